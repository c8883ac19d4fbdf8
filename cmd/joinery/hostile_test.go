package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/joinery-cae/joinery/joints/pipeline"
	"github.com/joinery-cae/joinery/writers/document"
)

// smallMesh is the shared "small" fixture in the native format
// (testdata/formats/README.md): four 1 mm quads of part 10 at z = 0 and a
// 1.5 mm triangle of part 20 at z = 2.5 above the corner at the origin.
const smallMesh = "../../testdata/native/small.jmesh"

// hostileDir returns a directory holding m.jmesh (the small fixture) and
// w.csv, one weld between its two parts.
func hostileDir(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	mesh, err := os.ReadFile(smallMesh)
	if err != nil {
		t.Fatal(err)
	}
	writeFile(t, dir, "m.jmesh", string(mesh))
	writeFile(t, dir, "w.csv", "id,x,y,z\nW1,3,3,1.25\n")
	return dir
}

func writeFile(t *testing.T, dir, name, content string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// runCLIWithin runs a command line like runCLI, failing the test when it
// takes longer than limit (a reader blocked on a pipe would hang for ever).
func runCLIWithin(t *testing.T, limit time.Duration, args ...string) (int, string, string) {
	t.Helper()
	type result struct {
		code     int
		out, err string
	}
	done := make(chan result, 1)
	go func() {
		code, out, errs := runCLI(t, args...)
		done <- result{code, out, errs}
	}()
	select {
	case r := <-done:
		return r.code, r.out, r.err
	case <-time.After(limit):
		t.Fatalf("%s: still running after %v", strings.Join(args, " "), limit)
	}
	return 0, "", ""
}

func TestHostileBaseline(t *testing.T) {
	dir := hostileDir(t)
	code, _, errs := runCLI(t, "build", "-m", filepath.Join(dir, "m.jmesh"), "-j", filepath.Join(dir, "w.csv"), "-o", filepath.Join(dir, "out"), "--quiet")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
}

// buildIn runs build with the given flags from the fixture directory's
// files and returns the exit status, stderr and whether outputs exist.
func buildIn(t *testing.T, dir string, args ...string) (int, string, bool) {
	t.Helper()
	out := filepath.Join(dir, "out")
	code, _, errs := runCLI(t, append([]string{"build", "-o", out, "--quiet"}, args...)...)
	_, err := os.Stat(out)
	return code, errs, err == nil
}

// Text that is not UTF-8 is an input error at its line: two ids that
// differ only in such bytes (W\xff1, W\xfe1) would both be written as
// "W\ufffd1" (issue). Also free-tag values, groups and part names.
func TestNotUTF8Refused(t *testing.T) {
	for _, c := range []struct {
		name, file, content, want string
	}{
		{"joint ids", "w.csv", "id,x,y,z\nW\xff1,3,3,1.25\nW\xfe1,4,4,1.25\n", "w.csv:2: joint id \"W\\xff1\" is not valid UTF-8"},
		{"group", "w.csv", "id,x,y,z,group\nW1,3,3,1.25,g\xff\n", "w.csv:2: joint \"W1\": group \"g\\xff\" is not valid UTF-8"},
		{"tag value", "w.csv", "id,x,y,z,station\nW1,3,3,1.25,S\xfe\n", "w.csv:2: joint \"W1\": tag \"station\" = \"S\\xfe\" is not valid UTF-8"},
		{"yaml joint list", "w.yaml", "joints:\n  - {id: W1, point: [3, 3, 1.25]}\n  - {id: W\xff2, point: [4, 4, 1.25]}\n", "w.yaml:3: not valid UTF-8 text"},
		{"parts csv name", "p.csv", "id,thickness,name\n10,1,floor\n20,1.5,br\xe9cket\n", "p.csv:3: name: \"br\\xe9cket\" is not valid UTF-8"},
		{"parts yaml", "p.yaml", "parts:\n  - {id: 10, thickness: 1}\n  - {id: 20, thickness: 1.5, material: S\xff}\n", "p.yaml:3: not valid UTF-8 text"},
	} {
		t.Run(c.name, func(t *testing.T) {
			dir := hostileDir(t)
			p := writeFile(t, dir, c.file, c.content)
			args := []string{"-m", filepath.Join(dir, "m.jmesh"), "-j", p}
			if strings.HasPrefix(c.file, "p.") {
				args = []string{"-m", filepath.Join(dir, "m.jmesh"), "-j", filepath.Join(dir, "w.csv"), "-p", p}
			}
			code, errs, wrote := buildIn(t, dir, args...)
			if code != exitBadInput || !strings.Contains(errs, c.want) || wrote {
				t.Errorf("exit %d, outputs %v, stderr %q; want exit 2 and %q", code, wrote, errs, c.want)
			}
		})
	}
}

// The same file under two spellings is refused like the same spelling
// twice (issue: -m m.jmesh -m $PWD/m.jmesh --renumber was accepted and
// half the sheets got nothing).
func TestSameFileTwice(t *testing.T) {
	dir := hostileDir(t)
	rel, err := filepath.Rel(mustGetwd(t), filepath.Join(dir, "m.jmesh"))
	if err != nil {
		t.Skip(err)
	}
	abs := filepath.Join(dir, "m.jmesh")
	dotted := filepath.Join(dir, ".", "sub", "..") + string(filepath.Separator) + "m.jmesh"
	os.Mkdir(filepath.Join(dir, "sub"), 0o755)
	link := filepath.Join(dir, "link.jmesh")
	hasLink := os.Symlink("m.jmesh", link) == nil
	joints := filepath.Join(dir, "w.csv")
	cases := [][]string{
		{"-m", rel, "-m", abs, "--renumber", "-j", joints},
		{"-m", abs, "-m", dotted, "--renumber", "-j", joints},
		{"-m", abs, "-j", joints, "-j", dotted[:len(dotted)-len("m.jmesh")] + "w.csv"},
	}
	if hasLink {
		cases = append(cases, []string{"-m", abs, "-m", link, "--renumber", "-j", joints})
	}
	for _, args := range cases {
		code, errs, wrote := buildIn(t, dir, args...)
		if code != exitBadInput || !strings.Contains(errs, "given twice") || wrote {
			t.Errorf("%v: exit %d, outputs %v, stderr %q; want exit 2, given twice", args, code, wrote, errs)
		}
	}
}

func mustGetwd(t *testing.T) string {
	t.Helper()
	wd, err := os.Getwd()
	if err != nil {
		t.Fatal(err)
	}
	return wd
}

// twoPlates returns a native mesh of two parallel plates of 6 x 6 quads,
// 5 mm apart from their neighbours and 1 mm apart in z (part 1: 1 mm at
// z = 0, part 2: 1 mm at z = 1), with the shell records in the order perm
// gives (nil: in id order).
func twoPlates(perm []int) string {
	var b strings.Builder
	b.WriteString("joinery-mesh 1\npart 1 thickness=1\npart 2 thickness=1\n")
	const n = 6
	for p := range 2 {
		for j := 0; j <= n; j++ {
			for i := 0; i <= n; i++ {
				fmt.Fprintf(&b, "node %d %d %d %d\n", 1000*(p+1)+j*(n+1)+i+1, 5*i, 5*j, p)
			}
		}
	}
	var shells []string
	for p := range 2 {
		for j := range n {
			for i := range n {
				a := 1000*(p+1) + j*(n+1) + i + 1
				shells = append(shells, fmt.Sprintf("shell %d %d %d %d %d %d\n", 1000*(p+1)+j*n+i+1, p+1, a, a+1, a+n+2, a+n+1))
			}
		}
	}
	for k := range shells {
		if perm != nil {
			k = perm[k]
		}
		b.WriteString(shells[k])
	}
	return b.String()
}

// A weld exactly on a node or an edge shared by several elements is as
// near to each: the lower element id takes it, whatever the order of the
// elements in the file (issue: shuffling element lines changed 4 of 5
// connectors).
func TestSharedNodeAndEdgeTiesByElementID(t *testing.T) {
	// On shared nodes, on shared edges, inside an element.
	welds := "id,x,y,z\nN1,10,10,0.5\nN2,15,20,0.5\nE1,12.5,10,0.5\nE2,20,17.5,0.5\nI1,11,12,0.5\n"
	var first []document.ConnectorDoc
	rng := rand.New(rand.NewPCG(7, 7))
	for run := range 4 {
		var perm []int
		if run > 0 {
			perm = rng.Perm(72)
		}
		dir := t.TempDir()
		writeFile(t, dir, "m.jmesh", twoPlates(perm))
		writeFile(t, dir, "w.csv", welds)
		out := filepath.Join(dir, "out")
		// Interpolated ends: the host element gives the nodes and weights.
		code, _, errs := runCLI(t, "build", "-m", filepath.Join(dir, "m.jmesh"), "-j", filepath.Join(dir, "w.csv"), "-o", out, "--quiet")
		if code != exitOK && code != exitFindings {
			t.Fatalf("exit %d: %s", code, errs)
		}
		doc := readConnectors(t, filepath.Join(out, "connectors.json"))
		if first == nil {
			first = doc.Connectors
			for _, c := range first {
				if len(c.Sheets) != 2 {
					t.Fatalf("weld %s: %d sheets", c.ID, len(c.Sheets))
				}
			}
			// The lowest-id element touching each point (ids as twoPlates
			// numbers them: 1000*part + 6*row + column + 1).
			for id, want := range map[string]int64{"N1": 1008, "N2": 1021, "E1": 1009, "E2": 1022, "I1": 1015} {
				for _, c := range first {
					if c.ID == id && c.Sheets[0].Element != want && c.Sheets[1].Element != want {
						t.Errorf("weld %s: hosts %d and %d, want %d on part 1", id, c.Sheets[0].Element, c.Sheets[1].Element, want)
					}
				}
			}
			continue
		}
		a, _ := json.Marshal(first)
		b, _ := json.Marshal(doc.Connectors)
		if !bytes.Equal(a, b) {
			t.Errorf("shuffled shells (run %d) changed the connectors:\n%s\n%s", run, b, a)
		}
	}
}

// fixture returns the text of a shared test file.
func fixture(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("../../testdata", path))
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// hostileCase is one bad input: files to write over the fixture
// directory's (m.jmesh, w.csv), the flags of the run, and what stderr
// must say.
type hostileCase struct {
	name  string
	files map[string]string
	args  []string // after the default -m m.jmesh -j w.csv unless they give -m
	want  string
}

// runHostile runs each case: exit 2, the message on stderr, a short
// stderr, nothing written.
func runHostile(t *testing.T, cases []hostileCase) {
	t.Helper()
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := hostileDir(t)
			for name, content := range c.files {
				writeFile(t, dir, name, content)
			}
			var args []string
			if !slices.Contains(c.args, "-m") && !slices.Contains(c.args, "job.yaml") {
				args = append(args, "-m", "m.jmesh", "-j", "w.csv")
			}
			args = append(args, c.args...)
			for i, a := range args {
				if _, err := os.Stat(filepath.Join(dir, a)); err == nil && !strings.HasPrefix(a, "-") {
					args[i] = filepath.Join(dir, a)
				}
			}
			code, errs, wrote := buildIn(t, dir, args...)
			if code != exitBadInput || !strings.Contains(errs, c.want) || wrote {
				t.Errorf("exit %d, outputs %v, stderr %q; want exit 2 and %q", code, wrote, errs, c.want)
			}
			if len(errs) > 400 {
				t.Errorf("stderr is %d bytes long", len(errs))
			}
		})
	}
}

