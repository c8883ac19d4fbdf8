package flange

import (
	"cmp"
	"math"
	"slices"

	"github.com/joinery-cae/joinery/geom"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
	"gonum.org/v1/gonum/spatial/r3"
)

// spine is a polyline along a flange with the frame that unrolls the
// flange into a chart: s along the polyline, n across it in the sheet's
// tangent plane. An open spine extends straight past its ends.
type spine struct {
	pts    []r3.Vec
	cum    []float64 // arc length at pts[i]
	tan    []r3.Vec  // unit tangent of segment i, from pts[i] to pts[i+1] (closed: the last wraps)
	lat    []r3.Vec  // unit lateral direction of segment i: normal x tangent
	closed bool
	length float64
	// ext0 and ext1 are the lengths at an open spine's start and end
	// that carry it on past the overlap's ends (extendArcs).
	ext0, ext1 float64
}

// makeSpine builds a spine through pts with the sheet normals at them
// (consistently oriented). Points closer than 1e-9 mm to the previous
// one are dropped. It returns nil for fewer than two distinct points.
func makeSpine(pts, normals []r3.Vec, closed bool) *spine {
	sp := &spine{closed: closed}
	var ns []r3.Vec
	for i, p := range pts {
		if len(sp.pts) > 0 && dist(p, sp.pts[len(sp.pts)-1]) < 1e-9 {
			continue
		}
		sp.pts = append(sp.pts, p)
		ns = append(ns, normals[i])
	}
	if closed && len(sp.pts) > 1 && dist(sp.pts[0], sp.pts[len(sp.pts)-1]) < 1e-9 {
		sp.pts, ns = sp.pts[:len(sp.pts)-1], ns[:len(ns)-1]
	}
	if len(sp.pts) < 2 || closed && len(sp.pts) < 3 {
		return nil
	}
	nseg := len(sp.pts) - 1
	if closed {
		nseg++
	}
	sp.cum = make([]float64, len(sp.pts))
	for i := range nseg {
		j := (i + 1) % len(sp.pts)
		d := r3.Sub(sp.pts[j], sp.pts[i])
		l := r3.Norm(d)
		t := r3.Scale(1/l, d)
		nrm := r3.Add(ns[i], ns[j])
		lat := r3.Cross(nrm, t)
		if ll := r3.Norm(lat); ll > 0 {
			lat = r3.Scale(1/ll, lat)
		} else {
			lat = anyPerpendicular(t)
		}
		sp.tan = append(sp.tan, t)
		sp.lat = append(sp.lat, lat)
		if j > 0 {
			sp.cum[j] = sp.cum[i] + l
		}
		sp.length = sp.cum[i] + l
	}
	return sp
}

// anyPerpendicular returns a unit vector perpendicular to unit t.
func anyPerpendicular(t r3.Vec) r3.Vec {
	ref := r3.Vec{X: 1}
	if math.Abs(t.X) > 0.9 {
		ref = r3.Vec{Y: 1}
	}
	return r3.Unit(r3.Cross(t, ref))
}

// segLen returns the length of segment i.
func (sp *spine) segLen(i int) float64 {
	if i+1 < len(sp.pts) {
		return sp.cum[i+1] - sp.cum[i]
	}
	return sp.length - sp.cum[i]
}

// locate returns the chart coordinates of p: s along the spine, n across
// it (positive on the side of lat). Only the segments within window of
// the hint are searched when window > 0 (a closed spine's s wraps).
func (sp *spine) locate(p r3.Vec, hint, window float64) (s, n float64) {
	nseg := len(sp.tan)
	bestD := math.Inf(1)
	try := func(i int) {
		l := sp.segLen(i)
		t := r3.Dot(r3.Sub(p, sp.pts[i]), sp.tan[i])
		vertex := -1 // the vertex the foot is held at, closed spines
		switch {
		case t < 0 && (sp.closed || i > 0):
			t = 0
			if sp.closed {
				vertex = i
			}
		case t > l && (sp.closed || i < nseg-1):
			t = l
			if sp.closed {
				vertex = (i + 1) % nseg
			}
		}
		foot := r3.Add(sp.pts[i], r3.Scale(t, sp.tan[i]))
		if d := r3.Norm2(r3.Sub(p, foot)); d < bestD {
			bestD = d
			s = sp.cum[i] + t
			n = r3.Dot(r3.Sub(p, foot), sp.lat[i])
			if vertex >= 0 {
				n = sp.wedge(vertex, r3.Sub(p, foot), n)
			}
		}
	}
	if window <= 0 || 2*window >= sp.length {
		for i := range nseg {
			try(i)
		}
	} else {
		lo, hi := hint-window, hint+window
		if sp.closed {
			for i := range nseg {
				a := sp.cum[i]
				b := a + sp.segLen(i)
				// The segment's range against [lo, hi] modulo the length.
				for _, shift := range [3]float64{-sp.length, 0, sp.length} {
					if b+shift >= lo && a+shift <= hi {
						try(i)
						break
					}
				}
			}
		} else {
			i0, _ := slices.BinarySearch(sp.cum, lo)
			i0 = max(0, i0-1)
			for i := i0; i < nseg && sp.cum[i] <= hi; i++ {
				try(i)
			}
			if math.IsInf(bestD, 1) {
				for i := range nseg {
					try(i)
				}
			}
		}
	}
	if sp.closed {
		s = math.Mod(s, sp.length)
		if s < 0 {
			s += sp.length
		}
	}
	return s, n
}

// wedge returns the chart n of a point at offset v from vertex k of a
// closed spine, nearer to the vertex than to either segment's inside:
// it lies in the wedge on the convex side of the turn there, as far
// across as it lies from the vertex (lat, the lateral component, would
// put the points beyond a sharp corner, such as a ring's outer corner
// round a rectangular opening, onto the centreline). lat is kept where
// the spine does not turn.
func (sp *spine) wedge(k int, v r3.Vec, lat float64) float64 {
	nseg := len(sp.tan)
	turn := r3.Dot(sp.tan[k], sp.lat[(k+nseg-1)%nseg])
	if math.Abs(turn) < 1e-9 {
		return lat
	}
	return -math.Copysign(r3.Norm(v), turn)
}

// at returns the point at arc length s and the tangent there; an open
// spine goes on straight past its ends, a closed one wraps.
func (sp *spine) at(s float64) (r3.Vec, r3.Vec) {
	if sp.closed {
		s = math.Mod(s, sp.length)
		if s < 0 {
			s += sp.length
		}
	}
	i := sp.segment(s)
	return r3.Add(sp.pts[i], r3.Scale(s-sp.cum[i], sp.tan[i])), sp.tan[i]
}

// outline is what the centreline computation returns.
type outline struct {
	centre []r3.Vec // the centreline
	length float64
	closed bool
	width  [3]float64 // min, mean (area / length), max; min <= mean <= max (finish)
	// chart is the spine the flange is unrolled along, and shift the
	// chart coordinate s of the centreline's start (the centreline's own
	// s is chart s minus shift, wrapped for a closed flange).
	chart  *spine
	shift  float64
	bound  orb.MultiLineString // the outline in centreline coordinates (s, n); closed: three turns
	poly   orb.Polygon         // the outline of an open flange as a polygon in centreline coordinates
	binLen float64
}

