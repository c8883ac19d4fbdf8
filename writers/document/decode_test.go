package document

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

// seedConnectors is a connectors document for the 4 x 4 grid of
// geomtest.Grid (node ids 1 to 25, element ids 1 to 16, part 1): one
// interpolated end on element 6 and one node-pair end, one link.
const seedConnectors = `{
  "schema": "joinery/connectors",
  "version": 2,
  "connectors": [
    {"id":"W1","kind":"spot","state":"built","point":[1.5,1.5,0],"axis":[0,0,1],"diameter":5,"attach":"interpolated","dofs":["tx","ty","tz"],
     "sheets":[{"part":1,"element":6,"point":[1.5,1.5,0],"distance":0,"thickness":1,"position":0,"lateral":0,"edge_distance":null,"end_node":100,"end_point":[1.5,1.5,0],"nodes":[7,8,13,12],"weights":[0.25,0.25,0.25,0.25]},
               {"part":1,"element":7,"point":[2,1,0],"distance":0,"thickness":1,"position":0,"lateral":0,"edge_distance":1,"end_node":null,"end_point":[2,1,0],"nodes":[8],"weights":[1]}],
     "links":[{"id":101,"from":0,"to":1,"start":[1.5,1.5,0],"end":[2,1,0],"length":0.7,"direction":[0.7,-0.7,0],"contact_gap":1,"mid_gap":0}],
     "findings":[]},
    {"id":"W2","kind":"spot","state":"not-built","point":[0,0,0],"axis":null,"diameter":null,"attach":"node-pair","dofs":[],"sheets":[],"links":[],"findings":["no-sheet"]}
  ]
}`

func TestToConnectors(t *testing.T) {
	m := geomtest.Grid(geomtest.GridSpec{NX: 4, NY: 4})
	doc, err := DecodeConnectors(strings.NewReader(seedConnectors), "c.json")
	if err != nil {
		t.Fatal(err)
	}
	cs, err := doc.ToConnectors(m, "c.json")
	if err != nil {
		t.Fatal(err)
	}
	c := cs[0]
	if len(c.Ends) != 2 || c.Ends[0].NodeIndex != -1 || c.EndIDs[0] != 100 || c.Ends[1].NodeIndex != 7 || len(c.Links) != 1 || c.DOFs.String() != "tx,ty,tz" {
		t.Errorf("%+v", c)
	}
	if doc.ConnectorLine(0) != 5 || doc.ConnectorLine(1) != 10 {
		t.Errorf("lines %d %d, want 5 and 10", doc.ConnectorLine(0), doc.ConnectorLine(1))
	}
	pairs, ok := doc.Connectors[0].NodePairs()
	if ok || pairs != nil {
		t.Errorf("an interpolated connector has no node pairs: %v", pairs)
	}
	// A node the mesh lacks: an input error at the connector's line.
	bad := strings.Replace(seedConnectors, `"nodes":[8]`, `"nodes":[99]`, 1)
	doc, _ = DecodeConnectors(strings.NewReader(bad), "c.json")
	if _, err := doc.ToConnectors(m, "c.json"); err == nil || !strings.HasPrefix(err.Error(), `c.json:5: connector "W1": sheet 1: node 99 is not in the mesh`) {
		t.Errorf("%v", err)
	}
	// An axis that is not a unit vector (a hand-edited file): gaps square
	// to the sheets take cosines against it, so it is refused; Joinery's
	// own axes, written to 15 significant digits, pass.
	for _, tc := range []struct{ axis, want string }{
		{"[0,0,2]", `c.json:5: connector "W1": axis [0, 0, 2] is not a unit vector (length 2)`},
		{"[0.6,0.8,1e-4]", `c.json:5: connector "W1": axis [0.6, 0.8, 0.0001] is not a unit vector`}, // length 1 + 5e-9
		{"[0.6,0.8,0]", ""},
		{"[0.577350269189626,0.577350269189626,0.577350269189626]", ""},
	} {
		doc, err := DecodeConnectors(strings.NewReader(strings.Replace(seedConnectors, `"axis":[0,0,1]`, `"axis":`+tc.axis, 1)), "c.json")
		if err != nil {
			t.Fatal(err)
		}
		_, err = doc.ToConnectors(m, "c.json")
		switch {
		case tc.want == "" && err != nil:
			t.Errorf("axis %s: %v", tc.axis, err)
		case tc.want != "" && (err == nil || !strings.HasPrefix(err.Error(), tc.want)):
			t.Errorf("axis %s: %v, want %s", tc.axis, err, tc.want)
		}
	}
}

