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
// they face each other, in the frame of the part with the smaller id
// (a): the signed distance from a's mesh to b's along a's normal (as
// made consistent by the orientation), and whether b's normal points the
// other way.
type sample struct {
	a, b    int32   // part indices, Parts[a].ID < Parts[b].ID
	s       float64 // mm, along a's normal from a's mesh to b's
	opposed bool    // b's normal points against a's
	ta, tb  float64 // thicknesses of the two elements, mm
	w       float64 // weight: overlap area, mm² (0 for joint sites)
	site    bool    // measured at a joint site
	at      r3.Vec  // where: the sampling element's centroid, or the joint point
}

// facet is an element seen as a flat polygon: its centroid, its unit
// normal as made consistent, and the radius of the sphere about the
// centroid that holds its corners.
type facet struct {
	c, n   r3.Vec
	radius float64
}

func newFacet(m *geom.Mesh, or *geom.Orientation, e int) facet {
	f := facet{c: m.Centroid(e), n: r3.Scale(or.Sign(e), m.Normal(e))}
	for k := range m.Type(e).Corners() {
		f.radius = math.Max(f.radius, r3.Norm(r3.Sub(m.Corner(e, k), f.c)))
	}
	return f
}

// inside reports whether point p, a point of element e's plane (through
// its centroid, square to its mean normal n as the node order gives it),
// lies within e's polygon, with a margin of tol mm. Warped quads are
// taken as their mean plane: the error is their warp, negligible for
// measuring separations of shells.
func inside(m *geom.Mesh, e int, n, p r3.Vec, tol float64) bool {
	nc := m.Type(e).Corners()
	// In-plane test: p lies on the inner side of every edge (the polygon
	// is taken convex; shell elements are).
	for k := range nc {
		a, b := m.Corner(e, k), m.Corner(e, (k+1)%nc)
		edge := r3.Sub(b, a)
		l := r3.Norm(edge)
		if l == 0 {
			continue
		}
		// Inward normal of the edge within the plane.
		in := r3.Scale(1/l, r3.Cross(n, edge))
		if r3.Dot(r3.Sub(p, a), in) < -tol {
			return false
		}
	}
	return true
}

// overlapSamples measures, for every element near an element of another
// part (geom.Index.ElemPairsNear within reach), the separation to each
// other part that faces it: whose element, parallel to it within cosTol,
// contains the foot of the element's centroid along its normal within
// the pair's window (|s| at most t1+t2 plus the allowance). Of the parts
// facing an element on one side only the nearest counts (a sheet beyond
// a sheet is not in contact with it); a part coinciding with the element
// (|s| within coincide) counts as lying on both sides. Samples come in
// element order, whatever the number of goroutines.
func overlapSamples(x *geom.Index, or *geom.Orientation, reach, cosTol float64, allowance func(t1, t2 float64) float64) []sample {
	m := x.Mesh()
	pairs := x.ElemPairsNear(reach, m.ElemPart)
	// Candidates of each element, both ways (compressed rows).
	ne := m.NumElems()
	start := make([]int32, ne+1)
	for _, p := range pairs {
		start[p[0]+1]++
		start[p[1]+1]++
	}
	for i := 1; i <= ne; i++ {
		start[i] += start[i-1]
	}
	cand := make([]int32, start[ne])
	fill := make([]int32, ne)
	for _, p := range pairs {
		a, b := p[0], p[1]
		cand[start[a]+fill[a]] = b
		fill[a]++
		cand[start[b]+fill[b]] = a
		fill[b]++
	}
	pairs, fill = nil, nil
	// Facets of the elements that have candidates.
	slot := make([]int32, ne)
	var involved []int32
	for e := range ne {
		slot[e] = -1
		if start[e+1] > start[e] {
			slot[e] = int32(len(involved))
			involved = append(involved, int32(e))
		}
	}
	facets := make([]facet, len(involved))
	parallelRange(len(involved), 4096, func(lo, hi int) {
		for i := lo; i < hi; i++ {
			facets[i] = newFacet(m, or, int(involved[i]))
		}
	})
	const block = 4096
	out := make([][]sample, (len(involved)+block-1)/block)
	parallelRange(len(out), 1, func(lo, hi int) {
		type best struct {
			part  int32
			elem  int32
			s, t  float64
			score float64 // lateral distance of the candidate's centroid from the foot line
		}
		var found []best
		var order []best
		for bi := lo; bi < hi; bi++ {
			var res []sample
			for _, e := range involved[bi*block : min((bi+1)*block, len(involved))] {
				fe := &facets[slot[e]]
				if r3.Norm2(fe.n) == 0 {
					continue
				}
				te := m.Thickness(int(e))
				pe := m.ElemPart[e]
				order = order[:0]
				for _, f := range cand[start[e]:start[e+1]] {
					ff := &facets[slot[f]]
					cos := r3.Dot(fe.n, ff.n)
					if math.Abs(cos) < cosTol {
						continue
					}
					tf := m.Thickness(int(f))
					// Distance along e's normal from e's centroid to f's plane.
					s := r3.Dot(r3.Sub(ff.c, fe.c), ff.n) / cos
					if math.Abs(s) > te+tf+allowance(te, tf) {
						continue
					}
					foot := r3.Add(fe.c, r3.Scale(s, fe.n))
					lat := r3.Norm(r3.Sub(foot, ff.c))
					if lat > ff.radius {
						continue
					}
					order = append(order, best{part: m.ElemPart[f], elem: f, s: s, t: tf, score: lat})
				}
				// Per part, the candidate whose polygon holds the foot,
				// nearest centroid first.
				slices.SortFunc(order, func(a, b best) int {
					return cmp.Or(cmp.Compare(a.part, b.part), cmp.Compare(a.score, b.score), cmp.Compare(a.elem, b.elem))
				})
				found = found[:0]
				for i := 0; i < len(order); i++ {
					c := order[i]
					if len(found) > 0 && found[len(found)-1].part == c.part {
						continue
					}
					ff := &facets[slot[c.elem]]
					if inside(m, int(c.elem), r3.Scale(or.Sign(int(c.elem)), ff.n), r3.Add(fe.c, r3.Scale(c.s, fe.n)), 1e-6*ff.radius) {
						found = append(found, c)
					}
				}
				if len(found) == 0 {
					continue
				}
				// The nearest part on each side; a coinciding one (meshes
				// drawn on one surface coincide but for rounding; 5 per
				// cent of the thickness) blocks both.
				coincide := 0.05 * te
				up, down := -1, -1
				for i, c := range found {
					if c.s >= -coincide && (up < 0 || c.s < found[up].s || c.s == found[up].s && c.part < found[up].part) {
						up = i
					}
					if c.s <= coincide && (down < 0 || c.s > found[down].s || c.s == found[down].s && c.part < found[down].part) {
						down = i
					}
				}
				area := m.Area(int(e))
				for i, c := range found {
					if i != up && i != down {
						continue
					}
					ff := &facets[slot[c.elem]]
					res = append(res, newSample(m, pe, c.part, c.s, r3.Dot(fe.n, ff.n) < 0, te, c.t, area/2, false, fe.c))
				}
			}
			out[bi] = res
		}
	})
	var all []sample
	for _, o := range out {
		all = append(all, o...)
	}
	return all
}

