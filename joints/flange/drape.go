package flange

import (
	"cmp"
	"math"
	"slices"

	"github.com/joinery-cae/joinery/geom"
	"gonum.org/v1/gonum/spatial/r3"
)

// drapeDepth bounds how many times over drape halves a chord: a chord
// across a crease cuts the corner by about half its length times the
// sine of half the bend; each halving about halves the cut, so 16
// rounds take a 10 mm chord across a right-angle bend to well under a
// micrometre.
const drapeDepth = 16

// draper finds the closest point of a flange's faying surface to a
// point. The faying surface is taken piece by piece: each host element
// of the overlap moved along its normal by its sample's shift. Where
// two of them meet at a crease, moved apart (the host on the inside of
// the bend) or across each other (on the outside), the surface runs
// along the line where their planes meet, as the faying face of the
// other sheet does.
type draper struct {
	m       *geom.Mesh
	samples []sample
	cell    float64
	grid    map[[3]int64][]int32
	// centre and rad are each piece's lifted centroid and the radius
	// about it that holds its corners (a bound that spares most
	// projections).
	centre []r3.Vec
	rad    []float64
	edges  []sharedEdge // the element edges the pieces share (sharedEdges)
	buf    []int32
}

func newDraper(m *geom.Mesh, samples []sample, edges []sharedEdge) *draper {
	d := &draper{m: m, samples: samples, edges: edges, grid: map[[3]int64][]int32{},
		centre: make([]r3.Vec, len(samples)), rad: make([]float64, len(samples))}
	for i, s := range samples {
		e := int(s.elem)
		c := m.Centroid(e)
		for k := range m.Type(e).Corners() {
			d.rad[i] = math.Max(d.rad[i], dist(c, m.Corner(e, k)))
		}
		d.cell = math.Max(d.cell, d.rad[i])
		d.centre[i] = r3.Add(c, r3.Scale(s.shift, s.normal))
	}
	// Any element whose surface lies within cell/2 of a point has its
	// centre within 1.5 cells of it: the 27 cells round the point's
	// hold it.
	d.cell = 2 * math.Max(d.cell, 1e-6)
	for i := range samples {
		k := d.key(d.centre[i])
		d.grid[k] = append(d.grid[k], int32(i))
	}
	return d
}

// across returns the samples other than i whose element shares the
// edge from u to v with sample i's, in order.
func (d *draper) across(i int32, u, v int32) []int32 {
	key := edgeKey(u, v)
	lo, _ := slices.BinarySearchFunc(d.edges, key, func(e sharedEdge, k uint64) int { return cmp.Compare(e.key, k) })
	out := d.buf[:0]
	for _, e := range d.edges[lo:] {
		if e.key != key {
			break
		}
		if e.a == i {
			out = append(out, e.b)
		} else if e.b == i {
			out = append(out, e.a)
		}
	}
	d.buf = out
	return out
}

func (d *draper) key(p r3.Vec) [3]int64 {
	f := func(v float64) int64 { return int64(math.Floor(v / d.cell)) }
	return [3]int64{f(p.X), f(p.Y), f(p.Z)}
}

// foot returns the point of the faying surface closest to q and the
// surface normal there, of the pieces' one orientation (up), and false when no piece lies within half a cell
// of q. Of pieces equally near, the first sample's wins.
func (d *draper) foot(q r3.Vec) (r3.Vec, r3.Vec, bool) {
	m := d.m
	k := d.key(q)
	var bestPr geom.Projection
	bestD, bestI := math.Inf(1), int32(-1)
	for dx := int64(-1); dx <= 1; dx++ {
		for dy := int64(-1); dy <= 1; dy++ {
			for dz := int64(-1); dz <= 1; dz++ {
				for _, i := range d.grid[[3]int64{k[0] + dx, k[1] + dy, k[2] + dz}] {
					// No point of a piece lies nearer than its centre less
					// its radius (with a little slack against rounding):
					// such a piece cannot beat the best, nor tie it.
					if lb := dist(q, d.centre[i]) - d.rad[i]; lb > bestD+1e-9*(1+bestD) {
						continue
					}
					s := &d.samples[i]
					lift := r3.Scale(s.shift, s.normal)
					pr := m.Project(int(s.elem), r3.Sub(q, lift))
					pr.Point = r3.Add(pr.Point, lift)
					if pr.Dist < bestD || pr.Dist == bestD && i < bestI {
						bestPr, bestD, bestI = pr, pr.Dist, i
					}
				}
			}
		}
	}
	if bestI < 0 || bestD > d.cell/2 {
		return r3.Vec{}, r3.Vec{}, false
	}
	s := &d.samples[bestI]
	n1 := s.up
	if r3.Norm2(n1) == 0 {
		return r3.Vec{}, r3.Vec{}, false
	}
	// On an edge shared with another piece whose plane differs (a
	// crease): the closest point of the line where the two planes meet.
	e := int(s.elem)
	nodes := m.ElemNodes(e)
	nc := m.Type(e).Corners()
	lift := r3.Scale(s.shift, s.normal)
	size := m.ElemSize(e)
	for j := range nc {
		a, b := r3.Add(m.Coords[nodes[j]], lift), r3.Add(m.Coords[nodes[(j+1)%nc]], lift)
		if dist(bestPr.Point, closestOn(bestPr.Point, a, b)) > 1e-9*(1+size) {
			continue
		}
		for _, i := range d.across(bestI, nodes[j], nodes[(j+1)%nc]) {
			o := &d.samples[i]
			n2 := o.up
			c := r3.Dot(n1, n2)
			if !(1-c*c > 1e-8) {
				continue
			}
			p2 := r3.Add(m.Coords[nodes[j]], r3.Scale(o.shift, o.normal))
			r1, r2 := r3.Dot(n1, r3.Sub(a, q)), r3.Dot(n2, r3.Sub(p2, q))
			x := r3.Add(q, r3.Add(r3.Scale((r1-c*r2)/(1-c*c), n1), r3.Scale((r2-c*r1)/(1-c*c), n2)))
			// The bisecting normal, of the two pieces' normals turned to
			// one orientation (orient: not by their angle, which passes
			// a right angle at a sharp bend).
			return x, r3.Unit(r3.Add(n1, n2)), true
		}
	}
	return bestPr.Point, n1, true
}

