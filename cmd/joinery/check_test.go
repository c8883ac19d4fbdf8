package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/writers/document"
)

// benchModel writes a small invented model into dir: a base plate (part
// 1, 200 x 100 mm), a strip on it (part 2, 200 x 20 mm, both 1 mm, in
// contact, meshed alike with 5 mm quads so that nodes face each other)
// and a loose plate (part 3) far above. It returns the mesh, and the
// paths of the mesh and the parts table.
func benchModel(t *testing.T, dir string) (*geom.Mesh, string, string) {
	t.Helper()
	m := &geom.Mesh{ElemStart: []int32{0}, Sources: []geom.Source{{File: "bench"}}}
	add := func(part int64, x0, y0, z float64, nx, ny int) {
		m.Parts = append(m.Parts, geom.Part{ID: part, Thickness: 1})
		pi := int32(len(m.Parts) - 1)
		base := int32(len(m.Coords))
		for j := 0; j <= ny; j++ {
			for i := 0; i <= nx; i++ {
				m.NodeIDs = append(m.NodeIDs, part*10000+int64(len(m.Coords)-int(base))+1)
				m.Coords = append(m.Coords, r3.Vec{X: x0 + 5*float64(i), Y: y0 + 5*float64(j), Z: z})
			}
		}
		for j := 0; j < ny; j++ {
			for i := 0; i < nx; i++ {
				n0 := base + int32(j*(nx+1)+i)
				m.Conn = append(m.Conn, n0, n0+1, n0+int32(nx)+2, n0+int32(nx)+1)
				m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
				m.ElemIDs = append(m.ElemIDs, part*10000+int64(len(m.ElemIDs))+1)
				m.ElemPart = append(m.ElemPart, pi)
			}
		}
	}
	add(1, 0, 0, 0, 40, 20)
	add(2, 0, 40, 1, 40, 4)
	add(3, 0, 0, 80, 4, 4)
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := native.Write(&b, m); err != nil {
		t.Fatal(err)
	}
	mesh := filepath.Join(dir, "bench.jmesh")
	parts := filepath.Join(dir, "parts.yaml")
	write(t, mesh, b.String())
	write(t, parts, "parts:\n  - {id: 1, name: base plate, thickness: 1}\n  - {id: 2, name: strip, thickness: 1}\n  - {id: 3, name: loose plate, thickness: 1}\n")
	return m, mesh, parts
}