// toCentre returns the centreline coordinates of p.
func (o *outline) toCentre(p r3.Vec) (s, n float64) {
	s, n = o.chart.locate(p, 0, 0)
	s -= o.shift
	if o.closed {
		s = math.Mod(s, o.length)
		if s < 0 {
			s += o.length
		}
	}
	return s, n
}

// point returns the centreline point at centreline coordinate s.
func (o *outline) point(s float64) r3.Vec {
	p, _ := o.chart.at(s + o.shift)
	return p
}

// edgeDistance returns the distance in the chart from the centreline
// point at s to the overlap's outline.
func (o *outline) edgeDistance(s float64) float64 {
	return planar.DistanceFrom(o.bound, orb.Point{s, 0})
}

// inside reports whether the centreline point at s lies in the overlap.
func (o *outline) inside(s float64) bool {
	if o.closed || len(o.poly) == 0 || len(o.poly[0]) < 4 {
		return true
	}
	return planar.PolygonContains(o.poly, orb.Point{s, 0})
}

// widthAt returns the length of the overlap's cross-section at s: the
// summed lengths of the stretches of the line s = const inside the
// outline.
func (o *outline) widthAt(s float64) float64 {
	var ns []float64
	for _, ls := range o.bound {
		for i := 0; i+1 < len(ls); i++ {
			a, b := ls[i], ls[i+1]
			if (a[0] <= s) == (b[0] <= s) {
				continue
			}
			t := (s - a[0]) / (b[0] - a[0])
			ns = append(ns, a[1]+t*(b[1]-a[1]))
		}
	}
	slices.Sort(ns)
	w := 0.0
	for i := 0; i+1 < len(ns); i += 2 {
		w += ns[i+1] - ns[i]
	}
	return w
}

// graph is the adjacency of the pieces of an overlap, in compressed
// rows, with the length of every link.
type graph struct {
	start []int32
	to    []int32
	len   []float64
}

// pieceGraph links samples whose elements share a node in contact;
// nodeElems returns the elements that use a node.
func pieceGraph(samples []sample, nodeElems func(n int32) []int32) *graph {
	at := make(map[int32]int32, len(samples))
	for i, s := range samples {
		at[s.elem] = int32(i)
	}
	// A piece of a quad mesh has up to 8 neighbours (the elements round
	// its corners): the edges are gathered in slices of that size at
	// once, rather than grown by doubling.
	g := &graph{start: make([]int32, 1, len(samples)+1), to: make([]int32, 0, 8*len(samples)), len: make([]float64, 0, 8*len(samples))}
	var nb []int32
	for i, s := range samples {
		nb = nb[:0]
		for _, n := range s.nodes {
			for _, e := range nodeElems(n) {
				if j, ok := at[e]; ok && j != int32(i) && !slices.Contains(nb, j) {
					nb = append(nb, j)
				}
			}
		}
		slices.Sort(nb)
		for _, j := range nb {
			g.to = append(g.to, j)
			g.len = append(g.len, dist(s.pos, samples[j].pos))
		}
		g.start = append(g.start, int32(len(g.to)))
	}
	return g
}

// dist returns |a - b|.
func dist(a, b r3.Vec) float64 { return math.Sqrt(r3.Norm2(r3.Sub(a, b))) }

// queued is a piece waiting in a shortest-path search.
type queued struct {
	d float64
	i int32
}

// pathQueue is a binary min-heap of queued pieces by distance, then
// index.
type pathQueue []queued

func (q pathQueue) less(a, b int) bool { return q[a].d < q[b].d || q[a].d == q[b].d && q[a].i < q[b].i }

func (q *pathQueue) push(x queued) {
	h := append(*q, x)
	for i := len(h) - 1; i > 0; {
		p := (i - 1) / 2
		if !h.less(i, p) {
			break
		}
		h[i], h[p] = h[p], h[i]
		i = p
	}
	*q = h
}

func (q *pathQueue) pop() queued {
	h := *q
	top := h[0]
	last := len(h) - 1
	h[0] = h[last]
	h = h[:last]
	for i := 0; ; {
		l := 2*i + 1
		if l >= len(h) {
			break
		}
		if r := l + 1; r < len(h) && h.less(r, l) {
			l = r
		}
		if !h.less(l, i) {
			break
		}
		h[i], h[l] = h[l], h[i]
		i = l
	}
	*q = h
	return top
}

// search runs Dijkstra's shortest paths over g from the pieces with a
// finite d (d holds their start distances and is filled in), an edge
// costing its length times cost(a, b) when cost is set; prev, when not
// nil, receives each piece's predecessor.
func (g *graph) search(d []float64, prev []int32, cost func(a, b int32) float64) {
	var q pathQueue
	for i, v := range d {
		if !math.IsInf(v, 1) {
			q.push(queued{v, int32(i)})
		}
	}
	for len(q) > 0 {
		x := q.pop()
		if x.d > d[x.i] {
			continue
		}
		for k := g.start[x.i]; k < g.start[x.i+1]; k++ {
			j := g.to[k]
			l := g.len[k]
			if cost != nil {
				l *= cost(x.i, j)
			}
			if nd := x.d + l; nd < d[j] {
				d[j] = nd
				if prev != nil {
					prev[j] = x.i
				}
				q.push(queued{nd, j})
			}
		}
	}
}

// geodesic returns the distances along the piece graph from piece src,
// and the predecessor of each piece on its shortest path. With ridge
// set (each piece's distance to the outline), an edge costs its length
// divided by the square of its ends' mean ridge distance over the
// largest: paths keep to the middle of the overlap.
func geodesic(g *graph, ridge []float64, src int32) ([]float64, []int32) {
	n := len(g.start) - 1
	d := make([]float64, n)
	prev := make([]int32, n)
	for i := range d {
		d[i] = math.Inf(1)
		prev[i] = -1
	}
	d[src] = 0
	var cost func(a, b int32) float64
	if ridge != nil {
		top := 0.0
		for _, r := range ridge {
			top = math.Max(top, r)
		}
		if top > 0 {
			cost = func(a, b int32) float64 {
				f := (ridge[a]+ridge[b])/(2*top) + 0.05
				return 1 / (f * f)
			}
		}
	}
	g.search(d, prev, cost)
	return d, prev
}

// boundaryDistance returns each piece's distance to the overlap's
// outline, measured along the piece graph from the pieces the outline
// bounds (a multi-source shortest path).
func boundaryDistance(samples []sample, g *graph, segs []segment) []float64 {
	at := make(map[int32]int32, len(samples))
	for i, s := range samples {
		at[s.elem] = int32(i)
	}
	d := make([]float64, len(samples))
	for i := range d {
		d[i] = math.Inf(1)
	}
	for _, sg := range segs {
		i, ok := at[sg.elem]
		if !ok {
			continue
		}
		p := samples[i].pos
		t := r3.Sub(sg.pb, sg.pa)
		u := 0.0
		if l2 := r3.Norm2(t); l2 > 0 {
			u = min(max(r3.Dot(r3.Sub(p, sg.pa), t)/l2, 0), 1)
		}
		if v := dist(p, r3.Add(sg.pa, r3.Scale(u, t))); v < d[i] {
			d[i] = v
		}
	}
	g.search(d, nil, nil)
	for i := range d {
		if math.IsInf(d[i], 1) {
			d[i] = 0
		}
	}
	return d
}