// Values no sheet-metal model can have are input errors at their line,
// in every input that gives them (issue: a thickness or a nugget of 1e300
// passed and printed 300-digit numbers; a 1000 mm nugget in patch mode
// wrote a 200 MB connectors.json). Option values too.
func TestImplausibleValuesRefused(t *testing.T) {
	mesh := fixture(t, "native/small.jmesh")
	vtkMesh := fixture(t, "formats/small_ascii.vtk")
	vtuMesh := fixture(t, "formats/small_ascii.vtu")
	runHostile(t, []hostileCase{
		{"parts yaml thickness", map[string]string{"p.yaml": "parts:\n  - {id: 10, thickness: 1}\n  - {id: 20, thickness: 1e300}\n"}, []string{"-p", "p.yaml"},
			"p.yaml:3: thickness: thickness 1e+300 mm is more than 100 mm"},
		{"parts csv thickness", map[string]string{"p.csv": "id,thickness\n10,1\n20,150\n"}, []string{"-p", "p.csv"},
			"p.csv:3: thickness: thickness 150 mm is more than 100 mm"},
		{"native part thickness", map[string]string{"m.jmesh": strings.Replace(mesh, "part 20 thickness=1.5", "part 20 thickness=1e300", 1)}, nil,
			"m.jmesh:5: part 20: thickness 1e+300 mm is more than 100 mm"},
		{"native coordinate", map[string]string{"m.jmesh": strings.Replace(mesh, "node 102 10.5 0 0", "node 102 1e300 0 0", 1)}, nil,
			"m.jmesh:8: node 102: coordinate 1e+300 mm lies more than 10 km from the origin"},
		{"vtk thickness", map[string]string{"m.vtk": strings.Replace(vtkMesh, "1 1 1 1 1.5 1.5", "1 1 1 1 120 1.5", 1)}, []string{"-m", "m.vtk", "-j", "w.csv"},
			"m.vtk:38: cell 4: thickness 120 mm is more than 100 mm"},
		{"vtu thickness", map[string]string{"m.vtu": strings.Replace(vtuMesh, "1 1 1 1 1.5 1.5", "1 1 1 1 250 1.5", 1)}, []string{"-m", "m.vtu", "-j", "w.csv"},
			"m.vtu:18: cell 4: thickness 250 mm is more than 100 mm"},
		{"joint nugget", map[string]string{"w.csv": "id,x,y,z,diameter\nW1,3,3,1.25,1e300\n"}, nil,
			"w.csv:2: spot weld \"W1\": nugget diameter 1e+300"},
		{"patch nugget of a metre", map[string]string{"w.csv": "id,x,y,z,diameter\nW1,3,3,1.25,1000\n"}, []string{"--attach", "patch"},
			"w.csv:2: spot weld \"W1\": nugget diameter 1000 mm is more than 50 mm"},
		{"joint coordinate", map[string]string{"w.csv": "id,x,y,z\nW1,3,3e12,1.25\n"}, nil,
			"w.csv:2: joint \"W1\": coordinate 3e+12 mm lies more than 10 km from the origin"},
		{"bolt washer", map[string]string{"w.csv": "id,x,y,z,kind,diameter,washer,hole\nB1,3,3,1.25,bolt,10,1e6,11\n"}, nil,
			"w.csv:2: bolt \"B1\": washer 1000000 mm is more than 200 mm"},
		{"reach flag", nil, []string{"--reach", "1e300"}, "reach 1e+300 mm: more than the 1000 mm"},
		{"gap allowance flag", nil, []string{"--gap-allowance", "1e300"}, "gap allowance 1e+300 mm: more than the 100 mm"},
		{"reach in the job", map[string]string{"job.yaml": "version: 1\nmeshes: [m.jmesh]\njoints: [w.csv]\nbuild:\n  reach: 1e300\n"}, []string{"job.yaml", "-m", "m.jmesh"},
			"job.yaml:5: reach: 1e+300 mm is more than the 1000 mm"},
	})
}

