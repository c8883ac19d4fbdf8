package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/joints/pipeline"
)

// Mistakes on the command line are bad usage, exit 2, whatever stage
// catches them: cobra's own checks (an unknown command, too many
// arguments) as well as the flags'.
func TestUsageErrorsExitTwo(t *testing.T) {
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"bulid", "job.yaml"}, `unknown command "bulid"`},
		{[]string{"build", "a.yaml", "b.yaml"}, "accepts at most 1 arg(s), received 2 (see 'joinery build --help')"},
		{[]string{"build", "--no-such-flag"}, "unknown flag: --no-such-flag (see 'joinery build --help')"},
		{[]string{"check", "--pitch", "20"}, "unknown flag: --pitch (see 'joinery check --help')"},
		{[]string{"build", "--attach", "nodepair"}, "nodepair"},
		// cobra's own help and completion commands print their help
		// and exit 0 on a topic or shell they do not know.
		{[]string{"help", "biuld"}, `unknown help topic "biuld"`},
		{[]string{"help", "build", "extra"}, `unknown help topic "build extra"`},
		{[]string{"completion"}, "completion: no shell given: want one of bash, fish, powershell, zsh"},
		{[]string{"completion", "fish2"}, `completion: unknown shell "fish2"`},
	} {
		code, _, errs := runCLI(t, tc.args...)
		if code != exitBadInput || !strings.Contains(errs, tc.want) {
			t.Errorf("%v: exit %d, %q; want exit %d and %q", tc.args, code, errs, exitBadInput, tc.want)
		}
	}
	// What they know still works.
	for _, args := range [][]string{{"help"}, {"help", "build"}, {"help", "completion", "bash"}, {"completion", "bash"}, {"completion", "--help"}} {
		if code, out, errs := runCLI(t, args...); code != exitOK || out == "" {
			t.Errorf("%v: exit %d, %d bytes out, %q", args, code, len(out), errs)
		}
	}
}

// check and flanges write beside the build's set by default, so that a
// check of a build's connectors leaves the set it reads; an output
// directory holding the connectors checked is refused.
func TestCheckLeavesTheBuildsSet(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	if code, _, errs := runCLI(t, "build", exampleJob, "-o", out, "--quiet"); code != exitOK {
		t.Fatalf("build: exit %d: %s", code, errs)
	}
	conns := filepath.Join(out, "connectors.json")
	if code, _, errs := runCLI(t, "check", exampleJob, "--connectors", conns, "-o", out, "--quiet"); code != exitBadInput || !strings.Contains(errs, "output directory") {
		t.Errorf("check into the build's set: exit %d, %s", code, errs)
	}
	if _, err := os.Stat(conns); err != nil {
		t.Errorf("the build's set lost its connectors: %v", err)
	}
	// By default check and flanges write to the job's out with -check
	// and -flanges appended, beside the build's set.
	ex := filepath.Join(dir, "example")
	if err := os.CopyFS(ex, os.DirFS(exampleDir)); err != nil {
		t.Fatal(err)
	}
	job := filepath.Join(ex, "job.yaml")
	if code, _, errs := runCLI(t, "build", job, "--quiet"); code != exitOK {
		t.Fatalf("build: exit %d: %s", code, errs)
	}
	if code, _, errs := runCLI(t, "check", job, "--connectors", filepath.Join(ex, "out", "connectors.json"), "--quiet"); code != exitOK {
		t.Fatalf("check: exit %d: %s", code, errs)
	}
	if code, _, errs := runCLI(t, "flanges", job, "--quiet"); code != exitOK {
		t.Fatalf("flanges: exit %d: %s", code, errs)
	}
	for _, f := range []string{"out/connectors.json", "out-check/report.json", "out-flanges/flanges.json"} {
		if _, err := os.Stat(filepath.Join(ex, f)); err != nil {
			t.Errorf("%s: %v", f, err)
		}
	}
}

// A sweep over single degrees of freedom (spot-dofs=tx,ty,tz) is most
// likely the set tx+ty+tz mistyped: it runs, with a note saying so.
func TestSweepSingleDOFNote(t *testing.T) {
	skipWithoutExample(t)
	code, _, errs := runCLI(t, "sweep", exampleJob, "--vary", "spot-dofs=tx,ty,tz", "-o", filepath.Join(t.TempDir(), "sw"))
	if code == exitBadInput || !strings.Contains(errs, "note: --vary spot-dofs=tx,ty,tz makes 3 variants, each coupling one degree of freedom") {
		t.Errorf("exit %d, %s", code, errs)
	}
	if note := singleDOFNote(pipeline.Vary{Key: "spot-dofs", Values: []string{"tx+ty+tz", "tx+ty+tz+rx+ry+rz"}}); note != "" {
		t.Errorf("a note for sets: %s", note)
	}
}
