package writers

import (
	"bytes"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/writers/document"
)

// Locations in report.txt keep a micrometre in every unit the meshes may
// be in (0.5 mm is 0.0005 m, 0.019685 in: 1 in = 25.4 mm exactly, by the
// international inch of 1959), and a screw's pitch is given per radian
// in that unit.
func TestReportTextUnits(t *testing.T) {
	for _, tc := range []struct {
		unit       string
		at         document.Vec
		pitch      float64
		want, also string
	}{
		{"mm", document.Vec{27.5, 3.1, 0.5}, 2.5, "at (27.5, 3.1, 0.5)", "pitch 2.5 mm/rad"},
		{"m", document.Vec{0.0275, 0.0031, 0.0005}, 0.0025, "at (0.0275, 0.0031, 0.0005)", "pitch 0.0025 m/rad"},
		{"in", document.Vec{27.5 / 25.4, 3.1 / 25.4, 0.5 / 25.4}, 2.5 / 25.4, "at (1.08268, 0.12205, 0.01969)", "pitch 0.09843 in/rad"},
	} {
		id := "W1"
		pt := tc.at
		doc := &document.ReportDoc{Command: "build", Units: document.Units{Length: tc.unit, Angle: "degree"},
			Findings: []document.FindingDoc{
				{Severity: "warning", Code: "gap-open", Joint: &id, Joints: []string{id}, Parts: []int64{1, 2}, Message: "m", Location: &pt},
				{Severity: "error", Code: "mechanism", Parts: []int64{2}, Message: "m", Motion: &document.MotionDoc{Kind: "screw", Count: 1, Point: &pt, Pitch: &tc.pitch}},
			}}
		doc.Summary.ByCode = map[string]int{"gap-open": 1, "mechanism": 1}
		var b bytes.Buffer
		if err := WriteReportText(&b, doc); err != nil {
			t.Fatal(err)
		}
		if s := b.String(); !strings.Contains(s, tc.want) || !strings.Contains(s, tc.also) {
			t.Errorf("%s: want %q and %q in\n%s", tc.unit, tc.want, tc.also, s)
		}
	}
}