// A huge garbage field is echoed as a short excerpt, whatever the input
// (issue: a 10 MB token gave a 10 MB stderr line in the native reader,
// in a CSV kind and in a parts table's surface).
func TestLongFieldsEchoedShort(t *testing.T) {
	huge := strings.Repeat("x", 10<<20)
	mesh := fixture(t, "native/small.jmesh")
	vtkMesh := fixture(t, "formats/small_ascii.vtk")
	vtuMesh := fixture(t, "formats/small_ascii.vtu")
	runHostile(t, []hostileCase{
		{"native record", map[string]string{"m.jmesh": mesh + huge + "\n"}, nil, `unknown record "xxxxxxxx`},
		{"native coordinate", map[string]string{"m.jmesh": strings.Replace(mesh, "node 102 10.5 0 0", "node 102 "+huge+" 0 0", 1)}, nil, `x coordinate "xxxx`},
		{"native part key", map[string]string{"m.jmesh": strings.Replace(mesh, "part 20 thickness=1.5", "part 20 thickness=1.5 "+huge+"=1", 1)}, nil, `unknown key "xxxx`},
		{"csv kind", map[string]string{"w.csv": "id,x,y,z,kind\nW1,3,3,1.25," + huge + "\n"}, nil, `unknown joint kind "xxxx`},
		{"csv number", map[string]string{"w.csv": "id,x,y,z\nW1,3," + huge + ",1.25\n"}, nil, `y: "xxxx`},
		{"csv parts", map[string]string{"w.csv": "id,x,y,z,parts\nW1,3,3,1.25," + huge + "\n"}, nil, `parts: "xxxx`},
		{"joint id", map[string]string{"w.csv": "id,x,y,z\n" + huge + ",3,3,1.25\n"}, nil, `more than the 256 a joint id may have`},
		{"parts yaml surface", map[string]string{"p.yaml": "parts:\n  - {id: 10, thickness: 1, surface: " + huge + "}\n"}, []string{"-p", "p.yaml"}, `unknown reference surface "xxxx`},
		{"parts yaml key", map[string]string{"p.yaml": "parts:\n  - {id: 10, thickness: 1, " + huge + ": 1}\n"}, []string{"-p", "p.yaml"}, `p.yaml:1: YAML: did not find expected`},
		{"parts csv mesh", map[string]string{"p.csv": "id,thickness,mesh\n10,1,a/" + huge + "\n"}, []string{"-p", "p.csv"}, `is not a file base name`},
		{"vtk keyword", map[string]string{"m.vtk": strings.Replace(vtkMesh, "SCALARS thickness float 1", huge, 1)}, []string{"-m", "m.vtk", "-j", "w.csv"}, `unknown keyword "xxxx`},
		{"vtu array name", map[string]string{"m.vtu": strings.Replace(vtuMesh, `Name="thickness" format="ascii"`, `Name="`+huge+`" format="zz"`, 1)}, []string{"-m", "m.vtu", "-j", "w.csv"}, `unknown format "zz"`},
		// A job file is at most pipeline.MaxJobFileBytes: a field just
		// under that is echoed short, a larger file refused by its size.
		{"job attach", map[string]string{"job.yaml": "version: 1\nmeshes: [m.jmesh]\njoints: [w.csv]\nbuild:\n  attach: " + huge[:pipeline.MaxJobFileBytes-100] + "\n"}, []string{"job.yaml"}, `unknown attachment "xxxx`},
		{"job too large", map[string]string{"job.yaml": "version: 1\nmeshes: [m.jmesh]\njoints: [w.csv]\nbuild:\n  attach: " + huge + "\n"}, []string{"job.yaml"}, `larger than 1048576 bytes: not a job file`},
	})
}

