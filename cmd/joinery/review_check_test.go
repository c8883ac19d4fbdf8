package main

import (
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// reviewPlate is one part of reviewModel: nx x ny quads of 5 mm from
// (x0, y0) at height z, 1 mm thick; node (i, j) has id base+j*(nx+1)+i+1,
// element (i, j) id base+j*nx+i+1, whatever the part's id.
type reviewPlate struct {
	key        string // the part's name, which the test maps to its id
	x0, y0, z  float64
	nx, ny     int
	base       int64
	elemOffset int64
}

func reviewPlates() []reviewPlate {
	return []reviewPlate{
		{key: "base", nx: 40, ny: 20, base: 10000},                      // 200 x 100 mm
		{key: "strip", y0: 40, z: 1, nx: 40, ny: 4, base: 20000},        // 200 x 20 mm on it
		{key: "plate", x0: 20, y0: 5, z: 1, nx: 12, ny: 5, base: 30000}, // 60 x 25 mm on it
		{key: "loose", z: 80, nx: 4, ny: 4, base: 40000},                // far above
	}
}

// node returns the id of plate p's node at (x, y).
func (p reviewPlate) node(x, y float64) int64 {
	i, j := int((x-p.x0)/5+0.5), int((y-p.y0)/5+0.5)
	return p.base + int64(j*(p.nx+1)+i) + 1
}

// writeReviewModel writes reviewPlates into dir as a native mesh and a
// parts table with lengths in unit (mm per unit: scale), part ids from
// ids, the shell and node lines shuffled with seed (0: in order); and a
// node-pair list of planted welds. It returns the mesh, parts and list
// paths.
func writeReviewModel(t *testing.T, dir string, scale float64, ids map[string]int64, seed uint64) (string, string, string) {
	t.Helper()
	ps := reviewPlates()
	num := func(v float64) string { return strconv.FormatFloat(v/scale, 'g', -1, 64) }
	var nodes, shells []string
	var parts strings.Builder
	parts.WriteString("parts:\n")
	for _, p := range ps {
		id := ids[p.key]
		fmt.Fprintf(&parts, "  - {id: %d, name: %s, thickness: %s}\n", id, p.key, num(1))
		for j := 0; j <= p.ny; j++ {
			for i := 0; i <= p.nx; i++ {
				nodes = append(nodes, fmt.Sprintf("node %d %s %s %s", p.base+int64(j*(p.nx+1)+i)+1, num(p.x0+5*float64(i)), num(p.y0+5*float64(j)), num(p.z)))
			}
		}
		for j := 0; j < p.ny; j++ {
			for i := 0; i < p.nx; i++ {
				n0 := p.base + int64(j*(p.nx+1)+i) + 1
				shells = append(shells, fmt.Sprintf("shell %d %d %d %d %d %d", p.base+int64(j*p.nx+i)+1, id, n0, n0+1, n0+int64(p.nx)+2, n0+int64(p.nx)+1))
			}
		}
	}
	if seed != 0 {
		r := rand.New(rand.NewPCG(seed, 7))
		r.Shuffle(len(nodes), func(a, b int) { nodes[a], nodes[b] = nodes[b], nodes[a] })
		r.Shuffle(len(shells), func(a, b int) { shells[a], shells[b] = shells[b], shells[a] })
	}
	var mesh strings.Builder
	mesh.WriteString("joinery-mesh 1\n")
	for _, p := range ps {
		fmt.Fprintf(&mesh, "part %d thickness=%s\n", ids[p.key], num(1))
	}
	mesh.WriteString(strings.Join(nodes, "\n") + "\n" + strings.Join(shells, "\n") + "\n")
	meshPath, partsPath, listPath := filepath.Join(dir, "model.jmesh"), filepath.Join(dir, "parts.yaml"), filepath.Join(dir, "welds.csv")
	write(t, meshPath, mesh.String())
	write(t, partsPath, parts.String())
	write(t, listPath, reviewWelds(ps))
	return meshPath, partsPath, listPath
}

// reviewWelds is the node-pair list of the planted welds (translations
// only): S1-S4 one straight row along the strip at y = 50 (x = 20, 60,
// 100, 140), S5-S7 on neighbouring nodes (x = 180, 185, 190: a seam),
// D1 the node pair of S1 again; P1-P3 hold the plate, not on one line,
// P1 and P2 15 mm apart.
func reviewWelds(ps []reviewPlate) string {
	base, strip, plate := ps[0], ps[1], ps[2]
	var b strings.Builder
	b.WriteString("id,node_a,node_b,dofs\n")
	row := func(id string, top reviewPlate, x, y float64) {
		fmt.Fprintf(&b, "%s,%d,%d,tx+ty+tz\n", id, base.node(x, y), top.node(x, y))
	}
	for i, x := range []float64{20, 60, 100, 140, 180, 185, 190} {
		row(fmt.Sprintf("S%d", i+1), strip, x, 50)
	}
	row("D1", strip, 20, 50)
	row("P1", plate, 30, 15)
	row("P2", plate, 45, 15)
	row("P3", plate, 65, 20)
	return b.String()
}

// The planted welds' findings, by counting and the rules' tables: the
// seam S5-S7 (three welds on neighbouring nodes: no free node between);
// D1 and S1 on one node pair; P1 and P2 15 mm apart, below the minimum
// spacing of 18.452 mm for 1 mm sheets (resistance welding
// manufacturers' table, interpolated) and above the 5 mm nugget; the
// loose plate joined to nothing; the strip on one straight row of
// ball-joint welds (translations only) turns about it (classical
// rigid-body kinematics: ball joints on one line leave the turn about
// it), while three welds not on a line hold the plate. The same in mm,
// metres and inches (the rules apply in mm), with part ids renumbered
// and the file's lines shuffled.
func TestReviewCheckPlanted(t *testing.T) {
	want := func(id map[string]int64) []string {
		b, s, p, l := id["base"], id["strip"], id["plate"], id["loose"]
		pair := func(x, y int64) string { return fmt.Sprintf("[%d %d]", min(x, y), max(x, y)) }
		return []string{
			"seam [S5 S6 S7] " + pair(b, s),
			"duplicate [D1 S1] " + pair(b, s),
			"pitch-short [P1 P2] " + pair(b, p),
			fmt.Sprintf("free-part [] [%d]", l),
			fmt.Sprintf("mechanism [D1 S1 S2 S3 S4 S5 S6 S7] [%d %d]", s, b),
		}
	}
	ordered := map[string]int64{"base": 1, "strip": 2, "plate": 3, "loose": 4}
	renumbered := map[string]int64{"base": 40, "strip": 7, "plate": 13, "loose": 2}
	for _, tc := range []struct {
		name  string
		unit  string
		scale float64
		ids   map[string]int64
		seed  uint64
	}{
		{"mm", "mm", 1, ordered, 0},
		{"m", "m", 1000, ordered, 0},
		{"in", "in", 25.4, ordered, 0},
		{"renumbered and shuffled", "mm", 1, renumbered, 11},
		{"renumbered and shuffled, in", "in", 25.4, renumbered, 12},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			mesh, parts, list := writeReviewModel(t, dir, tc.scale, tc.ids, tc.seed)
			out := filepath.Join(dir, "check")
			code, _, errs := runCLI(t, "check", "--mesh", mesh, "--parts", parts, "--connectors", list, "--units", tc.unit, "--out", out, "--quiet")
			if code != exitFindings {
				t.Fatalf("exit %d, want 1: %s", code, errs)
			}
			validate(t, "report.schema.json", filepath.Join(out, "report.json"))
			doc := reportOf(t, out)
			if got, w := findingSet(doc), want(tc.ids); !slices.Equal(got, w) {
				t.Errorf("findings\n %v\nwant\n %v", got, w)
			}
			if a := doc.Summary.Assembly; a == nil || a.Groups != 2 || a.Mechanisms != 1 || a.RigidBodyModes != 13 || a.Unrestrained != 0 {
				t.Errorf("assembly %+v, want 2 groups, 1 mechanism motion, 13 rigid-body modes", a)
			}
		})
	}
}

