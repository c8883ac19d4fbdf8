package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
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
		var b strings.Builder
		fmt.Fprintf(&b, "joinery-mesh 1\npart 1 thickness=%g\npart 2 thickness=%g\n", th, th)
		for p, ny := range []int{0, 8, 4} {
			if p == 0 {
				continue
			}
			y0, z := 0.0, 0.0
			if p == 2 {
				y0, z = 20, th
			}
			for j := range ny + 1 {
				for i := range 61 {
					fmt.Fprintf(&b, "node %d %g %g %g\n", int64(p)*100000+int64(j*61+i)+1, 5*float64(i), y0+5*float64(j), z)
				}
			}
			for j := range ny {
				for i := range 60 {
					n := int64(p)*100000 + int64(j*61+i) + 1
					fmt.Fprintf(&b, "shell %d %d %d %d %d %d\n", int64(p)*100000+int64(j*60+i)+1, p, n, n+1, n+62, n+61)
				}
			}
		}
		mesh := filepath.Join(dir, name+".jmesh")
		write(t, mesh, b.String())
		out := filepath.Join(dir, name)
		if code, _, errs := runCLI(t, "flanges", "-m", mesh, "--pitch", "table", "-o", out, "--quiet", "--fail-on", "never"); code != exitOK {
			t.Fatalf("%g mm: exit %d: %s", th, code, errs)
		}
		data, err := os.ReadFile(filepath.Join(out, "report.json"))
		if err != nil {
			t.Fatal(err)
		}
		var rep struct {
			Summary struct {
				ByCode map[string]int `json:"by_code"`
			} `json:"summary"`
			Findings []struct {
				Code, Message string
			} `json:"findings"`
		}
		if err := json.Unmarshal(data, &rep); err != nil {
			t.Fatal(err)
		}
		for _, f := range rep.Findings {
			if f.Code == "pitch-short" {
				t.Errorf("%g mm sheets at the table's pitch: %s", th, f.Message)
			}
		}
	}
}
