package flange

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// checkWidth fails the test unless min <= mean <= max, and mean lies
// within tol of want.
func checkWidth(t *testing.T, w joints.Span, want, tol float64) {
	t.Helper()
	if !(w.Min <= w.Mean && w.Mean <= w.Max) || !near(w.Mean, want, tol) {
		t.Errorf("width %+v: want min <= mean <= max, mean %g within %g", w, want, tol)
	}
}

// A straight strip overlap traced on a triangle host: part 1, quads of
// 5 mm, x 0..100, y 0..20 at z = 0; part 2, the host (the finer mesh),
// triangles of h (both diagonals), x 0..100 and y from y0 to y1 at
// z = 1, every edge of the overlap on a host node line. The overlap is
// the rectangle x 0..100, y max(0, y0)..min(20, y1), whose centreline
// is its mid-line y = (lo+hi)/2, 100 long, the width hi-lo (closed
// form). Where part 1's edge crosses the host (y0 < 0 or y1 > 20), the
// overlap ends at that edge, and the host's pieces there are slivers
// the contact slack leaves beyond it; on the host's own edge the
// outermost triangles' centroids lie h/3 inside. The centreline and the
// welds keep to the mid-line within 0.02 h (README: where the meshes
// hold the overlap's edges); the area within 0.01 % (the slivers, 5e-4
// mm wide), the length and the mean width within 0.02 h.
func TestTriangleHostCentre(t *testing.T) {
	for _, h := range []float64{2, 2.5, 4} {
		for _, diag := range []bool{false, true} {
			for _, cut := range []struct {
				name   string
				y0, y1 float64
			}{
				{"part 1 cuts the host below", -2 * h, 4 * math.Floor(16/(4*h)) * h}, // y1 = 16, 15, 16: a node line below 20
				{"part 1 cuts the host above", h * math.Ceil(4/h), 20 + 2*h},         // y0 = 4, 5, 4
				{"part 1 cuts the host on both sides", -2 * h, 20 + 2*h},
			} {
				name := fmt.Sprintf("h %g, diagonal %v, %s", h, map[bool]string{false: "ac", true: "bd"}[diag], cut.name)
				t.Run(name, func(t *testing.T) {
					nu, nv := int(math.Round(100/h)), int(math.Round((cut.y1-cut.y0)/h))
					host := plate(2, 1, 0, cut.y0, 1, nu, nv, h)
					host.Tri, host.Diag = true, diag
					m := mesh(plate(1, 1, 0, 0, 0, 20, 4, 5), host)
					lo, hi := math.Max(0, cut.y0), math.Min(20, cut.y1)
					mid, w := (lo+hi)/2, hi-lo
					set, fs := place(t, m, joints.FlangeOptions{Pitch: joints.Pitch{MM: 30}}, joints.BuildOptions{})
					f := one(t, set)
					tol := 0.02 * h
					if !near(f.Area, 100*w, 1e-4*100*w) || !near(f.Length, 100, tol) {
						t.Errorf("area %g, length %g; want %g, 100", f.Area, f.Length, 100*w)
					}
					checkWidth(t, f.Width, w, tol)
					for _, p := range f.Centreline {
						if !near(p.Y, mid, tol) || !near(p.Z, 0.5, 1e-9) {
							t.Errorf("centreline point %v off the mid-line y = %g of the faying surface z = 0.5", p, mid)
						}
					}
					// 100 mm at 30 mm from one nugget diameter (5 mm)
					// in: stations at 5, 35, 65, 95 (TestStations).
					if len(f.Welds) != 4 {
						t.Fatalf("%d welds, want 4 (%v)", len(f.Welds), fs)
					}
					for _, wd := range f.Welds {
						if !near(wd.Joint.Point.Y, mid, tol) {
							t.Errorf("weld %s at %v: off the mid-line y = %g", wd.Joint.ID, wd.Joint.Point, mid)
						}
					}
				})
			}
		}
	}
}

