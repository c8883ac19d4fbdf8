package geom

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestMayAdmitWidensAdmits checks that the single-precision pre-test of
// the facing search never rejects what the exact test admits: random
// clusters and lines around coordinates of 0 to 50 m (a car body in mm),
// many of them on the edge of the limits, where rounding decides.
func TestMayAdmitWidensAdmits(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	round := func(v r3.Vec) r3.Vec {
		return r3.Vec{X: float64(float32(v.X)), Y: float64(float32(v.Y)), Z: float64(float32(v.Z))}
	}
	unit := func() r3.Vec {
		v := r3.Vec{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()}
		return r3.Scale(1/r3.Norm(v), v)
	}
	cases := []struct {
		name  string
		scale float64 // mm, the size of the coordinates
	}{
		{"near the origin", 1},
		{"a part", 1e3},
		{"a car body", 5e4},
	}
	const r, repCos = 4.5, 0.9
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			admitted := 0
			for range 200000 {
				base := r3.Scale(tc.scale, r3.Vec{X: rng.Float64()*2 - 1, Y: rng.Float64()*2 - 1, Z: rng.Float64()*2 - 1})
				c := cluster{n: round(unit()), lo: base, hi: r3.Add(base, r3.Vec{X: rng.Float64() * 10, Y: rng.Float64() * 10, Z: rng.Float64() * 10}), rad: rng.Float64() * 5}
				// A line on the edge of the distance limit, and a normal on
				// the edge of the angle limit, now and then.
				lim := (r + c.rad) * (1 + 1e-5)
				d := lim * (1 + (rng.Float64()-0.5)*1e-9)
				c0 := r3.Add(c.hi, r3.Scale(d, r3.Scale(1/math.Sqrt(3), r3.Vec{X: 1, Y: 1, Z: 1})))
				if rng.IntN(2) == 0 {
					c0 = r3.Add(c.lo, r3.Scale(rng.Float64()*12, unit()))
				}
				n := unit()
				if rng.IntN(2) == 0 {
					// A normal at the angle limit to the cluster's.
					p := r3.Cross(c.n, unit())
					p = r3.Scale(1/r3.Norm(p), p)
					a := math.Acos(repCos) * (1 + (rng.Float64()-0.5)*1e-7)
					n = r3.Add(r3.Scale(math.Cos(a), c.n), r3.Scale(math.Sin(a), p))
					n = r3.Scale(1/r3.Norm(n), n)
				}
				if !c.admits(c0, n, repCos, r) {
					continue
				}
				admitted++
				c32, n32 := round(c0), round(n)
				size := math.Max(math.Abs(c32.X), math.Max(math.Abs(c32.Y), math.Abs(c32.Z)))
				if !c.mayAdmit(c32, n32, size, repCos, r) {
					t.Fatalf("admits %v %v but the rounded %v %v are rejected", c0, n, c32, n32)
				}
			}
			if admitted < 1000 {
				t.Fatalf("only %d lines admitted: the test does not test", admitted)
			}
		})
	}
}
