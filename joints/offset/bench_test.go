package offset

import (
	"context"
	"sync"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/synth"
)

// body2M is the 2,000,000-element synthetic body of the benchmarks
// (joints/synth, seed 1, 6,000 welds), made once.
var body2M = sync.OnceValues(func() (*synth.Model, error) {
	return synth.Generate(synth.Config{Elements: 2_000_000, Welds: 6000, Bolts: 20, Seed: 1})
})

func body(b *testing.B) *synth.Model {
	if testing.Short() {
		b.Skip("2,000,000 elements: not with -short")
	}
	md, err := body2M()
	if err != nil {
		b.Fatal(err)
	}
	return md
}

// BenchmarkInfer2M measures the stages of a surface inference on the
// synthetic body: the element index, the orientation of the normals, the
// facing elements and the whole Infer (index excluded).
func BenchmarkInfer2M(b *testing.B) {
	md := body(b)
	m := md.Mesh
	b.Run("index", func(b *testing.B) {
		for b.Loop() {
			geom.NewElemIndex(m)
		}
	})
	adj := geom.NodeElements(m)
	b.Run("orient", func(b *testing.B) {
		for b.Loop() {
			geom.OrientNormals(m, adj)
		}
	})
	x := geom.NewElemIndex(m)
	b.Run("facing", func(b *testing.B) {
		for b.Loop() {
			x.FacingElements(m.ElemPart, 4.5, 0.94, true)
		}
	})
	b.Run("infer", func(b *testing.B) {
		for b.Loop() {
			if _, err := Infer(context.Background(), x, md.Joints, joints.BuildOptions{}, nil); err != nil {
				b.Fatal(err)
			}
		}
	})
}