func write(t *testing.T, path, text string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// nodeID returns the id of part's node at (x, y) of benchModel.
func nodeID(t *testing.T, m *geom.Mesh, part int64, x, y float64) int64 {
	t.Helper()
	for n, c := range m.Coords {
		if m.NodeIDs[n]/10000 == part && c.X == x && c.Y == y {
			return m.NodeIDs[n]
		}
	}
	t.Fatalf("no node of part %d at (%g, %g)", part, x, y)
	return 0
}

// reportOf reads a report.json.
func reportOf(t *testing.T, dir string) *document.ReportDoc {
	t.Helper()
	return readReport(t, filepath.Join(dir, "report.json"))
}

// findingSet lists a report's findings as "code joints parts" lines.
func findingSet(doc *document.ReportDoc) []string {
	var out []string
	for _, f := range doc.Findings {
		out = append(out, fmt.Sprintf("%s %v %v", f.Code, f.Joints, f.Parts))
	}
	return out
}

// A node-pair list exported from a model, with planted defects: a strip
// held by one straight row of translation-only welds (a mechanism about
// the row), three welds on adjacent nodes (a seam), a weld defined twice
// (a duplicate) and a part with no weld (a free part).
func TestCheckNodePairList(t *testing.T) {
	dir := t.TempDir()
	m, mesh, parts := benchModel(t, dir)
	var csv strings.Builder
	csv.WriteString("# welds of an invented model, exported as node pairs\nid,node_a,node_b,dofs\n")
	row := func(id string, x float64) {
		fmt.Fprintf(&csv, "%s,%d,%d,tx+ty+tz\n", id, nodeID(t, m, 1, x, 50), nodeID(t, m, 2, x, 50))
	}
	for i, x := range []float64{20, 60, 100, 140} {
		row(fmt.Sprintf("S%d", i+1), x)
	}
	row("S5", 180)
	row("S6", 185)
	row("S7", 190)
	row("D1", 20)
	list := filepath.Join(dir, "welds.csv")
	write(t, list, csv.String())
	out := filepath.Join(dir, "audit")
	code, stdout, errs := runCLI(t, "check", "--mesh", mesh, "--parts", parts, "--connectors", list, "--out", out)
	if code != exitFindings {
		t.Fatalf("exit %d, want 1 (errors found): %s\n%s", code, errs, stdout)
	}
	validate(t, "report.schema.json", filepath.Join(out, "report.json"))
	doc := reportOf(t, out)
	want := []string{
		"seam [S5 S6 S7] [1 2]",
		"duplicate [D1 S1] [1 2]",
		"free-part [] [3]",
		"mechanism [D1 S1 S2 S3 S4 S5 S6 S7] [2 1]",
	}
	if got := findingSet(doc); !slices.Equal(got, want) {
		t.Errorf("findings\n%v\nwant\n%v", got, want)
	}
	for _, f := range doc.Findings {
		if f.Code == "mechanism" {
			if f.Motion == nil || f.Motion.Kind != "rotation" || f.Motion.Direction == nil || (*f.Motion.Direction)[0] != 1 || (*f.Motion.Point)[1] != 50 {
				t.Errorf("mechanism motion %+v, want a rotation about the row along x at y = 50", f.Motion)
			}
		}
	}
	if a := doc.Summary.Assembly; a == nil || a.Groups != 2 || a.RigidBodyModes != 13 || a.Mechanisms != 1 {
		t.Errorf("assembly %+v", a)
	}
	txt, err := os.ReadFile(filepath.Join(out, "report.txt"))
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range []string{"joinery check report", "parts 1 base plate, 2 strip", "S5 S6 S7", "motion: rotation x 1", "part 3 loose plate"} {
		if !strings.Contains(string(txt), s) {
			t.Errorf("report.txt lacks %q:\n%s", s, txt)
		}
	}
	// --fail-on never: exit 0; the same welds coupling all six degrees of
	// freedom hold the strip.
	six := strings.ReplaceAll(csv.String(), "tx+ty+tz", "tx+ty+tz+rx+ry+rz")
	write(t, list, six)
	code, _, errs = runCLI(t, "check", "--mesh", mesh, "--parts", parts, "--connectors", list, "--out", out, "--fail-on", "never", "--quiet")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, f := range findingSet(reportOf(t, out)) {
		if strings.HasPrefix(f, "mechanism") {
			t.Errorf("six degrees of freedom: %s", f)
		}
	}
}

// The same welds built as node pairs and read back from connectors.json,
// or exported as a node-pair list, give the same findings; build reports
// the mechanism and the free part on what it builds.
func TestCheckConnectorsJSONMatchesNodePairs(t *testing.T) {
	dir := t.TempDir()
	_, mesh, parts := benchModel(t, dir)
	var jl strings.Builder
	jl.WriteString("id,x,y,z\n")
	for i, x := range []float64{20, 60, 100, 140, 180, 185, 190} {
		fmt.Fprintf(&jl, "W%d,%g,50,0.5\n", i+1, x)
	}
	list := filepath.Join(dir, "welds.csv")
	write(t, list, jl.String())
	built := filepath.Join(dir, "built")
	code, _, errs := runCLI(t, "build", "--mesh", mesh, "--parts", parts, "--joints", list, "--attach", "node-pair", "--spot-dofs", "tx,ty,tz", "--out", built, "--quiet")
	if code != exitFindings {
		t.Fatalf("build: exit %d, want 1 (a mechanism): %s", code, errs)
	}
	fromBuild := findingSet(reportOf(t, built))
	for _, want := range []string{"mechanism [W1 W2 W3 W4 W5 W6 W7] [2 1]", "free-part [] [3]", "seam [W5 W6 W7] [1 2]"} {
		if !slices.Contains(fromBuild, want) {
			t.Errorf("build findings %v lack %q", fromBuild, want)
		}
	}
	// Export the node pairs of connectors.json as a list.
	cdoc := readConnectors(t, filepath.Join(built, "connectors.json"))
	var pairs strings.Builder
	pairs.WriteString("id,node_a,node_b,dofs\n")
	for _, c := range cdoc.Connectors {
		for _, l := range c.Links {
			fmt.Fprintf(&pairs, "%s,%d,%d,%s\n", c.ID, c.Sheets[l.From].Nodes[0], c.Sheets[l.To].Nodes[0], strings.Join(c.DOFs, "+"))
		}
	}
	csvPath := filepath.Join(dir, "pairs.csv")
	write(t, csvPath, pairs.String())
	var sets [][]string
	for _, in := range []string{filepath.Join(built, "connectors.json"), csvPath} {
		out := filepath.Join(dir, "check-"+filepath.Ext(in)[1:])
		if code, _, errs := runCLI(t, "check", "--mesh", mesh, "--parts", parts, "--connectors", in, "--out", out, "--quiet"); code != exitFindings {
			t.Fatalf("check %s: exit %d: %s", in, code, errs)
		}
		sets = append(sets, findingSet(reportOf(t, out)))
	}
	if !slices.Equal(sets[0], sets[1]) {
		t.Errorf("connectors.json gives\n%v\nthe node-pair list\n%v", sets[0], sets[1])
	}
	if !slices.Equal(sets[0], fromBuild) {
		t.Errorf("check gives\n%v\nbuild\n%v", sets[0], fromBuild)
	}
}

// check of the example's built connectors: the golden report.
func TestCheckExampleGolden(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	conns := filepath.Join("testdata", "golden", "build-connectors.json")
	code, out, errs := runCLI(t, "check", exampleJob, "--connectors", conns, "--out", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s\n%s", code, errs, out)
	}
	for _, name := range []string{"report.json", "report.txt"} {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		golden(t, "check-"+name, b)
	}
	validate(t, "report.schema.json", filepath.Join(dir, "report.json"))
	code, out, _ = runCLI(t, "check", exampleJob, "--connectors", conns, "--out", dir, "--json")
	var js map[string]any
	if code != exitOK || json.Unmarshal([]byte(out), &js) != nil || js["caution"] == nil {
		t.Errorf("--json: exit %d, %q", code, out)
	}
}

// Bad check inputs exit 2 and write nothing; node ids that the mesh
// lacks are named with file and line.
func TestCheckBadInput(t *testing.T) {
	dir := t.TempDir()
	m, mesh, parts := benchModel(t, dir)
	bad := filepath.Join(dir, "bad.csv")
	write(t, bad, fmt.Sprintf("id,node_a,node_b\nW1,%d,%d\nW2,%d,424242\n", nodeID(t, m, 1, 20, 50), nodeID(t, m, 2, 20, 50), nodeID(t, m, 1, 60, 50)))
	good := filepath.Join(dir, "good.csv")
	write(t, good, fmt.Sprintf("id,node_a,node_b\nW1,%d,%d\n", nodeID(t, m, 1, 20, 50), nodeID(t, m, 2, 20, 50)))
	other := filepath.Join(dir, "welds.txt")
	write(t, other, "id\n")
	out := filepath.Join(dir, "out")
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"check", "--mesh", mesh, "--parts", parts, "--connectors", bad, "--out", out}, "bad.csv:3: weld \"W2\": node 424242 is not in the mesh"},
		{[]string{"check", "--mesh", mesh, "--parts", parts, "--out", out}, "no connectors given"},
		{[]string{"check", "--mesh", mesh, "--parts", parts, "--connectors", other, "--out", out}, "unknown connector file type"},
		{[]string{"check", "--mesh", mesh, "--parts", parts, "--connectors", good, "--connectors", good, "--out", out}, "given twice"},
		{[]string{"check", "--connectors", bad, "--out", out}, "no mesh given"},
		{[]string{"check", "--mesh", mesh, "--connectors", bad, "--spot-dofs", "tx,tq", "--out", out}, "unknown degree of freedom"},
	} {
		code, _, errs := runCLI(t, tc.args...)
		if code != exitBadInput || !strings.Contains(errs, tc.want) {
			t.Errorf("%v: exit %d, %q; want 2 and %q", tc.args, code, errs, tc.want)
		}
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("output directory written on bad input")
	}
}

