package flange

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// crossingSteps bounds the steps that locate where an overlap ends
// along an element edge, and crossingTol, mm, is the bracket at which
// they stop: 7 steps of bisection alone bring a 5 mm edge under 0.04 mm.
const (
	crossingSteps = 7
	crossingTol   = 0.01
)

// Rule returns the contact rule of build options o and flange options fo
// (defaults resolved by the caller) for geom.FindContacts: the build's
// gap allowance and angle limit, the flanges' facing factor, and the part
// pairs asked for (nil: all).
func Rule(m *geom.Mesh, o *joints.BuildOptions, fo *joints.FlangeOptions) geom.ContactRule {
	r := geom.ContactRule{
		Allowance:    o.GapAllowanceFor,
		AngleLimit:   o.AngleLimit,
		FacingFactor: fo.FacingFactor,
	}
	if len(fo.Pairs) > 0 {
		want := map[[2]int32]bool{}
		for _, p := range fo.Pairs {
			a, okA := m.PartIndex(p[0])
			b, okB := m.PartIndex(p[1])
			if okA && okB {
				want[[2]int32{min(a, b), max(a, b)}] = true
			}
		}
		r.Pair = func(a, b int32) bool { return want[[2]int32{a, b}] }
	}
	return r
}

// Find returns the flanges of the contacts c: every connected overlap of
// every pair of parts in contact, traced on the pair's host mesh (see
// geom.Contacts.Host), sorted by part pair, then by the start of their
// centrelines, with their ids.
//
// An overlap is made of the host's elements that use a node in contact
// with the other part, clipped where the contact ends (on element edges
// between a node in contact and one out of it, by bisection with the
// contact test); two such elements belong to one flange when they share
// a node in contact. Its outline is made of the cuts and of the element
// edges no other element of the overlap shares; a flange whose outline
// has an inner loop long enough to go round an opening (at least pi times
// the mean width) is a ring. The centreline is fitted in a chart of the
// flange unrolled along it (see centreline). Pairs are processed
// concurrently; the result does not depend on GOMAXPROCS.
func Find(ctx context.Context, c *geom.Contacts, fo joints.FlangeOptions) (*Set, error) {
	m := c.Mesh()
	groups := map[[2]int32][]*geom.NodeContact{}
	for r := range c.Records() {
		k := [2]int32{r.Part, r.Other}
		groups[k] = append(groups[k], r)
	}
	facing := map[[2]int32][]geom.FacingPair{}
	for _, f := range c.Facing() {
		k := [2]int32{min(f.PartA, f.PartB), max(f.PartA, f.PartB)}
		facing[k] = append(facing[k], f)
	}
	type job struct {
		host, other int32
		a, b        int64 // part ids, a < b
	}
	var jobs []job
	for _, p := range c.Pairs() {
		h, _ := c.Host(p[0], p[1])
		o := p[0] + p[1] - h
		if len(groups[[2]int32{h, o}]) == 0 {
			continue
		}
		a, b := m.Parts[p[0]].ID, m.Parts[p[1]].ID
		jobs = append(jobs, job{h, o, min(a, b), max(a, b)})
	}
	slices.SortFunc(jobs, func(x, y job) int { return cmp.Or(cmp.Compare(x.a, y.a), cmp.Compare(x.b, y.b)) })
	// Hand the pairs out largest first (by nodes in contact), so that no
	// large pair is left running alone at the end; results go by index.
	order := make([]int, len(jobs))
	for i := range order {
		order[i] = i
	}
	size := func(i int) int { return len(groups[[2]int32{jobs[i].host, jobs[i].other}]) }
	slices.SortStableFunc(order, func(x, y int) int { return cmp.Compare(size(y), size(x)) })
	out := make([][]joints.Flange, len(jobs))
	charts := make([][]*outline, len(jobs))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(jobs)) {
		wg.Go(func() {
			var recOf []int32
			for {
				k := int(next.Add(1) - 1)
				if k >= len(jobs) || ctx.Err() != nil {
					return
				}
				i := order[k]
				j := jobs[i]
				key := [2]int32{min(j.host, j.other), max(j.host, j.other)}
				w := &pairWork{c: c, m: m, host: j.host, other: j.other, recs: groups[[2]int32{j.host, j.other}],
					cross: map[vkey]r3.Vec{}, bisect: crossingSteps, facing: facing[key]}
				if recOf == nil {
					recOf = make([]int32, m.NumNodes())
				}
				w.indexRecs(recOf)
				out[i] = w.flanges(j.a, j.b)
				w.clearRecs()
				charts[i] = w.outlines
			}
		})
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("flange: interrupted: %w", err)
	}
	set := &Set{Contacts: c, opts: fo}
	for i, fs := range out {
		set.Flanges = append(set.Flanges, fs...)
		set.charts = append(set.charts, charts[i]...)
	}
	return set, nil
}

// Set is the flanges of a model with what placing welds on them needs.
type Set struct {
	Flanges  []joints.Flange
	Contacts *geom.Contacts
	charts   []*outline // aligned with Flanges
	opts     joints.FlangeOptions
}

