package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/writers/document"
)

// Command-level tests of what a new user met: joint-list columns and
// delimiters, rejected sheets, ties between host elements, id ranges,
// progress, renumbering, and the exit statuses and cautions of the
// restructured commands.

// sheet is a flat rectangular sheet at height z, meshed with square
// elements of size h (quads, or each square split into two triangles),
// with node and element ids base+1, base+2, ...
type sheet struct {
	part   int64
	t, z   float64
	x0, y0 float64
	nx, ny int
	h      float64
	tri    bool
	base   int64
}

// jmesh returns the lines of a native mesh file holding the sheets, plus
// extra lines at the end.
func jmesh(sheets []sheet, extra ...string) []string {
	lines := []string{"joinery-mesh 1"}
	for _, s := range sheets {
		lines = append(lines, fmt.Sprintf("part %d thickness=%g", s.part, s.t))
	}
	for _, s := range sheets {
		for j := 0; j <= s.ny; j++ {
			for i := 0; i <= s.nx; i++ {
				lines = append(lines, fmt.Sprintf("node %d %g %g %g", s.base+int64(j*(s.nx+1)+i)+1, s.x0+float64(i)*s.h, s.y0+float64(j)*s.h, s.z))
			}
		}
	}
	for _, s := range sheets {
		id := s.base
		for j := 0; j < s.ny; j++ {
			for i := 0; i < s.nx; i++ {
				n0 := s.base + int64(j*(s.nx+1)+i) + 1
				n1, n2, n3 := n0+1, n0+int64(s.nx)+2, n0+int64(s.nx)+1
				if s.tri {
					id++
					lines = append(lines, fmt.Sprintf("shell %d %d %d %d %d", id, s.part, n0, n1, n2))
					id++
					lines = append(lines, fmt.Sprintf("shell %d %d %d %d %d", id, s.part, n0, n2, n3))
				} else {
					id++
					lines = append(lines, fmt.Sprintf("shell %d %d %d %d %d %d", id, s.part, n0, n1, n2, n3))
				}
			}
		}
	}
	return append(lines, extra...)
}