// check reads a build's output set whole: given the directory, or the
// connectors.json inside it; a set changed since it was written is
// refused; the check's own outputs form a set whose run id depends on
// the connectors read.
func TestCheckReadsOutputSets(t *testing.T) {
	dir := t.TempDir()
	_, mesh, parts, built := threeWelds(t, dir)
	var ids []string
	var sets [][]string
	for i, in := range []string{built, filepath.Join(built, "connectors.json")} {
		out := filepath.Join(dir, fmt.Sprint("check", i))
		if code, _, errs := runCLI(t, "check", "--mesh", mesh, "--parts", parts, "--connectors", in, "--out", out, "--quiet"); code != exitOK {
			t.Fatalf("check %s: exit %d: %s", in, code, errs)
		}
		doc := reportOf(t, out)
		ids = append(ids, doc.RunID)
		sets = append(sets, findingSet(doc))
	}
	if !slices.Equal(sets[0], sets[1]) || !slices.Equal(sets[0], []string{"free-part [] [3]"}) {
		t.Errorf("findings %v", sets)
	}
	if ids[0] == "" || ids[0] == ids[1] {
		// The recorded connector paths differ, so do the run ids.
		t.Errorf("run ids %v", ids)
	}
	// Change the set's connectors.json: refused.
	cj := filepath.Join(built, "connectors.json")
	raw, err := os.ReadFile(cj)
	if err != nil {
		t.Fatal(err)
	}
	// One file named twice under other spellings (the set's directory
	// and its connectors.json, a link to it) is refused as such, not
	// read twice into a clash of connector ids naming the directory as
	// a file and line.
	link := filepath.Join(dir, "link.json")
	if err := os.Symlink(cj, link); err != nil {
		t.Fatal(err)
	}
	for _, twice := range [][2]string{{built, cj}, {cj, link}, {cj, filepath.Join(built, ".", "connectors.json")}} {
		code, _, errs := runCLI(t, "check", "--mesh", mesh, "--parts", parts, "--connectors", twice[0], "--connectors", twice[1], "--out", filepath.Join(dir, "check2"))
		if want := "connector file given twice (as " + twice[0] + " too)"; code != exitBadInput || !strings.Contains(errs, want) {
			t.Errorf("%v: exit %d, %q; want 2 and %q", twice, code, errs, want)
		}
	}
	write(t, cj, strings.Replace(string(raw), `"W3"`, `"W9"`, 1))
	code, _, errs := runCLI(t, "check", "--mesh", mesh, "--parts", parts, "--connectors", built, "--out", filepath.Join(dir, "check9"))
	if code != exitBadInput || !strings.Contains(errs, "connectors.json") {
		t.Errorf("changed set: exit %d, %q", code, errs)
	}
}

