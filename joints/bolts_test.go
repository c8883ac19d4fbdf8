package joints

import (
	"errors"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// TestBoltRows reads bolt rows of joint lists: axis, ground, and the
// input errors with file and line for missing or impossible sizes.
func TestBoltRows(t *testing.T) {
	head := "id,x,y,z,kind,diameter,washer,hole,nx,ny,nz,ground\n"
	for _, c := range []struct {
		name, row, err string
		axis           r3.Vec
		ground         bool
	}{
		{name: "plain", row: "B1,0,0,0,bolt,10,20,11,,,,"},
		{name: "axis", row: "B1,0,0,0,bolt,10,20,11,0,0,-2,yes", axis: r3.Vec{Z: -1}, ground: true},
		{name: "ground-no", row: "B1,0,0,0,bolt,10,20,11,,,,NO"},
		{name: "no-washer", row: "B1,0,0,0,bolt,10,,11,,,,", err: `b.csv:2: bolt "B1": no washer given`},
		{name: "no-sizes", row: "B1,0,0,0,bolt,,,,,,,", err: "no diameter, washer, hole given"},
		{name: "hole-small", row: "B1,0,0,0,bolt,10,20,9,,,,", err: "b.csv:2: bolt \"B1\": hole diameter 9 mm is smaller than the bolt diameter 10 mm"},
		{name: "washer-small", row: "B1,0,0,0,bolt,10,11,11,,,,", err: "washer diameter 11 mm is not larger"},
		{name: "negative", row: "B1,0,0,0,bolt,10,-20,11,,,,", err: "b.csv:2: washer: -20 mm is negative"},
		{name: "axis-partial", row: "B1,0,0,0,bolt,10,20,11,1,,,", err: "b.csv:2: axis: give nx, ny and nz together"},
		{name: "axis-zero", row: "B1,0,0,0,bolt,10,20,11,0,0,0,", err: "non-zero finite length"},
		{name: "ground-bad", row: "B1,0,0,0,bolt,10,20,11,,,,maybe", err: "b.csv:2: ground:"},
	} {
		t.Run(c.name, func(t *testing.T) {
			js, _, err := ReadJointsCSV(strings.NewReader(head+c.row+"\n"), "b.csv")
			if c.err != "" {
				if err == nil || !strings.Contains(err.Error(), c.err) || !errors.Is(err, geom.ErrInput) {
					t.Fatalf("error %v, want an input error with %q", err, c.err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if j := js[0]; j.Axis != c.axis || j.Ground != c.ground {
				t.Errorf("axis %v ground %v, want %v %v", j.Axis, j.Ground, c.axis, c.ground)
			}
		})
	}
	yml := "joints:\n  - {id: B1, kind: bolt, point: [0, 0, 0], diameter: 10, washer: 20, hole: 11, nx: 0, ny: 3, nz: 4, ground: true}\n"
	js, _, err := ReadJointsYAML(strings.NewReader(yml), "b.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if j := js[0]; r3.Norm(r3.Sub(j.Axis, r3.Vec{Y: 0.6, Z: 0.8})) > 1e-15 || !j.Ground {
		t.Errorf("yaml: axis %v ground %v", j.Axis, j.Ground)
	}
	_, warns, err := ReadJointsCSV(strings.NewReader(head+"W1,0,0,0,spot,,,,0,0,1,yes\n"), "w.csv")
	if err != nil || len(warns) != 1 || !strings.Contains(warns[0].Message, "axis and ground apply to bolts") {
		t.Errorf("spot weld with axis: %v %v", warns, err)
	}
}

// TestMetricBolts checks the size table against ISO 7089 (washer outer
// diameters) and ISO 273 (clearance holes), as in REFERENCES.md.
func TestMetricBolts(t *testing.T) {
	want := map[float64][4]float64{
		6:  {12, 6.4, 6.6, 7.0},    // ISO 7089; ISO 273 fine, medium, coarse
		8:  {16, 8.4, 9.0, 10.0},   // ISO 7089; ISO 273
		10: {20, 10.5, 11.0, 12.0}, // ISO 7089; ISO 273
		12: {24, 13.0, 13.5, 14.5}, // ISO 7089; ISO 273
	}
	for d, w := range want {
		b, ok := MetricBoltFor(d)
		if !ok || [4]float64{b.WasherOuter, b.Fine, b.Medium, b.Coarse} != w {
			t.Errorf("M%g: %+v, want %v", d, b, w)
		}
	}
	if _, ok := MetricBoltFor(14); ok {
		t.Errorf("M14 is not in the table")
	}
	// Sizes given in inches and rounded to 6 or 4 significant digits
	// (25.4 mm to the inch) are still the tabled sizes: M6 0.236220 in is
	// 5.999988 mm, M10 0.3937 in 9.99998 mm (SizeRoundoff).
	for _, c := range []struct{ in, want float64 }{{0.236220, 6}, {0.314961, 8}, {0.3937, 10}, {0.393701, 10}, {0.472441, 12}} {
		if b, ok := MetricBoltFor(c.in * Inch.MM()); !ok || b.Nominal != c.want {
			t.Errorf("%g in: %+v %v, want M%g", c.in, b, ok, c.want)
		}
	}
	// A size between two of the table's is none of them.
	if _, ok := MetricBoltFor(10.01); ok {
		t.Errorf("10.01 mm is not an M10")
	}
}