func writeLines(t *testing.T, path string, lines []string) string {
	t.Helper()
	if err := os.WriteFile(path, []byte(strings.Join(lines, "\n")+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func writeText(t *testing.T, path, text string) string {
	t.Helper()
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func readFile(t *testing.T, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// exampleWelds returns the header and rows of the example's joint list.
func exampleWelds(t *testing.T) [][]string {
	t.Helper()
	r := csv.NewReader(bytes.NewReader(readFile(t, filepath.Join(filepath.Dir(exampleJob), "welds.csv"))))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return recs
}

// writeCSV writes records with the given delimiter (encoding/csv quotes
// the fields that hold it).
func writeCSV(t *testing.T, path string, comma rune, recs [][]string) string {
	t.Helper()
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	w.Comma = comma
	if err := w.WriteAll(recs); err != nil {
		t.Fatal(err)
	}
	return writeText(t, path, b.String())
}

// withoutInputs returns a JSON document with its "inputs" member removed,
// re-encoded, so that builds from differently named files compare.
func withoutInputs(t *testing.T, b []byte) string {
	t.Helper()
	var doc map[string]any
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	delete(doc, "inputs")
	delete(doc, "run_id") // the inputs' hash: other inputs, another id
	out, err := json.Marshal(doc)
	if err != nil {
		t.Fatal(err)
	}
	return string(out)
}

// withoutRunID blanks the run id a document carries.
func withoutRunID(b []byte) []byte {
	return regexp.MustCompile(`"run_id": "[0-9a-f]{32}"`).ReplaceAll(b, []byte(`"run_id": ""`))
}

func TestBuildNearMissColumnIsAnError(t *testing.T) {
	// "diamter" would have been a tag, and the listed 6 mm nugget the
	// rule's: in CSV as in YAML it is an input error at its line with
	// the suggestion, and nothing is written.
	skipWithoutExample(t)
	dir := t.TempDir()
	recs := exampleWelds(t)
	for i, h := range recs[0] {
		if h == "diameter" {
			recs[0][i] = "diamter"
		}
	}
	lists := map[string]string{
		writeCSV(t, filepath.Join(dir, "welds.csv"), ',', recs):                                                       ":1: unknown column \"diamter\" (did you mean \"diameter\"?)",
		writeText(t, filepath.Join(dir, "welds.yaml"), "joints:\n  - id: W1\n    point: [0, 0, 0]\n    diamter: 6\n"): ":4: joint: unknown key \"diamter\" (did you mean \"diameter\"?)",
	}
	for list, want := range lists {
		out := filepath.Join(dir, "out")
		code, _, errs := runCLI(t, "build", exampleJob, "--joints", list, "--out", out)
		if code != exitBadInput || !strings.Contains(errs, list+want) {
			t.Errorf("%s: exit %d, stderr %q; want 2 and %q", filepath.Base(list), code, errs, list+want)
		}
		if _, err := os.Stat(out); !os.IsNotExist(err) {
			t.Errorf("%s: output written", filepath.Base(list))
		}
	}
}

func TestBuildTagColumnsListed(t *testing.T) {
	// Columns with names unlike the known ones stay tags: named on
	// stderr, in report.json's and connectors.json's inputs, in
	// report.txt, in the summary and in --json.
	skipWithoutExample(t)
	dir := t.TempDir()
	recs := exampleWelds(t)
	recs[0] = append(recs[0], "robot", "Station")
	for i := 1; i < len(recs); i++ {
		recs[i] = append(recs[i], "R2", "")
	}
	list := writeCSV(t, filepath.Join(dir, "welds.csv"), ',', recs)
	out := filepath.Join(dir, "out")
	code, stdout, errs := runCLI(t, "build", exampleJob, "--joints", list, "--out", out)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	want := []document.TagColumns{{File: list, Columns: []string{"robot", "Station"}}}
	if got := reportOf(t, out).Inputs.TagColumns; !reflect.DeepEqual(got, want) {
		t.Errorf("report.json tag_columns %v, want %v", got, want)
	}
	var conn document.ConnectorsDoc
	if err := json.Unmarshal(readFile(t, filepath.Join(out, "connectors.json")), &conn); err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(conn.Inputs.TagColumns, want) {
		t.Errorf("connectors.json tag_columns %v, want %v", conn.Inputs.TagColumns, want)
	}
	line := "free tags   " + list + ": robot, Station"
	if !strings.Contains(stdout, line) || !strings.Contains(string(readFile(t, filepath.Join(out, "report.txt"))), line) {
		t.Errorf("summary or report.txt lacks %q:\n%s", line, stdout)
	}
	if !strings.Contains(errs, "kept as free tags: robot, Station") {
		t.Errorf("stderr %q does not name the tag columns", errs)
	}
	validate(t, "report.schema.json", filepath.Join(out, "report.json"))
	validate(t, "connectors.schema.json", filepath.Join(out, "connectors.json"))
	code, stdout, _ = runCLI(t, "build", exampleJob, "--joints", list, "--out", out, "--json")
	var res buildJSON
	if code != exitOK || json.Unmarshal([]byte(stdout), &res) != nil || !reflect.DeepEqual(res.Inputs.TagColumns, want) {
		t.Errorf("--json: exit %d, inputs %+v", code, res.Inputs)
	}
}

func TestBuildSemicolonAndTabLists(t *testing.T) {
	// The example's list exported with semicolons (parts quoted, as
	// spreadsheets write them) and with tabs builds the same connectors
	// as the comma-separated original.
	skipWithoutExample(t)
	dir := t.TempDir()
	recs := exampleWelds(t)
	ref := filepath.Join(dir, "ref")
	if code, _, errs := runCLI(t, "build", exampleJob, "--out", ref, "--quiet"); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for name, comma := range map[string]rune{"semicolon.csv": ';', "tab.csv": '\t'} {
		list := writeCSV(t, filepath.Join(dir, name), comma, recs)
		out := filepath.Join(dir, name+".out")
		if code, _, errs := runCLI(t, "build", exampleJob, "--joints", list, "--out", out, "--quiet"); code != exitOK {
			t.Fatalf("%s: exit %d: %s", name, code, errs)
		}
		for _, doc := range []string{"connectors.json", "report.json"} {
			if withoutInputs(t, readFile(t, filepath.Join(out, doc))) != withoutInputs(t, readFile(t, filepath.Join(ref, doc))) {
				t.Errorf("%s: %s differs from the comma-separated list's", name, doc)
			}
		}
	}
	// A decimal comma is an input error at its line that says so.
	recs[3][1] = strings.Replace(recs[3][1], ".", ",", 1)
	if !strings.Contains(recs[3][1], ",") {
		recs[3][1] += ",5"
	}
	list := writeCSV(t, filepath.Join(dir, "comma.csv"), ';', recs)
	code, _, errs := runCLI(t, "build", exampleJob, "--joints", list, "--out", filepath.Join(dir, "bad"))
	if want := list + ":4: x: \"" + recs[3][1] + "\" has a decimal comma"; code != exitBadInput || !strings.Contains(errs, want) {
		t.Errorf("decimal comma: exit %d, stderr %q; want 2 and %q", code, errs, want)
	}
}

func TestBuildNamesRejectedSheets(t *testing.T) {
	// Part 2 ends 1.5 mm short of W1; part 3 under W3 is one element with
	// its corners on a line. 1 mm sheets: nugget 5 mm (5 sqrt(t), common
	// practice), lateral limit 1.25 mm.
	dir := t.TempDir()
	mesh := writeLines(t, filepath.Join(dir, "m.jmesh"), jmesh(
		[]sheet{{part: 1, t: 1, nx: 10, ny: 10, h: 5, base: 100000}, {part: 2, t: 1, z: 1, nx: 5, ny: 10, h: 5, base: 200000}},
		"part 3 thickness=1", "node 300001 40 40 1", "node 300002 45 40 1", "node 300003 50 40 1", "shell 300001 3 300001 300002 300003"))
	list := writeText(t, filepath.Join(dir, "w.csv"), "id,x,y,z\nW1,26.5,25,0.5\nW2,10,25,0.5\nW3,45,40,0.5\n")
	out := filepath.Join(dir, "out")
	code, _, errs := runCLI(t, "build", "--mesh", mesh, "--joints", list, "--out", out, "--fail-on", "never")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	got := map[string]string{}
	for _, f := range reportOf(t, out).Findings {
		if f.Joint != nil {
			got[*f.Joint+" "+f.Code] = f.Message
		}
	}
	want := map[string]string{
		"W1 single-sheet":    "only part 1 lies under the weld within 4.5 mm: nothing to join; also within reach: part 2, 1.5 mm off the weld axis (limit 1.25 mm)",
		"W3 degenerate-host": "the element of part 3 under the weld (id 300001) is degenerate: too little area for a normal to build on",
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("findings %v\nwant     %v", got, want)
	}
}

func TestBuildIgnoresElementOrder(t *testing.T) {
	// Welds on nodes and edges that elements share: the host is the
	// lowest element id, so shuffling the element lines of the file
	// leaves connectors.json byte for byte the same.
	dir := t.TempDir()
	lines := jmesh([]sheet{{part: 1, t: 1, nx: 10, ny: 10, h: 5, base: 100000}, {part: 2, t: 1.2, z: 1.1, nx: 10, ny: 10, h: 5, tri: true, base: 200000}})
	mesh := filepath.Join(dir, "m.jmesh")
	list := writeText(t, filepath.Join(dir, "w.csv"), "id,x,y,z\n"+
		"W1,25,25,0.55\n"+ // on a node of both sheets
		"W2,22.5,25,0.55\n"+ // on an edge of both
		"W3,25,32.5,0.55\n"+ // on an edge of both
		"W4,17.5,17.5,0.55\n"+ // on a diagonal of the triangles
		"W5,21.3,27.9,0.55\n") // inside elements
	first := map[string][]byte{}
	rng := rand.New(rand.NewPCG(6, 6))
	for trial := range 4 {
		if trial > 0 {
			var head, shells []string
			for _, l := range lines {
				if strings.HasPrefix(l, "shell ") {
					shells = append(shells, l)
				} else {
					head = append(head, l)
				}
			}
			rng.Shuffle(len(shells), func(i, j int) { shells[i], shells[j] = shells[j], shells[i] })
			lines = append(head, shells...)
		}
		writeLines(t, mesh, lines)
		out := filepath.Join(dir, fmt.Sprint("out", trial))
		for _, attach := range []string{"interpolated", "node-pair", "patch"} {
			// The welds lie a few mm apart (the audit reports them as
			// duplicates): this test is about element order alone.
			if code, _, errs := runCLI(t, "build", "--mesh", mesh, "--joints", list, "--out", out, "--attach", attach, "--quiet", "--fail-on", "never"); code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			// The run id hashes the mesh file, which the shuffle changed.
			got := withoutRunID(readFile(t, filepath.Join(out, "connectors.json")))
			if first[attach] == nil {
				first[attach] = got
				continue
			}
			if !bytes.Equal(got, first[attach]) {
				t.Fatalf("shuffle %d, --attach %s: connectors.json differs", trial, attach)
			}
		}
	}
}

func TestBuildWarnsOfIDRange(t *testing.T) {
	// New ids above 2,147,483,647 (2^31 - 1, the largest 32-bit signed
	// integer; many solvers hold ids in 32 bits, common practice): one
	// warning for the run, with the range; below the failure level.
	skipWithoutExample(t)
	out := t.TempDir()
	code, stdout, errs := runCLI(t, "build", exampleJob, "--out", out, "--id-start", "2147483600")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var found []string
	for _, f := range reportOf(t, out).Findings {
		if f.Code == "id-range" {
			found = append(found, f.Severity+": "+f.Message)
		}
	}
	want := "warning: new ids 2147483600 to 2147483687 exceed 2147483647"
	if len(found) != 1 || !strings.HasPrefix(found[0], want) {
		t.Errorf("id-range findings %q, want one starting %q", found, want)
	}
	if !strings.Contains(stdout, "id-range 1") {
		t.Errorf("summary does not count id-range:\n%s", stdout)
	}
}

func TestBuildProgressAdvances(t *testing.T) {
	// On a terminal each step's bar reaches its end: the read advances
	// per mesh file (it stayed at 0), the weld step per weld; quiet runs
	// draw nothing.
	skipWithoutExample(t)
	var stdout, stderr bytes.Buffer
	if code := run(context.Background(), []string{"build", exampleJob, "--out", t.TempDir()}, &stdout, &stderr, true); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	for _, want := range []string{"reading mesh files", "building spot welds", "indexing elements ..."} {
		if !strings.Contains(stderr.String(), want) {
			t.Errorf("stderr lacks %q", want)
		}
	}
	for _, label := range []string{"reading mesh files", "building spot welds"} {
		if !regexpFinished(stderr.String(), label) {
			t.Errorf("%q never reaches 100%%: %q", label, stderr.String())
		}
	}
	stderr.Reset()
	run(context.Background(), []string{"build", exampleJob, "--out", t.TempDir(), "--quiet"}, &stdout, &stderr, true)
	if stderr.Len() != 0 {
		t.Errorf("--quiet drew %q", stderr.String())
	}
}

// regexpFinished reports whether the bar of the step label was drawn at
// 100% in s.
func regexpFinished(s, label string) bool {
	for _, seg := range strings.Split(s, "\r") {
		if strings.HasPrefix(strings.TrimPrefix(seg, "\033[K"), label) && strings.HasSuffix(seg, "100%") {
			return true
		}
	}
	return false
}

func TestBuildShowsRenumbering(t *testing.T) {
	// Two files with the same ids: with --renumber the second is shifted,
	// and the offsets appear in the summary, --json and both documents.
	dir := t.TempDir()
	a := writeLines(t, filepath.Join(dir, "a.jmesh"), jmesh([]sheet{{part: 1, t: 1, nx: 4, ny: 4, h: 5}}))
	b := writeLines(t, filepath.Join(dir, "b.jmesh"), jmesh([]sheet{{part: 2, t: 1, z: 1, nx: 4, ny: 4, h: 5}}))
	list := writeText(t, filepath.Join(dir, "w.csv"), "id,x,y,z\nW1,10,10,0.5\n")
	out := filepath.Join(dir, "out")
	args := []string{"build", "--mesh", a, "--mesh", b, "--joints", list, "--out", out}
	if code, _, errs := runCLI(t, args...); code != exitBadInput || !strings.Contains(errs, "appears twice") {
		t.Fatalf("without --renumber: exit %d, %s", code, errs)
	}
	code, stdout, errs := runCLI(t, append(args, "--renumber")...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// b's ids move above a's (geom.Merge decides by how much).
	rep := reportOf(t, out)
	if len(rep.Inputs.Renumbered) != 1 || rep.Inputs.Renumbered[0].File != b {
		t.Fatalf("report.json renumbered %+v", rep.Inputs.Renumbered)
	}
	s := rep.Inputs.Renumbered[0]
	line := fmt.Sprintf("renumbered  %s: node ids %+d, element ids %+d", b, s.NodeOffset, s.ElemOffset)
	if s.NodeOffset <= 0 || s.ElemOffset <= 0 || !strings.Contains(stdout, line) {
		t.Errorf("summary lacks %q:\n%s", line, stdout)
	}
	var conn document.ConnectorsDoc
	if err := json.Unmarshal(readFile(t, filepath.Join(out, "connectors.json")), &conn); err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(conn.Inputs.Renumbered, rep.Inputs.Renumbered) {
		t.Errorf("connectors.json renumbered %+v", conn.Inputs.Renumbered)
	}
	code, stdout, _ = runCLI(t, append(args, "--renumber", "--json")...)
	var res buildJSON
	if code != exitOK || json.Unmarshal([]byte(stdout), &res) != nil || !reflect.DeepEqual(res.Inputs.Renumbered, rep.Inputs.Renumbered) {
		t.Errorf("--json: exit %d, inputs %+v", code, res.Inputs)
	}
}

func TestBuildWithoutJointsIsUsageError(t *testing.T) {
	skipWithoutExample(t)
	out := filepath.Join(t.TempDir(), "out")
	mesh := filepath.Join(filepath.Dir(exampleJob), "mesh", "bracket.jmesh")
	code, _, errs := runCLI(t, "build", "--mesh", mesh, "--out", out)
	if code != exitBadInput || !strings.Contains(errs, "no joint list given") {
		t.Errorf("exit %d, stderr %q; want 2, no joint list given", code, errs)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("output written")
	}
}

func TestMissingJobFile(t *testing.T) {
	job := filepath.Join(t.TempDir(), "job.yaml")
	for _, cmd := range []string{"build", "inspect"} {
		code, _, errs := runCLI(t, cmd, job)
		if want := "joinery: " + job + ": job file not found\n"; code != exitBadInput || errs != want {
			t.Errorf("%s: exit %d, stderr %q; want 2 and %q", cmd, code, errs, want)
		}
	}
}

// A newcomer's first try, the mesh where the job file goes, is refused at
// once with the flag that takes it, by every command that takes a job.
func TestMeshGivenAsJobFile(t *testing.T) {
	skipWithoutExample(t)
	mesh := filepath.Join(filepath.Dir(exampleJob), "mesh", "bracket.jmesh")
	for _, cmd := range []string{"build", "inspect", "check", "flanges", "offsets", "sweep"} {
		code, _, errs := runCLI(t, cmd, mesh)
		want := "joinery: " + mesh + ": this is a mesh file, not a job file: give it with --mesh (-m)"
		if code != exitBadInput || !strings.HasPrefix(errs, want) {
			t.Errorf("%s: exit %d, stderr %q; want 2 and %q", cmd, code, errs, want)
		}
	}
}

func TestCautionWhereResultsAre(t *testing.T) {
	skipWithoutExample(t)
	if _, help, _ := runCLI(t, "build", "--help"); !strings.Contains(help, document.Caution) {
		t.Errorf("build --help lacks the caution")
	}
	out := t.TempDir()
	code, stdout, errs := runCLI(t, "build", exampleJob, "--out", out, "--json")
	var res buildJSON
	if code != exitOK || json.Unmarshal([]byte(stdout), &res) != nil || res.Caution != document.Caution {
		t.Errorf("build --json: exit %d (%s), caution %q", code, errs, res.Caution)
	}
	firstLine := func(name string, n int) string {
		return strings.Join(strings.SplitN(string(readFile(t, filepath.Join(out, name))), "\n", n+1)[:n], "\n")
	}
	if l := firstLine("connectors.csv", 1); !strings.HasPrefix(l, "# ") || !strings.Contains(l, document.Caution) {
		t.Errorf("connectors.csv first line %q lacks the caution", l)
	}
	if l := firstLine("connectors.vtk", 2); !strings.Contains(l, document.ShortCaution) || len(strings.Split(l, "\n")[1]) > 256 {
		t.Errorf("connectors.vtk title %q lacks the short caution or exceeds 256 characters", l)
	}
	var conn document.ConnectorsDoc
	if err := json.Unmarshal(readFile(t, filepath.Join(out, "connectors.json")), &conn); err != nil || conn.Caution != document.Caution {
		t.Errorf("connectors.json caution %q (%v)", conn.Caution, err)
	}
}

func TestUnwritableOutputExitsThree(t *testing.T) {
	// --out below a regular file cannot be created: not the input's
	// fault, exit 3, with a message that says so.
	skipWithoutExample(t)
	file := writeText(t, filepath.Join(t.TempDir(), "plain"), "x")
	code, _, errs := runCLI(t, "build", exampleJob, "--out", filepath.Join(file, "out"))
	if code != exitFailure || !strings.Contains(errs, "not an input problem") {
		t.Errorf("exit %d, stderr %q; want 3", code, errs)
	}
}

func TestInspectSaysTri(t *testing.T) {
	skipWithoutExample(t)
	code, out, errs := runCLI(t, "inspect", exampleJob)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, l := range strings.Split(out, "\n") {
		if f := strings.Fields(l); len(f) > 0 && f[0] == "id" {
			if !strings.Contains(" "+l+" ", " tri ") || strings.Contains(l, "tria") {
				t.Errorf("parts table header %q: want a tri column", l)
			}
			return
		}
	}
	t.Errorf("no parts table header in %q", out)
}

// A mesh, parts table or joint list that does not exist is the input's
// fault: exit 2, the message names the file, and nothing is written.
func TestMissingInputFiles(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	missing := filepath.Join(dir, "nothing-here")
	welds := filepath.Join(exampleDir, "welds.csv")
	for _, c := range []struct {
		name string
		args []string
	}{
		{"mesh", []string{"--mesh", missing + ".vtk", "--joints", welds}},
		{"parts", []string{exampleJob, "--parts", missing + ".yaml"}},
		{"joints", []string{exampleJob, "--joints", missing + ".csv"}},
	} {
		out := filepath.Join(dir, "out-"+c.name)
		code, _, errs := runCLI(t, append([]string{"build", "--out", out}, c.args...)...)
		if code != exitBadInput || !strings.Contains(errs, missing) || !strings.Contains(errs, "no such file") {
			t.Errorf("%s: exit %d, stderr %q; want 2 naming the file", c.name, code, errs)
		}
		if _, err := os.Stat(out); !os.IsNotExist(err) {
			t.Errorf("%s: output directory written", c.name)
		}
	}
}
