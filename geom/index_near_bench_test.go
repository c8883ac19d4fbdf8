package geom

import (
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// BenchmarkNearElements measures the selection NewIndexNear makes (the
// elements whose box lies within margin of a point, their boxes filled
// in for the tree) on 2,000,000 quads of 5 mm with 6,000 points spread
// over them and a margin of 18 mm (a build's reach and edge checks on a
// body), in CPU time per selection. Skipped with -short.
func BenchmarkNearElements(b *testing.B) {
	if testing.Short() {
		b.Skip("2,000,000 elements")
	}
	m := gridMesh(2000, 1000, 5, 20)
	rng := rand.New(rand.NewPCG(5, 6))
	pts := make([]r3.Vec, 6000)
	for i := range pts {
		pts[i] = r3.Vec{X: 10000 * rng.Float64(), Y: 5000 * rng.Float64()}
	}
	var sel []int32
	defer cpuMetric(b)()
	for b.Loop() {
		sel, _ = nearElements(m, NearPoints{pts, 18})
	}
	b.ReportMetric(float64(len(sel)), "selected")
}
