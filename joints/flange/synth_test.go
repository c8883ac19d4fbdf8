package flange

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/synth"
)

// segDist returns the distance from p to the polyline pts.
func segDist(p r3.Vec, pts []r3.Vec, closed bool) float64 {
	best := math.Inf(1)
	n := len(pts)
	segs := n - 1
	if closed {
		segs = n
	}
	for i := range segs {
		best = math.Min(best, geom.SegmentDistance(p, pts[i], pts[(i+1)%n]))
	}
	return best
}

// The synthetic body's generator puts its welds on the middle of the
// faying flanges and says which sheets each joins (its ground truth):
// every such pair of sheets has a flange whose centreline passes by the
// weld, within a quarter of the flange's width.
func TestSyntheticBodyFlanges(t *testing.T) {
	md, err := synth.Generate(synth.Config{Elements: 60_000, Welds: 300, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	set := findAll(t, md.Mesh, joints.FlangeOptions{})
	byPair := map[[2]int64][]*joints.Flange{}
	for i := range set.Flanges {
		f := &set.Flanges[i]
		byPair[f.Parts] = append(byPair[f.Parts], f)
	}
	for i, j := range md.Joints {
		if j.Kind != joints.Spot {
			continue
		}
		st := md.Stacks[i]
		for k := 0; k+1 < len(st); k++ {
			found := false
			for _, f := range byPair[joints.PairKey(st[k], st[k+1])] {
				if segDist(j.Point, f.Centreline, f.Closed) <= f.Width.Mean/4+2 {
					found = true
				}
			}
			if !found {
				t.Errorf("weld %s on %v: no flange of parts %d and %d passes by it", j.ID, st, st[k], st[k+1])
			}
		}
	}
	// At the generator's pitch the flanges take about as many welds.
	bo := joints.BuildOptions{}.Defaults(joints.MaxThickness(md.Mesh))
	set.opts.Pitch = joints.Pitch{MM: md.Pitch}
	if _, err := set.Place(context.Background(), geom.NewElemIndex(md.Mesh), bo); err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, f := range set.Flanges {
		n += len(f.Welds)
	}
	if n < 250 {
		t.Errorf("%d welds placed at %g mm, the generator placed 300", n, md.Pitch)
	}
}
