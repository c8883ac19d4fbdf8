package flange

import (
	"context"
	"math"
	"slices"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// Stations against arithmetic: n = floor((L - 2e) / p) + 1 stations of
// an open flange, the spare length split evenly between the ends; a
// closed flange gets floor(L / p) stations at L / n.
func TestStations(t *testing.T) {
	for _, tc := range []struct {
		l, p, e float64
		closed  bool
		want    []float64
		spacing float64
	}{
		{100, 30, 5, false, []float64{5, 35, 65, 95}, 30},          // 90 / 30 + 1 = 4, nothing spare
		{100, 25, 5, false, []float64{12.5, 37.5, 62.5, 87.5}, 25}, // 90 / 25 -> 4, 15 spare: 7.5 at each end
		{100, 30, 10, false, []float64{20, 50, 80}, 30},            // 80 / 30 -> 3, 20 spare
		{10, 30, 5, false, []float64{5}, 30},                       // one station in the middle
		{9, 30, 5, false, nil, 0},                                  // shorter than its margins
		{120, 30, 0, true, []float64{15, 45, 75, 105}, 30},         // 120 / 30 = 4 round
		{100, 30, 0, true, []float64{100.0 / 6, 50, 500.0 / 6}, 100.0 / 3},
	} {
		got, sp := stations(tc.l, tc.p, tc.e, tc.closed)
		if len(got) != len(tc.want) || !near(sp, tc.spacing, 1e-12) {
			t.Errorf("stations(%g, %g, %g, %v) = %v (spacing %g), want %v (%g)", tc.l, tc.p, tc.e, tc.closed, got, sp, tc.want, tc.spacing)
			continue
		}
		for i := range got {
			if !near(got[i], tc.want[i], 1e-9) {
				t.Errorf("stations(%g, %g, %g, %v) = %v, want %v", tc.l, tc.p, tc.e, tc.closed, got, tc.want)
				break
			}
		}
	}
}

// place finds and places the welds of m.
func place(t *testing.T, m *geom.Mesh, fo joints.FlangeOptions, bo joints.BuildOptions) (*Set, []joints.Finding) {
	t.Helper()
	set := findAll(t, m, fo)
	bo = bo.Defaults(joints.MaxThickness(m))
	fs, err := set.Place(context.Background(), geom.NewElemIndex(m), bo)
	if err != nil {
		t.Fatal(err)
	}
	return set, fs
}

func codeCount(fs []joints.Finding, code string) int {
	n := 0
	for _, f := range fs {
		if f.Code == code {
			n++
		}
	}
	return n
}

// Welds on a straight 100 mm strip: one nugget diameter (5 sqrt(t) =
// 5 mm for 1 mm sheets, common practice) from each end, then every
// pitch; each on the faying surface between the sheets (z = 0.5 between
// mid-surfaces at 0 and 1, z = 0.4 on the 0.8 mm plate's top), at the
// middle of the strip, joining the pair.
func TestPlaceOnStrip(t *testing.T) {
	for _, tc := range []struct {
		name   string
		t1, t2 float64
		z2, zf float64
		fo     joints.FlangeOptions
		xs     []float64
	}{
		{"pitch 30", 1, 1, 1, 0.5, joints.FlangeOptions{Pitch: joints.Pitch{MM: 30}}, []float64{5, 35, 65, 95}},
		{"pitch 25", 1, 1, 1, 0.5, joints.FlangeOptions{Pitch: joints.Pitch{MM: 25}}, []float64{12.5, 37.5, 62.5, 87.5}},
		{"end margin 10", 1, 1, 1, 0.5, joints.FlangeOptions{Pitch: joints.Pitch{MM: 30}, EndMargin: 10}, []float64{20, 50, 80}},
		// Governing 0.8 mm: nugget 5 sqrt(0.8) = 4.472 mm, 91.06 mm
		// between the margins: 4 welds 30 apart, 0.53 spare at each end.
		{"0.8 and 1.5 mm", 0.8, 1.5, 1.15, 0.4, joints.FlangeOptions{Pitch: joints.Pitch{MM: 30}},
			[]float64{5.0, 35.0, 65.0, 95.0}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m := mesh(plate(1, tc.t1, 0, 0, 0, 20, 10, 5), plate(2, tc.t2, 0, 10, tc.z2, 20, 4, 5))
			set, fs := place(t, m, tc.fo, joints.BuildOptions{})
			f := one(t, set)
			if len(f.Welds) != len(tc.xs) || len(fs) != 0 {
				t.Fatalf("%d welds, findings %v; want %d, none", len(f.Welds), fs, len(tc.xs))
			}
			d := 5 * math.Sqrt(math.Min(tc.t1, tc.t2))
			for i, w := range f.Welds {
				p := w.Joint.Point
				if !near(p.X, tc.xs[i], 0.05) || !near(p.Y, 20, 0.05) || !near(p.Z, tc.zf, 1e-6) {
					t.Errorf("weld %s at %v, want (%g, 20, %g)", w.Joint.ID, p, tc.xs[i], tc.zf)
				}
				parts := slices.Clone(w.Joint.Parts)
				slices.Sort(parts)
				if !slices.Equal(parts, []int64{1, 2}) || !near(w.Joint.Diameter, d, 1e-12) || w.Station != i+1 ||
					w.Joint.ID != joints.WeldID("1-2-1", i+1) || w.Joint.Group != "1-2-1" {
					t.Errorf("weld %+v", w)
				}
				if i > 0 && !near(w.S-f.Welds[i-1].S, f.Pitch, 1e-9) {
					t.Errorf("welds %d and %d %g apart along the centreline, pitch %g", i, i+1, w.S-f.Welds[i-1].S, f.Pitch)
				}
			}
		})
	}
}

