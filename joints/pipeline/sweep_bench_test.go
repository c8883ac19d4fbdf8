package pipeline

import (
	"context"
	"hash"
	"testing"
	"time"

	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/spot"
	"github.com/joinery-cae/joinery/joints/stiffness"
	"github.com/joinery-cae/joinery/joints/synth"
	"github.com/joinery-cae/joinery/writers"
	"github.com/joinery-cae/joinery/writers/html"
)

// BenchmarkSweep8 measures the variants of a sweep of 8 (spot-weld
// rotations x attachment x link form) on the 2,000,000-element synthetic
// body with 6,000 welds, side by side with one build's same steps (the
// read and the writing to disk excepted): index, connectors, check,
// documents and page, with the page's outline. It reports both as ms per
// run and their ratio as sweep/build.
func BenchmarkSweep8(b *testing.B) {
	if testing.Short() {
		b.Skip("2,000,000 elements")
	}
	md, err := synth.Generate(synth.Config{Elements: 2_000_000, Welds: 6000, Bolts: 20, Seed: 1})
	if err != nil {
		b.Fatal(err)
	}
	job := &Job{Version: 1}
	var vary []Vary
	for _, s := range []string{"spot-dofs=tx+ty+tz+rx+ry+rz,tx+ty+tz", "attach=interpolated,patch", "links=gap,offset"} {
		v, err := ParseVary(s)
		if err != nil {
			b.Fatal(err)
		}
		vary = append(vary, v)
	}
	s, err := job.SweepSettings(vary, 0)
	if err != nil {
		b.Fatal(err)
	}
	variants, err := s.Variants(job)
	if err != nil {
		b.Fatal(err)
	}
	newInputs := func() *Inputs {
		return &Inputs{Job: job, Model: &meshio.Model{Mesh: md.Mesh}, Joints: md.Joints, sums: &inputSums{sums: map[string]hash.Hash{}}}
	}
	material := func(int64) stiffness.Material { return stiffness.Steel() }
	ctx := context.Background()
	var tBuild, tSweep time.Duration
	for b.Loop() {
		t0 := time.Now()
		in := newInputs()
		o := html.NewOutline(md.Mesh)
		if err := renderVariant(ctx, in, &Variant{Name: "build", Job: job, Build: BuildSettings{}}, material, func() *html.Outline { return o }); err != nil {
			b.Fatal(err)
		}
		t1 := time.Now()
		in = newInputs()
		o = html.NewOutline(md.Mesh)
		opts := make([]joints.BuildOptions, len(variants))
		for i, v := range variants {
			opts[i] = v.Build.Options
		}
		in.index = spot.IndexForAll(md.Mesh, md.Joints, opts)
		in.stacks = &spot.Stacks{}
		in.shared = newSharedBuilds(variants)
		done := make(chan error, len(variants))
		sem := make(chan struct{}, 2)
		for i := range variants {
			go func() {
				sem <- struct{}{}
				defer func() { <-sem }()
				done <- renderVariant(ctx, in, &variants[i], material, func() *html.Outline { return o })
			}()
		}
		for range variants {
			if err := <-done; err != nil {
				b.Fatal(err)
			}
		}
		t2 := time.Now()
		tBuild += t1.Sub(t0)
		tSweep += t2.Sub(t1)
	}
	n := float64(b.N)
	b.ReportMetric(float64(tBuild.Milliseconds())/n, "build-ms")
	b.ReportMetric(float64(tSweep.Milliseconds())/n, "sweep8-ms")
	b.ReportMetric(float64(tSweep)/float64(tBuild), "sweep/build")
}

// renderVariant builds a variant and renders its files in memory.
func renderVariant(ctx context.Context, in *Inputs, v *Variant, material func(int64) stiffness.Material, outline func() *html.Outline) error {
	_, files, err := buildVariant(ctx, in, v, material, Env{}, outline)
	if err == nil {
		_, err = writers.Render(files)
	}
	return err
}