// quarterAnnulus is a flat quarter ring, radii 50..70 mm over 0..90
// degrees at height z: 30 quads round and 4 across (5 mm across, 3
// degrees round).
func quarterAnnulus(part int64, z float64) sheet {
	return sheet{Part: part, T: 1, NU: 30, NV: 4, At: func(i, j int) r3.Vec {
		a := math.Pi / 2 * float64(i) / 30
		r := 50 + 5*float64(j)
		return r3.Vec{X: r * math.Cos(a), Y: r * math.Sin(a), Z: z}
	}}
}

// A flange curved in its plane, two identical quarter rings 50..70 mm
// (congruent: the node ring r = 60 holds the mid-line). The centreline
// is the mid-radius arc r = 60 (closed form), pi/2 60 = 94.248 mm long;
// the meshed polygon at r = 60, 30 chords of 3 degrees, is 30 2 60
// sin(1.5 deg) = 94.237 mm. The centreline's points, its ends (on the
// edges x = 0 and y = 0) and every weld keep to r = 60 within 0.02 h
// (h = 5 mm, README), and so does its length. The area is the meshed
// ring's, 30 polygon sectors of 1/2 sin(3 deg) (70^2 - 50^2) =
// 1884.09 mm^2, the mean width area / length = 20 within 0.02 h.
func TestCurvedInPlaneFlange(t *testing.T) {
	for _, pitch := range []float64{30, 20, 12} {
		t.Run(fmt.Sprintf("pitch %g", pitch), func(t *testing.T) {
			m := mesh(quarterAnnulus(1, 0), quarterAnnulus(2, 1))
			set, fs := place(t, m, joints.FlangeOptions{Pitch: joints.Pitch{MM: pitch}}, joints.BuildOptions{})
			f := one(t, set)
			const h, r = 5.0, 60.0
			tol := 0.02 * h
			area := 30 * 0.5 * math.Sin(math.Pi/60) * (70*70 - 50*50)
			if f.Match != joints.Congruent || f.Closed || !near(f.Area, area, 1e-9*area) || !near(f.Length, math.Pi/2*r, tol) {
				t.Errorf("%v, closed %v, area %g, length %g; want congruent, open, %g, %g", f.Match, f.Closed, f.Area, f.Length, area, math.Pi/2*r)
			}
			checkWidth(t, f.Width, 20, tol)
			for _, p := range f.Centreline {
				if d := math.Hypot(p.X, p.Y); !near(d, r, tol) || !near(p.Z, 0.5, 1e-9) {
					t.Errorf("centreline point %v at radius %g, want %g", p, d, r)
				}
			}
			a, b := f.Centreline[0], f.Centreline[len(f.Centreline)-1]
			if math.Min(math.Abs(a.X), math.Abs(a.Y)) > 1e-6 || math.Min(math.Abs(b.X), math.Abs(b.Y)) > 1e-6 {
				t.Errorf("centreline ends %v and %v, want them on the edges x = 0 and y = 0", a, b)
			}
			if len(f.Welds) < 3 {
				t.Fatalf("%d welds (%v)", len(f.Welds), fs)
			}
			for _, wd := range f.Welds {
				if d := math.Hypot(wd.Joint.Point.X, wd.Joint.Point.Y); !near(d, r, tol) {
					t.Errorf("weld %s at %v: radius %g, want %g", wd.Joint.ID, wd.Joint.Point, d, r)
				}
			}
		})
	}
}

// sector is a flat ring sector, radii r0..r1 round the z axis over deg
// degrees at height z, nr quads across and na round.
func sector(part int64, z, r0, r1 float64, nr, na int, deg float64) sheet {
	return sheet{Part: part, T: 1, NU: na, NV: nr, At: func(i, j int) r3.Vec {
		a := deg * math.Pi / 180 * float64(i) / float64(na)
		r := r0 + (r1-r0)*float64(j)/float64(nr)
		return r3.Vec{X: r * math.Cos(a), Y: r * math.Sin(a), Z: z}
	}}
}