// newSample makes a sample measured from part pa's side (s along pa's
// normal to pb's mesh) in the frame of the part with the smaller id: seen
// from pb, pa lies at -s along pa's normal, which is -s·(±1) along pb's.
func newSample(m *geom.Mesh, pa, pb int32, s float64, opposed bool, ta, tb, w float64, site bool, at r3.Vec) sample {
	if m.Parts[pa].ID > m.Parts[pb].ID {
		if !opposed {
			s = -s
		}
		pa, pb, ta, tb = pb, pa, tb, ta
	}
	return sample{a: pa, b: pb, s: s, opposed: opposed, ta: ta, tb: tb, w: w, site: site, at: at}
}

// siteSamples measures the separation of consecutive sheets at every
// joint point: the closest point of every part within reach (of the
// listed parts, when the joint lists them), those whose normals lie
// within cosTol of the nearest one's and whose closest point lies within
// LateralFactor nugget radii of the axis through the joint point, ordered
// along that axis; each consecutive pair within its window gives a
// sample.
func siteSamples(x *geom.Index, or *geom.Orientation, js []joints.Joint, o *joints.BuildOptions, cosTol float64) []sample {
	out := make([][]sample, len(js))
	parallelRange(len(js), 64, func(lo, hi int) {
		for i := lo; i < hi; i++ {
			out[i] = siteSample(x, or, &js[i], o, cosTol)
		}
	})
	var all []sample
	for _, s := range out {
		all = append(all, s...)
	}
	return all
}

func siteSample(x *geom.Index, or *geom.Orientation, j *joints.Joint, o *joints.BuildOptions, cosTol float64) []sample {
	m := x.Mesh()
	prs := x.ProjectNear(j.Point, o.Reach, func(e int) bool {
		return len(j.Parts) == 0 || slices.Contains(j.Parts, m.Parts[m.ElemPart[e]].ID)
	})
	type sheet struct {
		part  int32
		q, n  r3.Vec
		t     float64
		along float64
	}
	var sheets []sheet
	for _, pr := range prs { // by distance, then element index: the first per part is its closest
		p := m.ElemPart[pr.Elem]
		if slices.ContainsFunc(sheets, func(s sheet) bool { return s.part == p }) || r3.Norm2(pr.Normal) == 0 {
			continue
		}
		sheets = append(sheets, sheet{part: p, q: pr.Point, n: r3.Scale(or.Sign(pr.Elem), pr.Normal), t: m.Thickness(pr.Elem)})
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
		return cmp.Or(cmp.Compare(a.along, b.along), cmp.Compare(m.Parts[a.part].ID, m.Parts[b.part].ID))
	})
	var out []sample
	for i := 0; i+1 < len(kept); i++ {
		a, b := kept[i], kept[i+1]
		s := r3.Dot(r3.Sub(b.q, a.q), a.n)
		if math.Abs(s) > a.t+b.t+o.GapAllowanceFor(a.t, b.t) {
			continue
		}
		out = append(out, newSample(m, a.part, b.part, s, r3.Dot(a.n, b.n) < 0, a.t, b.t, 0, true, j.Point))
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