// elemsOf returns, for every node, the elements that use it (brute
// force, independent of the index).
func elemsOf(m *geom.Mesh) map[int32][]int32 {
	out := map[int32][]int32{}
	for e := range m.ElemIDs {
		for _, n := range m.ElemNodes(e) {
			out[n] = append(out[n], int32(e))
		}
	}
	return out
}

// attachNodesOf returns the nodes the weld's ends would be tied to, by
// the definitions of the attachments (found here by brute force over
// the mesh): the host element's nodes (interpolated), the nearest node
// of the sheet (node-pair), or every node of the sheet within half the
// nugget diameter plus the host element's (patch).
func attachNodesOf(m *geom.Mesh, w joints.Joint, a joints.Attach) []int32 {
	var out []int32
	for _, id := range w.Parts {
		pi, _ := m.PartIndex(id)
		best := geom.Projection{Dist: math.Inf(1), Elem: -1}
		for e := range m.ElemIDs {
			if m.ElemPart[e] == pi {
				if pr := m.Project(e, w.Point); pr.Dist < best.Dist {
					best = pr
				}
			}
		}
		host := m.ElemNodes(best.Elem)
		switch a {
		case joints.Interpolated:
			out = append(out, host...)
		case joints.NodePair, joints.Patch:
			near, nd := int32(-1), math.Inf(1)
			for e := range m.ElemIDs {
				if m.ElemPart[e] != pi {
					continue
				}
				for _, n := range m.ElemNodes(e) {
					d := math.Sqrt(sq(m.Coords[n].X-best.Point.X) + sq(m.Coords[n].Y-best.Point.Y) + sq(m.Coords[n].Z-best.Point.Z))
					if a == joints.NodePair && d < nd {
						near, nd = n, d
					}
					if a == joints.Patch && d <= w.Diameter/2 {
						out = append(out, n)
					}
				}
			}
			if a == joints.NodePair {
				out = append(out, near)
			} else {
				out = append(out, host...)
			}
		}
	}
	return out
}

func sq(v float64) float64 { return v * v }