// FuzzDecodeConnectors checks that no document makes the decoder, the
// conversion or the line finder panic, and that their errors are input
// errors.
func FuzzDecodeConnectors(f *testing.F) {
	f.Add([]byte(seedConnectors))
	if b, err := os.ReadFile(filepath.Join("..", "..", "cmd", "joinery", "testdata", "golden", "build-connectors.json")); err == nil {
		f.Add(b)
	}
	m := geomtest.Grid(geomtest.GridSpec{NX: 4, NY: 4})
	f.Fuzz(func(t *testing.T, data []byte) {
		doc, err := DecodeConnectors(bytes.NewReader(data), "f.json")
		if err != nil {
			if !errors.Is(err, geom.ErrInput) {
				t.Fatalf("not an input error: %v", err)
			}
			return
		}
		for i := range doc.Connectors {
			doc.ConnectorLine(i)
			doc.Connectors[i].NodePairs()
		}
		if _, err := doc.ToConnectors(m, "f.json"); err != nil && !errors.Is(err, geom.ErrInput) {
			t.Fatalf("not an input error: %v", err)
		}
	})
}

// TestToConnectorsParts: a sheet's part, its element's part and the
// parts of the nodes its end ties must agree, or the document does not
// say what it ties (the checks take the sheet's part as stated). The 4 x
// 4 grid has part 1 on x < 2 and part 2 on x > 2; the nodes at x = 2
// (ids 3, 8, 13, ...) lie on both.
func TestToConnectorsParts(t *testing.T) {
	m := geomtest.Grid(geomtest.GridSpec{NX: 4, NY: 4, Parts: []geom.Part{{ID: 1}, {ID: 2}},
		Part: func(i, j int) int32 {
			if i < 2 {
				return 0
			}
			return 1
		}})
	// Sheet 0 on part 1, element 6 (quad (1, 1), nodes 7, 8, 13, 12);
	// sheet 1 on part 2, element 7 (quad (2, 1), nodes 8, 9, 14, 13).
	doc := func(part0, elem0, nodes1 string) string {
		return `{"schema":"joinery/connectors","version":2,"connectors":[
{"id":"W1","kind":"spot","state":"built","point":[2,1.5,0],"axis":[0,0,1],"diameter":5,"attach":"interpolated","dofs":["tx","ty","tz"],
 "sheets":[{"part":` + part0 + `,"element":` + elem0 + `,"point":[1.5,1.5,0],"distance":0,"thickness":1,"position":0,"lateral":0,"edge_distance":null,"end_node":100,"end_point":[1.5,1.5,0],"nodes":[7,8,13,12],"weights":[0.25,0.25,0.25,0.25]},
           {"part":2,"element":7,"point":[2.5,1.5,0],"distance":0,"thickness":1,"position":1,"lateral":0,"edge_distance":null,"end_node":101,"end_point":[2.5,1.5,0],"nodes":` + nodes1 + `,"weights":[0.25,0.25,0.25,0.25]}],
 "links":[{"id":102,"from":0,"to":1,"start":[1.5,1.5,0],"end":[2.5,1.5,0],"length":1,"direction":[1,0,0],"contact_gap":1,"mid_gap":1}],
 "findings":[]}]}`
	}
	for _, c := range []struct {
		name                 string
		part0, elem0, nodes1 string
		want                 string // error prefix; "" for none
	}{
		{"agree", "1", "6", "[8,9,14,13]", ""},
		// Nodes 8 and 13 lie on both parts: an end of either may tie them.
		{"shared-nodes", "1", "6", "[8,3,14,13]", ""},
		{"element-on-other-part", "2", "6", "[8,9,14,13]", `c.json:2: connector "W1": sheet 0: element 6 lies on part 1, not on the sheet's part 2`},
		// The end on part 2 tied to part 1's nodes 7 and 12: it would tie
		// part 1 to itself.
		{"nodes-on-other-part", "1", "6", "[7,8,13,12]", `c.json:2: connector "W1": sheet 1: node 7, tied to the end on part 2, belongs to elements of part 1 only`},
	} {
		t.Run(c.name, func(t *testing.T) {
			d, err := DecodeConnectors(strings.NewReader(doc(c.part0, c.elem0, c.nodes1)), "c.json")
			if err != nil {
				t.Fatal(err)
			}
			_, err = d.ToConnectors(m, "c.json")
			switch {
			case c.want == "" && err != nil:
				t.Errorf("error %v, want none", err)
			case c.want != "" && (err == nil || !strings.HasPrefix(err.Error(), c.want) || !errors.Is(err, geom.ErrInput)):
				t.Errorf("error %v, want the input error %q", err, c.want)
			}
		})
	}
}