// farthest returns the piece farthest from the sources (ties to the lower
// index), ignoring unreachable ones.
func farthest(d []float64) int32 {
	best := int32(0)
	for i, v := range d {
		if !math.IsInf(v, 1) && v > d[best] {
			best = int32(i)
		}
	}
	return best
}

// chartIterations bounds the number of times the spine is re-fitted:
// each pass moves it to the middles of cross-sections perpendicular to
// the previous one; the fit stops once no point moves by more than a
// thousandth of the station spacing.
const chartIterations = 4

// centreline finds the centreline of an overlap from its pieces and
// outline loops (the first the outer one), with h the typical element
// size. Rings (ring true) get a closed centreline. area, the pieces' own
// (the host's mid-surface), sizes the fit's bins; fay, the overlap's
// area on the faying surface (fayingArea), where the centreline is
// measured, gives the mean width, fay / length. The samples' up normals
// are to be set (orient); edges are the element edges they share
// (sharedEdges, nil for a flat overlap).
//
// Open strips start from the shortest path through the pieces between
// the two pieces farthest apart (a double sweep), which follows a curved
// strip round its bend where a best-fit line would cut the chord; rings
// start from their inner loop. The spine is then re-fitted a few times:
// the pieces are placed in the chart of the current spine (s along, n
// across), gathered in bins along s, and the new spine runs through the
// middles of the outline's cross-sections at the bins' stations, at the
// level of the bins' area-weighted centroids (refit). An open spine
// that turns is carried on round its curve past its last stations
// (extendArcs) and given points between stations where its chords cut
// inside the curve (densify); the centreline ends where it leaves the
// overlap, on a straight spine along its end tangents. The fit rounds a
// ring's corners off, so a ring's centreline is then its mid-line
// between the outline and the opening (midline), charted along the fit.
func centreline(m *geom.Mesh, samples []sample, edges []sharedEdge, segs []segment, lps []loop, ring bool, h, area, fay float64, nodeElems func(int32) []int32) *outline {
	if len(samples) == 0 {
		return nil
	}
	perim := 0.0
	for _, l := range lps {
		perim += l.length
	}
	wEst := h
	if perim > 0 {
		wEst = math.Max(h, 2*area/perim)
	}
	binLen := math.Max(1.5*h, wEst/2)
	window := 2*wEst + 2*binLen
	hints := make([]float64, len(samples))
	var sp *spine
	var inner loop
	if ring {
		inner = lps[1]
		for _, l := range lps[2:] {
			if l.length > inner.length {
				inner = l
			}
		}
		ns := make([]r3.Vec, len(inner.pts))
		for i := range ns {
			ns[i] = samples[0].normal
		}
		sp = makeSpine(inner.pts, ns, true)
		window = 0 // no hints yet: search every segment
	} else {
		g := pieceGraph(samples, nodeElems)
		d0, _ := geodesic(g, nil, 0)
		a := farthest(d0)
		da, _ := geodesic(g, nil, a)
		b := farthest(da)
		// The path from end to end along the ridge of the distance to
		// the outline: it follows the middle of the strip (and of a
		// curved one round its bend), leaving the ends by the corner
		// bisectors.
		ridge := boundaryDistance(samples, g, segs)
		_, prev := geodesic(g, ridge, a)
		var path []int32
		for i := b; i >= 0; i = prev[i] {
			path = append(path, i)
		}
		slices.Reverse(path)
		// The path runs from corner to corner: leave out its first and
		// last stretch of about a width, where it cuts across the strip;
		// the spine's extensions cover the ends.
		total := da[b]
		trim := math.Min(wEst, total/4)
		var pts, ns []r3.Vec
		for _, i := range path {
			if da[i] >= trim && da[i] <= total-trim {
				pts, ns = append(pts, samples[i].pos), append(ns, samples[i].up)
			}
		}
		if len(pts) < 2 {
			pts, ns = pts[:0], ns[:0]
			for _, i := range path {
				pts, ns = append(pts, samples[i].pos), append(ns, samples[i].up)
			}
		}
		pts = smoothPath(pts, math.Max(binLen, 2*wEst))
		sp = makeSpine(pts, ns, false)
		for i := range hints {
			hints[i] = da[i]
			if math.IsInf(hints[i], 1) {
				hints[i] = 0
			}
		}
		if sp == nil {
			sp = fallbackSpine(samples)
			window = 0
		}
	}
	if sp == nil {
		return nil
	}
	ss := make([]float64, len(samples))
	nn := make([]float64, len(samples))
	for range chartIterations {
		for i := range samples {
			ss[i], nn[i] = sp.locate(samples[i].pos, hints[i], window)
		}
		next, offset, moved := refit(sp, samples, ss, nn, chartOutline(sp, lps, window), binLen, false)
		if next == nil {
			break
		}
		for i := range hints {
			hints[i] = ss[i] - offset
		}
		sp = next
		window = 2*wEst + 2*binLen
		if moved < 1e-2*binLen {
			break // converged
		}
	}
	// A last pass with the end stations, now that the spine no longer
	// slants across the ends; an open spine that turns is first carried
	// on round its curve, so that the end stations' cross-sections lie
	// square to it.
	tol := curveTolerance * h
	if !sp.closed {
		sp = extendArcs(sp, 1.5*binLen, tol)
	}
	for i := range samples {
		ss[i], nn[i] = sp.locate(samples[i].pos, hints[i], window)
	}
	if next, _, _ := refit(sp, samples, ss, nn, chartOutline(sp, lps, window), binLen, true); next != nil {
		sp = next
	}
	if !sp.closed {
		sp = drape(m, densify(extendArcs(sp, 1.5*binLen, tol), lps, wEst, tol), samples, edges, tol, 3*binLen)
	}
	if ring {
		// The fit above finds the middle of the pieces, which round a
		// ring's corners off; the ring's centreline is the middle of
		// its cross-sections between the outline and the opening.
		if mid := midline(sp, lps[0], inner, h, wEst); mid != nil {
			sp = mid
		}
	}
	return canonical(sp, samples, lps, fay, binLen)
}

// smoothPath returns the points of a polyline averaged over a window of
// length span along it, at the same number of points: the path through
// piece centroids zigzags by about half an element, which would tilt a
// chart's cross-sections.
func smoothPath(pts []r3.Vec, span float64) []r3.Vec {
	cum := make([]float64, len(pts))
	for i := 1; i < len(pts); i++ {
		cum[i] = cum[i-1] + dist(pts[i], pts[i-1])
	}
	out := make([]r3.Vec, len(pts))
	lo := 0
	for i := range pts {
		for cum[lo] < cum[i]-span/2 {
			lo++
		}
		var sum r3.Vec
		n := 0
		for j := lo; j < len(pts) && cum[j] <= cum[i]+span/2; j++ {
			sum = r3.Add(sum, pts[j])
			n++
		}
		out[i] = r3.Scale(1/float64(n), sum)
	}
	return out
}