// The rule that keeps welds from acting as a seam: no two welds'
// attachment nodes share an element, whatever the attachment; where the
// mesh (5 mm) is too coarse for the pitch asked, the welds are spaced at
// the smallest pitch that keeps them apart, about three element lengths
// for interpolated attachment, the nugget diameter plus two element
// lengths for patch, two element lengths for node pairs, and the run
// says so (pitch-too-fine).
func TestNoTwoWeldsShareAnElement(t *testing.T) {
	m := mesh(plate(1, 1, 0, 0, 0, 40, 10, 5), plate(2, 1, 0, 10, 1, 40, 4, 5))
	uses := elemsOf(m)
	const h, d = 5.0, 5.0
	for _, a := range []joints.Attach{joints.Interpolated, joints.NodePair, joints.Patch} {
		for _, pitch := range []float64{30, 12, 5} {
			set, fs := place(t, m, joints.FlangeOptions{Pitch: joints.Pitch{MM: pitch}}, joints.BuildOptions{Attach: a})
			f := one(t, set)
			touched := make([]map[int32]bool, len(f.Welds))
			for i, w := range f.Welds {
				touched[i] = map[int32]bool{}
				for _, n := range attachNodesOf(m, w.Joint, a) {
					for _, e := range uses[n] {
						touched[i][e] = true
					}
				}
			}
			for i := range touched {
				for j := range i {
					for e := range touched[i] {
						if touched[j][e] {
							t.Fatalf("%v, pitch %g: welds %s and %s share element %d", a, pitch, f.Welds[i].Joint.ID, f.Welds[j].Joint.ID, m.ElemIDs[e])
						}
					}
				}
			}
			lo, hi := map[joints.Attach][2]float64{
				joints.Interpolated: {2 * h, 3*h + 1}, joints.NodePair: {h, 2*h + 1}, joints.Patch: {d, d + 2*h + 1},
			}[a][0], map[joints.Attach][2]float64{
				joints.Interpolated: {2 * h, 3*h + 1}, joints.NodePair: {h, 2*h + 1}, joints.Patch: {d, d + 2*h + 1},
			}[a][1]
			tooFine := codeCount(fs, joints.CodePitchTooFine) == 1
			switch {
			case pitch >= hi && (tooFine || f.Pitch != pitch):
				t.Errorf("%v, pitch %g: spaced at %g (too fine: %v)", a, pitch, f.Pitch, tooFine)
			case pitch < lo && (!tooFine || f.Pitch < lo || f.Pitch > hi):
				t.Errorf("%v, pitch %g: spaced at %g, want a pitch-too-fine finding and %g..%g", a, pitch, f.Pitch, lo, hi)
			}
		}
	}
}

// On congruent meshes, between two consecutive welds at least one facing
// node pair stays unconnected.
func TestFacingPairFreeBetweenWelds(t *testing.T) {
	m := mesh(plate(1, 1, 0, 0, 0, 40, 10, 5), plate(2, 1, 0, 10, 1, 40, 4, 5))
	for _, a := range []joints.Attach{joints.Interpolated, joints.NodePair, joints.Patch} {
		set, _ := place(t, m, joints.FlangeOptions{Pitch: joints.Pitch{MM: 5}}, joints.BuildOptions{Attach: a})
		f := one(t, set)
		for i := 1; i < len(f.Welds); i++ {
			w0, w1 := f.Welds[i-1].Joint, f.Welds[i].Joint
			used := map[int32]bool{}
			for _, n := range append(attachNodesOf(m, w0, a), attachNodesOf(m, w1, a)...) {
				used[n] = true
			}
			free := false
			for _, fp := range f.Facing {
				x := m.Coords[fp.A].X
				if x > w0.Point.X && x < w1.Point.X && !used[fp.A] && !used[fp.B] {
					free = true
				}
			}
			if !free {
				t.Errorf("%v: no free facing pair between %s and %s", a, w0.ID, w1.ID)
			}
		}
	}
}

