package spot

import (
	"context"
	"fmt"
	"slices"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/synth"
)

// synthModel makes the synthetic body used by the build tests and
// benchmarks.
func synthModel(tb testing.TB, elements, welds int) *synth.Model {
	tb.Helper()
	md, err := synth.Generate(synth.Config{Elements: elements, Welds: welds, Bolts: 4, Seed: 7})
	if err != nil {
		tb.Fatal(err)
	}
	return md
}

// TestBuildFindsGeneratedStacks checks the automatic sheet choice against
// the generator's ground truth: every spot weld must get exactly the
// stack the generator built, in order along the stack axis.
func TestBuildFindsGeneratedStacks(t *testing.T) {
	md := synthModel(t, 60_000, 300)
	res, err := buildAll(context.Background(), geom.NewIndex(md.Mesh), md.Joints, joints.BuildOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	truth := map[string][]int64{}
	for i, j := range md.Joints {
		truth[j.ID] = md.Stacks[i]
	}
	for _, c := range res.Connectors {
		if c.Joint.Kind != joints.Spot {
			continue
		}
		want := truth[c.Joint.ID]
		got := c.Stack.Parts()
		if !slices.Equal(got, want) && !slices.Equal(got, reversed(want)) {
			t.Errorf("joint %s: stack %v, want %v (findings %v)", c.Joint.ID, got, want, c.Findings)
		}
		if c.Status == joints.NotBuilt {
			t.Errorf("joint %s failed: %v", c.Joint.ID, c.Findings)
		}
	}
}

func reversed(s []int64) []int64 {
	r := slices.Clone(s)
	slices.Reverse(r)
	return r
}

// BenchmarkBuildWelds measures the weld stage alone (index built once)
// on a 2,000,000-element synthetic body with 600, 6,000 and 60,000 spot
// welds (the 60,000 case repeats each of the 6,000 welds ten times under
// new ids, as the generator's flanges hold about 15,000).
func BenchmarkBuildWelds(b *testing.B) {
	if testing.Short() {
		b.Skip("2,000,000 elements")
	}
	md := synthModel(b, 2_000_000, 6000)
	x := geom.NewIndex(md.Mesh)
	var spots []joints.Joint
	for _, j := range md.Joints {
		if j.Kind == joints.Spot {
			spots = append(spots, j)
		}
	}
	var many []joints.Joint
	for k := 0; k < 10; k++ {
		for _, j := range spots {
			j.ID = fmt.Sprintf("%s-%d", j.ID, k)
			many = append(many, j)
		}
	}
	for _, js := range [][]joints.Joint{spots[:600], spots, many} {
		b.Run(fmt.Sprintf("welds=%d", len(js)), func(b *testing.B) {
			for b.Loop() {
				if _, err := buildAll(context.Background(), x, js, joints.BuildOptions{}, nil); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(js))/1e3, "µs/weld")
		})
	}
}

// BenchmarkIndex2M measures building the spatial index of a
// 2,000,000-element body.
func BenchmarkIndex2M(b *testing.B) {
	if testing.Short() {
		b.Skip("2,000,000 elements")
	}
	md := synthModel(b, 2_000_000, 600)
	for b.Loop() {
		geom.NewIndex(md.Mesh)
	}
}

// BenchmarkIndexNear2M measures building the index a build uses (the
// elements within reach of 6,000 welds) on the same body.
func BenchmarkIndexNear2M(b *testing.B) {
	if testing.Short() {
		b.Skip("2,000,000 elements")
	}
	md := synthModel(b, 2_000_000, 6000)
	for b.Loop() {
		IndexFor(md.Mesh, md.Joints, joints.BuildOptions{})
	}
}