// orientAlong flips normals so that each agrees with the previous one.
func orientAlong(ns []r3.Vec) []r3.Vec {
	out := slices.Clone(ns)
	for i := 1; i < len(out); i++ {
		if r3.Dot(out[i], out[i-1]) < 0 {
			out[i] = r3.Scale(-1, out[i])
		}
	}
	return out
}

// fallbackSpine returns a straight spine through the samples along their
// direction of largest spread, for an overlap too small for a path.
func fallbackSpine(samples []sample) *spine {
	var c r3.Vec
	w := 0.0
	for _, s := range samples {
		c = r3.Add(c, r3.Scale(s.area, s.pos))
		w += s.area
	}
	c = r3.Scale(1/w, c)
	// Power iteration on the covariance.
	var cov [3][3]float64
	for _, s := range samples {
		d := r3.Sub(s.pos, c)
		v := [3]float64{d.X, d.Y, d.Z}
		for i := range 3 {
			for j := range 3 {
				cov[i][j] += s.area * v[i] * v[j]
			}
		}
	}
	dir := anyPerpendicular(samples[0].normal)
	for range 50 {
		v := [3]float64{dir.X, dir.Y, dir.Z}
		var o [3]float64
		for i := range 3 {
			for j := range 3 {
				o[i] += cov[i][j] * v[j]
			}
		}
		n := r3.Vec{X: o[0], Y: o[1], Z: o[2]}
		if r3.Norm(n) == 0 {
			break
		}
		dir = r3.Unit(n)
	}
	half := 0.0
	for _, s := range samples {
		half = math.Max(half, math.Abs(r3.Dot(r3.Sub(s.pos, c), dir)))
	}
	half = math.Max(half, 1e-3)
	n := samples[0].normal
	return makeSpine([]r3.Vec{r3.Sub(c, r3.Scale(half, dir)), r3.Add(c, r3.Scale(half, dir))}, []r3.Vec{n, n}, false)
}

// outlineSeg is a segment of the overlap's outline, with the chart s of
// its ends on a spine.
type outlineSeg struct {
	a, b   r3.Vec
	sa, sb float64
}

// chartOutline returns the segments of the outline loops with their
// chart s on sp: each loop is walked from its first point (located among
// all the spine's segments), the previous point's s the hint within
// window.
func chartOutline(sp *spine, lps []loop, window float64) []outlineSeg {
	total := 0
	for _, l := range lps {
		total += len(l.pts)
	}
	out := make([]outlineSeg, 0, total)
	for _, l := range lps {
		n := len(l.pts)
		if n < 2 {
			continue
		}
		nseg := n - 1
		if l.closed {
			nseg = n
		}
		first, _ := sp.locate(l.pts[0], 0, 0)
		prev := first
		for i := range nseg {
			j := (i + 1) % n
			s1 := first
			if j > 0 {
				s1, _ = sp.locate(l.pts[j], prev, window)
			}
			out = append(out, outlineSeg{l.pts[i], l.pts[j], prev, s1})
			prev = s1
		}
	}
	return out
}

// section is a cross-section of the overlap at a station of a spine: the
// plane through the spine's point p square to its smoothly turning
// tangent t, with lat across the sheet in it and nv the sheet's normal.
type section struct{ p, t, lat, nv r3.Vec }

// sectionAt returns the cross-section at arc length s. Its plane is
// square to tangentAt, not to the segment's own tangent: at a vertex of
// the spine the chart's line s = const is a wedge on the turn's convex
// side, whose crossings with the outline would lie short of it.
func (sp *spine) sectionAt(s float64) section {
	p, _ := sp.at(s)
	t := sp.tangentAt(s)
	l0 := sp.lat[sp.segment(s)]
	lat := r3.Sub(l0, r3.Scale(r3.Dot(l0, t), t))
	if n := r3.Norm(lat); n > 0 {
		lat = r3.Scale(1/n, lat)
	} else {
		lat = l0
	}
	return section{p, t, lat, r3.Cross(t, lat)}
}

// cross returns the offset across (along lat) of the point where
// outline segment c crosses the section's plane, and false when it does
// not cross it or crosses it farther than reach off the sheet (along
// nv). An end on the plane counts as beyond it, so that a polyline
// through the plane crosses it once.
func (x section) cross(c outlineSeg, reach float64) (float64, bool) {
	da, db := r3.Dot(r3.Sub(c.a, x.p), x.t), r3.Dot(r3.Sub(c.b, x.p), x.t)
	if (da < 0) == (db < 0) {
		return 0, false
	}
	q := r3.Add(c.a, r3.Scale(da/(da-db), r3.Sub(c.b, c.a)))
	d := r3.Sub(q, x.p)
	if math.Abs(r3.Dot(d, x.nv)) > reach {
		return 0, false
	}
	return r3.Dot(d, x.lat), true
}