// The spacing table (resistance welding manufacturers' schedule, see
// joints.MinSpacing): 1 mm sheets need 18.45 mm, interpolated linearly
// between 0.79 mm (12.7) and 1.02 mm (19.0); a pitch below is reported,
// and "table" takes it as the pitch.
func TestPitchShort(t *testing.T) {
	m := mesh(plate(1, 1, 0, 0, 0, 40, 10, 5), plate(2, 1, 0, 10, 1, 40, 4, 5))
	need := 12.7 + (1-0.79)/(1.02-0.79)*(19.0-12.7) // 18.452 mm
	for _, tc := range []struct {
		pitch joints.Pitch
		short int
		used  float64
	}{
		{joints.Pitch{MM: 16}, 1, 16},
		{joints.Pitch{MM: 19}, 0, 19},
		{joints.Pitch{Table: true}, 0, need},
	} {
		set, fs := place(t, m, joints.FlangeOptions{Pitch: tc.pitch}, joints.BuildOptions{})
		if n := codeCount(fs, joints.CodePitchShort); n != tc.short || !near(one(t, set).Pitch, tc.used, 1e-9) {
			t.Errorf("pitch %v: %d pitch-short findings, spaced at %g; want %d, %g", tc.pitch, n, one(t, set).Pitch, tc.short, tc.used)
		}
	}
}

// A flange narrower than the table's minimum overlap (12.4 mm for 1 mm
// sheets, same table) is reported.
func TestFlangeNarrow(t *testing.T) {
	m := mesh(plate(1, 1, 0, 0, 0, 20, 10, 5), plate(2, 1, 0, 10, 1, 20, 2, 5)) // 10 mm wide
	_, fs := place(t, m, joints.FlangeOptions{Pitch: joints.Pitch{MM: 30}}, joints.BuildOptions{})
	if codeCount(fs, joints.CodeFlangeNarrow) == 0 {
		t.Errorf("10 mm flange not reported narrow: %v", fs)
	}
}

// A doubler over part of the strip makes three-sheet stacks there: the
// welds list the three sheets, and welds that join the same sheets stay
// a pitch apart across the flanges.
func TestThreeSheets(t *testing.T) {
	m := mesh(plate(1, 1, 0, 0, 0, 40, 10, 5), plate(2, 1, 0, 10, 1, 40, 4, 5), plate(3, 1, 100, 12.5, 2, 20, 3, 5))
	set, fs := place(t, m, joints.FlangeOptions{Pitch: joints.Pitch{MM: 30}}, joints.BuildOptions{})
	var all []joints.Joint
	for _, f := range set.Flanges {
		for _, w := range f.Welds {
			all = append(all, w.Joint)
		}
	}
	three := 0
	for _, w := range all {
		over := w.Point.X > 100 && w.Point.X < 200
		if over != (len(w.Parts) == 3) {
			t.Errorf("weld %s at x %g joins %v", w.ID, w.Point.X, w.Parts)
		}
		if len(w.Parts) == 3 {
			three++
		}
	}
	if three == 0 {
		t.Fatalf("no three-sheet weld: %v", all)
	}
	for i, a := range all {
		for _, b := range all[:i] {
			if commonSheets(a.Parts, b.Parts) >= 2 && math.Hypot(a.Point.X-b.Point.X, a.Point.Y-b.Point.Y) < 30-1e-6 {
				t.Errorf("welds %s and %s join the same sheets %g mm apart", a.ID, b.ID, math.Hypot(a.Point.X-b.Point.X, a.Point.Y-b.Point.Y))
			}
		}
	}
	// Three 1 mm sheets need 1.3 x 18.45 = 23.99 mm (the table's note
	// for three sheets): 30 is enough.
	if n := codeCount(fs, joints.CodePitchShort); n != 0 {
		t.Errorf("pitch-short at 30 mm: %v", fs)
	}
}

