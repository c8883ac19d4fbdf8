package geom

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// moderate reports whether every coordinate is finite and below 1e6 in
// magnitude, the range where the accuracy checks of the fuzz targets
// apply; outside it only the absence of panics is checked.
func moderate(v ...r3.Vec) bool {
	for _, p := range v {
		for _, c := range [3]float64{p.X, p.Y, p.Z} {
			if !(math.Abs(c) < 1e6) {
				return false
			}
		}
	}
	return true
}

// fuzzScale returns the largest coordinate magnitude, at least 1.
func fuzzScale(v ...r3.Vec) float64 {
	s := 1.0
	for _, p := range v {
		s = max(s, math.Abs(p.X), math.Abs(p.Y), math.Abs(p.Z))
	}
	return s
}

func checkFuzzWeights(t *testing.T, q r3.Vec, w []float64, x []r3.Vec) {
	t.Helper()
	var sum float64
	var s r3.Vec
	for i := range x {
		sum += w[i]
		s = r3.Add(s, r3.Scale(w[i], x[i]))
		if !(w[i] >= -1e-12 && w[i] <= 1+1e-12) {
			t.Fatalf("weight %d = %g", i, w[i])
		}
	}
	if math.Abs(sum-1) > 1e-12 {
		t.Fatalf("weights %v sum to %.17g", w, sum)
	}
	if !near(s, q, 1e-12*fuzzScale(x...)) {
		t.Fatalf("weights reproduce %v, want %v", s, q)
	}
}

func FuzzClosestOnTriangle(f *testing.F) {
	f.Add(0.5, 0.5, 3.0, 0.0, 0.0, 0.0, 2.0, 0.0, 0.0, 0.0, 2.0, 0.0)
	f.Add(1.5, 1.0, 0.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 2.0, 0.0, 0.0)
	f.Add(1.0, 2.0, 3.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0)
	f.Add(math.NaN(), 0.0, 0.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0, 0.0)
	f.Add(1e300, -1e300, 0.0, 0.0, 0.0, 0.0, 1e-300, 0.0, 0.0, 0.0, math.Inf(1), 0.0)
	f.Fuzz(func(t *testing.T, px, py, pz, ax, ay, az, bx, by, bz, cx, cy, cz float64) {
		p, a, b, c := v3(px, py, pz), v3(ax, ay, az), v3(bx, by, bz), v3(cx, cy, cz)
		q, l := ClosestOnTriangle(p, a, b, c)
		if !moderate(p, a, b, c) {
			return
		}
		checkFuzzWeights(t, q, l[:], []r3.Vec{a, b, c})
		// The weights place q on the triangle, so it is no nearer than
		// the true closest point; it must not be farther than the
		// reference's either.
		got := r3.Norm(r3.Sub(p, q))
		want := r3.Norm(r3.Sub(p, closestOnTriangleRef(p, a, b, c)))
		if got > want+1e-9*fuzzScale(p, a, b, c) {
			t.Fatalf("distance %.17g, reference %.17g", got, want)
		}
	})
}

func FuzzClosestOnQuad(f *testing.F) {
	f.Add(0.5, 1.5, 4.0, 0.0, 0.0, 0.0, 2.0, 0.0, 0.0, 2.0, 2.0, 0.0, 0.0, 2.0, 0.0)
	f.Add(0.9, 0.9, -2.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 1.0, 1.0, 0.3, 0.0, 1.0, 0.0)
	f.Add(0.2, 0.1, 1.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 1.0, 0.0)
	f.Add(1.0, 1.0, 1.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0)
	f.Add(5.0, -3.0, 2.0, 0.0, 0.0, 0.0, 4.0, 0.0, 1.0, 0.0, 4.0, -1.0, 4.0, 4.0, 0.0)
	f.Add(math.Inf(1), 0.0, 0.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 1.0, 1.0, math.NaN(), 0.0, 1.0, 0.0)
	f.Fuzz(func(t *testing.T, px, py, pz, x0, y0, z0, x1, y1, z1, x2, y2, z2, x3, y3, z3 float64) {
		p := v3(px, py, pz)
		x := [4]r3.Vec{v3(x0, y0, z0), v3(x1, y1, z1), v3(x2, y2, z2), v3(x3, y3, z3)}
		q, w, xi, eta := ClosestOnQuad(p, x)
		n := quadNormal(x, xi, eta)
		if !moderate(p, x[0], x[1], x[2], x[3]) {
			return
		}
		if !(math.Abs(xi) <= 1 && math.Abs(eta) <= 1) {
			t.Fatalf("(xi, eta) = (%g, %g) outside the element", xi, eta)
		}
		if l := r3.Norm(n); l != 0 && math.Abs(l-1) > 1e-12 {
			t.Fatalf("normal %v has length %g", n, l)
		}
		checkFuzzWeights(t, q, w[:], x[:])
		// The closest point is at least as close as any sampled point
		// of the surface (corners, edges and interior on a 9 x 9 grid).
		got := r3.Norm(r3.Sub(p, q))
		s := newBilinear(x)
		tol := 1e-9 * fuzzScale(p, x[0], x[1], x[2], x[3])
		for i := range 9 {
			for j := range 9 {
				u, v := float64(i)/4-1, float64(j)/4-1
				if d := r3.Norm(r3.Sub(p, s.at(u, v))); d < got-tol {
					t.Fatalf("distance %.17g at (%g, %g), but (%g, %g) is at %.17g", got, xi, eta, u, v, d)
				}
			}
		}
	})
}