// A coarsely meshed curved flange (as round a wheel arch): two identical
// sectors 50..70 mm over 90 degrees, 9 elements round (10 degrees each).
// The meshed overlap is the band between two polygons; its mid-line is
// the polygon of the mid-radius ring's chords, r = rm cos(d/2) / cos(phi)
// (rm = 60, d = 10 degrees, phi the angle from the element's middle;
// closed form), which cuts inside the true arc r = rm by at most the
// sagitta rm (1 - cos(d/2)) = 0.228 mm (closed form): what the mesh
// allows. Away from the ends (12.5 to 77.5 degrees, more than an element
// and a quarter in, where the last station lies) the centreline keeps to
// that polygon within 0.05 mm (its points on the polygon, its chords
// between them passing the polygon's vertices a fraction of a degree
// away); everywhere it keeps to the arc within the sagitta and 0.05 mm
// (the ends are carried on along the circle through the last stations),
// every weld within the sagitta and 0.01 mm. Before densify inserted
// cross-section middles, its four-point guesses rounded the polygon into
// a curve 0.29 mm off it, 0.285 mm off the arc.
func TestCoarseCurvedFlange(t *testing.T) {
	const rm, deg, na = 60.0, 90.0, 9
	half := deg / na / 2 * math.Pi / 180
	sag := rm * (1 - math.Cos(half))
	for _, nr := range []int{2, 4} {
		t.Run(fmt.Sprintf("%d across", nr), func(t *testing.T) {
			m := mesh(sector(1, 0, 50, 70, nr, na, deg), sector(2, 1, 50, 70, nr, na, deg))
			set, fs := place(t, m, joints.FlangeOptions{Pitch: joints.Pitch{MM: 30}}, joints.BuildOptions{})
			f := one(t, set)
			poly := func(p r3.Vec) float64 {
				a := math.Atan2(p.Y, p.X)
				phi := a - (math.Floor(a/(2*half))+0.5)*2*half
				return math.Hypot(p.X, p.Y) - rm*math.Cos(half)/math.Cos(phi)
			}
			// The length of the mid polygon, 9 chords 2 rm sin(d/2)
			// (closed form), to 0.05 mm.
			if want := na * 2 * rm * math.Sin(half); !near(f.Length, want, 0.05) {
				t.Errorf("length %.4f, want %.4f (the mid polygon; the arc is %.4f)", f.Length, want, deg*math.Pi/180*rm)
			}
			for i := 0; i+1 < len(f.Centreline); i++ {
				for k := 0; k <= 10; k++ {
					p := r3.Add(f.Centreline[i], r3.Scale(float64(k)/10, r3.Sub(f.Centreline[i+1], f.Centreline[i])))
					a := math.Atan2(p.Y, p.X) * 180 / math.Pi
					if d := poly(p); a > 12.5 && a < 77.5 && math.Abs(d) > 0.05 {
						t.Errorf("centreline at %v (%.2f deg) is %.4f mm off the mesh's mid polygon", p, a, d)
					}
					if d := math.Hypot(p.X, p.Y) - rm; math.Abs(d) > sag+0.05 {
						t.Errorf("centreline at %v (%.2f deg) is %.4f mm off the arc r = %g (sagitta %.4f)", p, a, d, rm, sag)
					}
				}
			}
			if len(f.Welds) != 3 {
				t.Fatalf("%d welds (%v)", len(f.Welds), fs)
			}
			for _, w := range f.Welds {
				if d := math.Hypot(w.Joint.Point.X, w.Joint.Point.Y) - rm; math.Abs(d) > sag+0.01 {
					t.Errorf("weld %s at %v: %.4f off the arc (sagitta %.4f)", w.Joint.ID, w.Joint.Point, d, sag)
				}
			}
		})
	}
}