// A ring gets equal spacing all round: floor(L / p) welds.
func TestPlaceOnRing(t *testing.T) {
	m := mesh(annulus(1, 1, 0, 20, 60, 16, 72), annulus(2, 1, 1, 30, 45, 6, 72))
	set, _ := place(t, m, joints.FlangeOptions{Pitch: joints.Pitch{MM: 30}}, joints.BuildOptions{})
	f := one(t, set)
	n := int(math.Floor(f.Length / 30))
	if len(f.Welds) != n || !near(f.Pitch, f.Length/float64(n), 1e-9) {
		t.Fatalf("%d welds at %g, want %d at %g", len(f.Welds), f.Pitch, n, f.Length/float64(n))
	}
	for i, w := range f.Welds {
		if r := math.Hypot(w.Joint.Point.X, w.Joint.Point.Y); !near(r, 37.5, 0.3) {
			t.Errorf("weld %s at radius %g", w.Joint.ID, r)
		}
		if i > 0 && !near(w.S-f.Welds[i-1].S, f.Pitch, 1e-9) {
			t.Errorf("spacing %g", w.S-f.Welds[i-1].S)
		}
	}
}

// A pitch finer than the mesh allows gives the most welds that keep the
// rule, spaced at the smallest pitch that keeps them apart. On a 6 mm
// grid a 78 mm strip keeps interpolated welds apart from 16.5 mm (five
// stations) but not from 17.0 to 18 mm (four stations would fit, yet
// they share elements), so the rule is not monotonic in the pitch and a
// search that bisects from the pitch asked may end above the window:
// it gave four welds at 18.06 mm for 1 mm. The count is checked against
// arithmetic: n = floor((L - 2e) / p) + 1 stations for length L = 78,
// end margins e = one nugget diameter, 5 sqrt(1) = 5 mm (common
// practice), and p the smallest pitch asked that gives no
// pitch-too-fine finding (found by trying them every 0.05 mm).
func TestTooFinePitchGivesMostWelds(t *testing.T) {
	const h, l, e = 6.0, 78.0, 5.0
	m := mesh(plate(1, 1, 0, 0, 0, 13, 10, h), plate(2, 1, 0, 2*h, 1, 13, 4, h))
	uses := elemsOf(m)
	set := findAll(t, m, joints.FlangeOptions{})
	f := one(t, set)
	if !near(f.Length, l, 1e-6) {
		t.Fatalf("flange %g mm long, want %g", f.Length, l)
	}
	x := geom.NewElemIndex(m)
	bo := joints.BuildOptions{}.Defaults(joints.MaxThickness(m))
	run := func(pitch float64) (*joints.Flange, []joints.Finding) {
		set.opts.Pitch = joints.Pitch{MM: pitch}
		fs, err := set.Place(context.Background(), x, bo)
		if err != nil {
			t.Fatal(err)
		}
		return one(t, set), fs
	}
	workable := 0.0
	for k := range 400 {
		p := 10 + 0.05*float64(k)
		if _, fs := run(p); codeCount(fs, joints.CodePitchTooFine) == 0 {
			workable = p
			break
		}
	}
	if workable == 0 {
		t.Fatal("no workable pitch from 10 to 30 mm")
	}
	want := int(math.Floor((l-2*e)/workable)) + 1
	if want != 5 { // 68 / 16.5 -> 4, + 1
		t.Fatalf("smallest workable pitch %g mm gives %d stations, want 5", workable, want)
	}
	for _, pitch := range []float64{1, 0.2, 8} {
		f, fs := run(pitch)
		if codeCount(fs, joints.CodePitchTooFine) != 1 || len(f.Welds) < want || f.Pitch > workable+1e-9 {
			t.Errorf("pitch %g: %d welds at %g mm (pitch-too-fine %d); want %d at no more than %g, and the finding",
				pitch, len(f.Welds), f.Pitch, codeCount(fs, joints.CodePitchTooFine), want, workable)
		}
		for i := 1; i < len(f.Welds); i++ {
			touched := map[int32]bool{}
			for _, n := range attachNodesOf(m, f.Welds[i-1].Joint, joints.Interpolated) {
				for _, el := range uses[n] {
					touched[el] = true
				}
			}
			for _, n := range attachNodesOf(m, f.Welds[i].Joint, joints.Interpolated) {
				for _, el := range uses[n] {
					if touched[el] {
						t.Fatalf("pitch %g: welds %s and %s share element %d", pitch, f.Welds[i-1].Joint.ID, f.Welds[i].Joint.ID, m.ElemIDs[el])
					}
				}
			}
		}
	}
}
