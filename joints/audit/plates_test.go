package audit

import (
	"bytes"
	"context"
	"fmt"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/spot"
)

// plate is a flat rectangular sheet at z = Z meshed with NX x NY square
// quads of size H from (X0, Y0).
type plate struct {
	Part   int64
	T      float64
	Z      float64
	X0, Y0 float64
	NX, NY int
	H      float64
}

// plates builds a mesh of plates; node and element ids of part p start
// at p*100000+1.
func plates(ps ...plate) *geom.Mesh {
	ss := make([]surface, len(ps))
	for k, p := range ps {
		ss[k] = surface{Part: p.Part, T: p.T, NU: p.NX, NV: p.NY, name: "plate", At: func(i, j int) r3.Vec {
			return r3.Vec{X: p.X0 + float64(i)*p.H, Y: p.Y0 + float64(j)*p.H, Z: p.Z}
		}}
	}
	return surfaces(ss...)
}

// nodeAt returns the id of part's node at (x, y).
func nodeAt(m *geom.Mesh, part int64, x, y float64) int64 {
	for n, c := range m.Coords {
		if m.NodeIDs[n]/100000 == part && c.X == x && c.Y == y {
			return m.NodeIDs[n]
		}
	}
	panic(fmt.Sprintf("no node of part %d at (%g, %g)", part, x, y))
}

// build makes the connectors of welds as a build does, with new ids.
func build(t *testing.T, m *geom.Mesh, welds []joints.Joint, o joints.BuildOptions) []joints.Connector {
	t.Helper()
	conns, err := spot.Build(context.Background(), geom.NewIndex(m), welds, o, nil)
	if err != nil {
		t.Fatal(err)
	}
	res, err := joints.NewResult(m, conns, nil, o.Defaults(joints.MaxThickness(m)))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range res.Connectors {
		if c.Status == joints.NotBuilt {
			t.Fatalf("weld %s not built: %v", c.Joint.ID, c.Findings)
		}
	}
	return res.Connectors
}

// audit runs the audit and fails on an error.
func audit(t *testing.T, m *geom.Mesh, conns []joints.Connector, extra []joints.Joint, o joints.BuildOptions) *Report {
	t.Helper()
	rep, err := Run(context.Background(), m, conns, extra, o, nil)
	if err != nil {
		t.Fatal(err)
	}
	return rep
}

// weldsAt returns spot welds W1, W2, ... at the points.
func weldsAt(pts ...r3.Vec) []joints.Joint {
	js := make([]joints.Joint, len(pts))
	for i, p := range pts {
		js[i] = joints.Joint{ID: fmt.Sprintf("W%d", i+1), Point: p}
	}
	return js
}

// nodePairCSV writes the node-pair list of node-pair connectors, as a
// model exported elsewhere would hold them.
func nodePairCSV(m *geom.Mesh, conns []joints.Connector) string {
	var b strings.Builder
	b.WriteString("id,node_a,node_b,dofs\n")
	for _, c := range conns {
		for _, l := range c.Links {
			fmt.Fprintf(&b, "%s,%d,%d,%s\n", c.Joint.ID, m.NodeIDs[c.Ends[l.From].NodeIndex], m.NodeIDs[c.Ends[l.To].NodeIndex], strings.Join(c.DOFs.Names(), "+"))
		}
	}
	return b.String()
}

// fromCSV reads a node-pair list and resolves it against m.
func fromCSV(t *testing.T, m *geom.Mesh, csv string, o joints.BuildOptions) []joints.Connector {
	t.Helper()
	welds, _, err := ReadNodePairs(bytes.NewReader([]byte(csv)), "welds.csv")
	if err != nil {
		t.Fatal(err)
	}
	conns, err := NodePairConnectors(m, welds, o)
	if err != nil {
		t.Fatal(err)
	}
	slices.SortStableFunc(conns, func(a, b joints.Connector) int { return joints.CompareIDs(a.Joint.ID, b.Joint.ID) })
	return conns
}

// summary lists findings as "code joints parts" lines, for comparison.
func summary(fs []joints.Finding) []string {
	var out []string
	for _, f := range fs {
		out = append(out, fmt.Sprintf("%s %v %v", f.Code, f.AllJoints(), f.Parts))
	}
	return out
}

func ofCode(fs []joints.Finding, code string) []joints.Finding {
	var out []joints.Finding
	for _, f := range fs {
		if f.Code == code {
			out = append(out, f)
		}
	}
	return out
}
