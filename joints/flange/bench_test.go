package flange

import (
	"context"
	"testing"
	"time"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/synth"
)

// BenchmarkFlanges2M finds every flange of every part pair of the
// 2,000,000-element synthetic body (whose flanges do not match node for
// node), from the mesh in memory: the element index, the contacts and
// the flanges. It reports the time of each step, and, as the ratio of
// two things run side by side, the flange finding against building the
// full spatial index of the same mesh (NewIndex, the step every build
// starts from).
func BenchmarkFlanges2M(b *testing.B) {
	if testing.Short() {
		b.Skip("2,000,000 elements")
	}
	md, err := synth.Generate(synth.Config{Elements: 2_000_000, Welds: 6000, Bolts: 20, Seed: 1})
	if err != nil {
		b.Fatal(err)
	}
	m := md.Mesh
	bo := joints.BuildOptions{}.Defaults(joints.MaxThickness(m))
	fo := joints.FlangeOptions{}.Defaults()
	var tIndex, tContacts, tFind, tFull time.Duration
	flanges := 0
	for b.Loop() {
		t0 := time.Now()
		x := geom.NewElemIndex(m)
		t1 := time.Now()
		c, err := geom.FindContacts(context.Background(), x, Rule(m, &bo, &fo))
		if err != nil {
			b.Fatal(err)
		}
		t2 := time.Now()
		set, err := Find(context.Background(), c, fo)
		if err != nil {
			b.Fatal(err)
		}
		t3 := time.Now()
		geom.NewIndex(m)
		t4 := time.Now()
		tIndex, tContacts, tFind, tFull = tIndex+t1.Sub(t0), tContacts+t2.Sub(t1), tFind+t3.Sub(t2), tFull+t4.Sub(t3)
		flanges = len(set.Flanges)
	}
	n := float64(b.N)
	b.ReportMetric(tIndex.Seconds()/n, "s-index")
	b.ReportMetric(tContacts.Seconds()/n, "s-contacts")
	b.ReportMetric(tFind.Seconds()/n, "s-flanges")
	b.ReportMetric((tIndex+tContacts+tFind).Seconds()/tFull.Seconds(), "x-full-index")
	b.ReportMetric(float64(flanges), "flanges")
}