// refit moves the spine across itself, at even stations along it, to
// the middle of the overlap's cross-sections: the new point at station k
// is the old spine's point there moved across to the middle of the
// outline's cross-section there (sectionAt), and along the sheet's
// normal to the area-weighted centroid of the samples near it. The
// cross-section is taken where it spans the samples near the station;
// where the outline's crossings are missing on a side or cut short (an
// end at a slant), the middle of the extent of those samples' centroids
// stands in, which is off the middle where the outermost pieces reach
// the outline unevenly (on triangles, a third of an element short of
// the host's own edge, but slivers on an edge the other sheet cuts).
// Each sample is shared between the two stations either side of it
// with hat weights, whose sum over a row of samples does not depend on
// the row's offset along s. Moving across only keeps the stations
// evenly spaced. Where a station is placed by its samples, taubin then
// removes any zigzag; cross-sections need no smoothing (each one's
// middle is the overlap's, whatever the tilt a zigzag gives it), and
// taubin would pull the point next to an open spine's end, which it
// holds, inside a curve (by 0.06 mm on a radius of 60 mm with stations
// 8.6 mm apart). With keepEnds, an open
// spine keeps its end stations. It returns the new spine and the s of
// the old one where it starts.
func refit(sp *spine, samples []sample, ss, ns []float64, cuts []outlineSeg, binLen float64, keepEnds bool) (*spine, float64, float64) {
	lo, hi := 0.0, sp.length
	if !sp.closed {
		lo, hi = math.Inf(1), math.Inf(-1)
		for _, s := range ss {
			lo, hi = math.Min(lo, s), math.Max(hi, s)
		}
	}
	nb := int(math.Round((hi - lo) / binLen))
	if sp.closed {
		nb = max(nb, 6)
	} else {
		nb = max(nb, 2)
	}
	bl := (hi - lo) / float64(nb)
	type bin struct {
		pos      r3.Vec
		area     float64
		normal   r3.Vec
		nlo, nhi float64 // extent across the spine of the samples nearest the station
		clo, chi float64 // extent of the outline's crossings with the station's cross-section
		// slo and shi: whether the crossing at clo (chi) is with an
		// outline segment that runs across the spine (steep) rather
		// than along it: an end of the overlap, cut square or at a
		// slant.
		slo, shi bool
	}
	bins := make([]bin, nb)
	for k := range bins {
		bins[k].nlo, bins[k].nhi = math.Inf(1), math.Inf(-1)
		bins[k].clo, bins[k].chi = math.Inf(1), math.Inf(-1)
	}
	add := func(k int, w float64, i int) {
		if w <= 0 {
			return
		}
		b := &bins[k]
		if w >= 0.5 {
			b.nlo, b.nhi = math.Min(b.nlo, ns[i]), math.Max(b.nhi, ns[i])
		}
		wa := w * samples[i].area
		b.pos = r3.Add(b.pos, r3.Scale(wa, samples[i].pos))
		b.area += wa
		b.normal = r3.Add(b.normal, r3.Scale(wa, samples[i].up))
	}
	for i := range samples {
		x := 0.0
		if bl > 0 {
			x = (ss[i]-lo)/bl - 0.5 // in station units
		}
		k := int(math.Floor(x))
		f := x - float64(k)
		switch {
		case sp.closed:
			add(((k%nb)+nb)%nb, 1-f, i)
			add((((k+1)%nb)+nb)%nb, f, i)
		case k < 0:
			add(0, 1, i)
		case k >= nb-1:
			add(nb-1, 1, i)
		default:
			add(k, 1-f, i)
			add(k+1, f, i)
		}
	}
	// The outline's crossings with the stations' cross-sections, those
	// within a bin of the samples' extent across and off the sheet (not
	// the far side of a ring or of a U-shaped flange). A segment is
	// tried on the stations within a bin of its chart s, unless its
	// chart image jumps (its ends on the inside of a bend, nearest to
	// segments of the spine far apart).
	secs := make([]section, nb)
	for k := range secs {
		secs[k] = sp.sectionAt(lo + (float64(k)+0.5)*bl)
	}
	crossing := func(b *bin, x section, c outlineSeg) {
		if n, ok := x.cross(c, bl); ok && n >= b.nlo-bl && n <= b.nhi+bl {
			d := r3.Sub(c.b, c.a)
			steep := math.Abs(r3.Dot(d, x.t)) < endSlant*r3.Norm(d)
			if n < b.clo {
				b.clo, b.slo = n, steep
			}
			if n > b.chi {
				b.chi, b.shi = n, steep
			}
		}
	}
	for _, c := range cuts {
		sa, sb := c.sa, c.sb
		if sp.closed {
			for sb-sa > sp.length/2 {
				sb -= sp.length
			}
			for sa-sb > sp.length/2 {
				sb += sp.length
			}
		}
		sa, sb = math.Min(sa, sb), math.Max(sa, sb)
		if !(bl > 0) || sb-sa > 2*dist(c.a, c.b)+bl {
			continue
		}
		k0 := int(math.Ceil((sa-bl-lo)/bl - 0.5))
		k1 := int(math.Floor((sb+bl-lo)/bl - 0.5))
		if !sp.closed {
			k0, k1 = max(k0, 0), min(k1, nb-1)
		} else {
			k1 = min(k1, k0+nb-1)
		}
		for k := k0; k <= k1; k++ {
			kk := ((k % nb) + nb) % nb
			crossing(&bins[kk], secs[kk], c)
		}
	}
	// middle returns the middle of a bin's cross-section where it spans
	// the bin's samples (with a quarter bin's play, for an outline that
	// slants within the bin).
	middle := func(b bin) (float64, bool) {
		mid := (b.nlo + b.nhi) / 2
		tol := bl / 4
		if b.nhi >= b.nlo && b.clo <= b.nlo+tol && b.chi >= b.nhi-tol && b.clo <= mid && b.chi >= mid {
			return (b.clo + b.chi) / 2, true
		}
		return 0, false
	}
	// An open spine's end stations whose cross-section meets the end of
	// the overlap (an outline segment running across the spine) see
	// the overlap on one side only where the end is cut at a slant:
	// the middle of such a cross-section lies off the strip's middle
	// (by up to half the width), and would pull the spine's end
	// across, further at every pass. They are left out from each end
	// up to the first station whose cross-section meets the sides
	// alone, keeping two stations at least; the spine's straight
	// extension covers the ends.
	first, last := 0, nb-1
	if !sp.closed {
		cut := func(b bin) bool { return b.area > 0 && (b.slo || b.shi) }
		for first < last-1 && cut(bins[first]) {
			first++
		}
		for last > first+1 && cut(bins[last]) {
			last--
		}
	}
	var pts, nrm []r3.Vec
	moved := 0.0
	smooth := false // whether a station is placed by its samples
	for k, b := range bins {
		if b.area <= 0 || k < first || k > last {
			continue
		}
		if !keepEnds && !sp.closed && nb >= 4 && (k == 0 || k == nb-1) {
			// An end station sees the overlap on one side only, cut by
			// the end at the old spine's slant: leave it out, the
			// spine's straight extension covers the end.
			continue
		}
		x := secs[k]
		d := r3.Sub(r3.Scale(1/b.area, b.pos), x.p)
		var mv r3.Vec
		if m, ok := middle(b); ok {
			// Across: to the middle of the cross-section, which an arc
			// (whose outer side has more area) does not pull outwards
			// as the centroid would; along the normal: to the mean.
			mv = r3.Add(r3.Scale(m, x.lat), r3.Scale(r3.Dot(d, x.nv), x.nv))
		} else {
			// Across: to the middle of the samples' extent, or their
			// centroid.
			smooth = true
			st := lo + (float64(k)+0.5)*bl
			_, t := sp.at(st)
			lat := sp.lat[sp.segment(st)]
			nv := r3.Cross(t, lat)
			across := r3.Dot(d, lat)
			if b.nhi >= b.nlo {
				across = (b.nlo + b.nhi) / 2
			}
			mv = r3.Add(r3.Scale(across, lat), r3.Scale(r3.Dot(d, nv), nv))
		}
		moved = math.Max(moved, r3.Norm(mv))
		pts = append(pts, r3.Add(x.p, mv))
		nrm = append(nrm, r3.Unit(b.normal))
	}
	if smooth {
		pts = taubin(pts, sp.closed)
	}
	next := makeSpine(pts, nrm, sp.closed)
	return next, lo + bl/2, moved
}

// endSlant is the cosine of the angle to the spine above which an
// outline segment counts as running across it (refit, finish): an end
// of the overlap, cut square or at a slant of up to 60 degrees from
// square (the cut 30 degrees or more off the spine's direction). The
// sides of a strip, a taper, a coarse mesh's chords round a curve run
// within a few degrees of it.
const endSlant = 0.866 // cos 30 degrees