// check judges the edge distance of the welds it reads as build does:
// a weld centre closer than one nugget diameter to a sheet's free edge
// is edge-close (common practice; README, build's codes). The strip of
// benchModel (part 2) spans y = 40 to 60; its welds join 1 mm sheets,
// nugget 5 sqrt(1) = 5 mm. Edge distances by hand calculation: a weld at
// y = 40 lies on the strip's edge (0 mm), at y = 45 5 mm from it (at the
// limit: it meets it), at y = 50 10 mm. The base plate (part 1, y = 0 to
// 100) is 40 mm or more from its edges everywhere here.
func TestCheckEdgeClose(t *testing.T) {
	dir := t.TempDir()
	m, mesh, parts := benchModel(t, dir)
	cases := []struct {
		name string
		y    float64
		want []string // edge-close findings, "code joints parts"
	}{
		{"on the strip's free edge (0 mm)", 40, []string{"edge-close [E1] [2]"}},
		{"one nugget diameter inside (5 mm, at the limit)", 45, nil},
		{"two nugget diameters inside (10 mm)", 50, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			// Node pairs exported from a model; three welds 80 mm apart,
			// one row of six-dof welds.
			var csv strings.Builder
			csv.WriteString("id,node_a,node_b\n")
			for i, x := range []float64{100, 20, 180} {
				y := 50.0
				if i == 0 {
					y = tc.y
				}
				fmt.Fprintf(&csv, "E%d,%d,%d\n", i+1, nodeID(t, m, 1, x, y), nodeID(t, m, 2, x, y))
			}
			list := filepath.Join(dir, "pairs.csv")
			write(t, list, csv.String())
			// The same welds built with interpolated ends and read back
			// from connectors.json.
			var jl strings.Builder
			jl.WriteString("id,x,y,z\n")
			fmt.Fprintf(&jl, "E1,100,%g,0.5\nE2,20,50,0.5\nE3,180,50,0.5\n", tc.y)
			joints := filepath.Join(dir, "welds.csv")
			write(t, joints, jl.String())
			built := filepath.Join(dir, "built")
			if code, _, errs := runCLI(t, "build", "--mesh", mesh, "--parts", parts, "--joints", joints, "--out", built, "--quiet", "--fail-on", "never"); code != exitOK {
				t.Fatalf("build: exit %d: %s", code, errs)
			}
			for _, in := range []string{list, filepath.Join(built, "connectors.json")} {
				out := filepath.Join(dir, "check")
				if code, _, errs := runCLI(t, "check", "--mesh", mesh, "--parts", parts, "--connectors", in, "--out", out, "--quiet", "--fail-on", "never"); code != exitOK {
					t.Fatalf("check %s: exit %d: %s", in, code, errs)
				}
				doc := reportOf(t, out)
				var got []string
				for _, f := range findingSet(doc) {
					if strings.HasPrefix(f, "edge-close") {
						got = append(got, f)
					}
				}
				if !slices.Equal(got, tc.want) {
					t.Errorf("check %s: edge-close findings %v, want %v", filepath.Base(in), got, tc.want)
				}
				flagged := 0
				if len(tc.want) > 0 {
					flagged = 1
				}
				if s := doc.Summary.ByState; s["flagged"] != flagged {
					t.Errorf("check %s: %d flagged, want %d (states %v)", filepath.Base(in), s["flagged"], flagged, s)
				}
			}
		})
	}
}

