package html

import (
	"cmp"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

// weldDoc returns a built two-sheet spot weld of parts a and b (a
// thickness ta, b tb) at p with stack axis n, its link at contact.
func weldDoc(id string, p, n r3.Vec, a, b int64, ta, tb float64) document.ConnectorDoc {
	d := 5 * math.Sqrt(min(ta, tb))
	ax := document.Vec{n.X, n.Y, n.Z}
	contact := (ta + tb) / 2
	return document.ConnectorDoc{
		ID: id, Kind: "spot", State: "built", Point: document.Vec{p.X, p.Y, p.Z}, Axis: &ax, Diameter: &d, DiameterSource: "5sqrt",
		Sheets: []document.SheetDoc{{Part: a, Thickness: ta}, {Part: b, Thickness: tb}},
		Links:  []document.LinkDoc{{From: 0, To: 1, MidGap: contact, ContactGap: contact}},
	}
}

// TestPairTwoWeldLines lays two parallel weld lines of a hat section's
// flanges on a tilted plane, 100 mm apart at 30 mm pitch, and a weld 10
// mm from the end of one line: the pair's chart must lie along the lines
// in the plane, the runs must be the two lines, the spacings 30 mm
// (closed form) but the one of 10 mm, which lies below the table's
// minimum for the governing 0.8 mm sheet.
func TestPairTwoWeldLines(t *testing.T) {
	along := r3.Unit(r3.Vec{X: 3, Y: 4})
	normal := r3.Unit(r3.Vec{X: -4, Y: 3, Z: 5}) // normal to along
	across := r3.Cross(normal, along)
	conn := &document.ConnectorsDoc{}
	for line := range 2 {
		for k := range 6 {
			p := r3.Add(r3.Vec{X: 100, Y: -50, Z: 300}, r3.Add(r3.Scale(30*float64(k), along), r3.Scale(100*float64(line), across)))
			conn.Connectors = append(conn.Connectors, weldDoc(fmt.Sprintf("W%d%d", line, k), p, normal, 20, 10, 1.2, 0.8))
		}
	}
	extra := r3.Add(r3.Vec{X: 100, Y: -50, Z: 300}, r3.Scale(-10, along))
	conn.Connectors = append(conn.Connectors, weldDoc("W99", extra, r3.Scale(-1, normal), 10, 20, 0.8, 1.2))
	an := analyse(conn, nil)
	if len(an.pairs) != 1 || an.pairs[0].a != 10 || an.pairs[0].b != 20 || len(an.unpaired) != 0 {
		t.Fatalf("pairs %+v, unpaired %v", an.pairs, an.unpaired)
	}
	pa := an.pairs[0]
	if math.Abs(r3.Dot(pa.e1, along)) < 1-1e-9 {
		t.Errorf("u = %v, want ±%v", pa.e1, along)
	}
	if math.Abs(r3.Dot(pa.n, normal)) < 1-1e-9 {
		t.Errorf("normal %v, want ±%v", pa.n, normal)
	}
	if d := r3.Dot(r3.Cross(pa.n, pa.e1), pa.e2); math.Abs(d-1) > 1e-12 {
		t.Errorf("chart not right-handed: (n x u).v = %g", d)
	}
	if len(pa.runs) != 2 || len(pa.runs[0])+len(pa.runs[1]) != 13 {
		t.Fatalf("runs %v, want the two lines", pa.runs)
	}
	// The 0.8 mm sheet governs (AWS D8.1M: the thinner of two sheets).
	want := joints.MinSpacing(0.8, 2)
	// The table (secondary copy) gives 12.7 mm at 0.79 mm and 19.0 at 1.02.
	if want < 12.7 || want > 19.0 {
		t.Fatalf("MinSpacing(0.8, 2) = %g, outside the table's rows 12.7..19.0", want)
	}
	short := 0
	for _, l := range pa.links {
		if l.thickness != 0.8 || l.sheets != 2 || l.min != want {
			t.Errorf("link %+v: thickness, sheets or minimum wrong", l)
		}
		switch {
		case math.Abs(l.length-10) < 1e-9:
			short++
			if l.length >= l.min {
				t.Errorf("10 mm spacing not below the minimum %g", l.min)
			}
		case math.Abs(l.length-30) > 1e-9:
			t.Errorf("spacing %g, want 30 or 10", l.length)
		}
	}
	if short != 1 || len(pa.links) != 11 {
		t.Errorf("%d links (%d short), want 11 (1 short)", len(pa.links), short)
	}
	for r := range pa.runs {
		if p := pa.pitch(r); math.Abs(p-30) > 1e-9 {
			t.Errorf("run %d: pitch %g, want 30", r, p)
		}
	}
}

// TestThreeSheetSpacing checks that a spacing between three-sheet welds
// takes the 30 per cent allowance of the tables' note.
func TestThreeSheetSpacing(t *testing.T) {
	conn := &document.ConnectorsDoc{}
	for k := range 3 {
		c := weldDoc(fmt.Sprintf("W%d", k), r3.Vec{X: 40 * float64(k)}, r3.Vec{Z: 1}, 10, 20, 1.0, 1.0)
		c.Sheets = append(c.Sheets, document.SheetDoc{Part: 30, Thickness: 1.5})
		conn.Connectors = append(conn.Connectors, c)
	}
	an := analyse(conn, nil)
	if len(an.pairs) != 2 {
		t.Fatalf("%d pairs, want 10-20 and 20-30", len(an.pairs))
	}
	for _, pa := range an.pairs {
		for _, l := range pa.links {
			// Governing thickness of 1.0, 1.0, 1.5: the second thickest, 1.0.
			if l.sheets != 3 || l.thickness != 1.0 || math.Abs(l.min-joints.ThreeSheetSpacingFactor*joints.MinSpacing(1.0, 2)) > 1e-12 {
				t.Errorf("pair %d-%d link %+v", pa.a, pa.b, l)
			}
		}
	}
}

// TestNearestEdges checks the swept nearest-neighbour search against a
// brute-force search on random points (seeded).
func TestNearestEdges(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	for trial := range 50 {
		n := 2 + rng.IntN(80)
		pts := make([]r3.Vec, n)
		for i := range pts {
			pts[i] = r3.Vec{X: rng.Float64() * 500, Y: rng.Float64() * 40, Z: rng.Float64() * 5}
		}
		k := 1 + rng.IntN(8)
		got := nearestEdges(pts, r3.Vec{X: 1}, k)
		var want []edge
		for i := range pts {
			type c struct {
				d float64
				j int
			}
			var cs []c
			for j := range pts {
				if j != i {
					cs = append(cs, c{r3.Norm(r3.Sub(pts[j], pts[i])), j})
				}
			}
			slices.SortFunc(cs, func(x, y c) int { return cmp.Or(cmp.Compare(x.d, y.d), cmp.Compare(x.j, y.j)) })
			for _, x := range cs[:min(k, len(cs))] {
				want = append(want, edge{i: int32(min(i, x.j)), j: int32(max(i, x.j)), length: x.d})
			}
		}
		slices.SortFunc(want, compareEdges)
		want = slices.Compact(want)
		if !slices.Equal(got, want) {
			t.Fatalf("trial %d (%d points, k %d): %d edges, brute force %d", trial, n, k, len(got), len(want))
		}
	}
}

// TestPrincipal checks the principal directions of points on a line and
// on a flat rectangle (closed form: the line's direction; the long side
// and the rectangle's normal).
func TestPrincipal(t *testing.T) {
	d := r3.Unit(r3.Vec{X: 1, Y: 2, Z: 2})
	var pts []r3.Vec
	for k := range 5 {
		pts = append(pts, r3.Scale(float64(k), d))
	}
	major, _ := principal(pts, r3.Scale(2, d))
	if math.Abs(r3.Dot(major, d)) < 1-1e-12 {
		t.Errorf("line: major %v, want ±%v", major, d)
	}
	pts = pts[:0]
	for i := range 11 {
		for j := range 3 {
			pts = append(pts, r3.Vec{X: float64(i) * 10, Y: float64(j) * 5, Z: 7})
		}
	}
	major, minor := principal(pts, r3.Vec{X: 50, Y: 5, Z: 7})
	if math.Abs(major.X) < 1-1e-12 || math.Abs(minor.Z) < 1-1e-12 {
		t.Errorf("rectangle: major %v, minor %v", major, minor)
	}
	if s := geom.SignLargest(r3.Vec{X: 0.1, Y: -0.9}); s.Y <= 0 {
		t.Errorf("signed kept the negative largest component: %v", s)
	}
}