// taubin smooths a polyline by one step of G. Taubin's lambda|mu filter
// (A signal processing approach to fair surface design, SIGGRAPH 1995):
// p += lambda L(p), then p += mu L(p), L the umbrella operator (the mean
// of the two neighbours less the point), lambda = 1/2, mu = -0.53. With
// lambda 1/2 the station-to-station zigzag (the mode a kinked spine
// feeds, as the pieces beyond a kink's convex side all fall on its
// vertex) is removed at once, while the mu step undoes the shrinking of
// slow bends to first order: an arc keeps its radius. An open
// polyline's ends stay.
func taubin(pts []r3.Vec, closed bool) []r3.Vec {
	step := func(in []r3.Vec, f float64) []r3.Vec {
		out := slices.Clone(in)
		n := len(in)
		for i := range in {
			a, c := i-1, i+1
			if closed {
				a, c = (i+n-1)%n, (i+1)%n
			} else if a < 0 || c >= n {
				continue
			}
			l := r3.Sub(r3.Scale(0.5, r3.Add(in[a], in[c])), in[i])
			out[i] = r3.Add(in[i], r3.Scale(f, l))
		}
		return out
	}
	if len(pts) < 3 {
		return pts
	}
	return step(step(pts, 0.5), -0.53)
}

// atLat returns the point at arc length s and the lateral direction
// there.
func (sp *spine) atLat(s float64) (r3.Vec, r3.Vec) {
	p, _ := sp.at(s)
	return p, sp.lat[sp.segment(s)]
}

// tangentAt returns the unit tangent at arc length s, turning smoothly
// from segment to segment: it is the segment's own at the segment's
// middle and the mean of two segments' at the vertex between them.
func (sp *spine) tangentAt(s float64) r3.Vec {
	i := sp.segment(s)
	nseg := len(sp.tan)
	if sp.closed {
		s = math.Mod(s, sp.length)
		if s < 0 {
			s += sp.length
		}
	}
	l := sp.segLen(i)
	f := 0.5
	if l > 0 {
		f = (s - sp.cum[i]) / l
	}
	j, w := -1, 0.0
	switch {
	case f < 0.5 && (i > 0 || sp.closed):
		j, w = (i+nseg-1)%nseg, 0.5-f
	case f > 0.5 && (i < nseg-1 || sp.closed):
		j, w = (i+1)%nseg, f-0.5
	}
	if j < 0 {
		return sp.tan[i]
	}
	w = min(max(w, 0), 0.5)
	t := r3.Add(r3.Scale(1-w, sp.tan[i]), r3.Scale(w, sp.tan[j]))
	if n := r3.Norm(t); n > 0 {
		return r3.Scale(1/n, t)
	}
	return sp.tan[i]
}

// segment returns the segment holding arc length s.
func (sp *spine) segment(s float64) int {
	if sp.closed {
		s = math.Mod(s, sp.length)
		if s < 0 {
			s += sp.length
		}
	}
	i, _ := slices.BinarySearch(sp.cum, s)
	i = min(max(i-1, 0), len(sp.tan)-1)
	if !sp.closed && s > sp.cum[len(sp.cum)-1] {
		i = len(sp.tan) - 1
	}
	return i
}

// finish extends an open spine to the overlap's ends, charts the outline
// and measures the widths.
func finish(sp *spine, samples []sample, lps []loop, area, binLen float64) *outline {
	o := &outline{chart: sp, closed: sp.closed, binLen: binLen}
	// The outline in chart coordinates.
	chartLoop := func(l loop) orb.LineString {
		ls := make(orb.LineString, 0, len(l.pts)+1)
		for _, p := range l.pts {
			s, n := sp.locate(p, 0, 0)
			ls = append(ls, orb.Point{s, n})
		}
		if l.closed && len(ls) > 0 {
			ls = append(ls, ls[0])
		}
		return ls
	}
	var charted []orb.LineString
	for _, l := range lps {
		charted = append(charted, chartLoop(l))
	}
	if sp.closed {
		o.length = sp.length
		o.centre = slices.Clone(sp.pts)
		o.shift = 0
		// Unwrap each loop to a continuous curve, then keep three
		// turns so that distances near the seam are right.
		for _, ls := range charted {
			for i := 1; i < len(ls); i++ {
				for ls[i][0]-ls[i-1][0] > o.length/2 {
					ls[i][0] -= o.length
				}
				for ls[i][0]-ls[i-1][0] < -o.length/2 {
					ls[i][0] += o.length
				}
			}
			for _, k := range [3]float64{-1, 0, 1} {
				c := make(orb.LineString, len(ls))
				for i, p := range ls {
					c[i] = orb.Point{p[0] + k*o.length, p[1]}
				}
				o.bound = append(o.bound, c)
			}
		}
	} else {
		// Where the line n = 0 leaves the outline beyond the spine's
		// ends.
		last := sp.cum[len(sp.cum)-1]
		start, end := sp.ext0, last-sp.ext1
		lower, upper := math.Inf(-1), math.Inf(1)
		for _, ls := range charted {
			for i := 0; i+1 < len(ls); i++ {
				a, b := ls[i], ls[i+1]
				if (a[1] < 0) == (b[1] < 0) {
					continue
				}
				s := a[0] + (0-a[1])/(b[1]-a[1])*(b[0]-a[0])
				if s <= start+1e-9 && s > lower {
					lower = s
				}
				if s >= end-1e-9 && s < upper {
					upper = s
				}
			}
		}
		if !math.IsInf(lower, -1) {
			start = lower
		}
		if !math.IsInf(upper, 1) {
			end = upper
		}
		o.shift = start
		o.length = end - start
		p0, _ := sp.at(start)
		o.centre = append(o.centre, p0)
		for i, p := range sp.pts {
			if sp.cum[i] > start+1e-9 && sp.cum[i] < end-1e-9 {
				o.centre = append(o.centre, p)
			}
		}
		p1, _ := sp.at(end)
		o.centre = append(o.centre, p1)
		for k, ls := range charted {
			c := make(orb.LineString, len(ls))
			for i, p := range ls {
				c[i] = orb.Point{p[0] - start, p[1]}
			}
			o.bound = append(o.bound, c)
			if len(c) >= 4 && c[0] == c[len(c)-1] {
				if k == 0 {
					o.poly = append(o.poly, orb.Ring(c))
				} else if len(o.poly) > 0 {
					o.poly = append(o.poly, orb.Ring(c))
				}
			}
		}
	}
	// Widths across the centreline, in bins away from the ends.
	o.width = [3]float64{math.Inf(1), 0, 0}
	nb := max(1, int(math.Round(o.length/binLen)))
	bl := o.length / float64(nb)
	for k := range nb {
		s := (float64(k) + 0.5) * bl
		if !o.closed && nb > 2 && (k == 0 || k == nb-1) {
			continue // the ends may be cut at a slant
		}
		w := o.widthAt(s)
		if w <= 0 {
			continue
		}
		o.width[0] = math.Min(o.width[0], w)
		o.width[2] = math.Max(o.width[2], w)
	}
	if o.length > 0 {
		o.width[1] = area / o.length
	}
	// The cross-sections sample the width, the mean takes in all of it
	// (a bulge between stations, the ends): min and max are widened to
	// take in the mean, so that min <= mean <= max.
	if math.IsInf(o.width[0], 1) {
		o.width[0], o.width[2] = o.width[1], o.width[1]
	}
	o.width[0] = math.Min(o.width[0], o.width[1])
	o.width[2] = math.Max(o.width[2], o.width[1])
	return o
}

