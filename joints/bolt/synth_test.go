package bolt

import (
	"context"
	"slices"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/spot"
	"github.com/joinery-cae/joinery/joints/synth"
)

// TestSynthBolts builds the bolts of a synthetic body against the
// generator's ground truth: every bolt gets exactly the stack the
// generator bolted, is built, and couples translations only.
func TestSynthBolts(t *testing.T) {
	md, err := synth.Generate(synth.Config{Elements: 60_000, Welds: 200, Bolts: 30, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	cs, err := Build(context.Background(), IndexFor(md.Mesh, md.Joints, joints.BuildOptions{}), md.Joints, joints.BuildOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	truth := map[string][]int64{}
	for i, j := range md.Joints {
		truth[j.ID] = md.Stacks[i]
	}
	if len(cs) != 30 {
		t.Fatalf("%d bolts built, want 30", len(cs))
	}
	for _, c := range cs {
		want, got := truth[c.Joint.ID], c.Stack.Parts()
		rev := slices.Clone(want)
		slices.Reverse(rev)
		if !slices.Equal(got, want) && !slices.Equal(got, rev) {
			t.Errorf("bolt %s: stack %v, want %v", c.Joint.ID, got, want)
		}
		if c.Status != joints.Built || c.DOFs != joints.Translations {
			t.Errorf("bolt %s: %s, dofs %s, findings %v", c.Joint.ID, c.Status, c.DOFs, codes(c.Findings))
		}
	}
}

// BenchmarkBolts2M measures the bolt stage beside the spot-weld stage on
// the 2,000,000-element synthetic body with 6,000 welds and 300 bolts,
// one index built once for both (as the pipeline does): the ratio of
// the two is the bolts' share of the connector build.
//
//	go test -run='^$' -bench=Bolts2M -benchtime=3x ./joints/bolt/
func BenchmarkBolts2M(b *testing.B) {
	if testing.Short() {
		b.Skip("2,000,000 elements")
	}
	md, err := synth.Generate(synth.Config{Elements: 2_000_000, Welds: 6000, Bolts: 300, Seed: 1})
	if err != nil {
		b.Fatal(err)
	}
	o := joints.BuildOptions{}
	pts, margin := spot.Near(md.Mesh, md.Joints, o)
	bpts, bmargin := Near(md.Mesh, md.Joints, o)
	b.Run("index", func(b *testing.B) {
		for b.Loop() {
			geom.NewIndexNear(md.Mesh, append(slices.Clone(pts), bpts...), max(margin, bmargin), false)
		}
	})
	x := geom.NewIndexNear(md.Mesh, append(pts, bpts...), max(margin, bmargin), false)
	b.Run("spot6000", func(b *testing.B) {
		for b.Loop() {
			if _, err := spot.Build(context.Background(), x, md.Joints, o, nil); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("bolt300", func(b *testing.B) {
		for b.Loop() {
			if _, err := Build(context.Background(), x, md.Joints, o, nil); err != nil {
				b.Fatal(err)
			}
		}
	})
}
