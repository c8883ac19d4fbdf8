package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestBuildExampleBolts builds the example's two towing-eye bolts end to
// end: by default through their meshed holes, rigid rings on
// translations (well-posed: the bracket is held); with averaging rings
// on translations each shank spins about its axis (unrestrained, one
// per bolt, naming it) and the bracket is not held (mechanism).
func TestBuildExampleBolts(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	code, _, errs := runCLI(t, "build", exampleJob, "--out", dir, "--quiet")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	doc := readConnectors(t, filepath.Join(dir, "connectors.json"))
	bolts := 0
	for _, c := range doc.Connectors {
		if c.Kind != "bolt" {
			continue
		}
		bolts++
		if c.State == "not-built" || c.Bolt == nil || c.Bolt.Coupling != "rigid" || strings.Join(c.DOFs, ",") != "tx,ty,tz" || c.Attach != "ring" {
			t.Errorf("%s: %s, %+v, dofs %v, attach %s", c.ID, c.State, c.Bolt, c.DOFs, c.Attach)
		}
		for _, s := range c.Sheets {
			// Holes meshed 11 mm, the bracket's at B2 12 mm (the
			// example's generator).
			want := 11.0
			if c.ID == "B2" && s.Part == 400 {
				want = 12
			}
			if s.HoleDiameter == nil || abs(*s.HoleDiameter-want) > 0.01 || s.Ring != "hole" || len(s.NodePoints) != len(s.Nodes) {
				t.Errorf("%s part %d: hole %v ring %s", c.ID, s.Part, s.HoleDiameter, s.Ring)
			}
		}
	}
	if bolts != 2 || doc.Options.Bolts == nil {
		t.Errorf("%d bolts, options %+v", bolts, doc.Options.Bolts)
	}
	rep, err := os.ReadFile(filepath.Join(dir, "report.txt"))
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(string(rep), "mechanism (") || strings.Contains(string(rep), "unrestrained (") {
		t.Errorf("default bolts not well-posed:\n%s", rep)
	}

	dir2 := filepath.Join(t.TempDir(), "out")
	code, _, errs = runCLI(t, "build", exampleJob, "--out", dir2, "--quiet", "--bolt-coupling", "averaging")
	if code != exitFindings {
		t.Fatalf("averaging: exit %d, want %d: %s", code, exitFindings, errs)
	}
	rep, _ = os.ReadFile(filepath.Join(dir2, "report.txt"))
	for _, want := range []string{"unrestrained (2 error)", "(made by B1) has 1 free motion, a rotation", "(made by B2) has 1 free motion, a rotation", "mechanism (1 error)"} {
		if !strings.Contains(string(rep), want) {
			t.Errorf("averaging report lacks %q:\n%s", want, rep)
		}
	}
	code, _, errs = runCLI(t, "build", exampleJob, "--out", dir2, "--quiet", "--shank", "spring")
	if code != exitBadInput || !strings.Contains(errs, `unknown shank form "spring"`) {
		t.Errorf("--shank spring: exit %d, %s", code, errs)
	}
}