// chartLength returns the length of the centreline measured in the
// chart (planar length of its chart image), which equals its length in
// space for a chart unrolled along it.
func (o *outline) chartLength() float64 {
	ls := make(orb.LineString, 0, len(o.centre)+1)
	for _, p := range o.centre {
		s, n := o.toCentre(p)
		ls = append(ls, orb.Point{s, n})
	}
	if o.closed && len(ls) > 0 {
		ls = append(ls, orb.Point{o.length, ls[0][1]})
	}
	return planar.Length(ls)
}

// orderGrain, mm, is the grain below which two coordinates count as
// equal when cmpVec orders points (the ends of a centreline, the starts
// of a pair's flanges): well below the element sizes and flange widths
// that such points differ by when they differ at all, and well above
// the wobble of the outline's fits (about 0.01 mm) when the same model
// is read in another unit and scaled to mm, so that it starts its
// centrelines at the same ends and numbers its flanges alike.
const orderGrain = 0.1

// cmpVec orders points lexicographically, coordinates in units of
// orderGrain, rounded.
func cmpVec(a, b r3.Vec) int {
	g := func(v float64) float64 { return math.Round(v / orderGrain) }
	return cmp.Or(cmp.Compare(g(a.X), g(b.X)), cmp.Compare(g(a.Y), g(b.Y)), cmp.Compare(g(a.Z), g(b.Z)))
}

// lessVec reports whether a comes before b (cmpVec).
func lessVec(a, b r3.Vec) bool { return cmpVec(a, b) < 0 }

// canonical returns the outline of spine sp traced so that ids do not
// depend on how the spine was found: an open centreline starts at its
// lexicographically smaller end; a closed one at its smallest point,
// going towards the smaller of that point's two neighbours.
func canonical(sp *spine, samples []sample, lps []loop, area, binLen float64) *outline {
	if !sp.closed {
		o := finish(sp, samples, lps, area, binLen)
		if lessVec(o.centre[len(o.centre)-1], o.centre[0]) {
			o = finish(reverseSpine(sp), samples, lps, area, binLen)
		}
		return o
	}
	n := len(sp.pts)
	pts := slices.Clone(sp.pts)
	ns := make([]r3.Vec, n)
	for i := range ns {
		ns[i] = r3.Cross(sp.tan[i], sp.lat[i])
	}
	first := 0
	for i, p := range pts {
		if lessVec(p, pts[first]) {
			first = i
		}
	}
	if lessVec(pts[(first+n-1)%n], pts[(first+1)%n]) {
		slices.Reverse(pts)
		slices.Reverse(ns)
		first = n - 1 - first
	}
	pts = append(pts[first:], pts[:first]...)
	ns = append(ns[first:], ns[:first]...)
	if c := makeSpine(pts, ns, true); c != nil {
		sp = c
	}
	return finish(sp, samples, lps, area, binLen)
}

// reverseSpine returns open spine sp run the other way, with the lateral
// direction flipped with it.
func reverseSpine(sp *spine) *spine {
	pts := slices.Clone(sp.pts)
	slices.Reverse(pts)
	ns := make([]r3.Vec, len(pts))
	for i := range ns {
		seg := min(len(pts)-1-i, len(sp.lat)-1)
		ns[i] = r3.Cross(sp.tan[seg], sp.lat[seg]) // the sheet normal
	}
	if r := makeSpine(pts, ns, false); r != nil {
		r.ext0, r.ext1 = sp.ext1, sp.ext0
		return r
	}
	return sp
}

// curveTolerance, times the element size, is how far a curved open
// centreline may run off its curve: between stations (densify) and
// beyond its last one (extendArcs).
const curveTolerance = 0.004

// normals returns the sheet normal at each point of sp, that of the
// segment starting there (the last point: ending there).
func (sp *spine) normals() []r3.Vec {
	ns := make([]r3.Vec, len(sp.pts))
	for i := range ns {
		seg := min(i, len(sp.tan)-1)
		ns[i] = r3.Cross(sp.tan[seg], sp.lat[seg])
	}
	return ns
}

// rotate returns v turned by angle a about unit axis k (Rodrigues'
// rotation formula).
func rotate(v, k r3.Vec, a float64) r3.Vec {
	c, s := math.Cos(a), math.Sin(a)
	return r3.Add(r3.Add(r3.Scale(c, v), r3.Scale(s, r3.Cross(k, v))), r3.Scale(r3.Dot(k, v)*(1-c), k))
}

// arcBeyond returns the points that carry the polyline a, b, c on past
// c along the circle through the three, for length e in steps about
// |c - b| long, with normal nc at c turned along; nil where the circle
// runs off the straight line on from c by no more than tol within e
// (e^2 / 2R, the sagitta rule), or turns by more than a radian within
// e (a bend that sharp is no curve to carry on).
func arcBeyond(a, b, c, nc r3.Vec, e, tol float64) (pts, ns []r3.Vec) {
	u, w := r3.Sub(b, a), r3.Sub(c, a)
	ax := r3.Cross(u, w)
	den := 2 * r3.Norm2(ax)
	if !(den > 0) {
		return nil, nil
	}
	// The circumcentre of a, b, c.
	o := r3.Add(a, r3.Scale(1/den, r3.Add(r3.Scale(r3.Norm2(u), r3.Cross(w, ax)), r3.Scale(r3.Norm2(w), r3.Cross(ax, u)))))
	r := dist(o, c)
	if e*e/(2*r) <= tol || e > r {
		return nil, nil
	}
	k := r3.Unit(ax) // a -> b -> c turns positively about k
	n := max(1, int(math.Ceil(e/math.Max(dist(b, c), e/8))))
	for i := 1; i <= n; i++ {
		ang := float64(i) * e / float64(n) / r
		pts = append(pts, r3.Add(o, rotate(r3.Sub(c, o), k, ang)))
		ns = append(ns, rotate(nc, k, ang))
	}
	return pts, ns
}

// extendArcs carries open spine sp on past each end for length e along
// the circle through its last three points, where that circle runs off
// the straight extension by more than tol: a curved flange's chart then
// stays square to it past the last station, and its centreline follows
// the curve to the ends instead of running on along the last chord. A
// spine that does not turn is returned as it is.
func extendArcs(sp *spine, e, tol float64) *spine {
	if sp == nil || sp.closed || len(sp.pts) < 3 {
		return sp
	}
	n := len(sp.pts)
	ns := sp.normals()
	pre, preN := arcBeyond(sp.pts[2], sp.pts[1], sp.pts[0], ns[0], e, tol)
	post, postN := arcBeyond(sp.pts[n-3], sp.pts[n-2], sp.pts[n-1], ns[n-1], e, tol)
	if pre == nil && post == nil {
		return sp
	}
	slices.Reverse(pre)
	slices.Reverse(preN)
	pts := slices.Concat(pre, sp.pts, post)
	nrm := slices.Concat(preN, ns, postN)
	out := makeSpine(pts, nrm, false)
	if out == nil || len(out.pts) != len(pts) {
		return sp
	}
	out.ext0 = sp.ext0
	if len(pre) > 0 {
		out.ext0 = out.cum[len(pre)]
	}
	out.ext1 = sp.ext1
	if len(post) > 0 {
		out.ext1 = out.length - out.cum[len(out.pts)-1-len(post)]
	}
	return out
}

