package offset

import (
	"cmp"
	"math"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// sample is one measurement of how far apart two parts' meshes lie where
// they face each other, in the frame of the part that comes first in the
// sampling order (a; sampleOrder): the signed distance from a's mesh to
// b's along a's normal (as made consistent by the orientation), and
// whether b's normal points the other way.
type sample struct {
	a, b    int32   // part indices, rank[a] < rank[b]
	ra, rb  int32   // their ranks in the sampling order
	s       float64 // mm, along a's normal from a's mesh to b's
	opposed bool    // b's normal points against a's
	ta, tb  float64 // thicknesses of the two elements, mm
	w       float64 // weight: overlap area, mm² (0 for joint sites)
	site    bool    // measured at a joint site
	at      r3.Vec  // where: the sampling element's centroid, or the joint point
}

// overlapSamples measures, for every element that another part faces
// (geom.Index.FacingElements within reach: its centroid's normal line
// meets an element of the other part, parallel to it within cosTol), the
// separation to that part, if it lies within the pair's window (|s| at
// most t1+t2 plus the allowance). Of the parts facing an element on one
// side only the nearest counts (a sheet beyond a sheet is not in contact
// with it), with any part whose mesh coincides with the nearest's; a
// part coinciding with the element (|s| within 5 per cent of its
// thickness: meshes drawn on their mating faces coincide but for
// rounding) counts and hides nothing: it lies on one side or the other,
// which the element cannot tell, and were it taken to lie on both, the
// element's neighbour on the far side would be lost (a sheet meshed on
// its top face, one on its bottom face lying on it, a third under the
// first: the first's contact with the third was not measured, and with
// the third's mesh the finest the surfaces came out mid, mid, bottom
// instead of top, bottom, mid; TestInferCoincidingMeshes). A
// coincidence band is 5 per cent of the sampling element's thickness. Each pair of parts is
// measured from the elements of the part that comes first in the
// sampling order rank (sampleOrder: geometric, not the parts' ids nor
// their order in the files), each sample weighing its element's area, so
// that a contact weighs its overlap area. The order depends only on the
// index and rank.
//
// fs are the facing elements: x.FacingElementsOrdered(m.ElemPart, rank,
// reach, cosTol, true). Each pair of parts is sampled from its
// part of lower rank; the parts of higher rank are looked at only to
// tell whether they lie in between (upward).
//
// The samples are returned in chunks, in order: fresh memory is dear, so
// each chunk's samples are found in its worker's reused buffer and kept
// at their size, and the chunks are not joined.
func overlapSamples(m *geom.Mesh, rank []int32, fs []geom.Facing, or *geom.Orientation, allowance func(t1, t2 float64) float64) [][]sample {
	// Facings come grouped by element: runs of about overlapChunk
	// facings, cut between elements, are sampled concurrently and their
	// samples joined in order.
	const overlapChunk = 1 << 14
	var cuts []int
	for lo := 0; lo < len(fs); {
		hi := min(lo+overlapChunk, len(fs))
		for hi < len(fs) && fs[hi].Elem == fs[hi-1].Elem {
			hi++
		}
		cuts = append(cuts, lo)
		lo = hi
	}
	cuts = append(cuts, len(fs))
	parts := make([][]sample, len(cuts)-1)
	bufs := make(chan []sample, runtime.GOMAXPROCS(0))
	parallelRange(len(parts), 1, func(lo, hi int) {
		var buf []sample
		select {
		case buf = <-bufs:
		default:
		}
		for k := lo; k < hi; k++ {
			buf = elementSamples(m, rank, fs[cuts[k]:cuts[k+1]], or, allowance, buf[:0])
			parts[k] = slices.Clone(buf)
		}
		select {
		case bufs <- buf:
		default:
		}
	})
	return parts
}

// elementSamples appends to out overlapSamples on facings fs that hold
// all the facings of each of their elements.
func elementSamples(m *geom.Mesh, rank []int32, fs []geom.Facing, or *geom.Orientation, allowance func(t1, t2 float64) float64, out []sample) []sample {
	type found struct {
		part int32
		s, t float64
		opp  bool
	}
	var cur []found
	flush := func(e int32) {
		if len(cur) == 0 {
			return
		}
		te := m.Thickness(int(e))
		coincide := 0.05 * te
		// The nearest part beyond the coincidence band on either side.
		up, down := math.Inf(1), math.Inf(-1)
		for _, c := range cur {
			if c.s > coincide {
				up = math.Min(up, c.s)
			}
			if c.s < -coincide {
				down = math.Max(down, c.s)
			}
		}
		at, w := m.Centroid(int(e)), m.Area(int(e))
		pe := m.ElemPart[e]
		for _, c := range cur {
			if rank[c.part] <= rank[pe] {
				continue
			}
			// A coinciding part, the nearest on a side, and a part that
			// coincides with the nearest (either of two meshes drawn on
			// their mating faces may be e's neighbour).
			if math.Abs(c.s) <= coincide || c.s > coincide && c.s <= up+coincide || c.s < -coincide && c.s >= down-coincide {
				out = append(out, newSample(rank, pe, c.part, c.s, c.opp, te, c.t, w, false, at))
			}
		}
		cur = cur[:0]
	}
	for i, f := range fs {
		if i > 0 && fs[i-1].Elem != f.Elem {
			flush(fs[i-1].Elem)
		}
		se, sf := or.Sign(int(f.Elem)), or.Sign(int(f.Other))
		te, tf := m.Thickness(int(f.Elem)), m.Thickness(int(f.Other))
		s := se * f.Dist
		if math.Abs(s) > te+tf+allowance(te, tf) {
			continue
		}
		opp := se*sf*r3.Dot(m.Normal(int(f.Elem)), m.Normal(int(f.Other))) < 0
		cur = append(cur, found{part: m.ElemPart[f.Other], s: s, t: tf, opp: opp})
	}
	if len(fs) > 0 {
		flush(fs[len(fs)-1].Elem)
	}
	return out
}

// newSample makes a sample measured from part pa's side (s along pa's
// normal to pb's mesh) in the frame of the part of lower rank: seen from
// pb, pa lies at -s along pa's normal, which is -s·(±1) along pb's.
func newSample(rank []int32, pa, pb int32, s float64, opposed bool, ta, tb, w float64, site bool, at r3.Vec) sample {
	if rank[pa] > rank[pb] {
		s = flipped(s, opposed)
		pa, pb, ta, tb = pb, pa, tb, ta
	}
	return sample{a: pa, b: pb, ra: rank[pa], rb: rank[pb], s: s, opposed: opposed, ta: ta, tb: tb, w: w, site: site, at: at}
}

// flipped returns a separation s along A's normal from A's mesh to B's
// as seen from B (along B's normal from B's mesh to A's): -s, or s when
// the normals are opposed (B's normal is -A's). It is exact.
func flipped(s float64, opposed bool) float64 {
	if opposed {
		return s
	}
	return -s
}

// siteSamples measures the separation of consecutive sheets at every
// joint point: the closest point of every part within reach (of the
// listed parts, when the joint lists them), those whose normals lie
// within cosTol of the nearest one's and whose closest point lies within
// LateralFactor nugget radii of the axis through the joint point, ordered
// along that axis; each consecutive pair within its window gives a
// sample, but for a sheet next to sheets whose meshes coincide there.
func siteSamples(x *geom.Index, rank []int32, or *geom.Orientation, js []joints.Joint, o *joints.BuildOptions, cosTol float64) []sample {
	out := make([][]sample, len(js))
	parallelRange(len(js), 64, func(lo, hi int) {
		for i := lo; i < hi; i++ {
			out[i] = siteSample(x, rank, or, &js[i], o, cosTol)
		}
	})
	return slices.Concat(out...)
}

func siteSample(x *geom.Index, rank []int32, or *geom.Orientation, j *joints.Joint, o *joints.BuildOptions, cosTol float64) []sample {
	m := x.Mesh()
	// The closest point of every part within reach: elements by their
	// box distance, each projected only while it may beat its part's
	// best (the box distance bounds the true one from below); ties go to
	// the lower element index.
	type near struct {
		e  int32
		d2 float64
	}
	var buf [256]int32
	elems := x.ElemsNear(j.Point, o.Reach, buf[:0])
	list := make([]near, 0, len(elems))
	for _, e := range elems {
		if len(j.Parts) == 0 || slices.Contains(j.Parts, m.Parts[m.ElemPart[e]].ID) {
			list = append(list, near{e, geom.BoxDist2(m.ElemBox(int(e)), j.Point)})
		}
	}
	slices.SortFunc(list, func(a, b near) int { return cmp.Or(cmp.Compare(a.d2, b.d2), cmp.Compare(a.e, b.e)) })
	var best []geom.Projection
	for _, c := range list {
		pi := m.ElemPart[c.e]
		k := slices.IndexFunc(best, func(pr geom.Projection) bool { return m.ElemPart[pr.Elem] == pi })
		if k >= 0 && c.d2 > best[k].Dist*best[k].Dist {
			continue
		}
		pr := m.Project(int(c.e), j.Point)
		switch {
		case !(pr.Dist <= o.Reach):
		case k < 0:
			best = append(best, pr)
		case pr.Dist < best[k].Dist || pr.Dist == best[k].Dist && pr.Elem < best[k].Elem:
			best[k] = pr
		}
	}
	slices.SortFunc(best, func(a, b geom.Projection) int {
		return cmp.Or(cmp.Compare(a.Dist, b.Dist), cmp.Compare(a.Elem, b.Elem))
	})
	type sheet struct {
		part  int32
		q, n  r3.Vec
		t     float64
		along float64
	}
	var sheets []sheet
	for _, pr := range best {
		if r3.Norm2(pr.Normal) == 0 {
			continue
		}
		sheets = append(sheets, sheet{part: m.ElemPart[pr.Elem], q: pr.Point, n: r3.Scale(or.Sign(pr.Elem), pr.Normal), t: m.Thickness(pr.Elem)})
	}
	if len(sheets) < 2 {
		return nil
	}
	axis := sheets[0].n
	d := j.Diameter
	if !(d > 0) {
		d = o.Rule.Diameter(sheets[0].t)
	}
	kept := sheets[:0]
	for _, s := range sheets {
		v := r3.Sub(s.q, j.Point)
		s.along = r3.Dot(v, axis)
		if math.Abs(r3.Dot(s.n, axis)) >= cosTol && joints.Across(v, axis) <= o.LateralFactor*d/2 {
			kept = append(kept, s)
		}
	}
	slices.SortStableFunc(kept, func(a, b sheet) int {
		return cmp.Or(cmp.Compare(a.along, b.along), cmp.Compare(rank[a.part], rank[b.part]))
	})
	// Sheets whose meshes coincide along the axis (within 5 per cent of
	// the thinner, as for overlaps: two sheets drawn on their mating
	// faces) are paired with each other but not with the sheets beside
	// them, which either of them may be the one to touch: the order the
	// sort gives such sheets is no physical order.
	coincide := func(i int) bool {
		return i >= 0 && i+1 < len(kept) && kept[i+1].along-kept[i].along <= 0.05*math.Min(kept[i].t, kept[i+1].t)
	}
	var out []sample
	for i := 0; i+1 < len(kept); i++ {
		a, b := kept[i], kept[i+1]
		if !coincide(i) && (coincide(i-1) || coincide(i+1)) {
			continue
		}
		s := r3.Dot(r3.Sub(b.q, a.q), a.n)
		if math.Abs(s) > a.t+b.t+o.GapAllowanceFor(a.t, b.t) {
			continue
		}
		out = append(out, newSample(rank, a.part, b.part, s, r3.Dot(a.n, b.n) < 0, a.t, b.t, 0, true, j.Point))
	}
	return out
}

// parallelRange calls fn on consecutive chunks of [0, n) of the given
// size from up to GOMAXPROCS goroutines; fn must write its results by
// index.
func parallelRange(n, chunk int, fn func(lo, hi int)) {
	nb := (n + chunk - 1) / chunk
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), nb) {
		wg.Go(func() {
			for {
				b := int(next.Add(1) - 1)
				if b >= nb {
					return
				}
				fn(b*chunk, min((b+1)*chunk, n))
			}
		})
	}
	wg.Wait()
}
