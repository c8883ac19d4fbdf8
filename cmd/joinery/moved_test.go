package main

import (
	"bytes"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/joints"
)

// A build's connectors checked against the mesh they were built on are
// clean; against the mesh with the strip moved 10 mm along its normal
// (ids kept), every weld's end on the strip is end-moved, 10 mm off; read
// in inches, the same mesh gives end-moved on every end (saying the
// units differ) and build's units-suspect.
func TestCheckEndMoved(t *testing.T) {
	dir := t.TempDir()
	m, mesh, parts := benchModel(t, dir)
	welds := filepath.Join(dir, "welds.csv")
	write(t, welds, "id,x,y,z,kind,parts\nW1,20,50,0.5,spot,1;2\nW2,100,50,0.5,spot,1;2\nW3,180,50,0.5,spot,1;2\n")
	built := filepath.Join(dir, "out")
	if code, stdout, errs := runCLI(t, "build", "--mesh", mesh, "--parts", parts, "--joints", welds, "--out", built, "--quiet"); code != exitOK {
		t.Fatalf("build: exit %d: %s\n%s", code, errs, stdout)
	}
	conns := filepath.Join(built, "connectors.json")
	check := func(mesh string, extra ...string) (int, []string, []string) {
		t.Helper()
		out := filepath.Join(dir, "check")
		args := append([]string{"check", "--mesh", mesh, "--parts", parts, "-c", conns, "--out", out, "--fail-on", "error"}, extra...)
		code, stdout, errs := runCLI(t, args...)
		if code != exitOK && code != exitFindings {
			t.Fatalf("check: exit %d: %s\n%s", code, errs, stdout)
		}
		validate(t, "report.schema.json", filepath.Join(out, "report.json"))
		var got, msgs []string
		for _, f := range reportOf(t, out).Findings {
			if f.Code == joints.CodeEndMoved || f.Code == joints.CodeUnitsSuspect {
				j := ""
				if f.Joint != nil {
					j = *f.Joint
				}
				got = append(got, f.Code+" "+j+" "+f.Severity)
				msgs = append(msgs, f.Message)
			}
		}
		return code, got, msgs
	}
	if code, got, _ := check(mesh); code != exitOK || len(got) != 0 {
		t.Fatalf("unchanged mesh: exit %d, %v", code, got)
	}
	// The strip (part 2) moved 10 mm along its normal, +z.
	for n := range m.Coords {
		if m.NodeIDs[n]/10000 == 2 {
			m.Coords[n].Z += 10
		}
	}
	var b bytes.Buffer
	if err := native.Write(&b, m); err != nil {
		t.Fatal(err)
	}
	moved := filepath.Join(dir, "moved.jmesh")
	write(t, moved, b.String())
	code, got, msgs := check(moved)
	want := []string{"end-moved W1 error", "end-moved W2 error", "end-moved W3 error"}
	if code != exitFindings || !slices.Equal(got, want) {
		t.Fatalf("moved mesh: exit %d, %v, want exit 1 and %v", code, got, want)
	}
	for _, msg := range msgs {
		if !strings.Contains(msg, "end on part 2") || !strings.Contains(msg, " 10 mm from") || !strings.Contains(msg, "the mesh changed since the build") {
			t.Errorf("message %q", msg)
		}
	}
	// The mm build read in inches: every end is off, and the model reads
	// as sheets 25.4 mm thick.
	code, got, msgs = check(mesh, "--units", "in")
	if code != exitFindings || len(got) != 7 || got[0] != "units-suspect  warning" {
		t.Fatalf("--units in: exit %d, %v, want units-suspect and six end-moved", code, got)
	}
	if !strings.Contains(msgs[1], "written in mm and this check reads the mesh in in") {
		t.Errorf("--units in: message %q", msgs[1])
	}
}