// The small inconsistencies the issue lists, each with a message that
// names its file (and line).
func TestMinorInputProblems(t *testing.T) {
	mesh := fixture(t, "native/small.jmesh")
	vtuData, _ := appendedVTU(t)
	runHostile(t, []hostileCase{
		// An empty YAML list file is refused as an empty CSV file is.
		{"empty yaml joint list", map[string]string{"w.yaml": ""}, []string{"-m", "m.jmesh", "-j", "w.yaml"}, "w.yaml: empty file"},
		{"empty csv joint list", map[string]string{"w.csv": ""}, nil, "w.csv: empty table"},
		// A header-only mesh is bad input, not a build of nothing.
		{"header-only jmesh", map[string]string{"m.jmesh": "joinery-mesh 1\n"}, nil, "m.jmesh: no triangles or quads"},
		{"parts without thickness", map[string]string{"m.jmesh": strings.Replace(mesh, "part 20 thickness=1.5\n", "", 1)}, nil,
			"m.jmesh: parts without a thickness: 20 (in "},
		{"id start in the job", map[string]string{"job.yaml": "version: 1\nmeshes: [m.jmesh]\njoints: [w.csv]\nbuild:\n  id_start: 5\n"}, []string{"job.yaml"},
			"job.yaml:5: id_start: 5 would collide with mesh ids (the largest is 2001)"},
		{"id start flag", nil, []string{"--id-start", "5"}, "--id-start 5 would collide with mesh ids (the largest is 2001)"},
		{"vtu without </VTKFile>", map[string]string{"m.vtu": strings.TrimSuffix(strings.TrimSpace(vtuData), "</VTKFile>")}, []string{"-m", "m.vtu", "-j", "w.csv"},
			"does not end with </AppendedData> and </VTKFile>"},
	})
	// A declared list without joints reads as empty, with a warning.
	dir := hostileDir(t)
	writeFile(t, dir, "w.yaml", "joints: []\n")
	writeFile(t, dir, "h.csv", "id,x,y,z\n")
	for _, list := range []string{"w.yaml", "h.csv"} {
		code, _, errs := runCLI(t, "build", "-m", filepath.Join(dir, "m.jmesh"), "-j", filepath.Join(dir, list), "-o", filepath.Join(dir, "out-"+list))
		if code != exitOK || !strings.Contains(errs, list+": the list holds no joints") {
			t.Errorf("%s: exit %d, stderr %q", list, code, errs)
		}
	}
}

// appendedVTU returns the small fixture as a .vtu file with appended raw
// data, as VTK writes it.
func appendedVTU(t *testing.T) (string, string) {
	t.Helper()
	p := "vtu/vtk9_appended_raw_lzma.vtu"
	return fixture(t, p), p
}