// densify inserts a point into each segment of open spine sp whose
// middle the four-point interpolatory scheme (N. Dyn, D. Levin and J. A.
// Gregory, A 4-point interpolatory subdivision scheme for curve design,
// CAGD 4, 1987; weight 1/16; the end segments by the quadratic through
// three points) puts farther than tol off the chord across the sheet, up
// to three rounds:
// on a curved flange a chord l long between stations cuts l^2 / 8R
// inside the curve (0.15 mm for stations 8.6 mm apart on a radius of
// 60 mm), and welds between stations would lie that far off. The scheme
// only says where a chord may cut a curve: the point inserted is the
// middle of the overlap's cross-section square to the chord at its
// middle (when the outline gives one), and it is inserted only where that
// middle lies more than tol off the chord. The scheme's own point
// overshoots a sharp turn (by 0.5 mm outside an L-shaped flange's corner,
// 10 mm wide) and rounds a coarse mesh's polygon round a curve into a
// smooth one that is not the overlap's middle (by up to 1.6 mm outside
// the polygon of 10 degree elements on a radius of 310 mm); the
// cross-section's middle is the overlap's own. Where the spine is
// straight nothing is inserted.
func densify(sp *spine, lps []loop, wEst, tol float64) *spine {
	if sp == nil || sp.closed || len(sp.pts) < 3 {
		return sp
	}
	// The outline's segments are filed when a chord first asks (most
	// flanges are straight and never do).
	var finder *sectionFinder
	filed := false
	for range 3 {
		p := sp.pts
		n := len(p)
		ns := sp.normals()
		var pts, nrm []r3.Vec
		added := false
		for i := range n {
			pts, nrm = append(pts, p[i]), append(nrm, ns[i])
			if i == n-1 {
				break
			}
			var m r3.Vec
			switch {
			case i == 0:
				m = r3.Scale(1.0/8, r3.Add(r3.Add(r3.Scale(3, p[0]), r3.Scale(6, p[1])), r3.Scale(-1, p[2])))
			case i == n-2:
				m = r3.Scale(1.0/8, r3.Add(r3.Add(r3.Scale(3, p[n-1]), r3.Scale(6, p[n-2])), r3.Scale(-1, p[n-3])))
			default:
				m = r3.Scale(1.0/16, r3.Sub(r3.Scale(9, r3.Add(p[i], p[i+1])), r3.Add(p[i-1], p[i+2])))
			}
			// Off the chord across the sheet, square to the chord and
			// the normal: welds are put on the sheets along their
			// normal, so a sagitta along it (a flange bent about its
			// length) does not move them, and neither does a shift
			// along the chord (stations unevenly spaced).
			c := r3.Scale(0.5, r3.Add(p[i], p[i+1]))
			d := r3.Sub(m, c)
			across := r3.Cross(r3.Add(ns[i], ns[i+1]), r3.Sub(p[i+1], p[i]))
			l := r3.Norm(across)
			if !(l > 0) || math.Abs(r3.Dot(d, across))/l <= tol {
				continue
			}
			lat := r3.Scale(1/l, across)
			if !filed {
				// Reach 1.5 widths: across an L's corner the section
				// along the bisector is sqrt 2 widths long (with wEst,
				// a congruent L traced on its own mesh lost its corner,
				// 186.9 mm long for 190; TestLShapedStrip).
				finder, filed = newSectionFinder(lps, 1.5*wEst), true
			}
			if finder != nil {
				// No cross-section there (its far side out of reach, as
				// beside an L's corner, where it runs along the other
				// arm): nothing to insert.
				off, ok := finder.middle(c, r3.Unit(r3.Sub(p[i+1], p[i])), lat)
				if !ok {
					continue
				}
				m, d = r3.Add(c, r3.Scale(off, lat)), r3.Scale(off, lat)
			}
			if math.Abs(r3.Dot(d, lat)) > tol {
				pts, nrm = append(pts, m), append(nrm, r3.Add(ns[i], ns[i+1]))
				added = true
			}
		}
		if !added {
			break
		}
		next := makeSpine(pts, nrm, false)
		if next == nil {
			break
		}
		next.ext0, next.ext1 = sp.ext0, sp.ext1
		sp = next
	}
	return sp
}

// sectionFinder finds the middle of an overlap's cross-sections from its
// outline segments, filed in a grid of cells of the flange's width.
type sectionFinder struct {
	segs  []outlineSeg
	cell  float64
	grid  map[[3]int64][]int32
	reach float64
}

// newSectionFinder files the segments of loops lps for cross-sections
// up to about wEst (the flange's estimated width) across; nil without
// segments.
func newSectionFinder(lps []loop, wEst float64) *sectionFinder {
	f := &sectionFinder{grid: map[[3]int64][]int32{}, reach: wEst}
	longest := 0.0
	for _, l := range lps {
		n := len(l.pts)
		nseg := n - 1
		if l.closed {
			nseg = n
		}
		for i := 0; i < nseg && n > 1; i++ {
			a, b := l.pts[i], l.pts[(i+1)%n]
			f.segs = append(f.segs, outlineSeg{a: a, b: b})
			longest = math.Max(longest, dist(a, b))
		}
	}
	if len(f.segs) == 0 || !(wEst > 0) {
		return nil
	}
	// A crossing middle takes lies within the reach along the section's
	// lateral direction and within it off the plane (section.cross), so
	// within reach sqrt(2) of the point, and its segment's middle within
	// half the segment's length of it: cells that wide make the cells
	// round the point's hold it.
	f.cell = math.Sqrt2*wEst + longest/2
	for i, sg := range f.segs {
		k := f.key(r3.Scale(0.5, r3.Add(sg.a, sg.b)))
		f.grid[k] = append(f.grid[k], int32(i))
	}
	return f
}

func (f *sectionFinder) key(p r3.Vec) [3]int64 {
	g := func(v float64) int64 { return int64(math.Floor(v / f.cell)) }
	return [3]int64{g(p.X), g(p.Y), g(p.Z)}
}

// middle returns the offset along unit lat from point p to the middle
// of the overlap's cross-section through p square to unit tangent t:
// between the nearest crossings of the outline on either side of p,
// within the reach, and false where either side has none.
func (f *sectionFinder) middle(p, t, lat r3.Vec) (float64, bool) {
	if f == nil {
		return 0, false
	}
	x := section{p: p, t: t, lat: lat, nv: r3.Cross(t, lat)}
	lo, hi := math.Inf(-1), math.Inf(1)
	k := f.key(p)
	for dx := int64(-1); dx <= 1; dx++ {
		for dy := int64(-1); dy <= 1; dy++ {
			for dz := int64(-1); dz <= 1; dz++ {
				for _, i := range f.grid[[3]int64{k[0] + dx, k[1] + dy, k[2] + dz}] {
					n, ok := x.cross(f.segs[i], f.reach)
					switch {
					case !ok || math.Abs(n) > f.reach:
					case n < 0 && n > lo:
						lo = n
					case n >= 0 && n < hi:
						hi = n
					}
				}
			}
		}
	}
	if math.IsInf(lo, -1) || math.IsInf(hi, 1) {
		return 0, false
	}
	return (lo + hi) / 2, true
}
