package main

import (
	"fmt"
	"path/filepath"
	"testing"
)

// flanges --pitch table spaces the welds at the table's minimum spacing
// (resistance welding manufacturers' schedule, joints.MinSpacing) and must
// not then report them as closer than it: welds placed at exactly 20.024
// mm on 1.1 mm sheets came out 20.023999999999994 mm apart and were
// flagged pitch-short. A 300 x 40 mm sheet with a 300 x 20 mm sheet on
// it, 5 mm elements, for thicknesses across the table's rows.
func TestPitchTableMeetsItsOwnSpacing(t *testing.T) {
	dir := t.TempDir()
	for _, th := range []float64{0.8, 0.85, 0.9, 0.95, 1.05, 1.1, 1.15, 1.2, 1.3, 1.4, 1.45, 1.6, 1.7, 1.8, 1.9, 2.0} {
		name := fmt.Sprintf("fl-%g", th)
		mesh := writeLines(t, filepath.Join(dir, name+".jmesh"), jmesh([]sheet{
			{part: 1, t: th, nx: 60, ny: 8, h: 5, base: 100000},
			{part: 2, t: th, z: th, y0: 20, nx: 60, ny: 4, h: 5, base: 200000},
		}))
		out := filepath.Join(dir, name)
		if code, _, errs := runCLI(t, "flanges", "-m", mesh, "--pitch", "table", "-o", out, "--quiet", "--fail-on", "never"); code != exitOK {
			t.Fatalf("%g mm: exit %d: %s", th, code, errs)
		}
		for _, f := range reportOf(t, out).Findings {
			if f.Code == "pitch-short" {
				t.Errorf("%g mm sheets at the table's pitch: %s", th, f.Message)
			}
		}
	}
}