// A two-part hinge renumbered: which part the report names as moving
// must follow the geometry, not the ids. The strip (200 x 20 mm) on one
// row of ball-joint welds turns against the base plate (200 x 100 mm)
// whichever has the lower id.
func TestReviewCheckHingeRenumbered(t *testing.T) {
	for _, ids := range []map[string]int64{
		{"base": 1, "strip": 2, "plate": 3, "loose": 4},
		{"base": 9, "strip": 3, "plate": 5, "loose": 4},
	} {
		dir := t.TempDir()
		mesh, parts, _ := writeReviewModel(t, dir, 1, ids, 0)
		ps := reviewPlates()
		list := filepath.Join(dir, "row.csv")
		var b strings.Builder
		b.WriteString("id,node_a,node_b,dofs\n")
		for i, x := range []float64{20, 60, 100, 140} {
			fmt.Fprintf(&b, "S%d,%d,%d,tx+ty+tz\n", i+1, ps[0].node(x, 50), ps[1].node(x, 50))
		}
		write(t, list, b.String())
		out := filepath.Join(dir, "check")
		code, _, errs := runCLI(t, "check", "--mesh", mesh, "--parts", parts, "--connectors", list, "--out", out, "--quiet", "--fail-on", "never")
		if code != exitOK {
			t.Fatalf("exit %d: %s", code, errs)
		}
		var mech []string
		for _, f := range findingSet(reportOf(t, out)) {
			if strings.HasPrefix(f, "mechanism") {
				mech = append(mech, f)
			}
		}
		if w := fmt.Sprintf("mechanism [S1 S2 S3 S4] [%d %d]", ids["strip"], ids["base"]); !slices.Equal(mech, []string{w}) {
			t.Errorf("ids %v: %v, want [%s]", ids, mech, w)
		}
	}
}
