package main

import (
	"os"
	"testing"
)

// A non-finite --reach is bad usage: exit 2 with nothing
// written (not even some of the output files).
func TestNonFiniteReachWritesNothing(t *testing.T) {
	skipWithoutExample(t)
	for _, v := range []string{"NaN", "Inf"} {
		dir := t.TempDir()
		code, _, _ := runCLI(t, "build", exampleJob, "--out", dir, "--quiet", "--reach", v)
		ents, _ := os.ReadDir(dir)
		if code != exitBadInput || len(ents) != 0 {
			var names []string
			for _, e := range ents {
				names = append(names, e.Name())
			}
			t.Errorf("--reach %s: exit %d, files written %v", v, code, names)
		}
	}
}