// TestToConnectorsSquareGap: a link's square_gap is taken as written;
// in a file written before the field it is worked out from the host
// elements' normals as build judged it (joints.SquareGap). The grid is
// tilted 40 degrees about y, so its normal lies 40 degrees off the
// document's axis z; sheets 1.5 and 3 mm in contact (2.25 mm apart
// square to them) lie 2.25 / cos 40 deg apart along the axis, since
// parallel planes d apart lie d / cos(theta) apart along a line at theta
// to their normal (plane geometry).
func TestToConnectorsSquareGap(t *testing.T) {
	s, c := math.Sincos(40 * math.Pi / 180)
	m := geomtest.Grid(geomtest.GridSpec{NX: 4, NY: 4, Node: func(i, j int) r3.Vec {
		return r3.Vec{X: float64(i) * c, Y: float64(j), Z: float64(i) * s}
	}})
	along := 2.25 / c
	doc := func(square string) string {
		return `{"schema":"joinery/connectors","version":2,"connectors":[
{"id":"W1","kind":"spot","state":"built","point":[1.5,1.5,0],"axis":[0,0,1],"diameter":5,"attach":"interpolated","dofs":["tx","ty","tz"],
 "sheets":[{"part":1,"element":6,"point":[1.5,1.5,0],"distance":0,"thickness":1.5,"position":0,"lateral":0,"edge_distance":null,"end_node":100,"end_point":[1.5,1.5,0],"nodes":[7,8,13,12],"weights":[0.25,0.25,0.25,0.25]},
           {"part":1,"element":7,"point":[2.5,1.5,0],"distance":0,"thickness":3,"position":` + strconv.FormatFloat(along, 'g', -1, 64) + `,"lateral":0,"edge_distance":null,"end_node":101,"end_point":[2.5,1.5,0],"nodes":[8,9,14,13],"weights":[0.25,0.25,0.25,0.25]}],
 "links":[{"id":102,"from":0,"to":1,"start":[1.5,1.5,0],"end":[2.5,1.5,0],"length":1,"direction":[1,0,0],"contact_gap":2.25,"mid_gap":` + strconv.FormatFloat(along, 'g', -1, 64) + square + `}],
 "findings":[]}]}`
	}
	for _, tc := range []struct {
		name, square string
		doc, conv    float64 // LinkDoc.Gap, the converted link's SquareGap
	}{
		{"written before square_gap", "", along, 2.25},
		{"square_gap given", `,"square_gap":2.5`, 2.5, 2.5},
	} {
		d, err := DecodeConnectors(strings.NewReader(doc(tc.square)), "c.json")
		if err != nil {
			t.Fatal(err)
		}
		if g := d.Connectors[0].Links[0].Gap(); math.Abs(g-tc.doc) > 1e-12 {
			t.Errorf("%s: document gap %.15g, want %.15g", tc.name, g, tc.doc)
		}
		cs, err := d.ToConnectors(m, "c.json")
		if err != nil {
			t.Fatal(err)
		}
		if l := cs[0].Links[0]; math.Abs(l.SquareGap-tc.conv) > 1e-12 || l.MidGap != along {
			t.Errorf("%s: link square gap %.15g, mid gap %.15g; want %.15g, %.15g", tc.name, l.SquareGap, l.MidGap, tc.conv, along)
		}
	}
}