// A sweep's output directory holds no connectors.json of its own: check
// given it says where the connectors are, naming a variant's folder.
func TestCheckPointsIntoSweep(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	sw := filepath.Join(dir, "sw")
	if code, _, errs := runCLI(t, "sweep", exampleJob, "--vary", "attach=interpolated,patch", "--out", sw, "--quiet"); code != exitOK {
		t.Fatalf("sweep: exit %d: %s", code, errs)
	}
	code, _, errs := runCLI(t, "check", exampleJob, "--connectors", sw, "--out", filepath.Join(dir, "c"))
	if want := "name one of them, as " + filepath.Join(sw, "01-attach=interpolated"); code != exitBadInput || !strings.Contains(errs, want) {
		t.Errorf("exit %d, %q; want 2 and %q", code, errs, want)
	}
}

// A connector's new nodes (the ends it brings) need ids of their own: a
// connectors.json edited so that an end_node is a node of the mesh, or
// the new node of another connector, would have a solver tie what the
// document does not tie; check refuses it as an input error naming the
// file and line.
func TestCheckNewNodeClash(t *testing.T) {
	dir := t.TempDir()
	m, mesh, parts, built := threeWelds(t, dir)
	b, err := os.ReadFile(filepath.Join(built, "connectors.json"))
	if err != nil {
		t.Fatal(err)
	}
	re := regexp.MustCompile(`"end_node":\s*(\d+)`)
	ends := re.FindAllSubmatchIndex(b, -1)
	if len(ends) < 4 {
		t.Fatalf("%d end nodes in connectors.json", len(ends))
	}
	// with returns b with the k-th end_node's id replaced by id.
	with := func(k int, id string) []byte {
		e := ends[k]
		return slices.Concat(b[:e[2]], []byte(id), b[e[3]:])
	}
	first := string(b[ends[0][2]:ends[0][3]])
	for _, tc := range []struct {
		name string
		doc  []byte
		want string
	}{
		{"mesh-node.json", with(0, fmt.Sprint(nodeID(t, m, 1, 20, 50))), "is a node of the mesh"},
		{"twice.json", with(3, first), "is a new node of connector \"W1\" too"},
	} {
		path := filepath.Join(dir, tc.name)
		if err := os.WriteFile(path, tc.doc, 0o644); err != nil {
			t.Fatal(err)
		}
		out := filepath.Join(dir, "out-"+tc.name)
		code, _, errs := runCLI(t, "check", "--mesh", mesh, "--parts", parts, "--connectors", path, "--out", out)
		if code != exitBadInput || !strings.Contains(errs, tc.name+":") || !strings.Contains(errs, tc.want) {
			t.Errorf("%s: exit %d, %q; want 2, the file's line and %q", tc.name, code, errs, tc.want)
		}
		if _, err := os.Stat(out); !os.IsNotExist(err) {
			t.Errorf("%s: output directory written on bad input", tc.name)
		}
	}
}

// threeWelds writes the bench model and three welds on it into dir and
// builds them into dir/built, returning the model, its files and the
// output directory.
func threeWelds(t *testing.T, dir string) (m *geom.Mesh, mesh, parts, built string) {
	t.Helper()
	m, mesh, parts = benchModel(t, dir)
	list := filepath.Join(dir, "welds.csv")
	write(t, list, "id,x,y,z\nW1,20,50,0.5\nW2,60,50,0.5\nW3,100,45,0.5\n")
	built = filepath.Join(dir, "built")
	if code, _, errs := runCLI(t, "build", "--mesh", mesh, "--parts", parts, "--joints", list, "--out", built, "--quiet"); code != exitOK {
		t.Fatalf("build: exit %d: %s", code, errs)
	}
	return m, mesh, parts, built
}
