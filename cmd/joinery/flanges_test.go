package main

import (
	"bytes"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

var flangesOutputs = []string{"flanges.json", "joints.csv", "flanges.vtk", "report.json", "report.txt"}

// joinery flanges on the bundled example finds the hat beam's two
// flanges on the floor, the closing plates on the floor, the beam's
// flange ends on the closing plates (three-sheet stacks with the floor)
// and the bracket on the beam's web; its welds build clean.
func TestFlangesExampleGolden(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	code, out, errs := runCLI(t, "flanges", exampleJob, "--pitch", "30", "--out", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s\n%s", code, errs, out)
	}
	for _, name := range flangesOutputs {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		golden(t, "flanges-"+name, b)
	}
	validate(t, "flanges.schema.json", filepath.Join(dir, "flanges.json"))
	validate(t, "report.schema.json", filepath.Join(dir, "report.json"))
	// The report names the run that wrote it (report.schema.json: command).
	if c := readReport(t, filepath.Join(dir, "report.json")).Command; c != "flanges" {
		t.Errorf("report.json: command %q, want flanges", c)
	}
	doc := readFlanges(t, filepath.Join(dir, "flanges.json"))
	pairs := map[[2]int64]int{}
	for _, fl := range doc.Flanges {
		pairs[fl.Parts]++
	}
	want := map[[2]int64]int{{100, 200}: 2, {100, 300}: 2, {200, 300}: 4, {200, 400}: 1}
	for p, n := range want {
		if pairs[p] != n {
			t.Errorf("parts %v: %d flanges, want %d", p, pairs[p], n)
		}
	}
	var again bytes.Buffer
	if err := document.EncodeFlanges(&again, doc); err != nil {
		t.Fatal(err)
	}
	raw, _ := os.ReadFile(filepath.Join(dir, "flanges.json"))
	if !bytes.Equal(again.Bytes(), raw) {
		t.Errorf("flanges.json does not read back to the same bytes")
	}
}

// The round trip: flanges --pitch, then build on its joints.csv, gives
// every weld built on exactly the sheets it lists, with no gap or edge
// finding.
func TestFlangesThenBuild(t *testing.T) {
	skipWithoutExample(t)
	for _, attach := range []string{"interpolated", "node-pair", "patch"} {
		t.Run(attach, func(t *testing.T) {
			dir := t.TempDir()
			fl, bl := filepath.Join(dir, "flanges"), filepath.Join(dir, "build")
			if code, _, errs := runCLI(t, "flanges", exampleJob, "--pitch", "30", "--attach", attach, "--out", fl, "--quiet"); code != exitOK {
				t.Fatalf("flanges: exit %d: %s", code, errs)
			}
			list := filepath.Join(fl, "joints.csv")
			welds, _, err := joints.ReadJoints(list)
			if err != nil || len(welds) == 0 {
				t.Fatalf("joints.csv: %d welds, %v", len(welds), err)
			}
			code, _, errs := runCLI(t, "build", exampleJob, "--joints", list, "--attach", attach, "--out", bl, "--quiet")
			if code != exitOK {
				t.Fatalf("build: exit %d: %s", code, errs)
			}
			doc := readConnectors(t, filepath.Join(bl, "connectors.json"))
			byID := map[string]joints.Joint{}
			for _, w := range welds {
				byID[w.ID] = w
			}
			for _, c := range doc.Connectors {
				var stack []int64
				for _, s := range c.Sheets {
					stack = append(stack, s.Part)
				}
				listed := slices.Clone(byID[c.ID].Parts)
				slices.Sort(stack)
				slices.Sort(listed)
				bad := slices.ContainsFunc(c.Findings, func(code string) bool {
					return code == joints.CodeGapOpen || code == joints.CodeGapClosed || code == joints.CodeEdgeClose
				})
				if c.State == "not-built" || bad || !slices.Equal(stack, listed) {
					t.Errorf("weld %s: %s on %v (listed %v), findings %v", c.ID, c.State, stack, listed, c.Findings)
				}
				if attach != "node-pair" && c.State != "built" {
					t.Errorf("weld %s: %s, findings %v", c.ID, c.State, c.Findings)
				}
			}
			if len(doc.Connectors) != len(welds) {
				t.Errorf("%d connectors for %d welds", len(doc.Connectors), len(welds))
			}
		})
	}
}

func TestFlangesDeterministicAcrossGOMAXPROCS(t *testing.T) {
	skipWithoutExample(t)
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	var first map[string][]byte
	for _, procs := range []int{1, 2, 4} {
		runtime.GOMAXPROCS(procs)
		dir := t.TempDir()
		if code, _, errs := runCLI(t, "flanges", exampleJob, "--pitch", "30", "--out", dir, "--quiet"); code != exitOK {
			t.Fatalf("exit %d: %s", code, errs)
		}
		got := map[string][]byte{}
		for _, name := range flangesOutputs {
			b, err := os.ReadFile(filepath.Join(dir, name))
			if err != nil {
				t.Fatal(err)
			}
			got[name] = b
		}
		if first == nil {
			first = got
			continue
		}
		for name := range got {
			if !bytes.Equal(got[name], first[name]) {
				t.Errorf("GOMAXPROCS=%d: %s differs", procs, name)
			}
		}
	}
}

// Bad flags and inputs: exit 2 with a message, nothing written.
func TestFlangesBadInput(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	for _, tc := range []struct {
		args []string
		msg  string
	}{
		{[]string{"--pair", "100"}, "--pair"},
		{[]string{"--pair", "100,100"}, "itself"},
		{[]string{"--pair", "100,999"}, "999"},
		{[]string{"--pitch", "-3"}, "--pitch"},
		{[]string{"--pitch", "often"}, "--pitch"},
		{[]string{"--end-margin", "-1"}, "end margin"},
		{[]string{"--end-margin", "5"}, "--end-margin places the first weld of each flange: it needs --pitch"},
		{[]string{"--attach", "glue"}, "glue"},
	} {
		args := append([]string{"flanges", exampleJob, "--out", out}, tc.args...)
		code, _, errs := runCLI(t, args...)
		if code != exitBadInput || !strings.Contains(errs, tc.msg) {
			t.Errorf("%v: exit %d, message %q; want 2 naming %q", tc.args, code, errs, tc.msg)
		}
	}
	bad := filepath.Join(dir, "bad.jmesh")
	if err := os.WriteFile(bad, []byte("joinery-mesh 1\nnode 1 0 0 zero\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if code, _, errs := runCLI(t, "flanges", "--mesh", bad, "--out", out); code != exitBadInput || !strings.Contains(errs, "bad.jmesh:2") {
		t.Errorf("bad mesh: exit %d, %q", code, errs)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("output directory written on bad input")
	}
}

// A pitch finer than the smallest nugget is refused at once, from the
// flag or the job file: placing stations that close cost time growing
// with the square of their number (--pitch 0.001 ran for hours on the
// example; 2.9 mm is the fused zone of the spacing table's thinnest
// row, resistance welding manufacturers' table).
func TestFlangesFinePitchRefused(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	for _, p := range []string{"0.001", "2.8999"} {
		code, _, errs := runCLIWithin(t, 20*time.Second, "flanges", exampleJob, "--pitch", p, "--out", out)
		if code != exitBadInput || !strings.Contains(errs, "at least 2.9") {
			t.Errorf("--pitch %s: exit %d, %q; want 2 and the least pitch", p, code, errs)
		}
	}
	ex := filepath.Join(dir, "example")
	if err := os.CopyFS(ex, os.DirFS(exampleDir)); err != nil {
		t.Fatal(err)
	}
	job := filepath.Join(ex, "job.yaml")
	text := "version: 1\nmeshes: [mesh/floor.vtk, mesh/beam.vtk, mesh/closing-plate.jmesh, mesh/bracket.jmesh]\nparts: parts.yaml\nflanges:\n  pitch: 1\n"
	if err := os.WriteFile(job, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	if code, _, errs := runCLIWithin(t, 20*time.Second, "flanges", job, "--out", out); code != exitBadInput || !strings.Contains(errs, "job.yaml:5:") || !strings.Contains(errs, "at least 2.9") {
		t.Errorf("job pitch 1: exit %d, %q; want 2 at job.yaml:5", code, errs)
	}
	if code, _, errs := runCLI(t, "flanges", exampleJob, "--pitch", "2.9", "--out", out, "--quiet", "--fail-on", "never"); code != exitOK {
		t.Errorf("--pitch 2.9: exit %d, %s", code, errs)
	}
	if _, err := os.Stat(out); err != nil {
		t.Errorf("--pitch 2.9 wrote no set: %v", err)
	}
}

// A pair asked for that has no flange is reported; --pair limits the
// search.
func TestFlangesPairs(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	code, out, errs := runCLI(t, "flanges", exampleJob, "--pair", "200,100", "--pair", "300,400", "--out", dir, "--fail-on", "never")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "flanges     2 on 1 part pair of the 2 asked for") || !strings.Contains(out, "no-flange 1") {
		t.Errorf("summary:\n%s", out)
	}
}

// flanges audits the welds it places as build does (issue 9): parts left
// without welds are free parts, and welds closer than the spacing table
// allows are named pair by pair (pitch-short, beside the flange's own
// finding on the pitch asked for); without --pitch nothing is audited.
func TestFlangesAuditTheirWelds(t *testing.T) {
	skipWithoutExample(t)
	for _, tc := range []struct {
		args []string
		want map[string]int // code -> findings naming joints (-1: any number above 0)
	}{
		// Only the floor and the beam welded: the closing plates and the
		// bracket hang free.
		{[]string{"--pair", "100,200", "--pitch", "30"}, map[string]int{joints.CodeFreePart: 2}},
		// 15 mm, below the table's 19-28 mm for these sheets: the audit
		// names the neighbouring welds of every flange.
		{[]string{"--pitch", "15"}, map[string]int{joints.CodePitchShort: -1}},
		{nil, map[string]int{joints.CodeFreePart: 0, joints.CodePitchShort: 0}},
	} {
		t.Run(strings.Join(tc.args, " "), func(t *testing.T) {
			dir := t.TempDir()
			code, _, errs := runCLI(t, append([]string{"flanges", exampleJob, "--out", dir, "--fail-on", "never", "--quiet"}, tc.args...)...)
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			fs := findingCodes(t, filepath.Join(dir, "report.json"))
			for c, n := range tc.want {
				got := 0
				for _, f := range fs[c] {
					if c == joints.CodeFreePart || len(f.Joints) > 0 {
						got++
					}
				}
				if n < 0 && got == 0 || n >= 0 && got != n {
					t.Errorf("%s: %d audit findings, want %d (-1: some)", c, got, n)
				}
			}
		})
	}
}