// flanges returns the flanges of one pair, ordered by the start of their
// centrelines and numbered.
func (w *pairWork) flanges(a, b int64) []joints.Flange {
	m := w.m
	w.collectElems()
	var fs []joints.Flange
	// Which component each host node in contact belongs to, for the
	// facing pairs.
	comps := w.components()
	// compOf[i] is the component of the node of w.recs[i], -1 for none.
	compOf := make([]int32, len(w.recs))
	for i := range compOf {
		compOf[i] = -1
	}
	for k, comp := range comps {
		for _, e := range comp {
			for _, n := range m.ElemNodes(int(e)) {
				if i := w.recOf[n]; i > 0 && compOf[i-1] < 0 {
					compOf[i-1] = int32(k)
				}
			}
		}
	}
	inComp := func(n int32, k int) bool {
		i := w.recOf[n]
		return i > 0 && compOf[i-1] == int32(k)
	}
	type built struct {
		f    joints.Flange
		comp int
	}
	var list []built
	for k, comp := range comps {
		samples, segs := w.trace(comp)
		if len(samples) == 0 || len(segs) == 0 {
			continue
		}
		lps := loops(segs)
		area, sizes := 0.0, make([]float64, 0, len(comp))
		for _, s := range samples {
			area += s.area
		}
		for _, e := range comp {
			sizes = append(sizes, m.ElemSize(int(e)))
		}
		h := median(sizes)
		perim := 0.0
		for _, l := range lps {
			perim += l.length
		}
		ring := false
		if len(lps) > 1 && perim > 0 {
			wMean := 2 * area / perim
			for _, l := range lps[1:] {
				if l.closed && l.length >= math.Pi*wMean {
					ring = true
				}
			}
		}
		// The pieces' normals turned to one orientation, and the area on
		// the faying surface, where the centreline is measured too: a
		// crease across the flange adds the mitre of the lifted pieces.
		var edges []sharedEdge
		if !flatNormals(samples) {
			edges = sharedEdges(m, samples)
		}
		orient(samples, edges)
		fay := w.fayingArea(samples, edges, area)
		o := centreline(m, samples, edges, segs, lps, ring, h, area, fay, w.c.NodeElems)
		if o == nil || o.length <= 0 {
			continue
		}
		f := joints.Flange{
			Parts: [2]int64{a, b}, Host: m.Parts[w.host].ID, Closed: o.closed, Area: fay, Length: o.length,
			Width:      joints.Span{Min: o.width[0], Mean: o.width[1], Max: o.width[2]},
			Centreline: o.centre, Normal: meanNormal(samples),
		}
		// Thicknesses and nodes in contact.
		var th, to []float64
		nodes := 0
		for i, r := range w.recs {
			if compOf[i] == int32(k) {
				nodes++
				th = append(th, m.Thickness(int(r.Elem)))
				to = append(to, m.Thickness(int(r.OtherElem)))
			}
		}
		f.Nodes = nodes
		f.Thickness = [2]float64{median(th), median(to)}
		if m.Parts[w.host].ID != a {
			f.Thickness[0], f.Thickness[1] = f.Thickness[1], f.Thickness[0]
		}
		f.Contact = (f.Thickness[0] + f.Thickness[1]) / 2
		// Facing pairs whose host node lies in this component.
		for _, fp := range w.facing {
			hn := fp.A
			if fp.PartA != w.host {
				hn = fp.B
			}
			if inComp(hn, k) {
				f.Facing = append(f.Facing, fp)
			}
		}
		f.Match = joints.Projected
		if nodes > 0 && float64(len(f.Facing)) >= joints.CongruentShare*float64(nodes) {
			f.Match = joints.Congruent
		}
		if len(f.Facing) > 0 {
			f.FacingTolerance = joints.Span{Min: math.Inf(1), Max: math.Inf(-1)}
			for _, fp := range f.Facing {
				f.FacingTolerance.Min = math.Min(f.FacingTolerance.Min, fp.Tolerance)
				f.FacingTolerance.Max = math.Max(f.FacingTolerance.Max, fp.Tolerance)
				f.FacingTolerance.Mean += fp.Tolerance
			}
			// Summed, then divided, and held between the extremes that
			// rounding could cross: equal values give their value.
			t := &f.FacingTolerance
			t.Mean = min(max(t.Mean/float64(len(f.Facing)), t.Min), t.Max)
		}
		list = append(list, built{f, k})
		w.outlines = append(w.outlines, o)
	}
	// Order by the start of the centreline, then number.
	idx := make([]int, len(list))
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(x, y int) int {
		return cmpVec(list[x].f.Centreline[0], list[y].f.Centreline[0])
	})
	outlines := make([]*outline, len(idx))
	for k, i := range idx {
		f := list[i].f
		f.ID = joints.FlangeID(a, b, k+1)
		fs = append(fs, f)
		outlines[k] = w.outlines[i]
	}
	w.outlines = outlines
	return fs
}

// meanNormal returns the area-weighted mean of the samples' unit
// normals, made a unit vector whose largest component is positive, or
// zero when its length is below joints.MinMeanNormal of the area.
func meanNormal(samples []sample) r3.Vec {
	var sum r3.Vec
	area := 0.0
	for _, s := range samples {
		sum = r3.Add(sum, r3.Scale(s.area, s.normal))
		area += s.area
	}
	l := r3.Norm(sum)
	if !(area > 0) || l < joints.MinMeanNormal*area {
		return r3.Vec{}
	}
	return geom.SignLargest(r3.Scale(1/l, sum))
}

// median returns the median of xs (the lower middle for an even count),
// 0 for none. xs is sorted in place.
func median(xs []float64) float64 {
	if len(xs) == 0 {
		return 0
	}
	slices.Sort(xs)
	return xs[(len(xs)-1)/2]
}