// drape lays open spine sp on the faying surface where it leaves it:
// first each point off the surface along the surface's normal (a fit's
// station inside a bend, at the middle of the pieces there) is put on
// it; then a chord whose middle lies farther than tol off the surface,
// along the normal there, is split at the closest point of the surface
// to its middle, over and over. A flange that runs across a crease of
// its sheets (a bent bracket lapping a bent panel) then has its
// centreline bent at the crease, on the sheets, and measured along them,
// where the fit's stations, a bin apart, cut the corner through the
// air: 3.5 mm short over a right-angle bend of a flange 20 mm wide.
// Points and chords that lie on the surface, or off it only beside its
// edge or beyond its ends, where the closest point lies along the
// surface, are left as they are.
//
// The spine's extensions past its first and last station (extendArcs'
// arcs, else the straight lines on along the end segments, sampled
// every reach/8 out to reach) are laid on the surface too, point by
// point out to the first that lies beyond the pieces, so that a flange
// whose sheets bend between its last station and its end (a beam
// stepping up onto a closing plate) is measured to its end along the
// sheets: the straight extension ran through the air, 0.1 mm short at
// each end of the example's flange of 100 and 200, across a bend of 7
// degrees 2.5 mm before the end, and its mean width, area over length,
// read 20.019 mm for 20.
func drape(m *geom.Mesh, sp *spine, samples []sample, edges []sharedEdge, tol, reach float64) *spine {
	if sp == nil || sp.closed || len(samples) == 0 || onePlane(m, samples) {
		return sp
	}
	d := newDraper(m, samples, edges)
	// across reports whether foot f of point p lies off it across the
	// surface (normal n) by more than tol, and more so than along it.
	across := func(p, f, n r3.Vec) bool {
		v := r3.Sub(p, f)
		off := math.Abs(r3.Dot(v, n))
		return off > tol && r3.Norm(r3.Sub(v, r3.Scale(r3.Dot(v, n), n))) <= off
	}
	// onIt reports whether point p lies on the surface: its foot f
	// within tol.
	onIt := func(p, f r3.Vec) bool { return dist(p, f) <= tol }
	ns := sp.normals()
	// The points within the overlap (first to last: the extensions are
	// the points before ext0 and after length-ext1).
	first, last := -1, -1
	for i := range sp.pts {
		if sp.cum[i] >= sp.ext0-1e-9 && sp.cum[i] <= sp.length-sp.ext1+1e-9 {
			if first < 0 {
				first = i
			}
			last = i
		}
	}
	if first < 0 {
		return sp
	}
	core := slices.Clone(sp.pts[first : last+1])
	coreN := slices.Clone(ns[first : last+1])
	moved := false
	for i, p := range core {
		if f, n, ok := d.foot(p); ok && across(p, f, n) {
			core[i], coreN[i] = f, n
			moved = true
		}
	}
	// extension returns the extension beyond core's end (start: before
	// its first point), outwards, laid on the surface: the spine's own
	// points there moved with the end point, else points on the
	// straight line on from the end segment.
	extension := func(start bool) (pts, nrm []r3.Vec, changed bool) {
		var own, ownN []r3.Vec
		end, endN, was := core[len(core)-1], coreN[len(core)-1], sp.pts[last]
		if start {
			end, endN, was = core[0], coreN[0], sp.pts[first]
			for i := first - 1; i >= 0; i-- {
				own, ownN = append(own, sp.pts[i]), append(ownN, ns[i])
			}
		} else {
			own, ownN = sp.pts[last+1:], ns[last+1:]
		}
		shift := r3.Sub(end, was)
		var dir r3.Vec
		if len(own) == 0 {
			if len(core) < 2 || !(reach > 0) {
				return nil, nil, false
			}
			dir = r3.Unit(r3.Sub(core[len(core)-1], core[len(core)-2]))
			if start {
				dir = r3.Unit(r3.Sub(core[0], core[1]))
			}
			for k := 1; k <= 8; k++ {
				own = append(own, r3.Add(was, r3.Scale(reach*float64(k)/8, dir)))
				ownN = append(ownN, endN)
			}
		}
		for k, p := range own {
			p = r3.Add(p, shift)
			f, n, ok := d.foot(p)
			switch {
			case ok && across(p, f, n):
				pts, nrm = append(pts, f), append(nrm, n)
				changed = true
			case ok && onIt(p, f):
				pts, nrm = append(pts, p), append(nrm, ownN[k])
			default:
				// Beyond the pieces: the rest, and the spine's straight
				// run on from its last point, carry on.
				if r3.Norm2(dir) == 0 {
					// The spine's own points: keep them, moved whole.
					for kk := k; kk < len(own); kk++ {
						pts, nrm = append(pts, r3.Add(own[kk], shift)), append(nrm, ownN[kk])
					}
				}
				return pts, nrm, changed
			}
		}
		return pts, nrm, changed
	}
	pre, preN, preMoved := extension(true)
	post, postN, postMoved := extension(false)
	// Straight runs that lie on the surface as they are stay implicit.
	if first == 0 && !preMoved {
		pre, preN = nil, nil
	}
	if last == len(sp.pts)-1 && !postMoved {
		post, postN = nil, nil
	}
	moved = moved || preMoved || postMoved
	slices.Reverse(pre)
	slices.Reverse(preN)
	src := slices.Concat(pre, core, post)
	srcN := slices.Concat(preN, coreN, postN)
	var pts, nrm []r3.Vec
	var fill func(a, b r3.Vec, depth int)
	fill = func(a, b r3.Vec, depth int) {
		if depth == 0 {
			return
		}
		mid := r3.Scale(0.5, r3.Add(a, b))
		f, n, ok := d.foot(mid)
		if !ok {
			return
		}
		// Only a foot between the chord's ends splits it, and only one
		// off the chord across the surface: judged from the middle, or
		// else from the chord's point nearest to the foot (on a shallow
		// crease, a few degrees, the middle's foot lies along the
		// surface from it: the example's step of 7 degrees).
		ab := r3.Sub(b, a)
		t := r3.Dot(r3.Sub(f, a), ab) / r3.Norm2(ab)
		if !(t > 1e-3 && t < 1-1e-3) || !across(mid, f, n) && !across(r3.Add(a, r3.Scale(t, ab)), f, n) {
			return
		}
		fill(a, f, depth-1)
		pts, nrm = append(pts, f), append(nrm, n)
		moved = true
		fill(f, b, depth-1)
	}
	for i, p := range src {
		pts, nrm = append(pts, p), append(nrm, srcN[i])
		if i+1 < len(src) {
			fill(p, src[i+1], drapeDepth)
		}
	}
	if !moved {
		return sp
	}
	out := makeSpine(pts, nrm, false)
	if out == nil {
		return sp
	}
	// The extensions' lengths: to the first and from the last point
	// within the overlap.
	s0, _ := out.locate(core[0], 0, 0)
	s1, _ := out.locate(core[len(core)-1], 0, 0)
	out.ext0, out.ext1 = s0, out.length-s1
	return out
}

// onePlane reports whether every piece of the faying surface (each host
// element moved along its normal by its shift) lies in one plane, to
// rounding: a flat flange, whose spine, made from points of that plane,
// lies in it too, so that drape would move nothing (most flanges: this
// spares them the search).
func onePlane(m *geom.Mesh, samples []sample) bool {
	n0 := samples[0].normal
	ref := samples[0].pos
	if r3.Norm2(n0) == 0 {
		return false
	}
	for _, s := range samples {
		if r3.Norm(r3.Cross(s.normal, n0)) > 1e-12 {
			return false
		}
		e := int(s.elem)
		lift := r3.Scale(s.shift, s.normal)
		for k := range m.Type(e).Corners() {
			c := r3.Add(m.Corner(e, k), lift)
			if math.Abs(r3.Dot(r3.Sub(c, ref), n0)) > 1e-9*(1+r3.Norm(c)) {
				return false
			}
		}
	}
	return true
}
