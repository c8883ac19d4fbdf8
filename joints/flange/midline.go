package flange

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Midline settings for rings: the loops are sampled at least every
// h/midlineStep, and the line through the mid-points is thinned to the
// points it needs within midlineSimplify times h.
const (
	midlineStep     = 4
	midlineSimplify = 0.02
)

// midline returns the centreline of a ring: the mid-points between
// every point of the outline (outer) and its nearest point on the
// opening (inner), in the outline's order. The smooth spine sp (the fit
// through the pieces, which rounds a ring's corners off) charts the
// loops, so that a point meets only the opening's segments near it, and
// gives the sheet's normal. On a strip
// of constant width w the nearest point of the other edge lies w across,
// so the mid-points lie on the mid-line; at a convex corner of the
// outline the nearest point of the opening is its corner, and the
// mid-point between the two is the corner of the mid-line (the square of
// side a+w round a square opening of side a); at the opening's corners
// likewise. The mid-points keep the spine's level across the sheet (the
// faying surface). h is the element size and wEst the flange's estimated
// width. It returns nil when the loops are too short to sample.
func midline(sp *spine, outer, inner loop, h, wEst float64) *spine {
	if sp == nil || !sp.closed || len(outer.pts) < 3 || len(inner.pts) < 3 || !(h > 0) || !(sp.length > 0) {
		return nil
	}
	total := sp.length
	window := 2*wEst + 2*h
	// The loops' segments, binned by the chart s of their ends, so that
	// a point meets only the segments near it, not the ring's far side.
	nb := max(1, min(int(math.Ceil(total/h)), 1<<16))
	bsz := total / float64(nb)
	type lseg struct{ a, b r3.Vec }
	type side struct {
		segs []lseg
		ss   []float64 // chart s of each segment's start
		bins [][]int32
	}
	chart := func(l loop) side {
		n := len(l.pts)
		sd := side{bins: make([][]int32, nb)}
		ss := make([]float64, n)
		hint, win := 0.0, 0.0
		for i, p := range l.pts {
			ss[i], _ = sp.locate(p, hint, win)
			hint, win = ss[i], window
		}
		nseg := n - 1
		if l.closed {
			nseg = n
		}
		for i := range nseg {
			j := (i + 1) % n
			d := ss[j] - ss[i]
			if d > total/2 {
				d -= total
			} else if d < -total/2 {
				d += total
			}
			k := int32(len(sd.segs))
			sd.segs = append(sd.segs, lseg{l.pts[i], l.pts[j]})
			sd.ss = append(sd.ss, ss[i])
			b0, b1 := int(math.Floor(math.Min(ss[i], ss[i]+d)/bsz)), int(math.Floor(math.Max(ss[i], ss[i]+d)/bsz))
			if b1-b0+1 >= nb {
				b0, b1 = 0, nb-1
			}
			for b := b0; b <= b1; b++ {
				c := ((b % nb) + nb) % nb
				sd.bins[c] = append(sd.bins[c], k)
			}
		}
		return sd
	}
	sides := [2]side{chart(squareCorners(outer, h)), chart(squareCorners(inner, h))}
	// nearest returns the point of side sd nearest to p, searching the
	// segments whose chart s lies within the reach of s (a segment in
	// several bins is measured more than once, to the same distance).
	reach := 2*wEst + 2*h
	span := int(math.Ceil(reach / bsz))
	nearest := func(sd *side, p r3.Vec, s float64) (r3.Vec, bool) {
		best, bd := r3.Vec{}, math.Inf(1)
		b := int(math.Floor(s / bsz))
		lo, hi := b-span, b+span
		if hi-lo+1 >= nb {
			lo, hi = 0, nb-1
		}
		for c := lo; c <= hi; c++ {
			for _, k := range sd.bins[((c%nb)+nb)%nb] {
				sg := sd.segs[k]
				q := closestOn(p, sg.a, sg.b)
				if d := r3.Norm2(r3.Sub(q, p)); d < bd {
					best, bd = q, d
				}
			}
		}
		return best, !math.IsInf(bd, 1)
	}
	type mid struct {
		s float64
		p r3.Vec
	}
	var mids []mid
	from, to := &sides[0], &sides[1]
	for i, sg := range from.segs {
		l := dist(sg.a, sg.b)
		n := max(1, int(math.Ceil(l*midlineStep/h)))
		for j := range n {
			p := r3.Add(sg.a, r3.Scale(float64(j)/float64(n), r3.Sub(sg.b, sg.a)))
			q, ok := nearest(to, p, from.ss[i])
			if !ok {
				continue
			}
			m := r3.Scale(0.5, r3.Add(p, q))
			s, _ := sp.locate(m, from.ss[i], window)
			// Onto the spine's level across the sheet.
			c, _ := sp.at(s)
			seg := sp.segment(s)
			nrm := r3.Cross(sp.tan[seg], sp.lat[seg])
			m = r3.Add(m, r3.Scale(r3.Dot(r3.Sub(c, m), nrm), nrm))
			mids = append(mids, mid{s, m})
		}
	}
	if len(mids) < 6 {
		return nil
	}
	keep := simplifyClosed(mids, func(m mid) r3.Vec { return m.p }, midlineSimplify*h)
	ps := make([]r3.Vec, 0, len(keep))
	ns := make([]r3.Vec, 0, len(keep))
	for _, k := range keep {
		ps = append(ps, mids[k].p)
		seg := sp.segment(mids[k].s)
		ns = append(ns, r3.Cross(sp.tan[seg], sp.lat[seg]))
	}
	return makeSpine(ps, orientAlong(ns), true)
}

// closestOn returns the point of segment a-b nearest to p.
func closestOn(p, a, b r3.Vec) r3.Vec {
	d := r3.Sub(b, a)
	u := 0.0
	if l2 := r3.Norm2(d); l2 > 0 {
		u = min(max(r3.Dot(r3.Sub(p, a), d)/l2, 0), 1)
	}
	return r3.Add(a, r3.Scale(u, d))
}

// squareCorners returns closed loop l with the corners that its tracing
// cut off put back: where the other sheet's corner falls inside a host
// element, the outline crosses that element on one short segment (up to
// the element's diagonal, 1.5 h) between two straight runs (each of two
// segments in line within 2 degrees, as the crossings of a straight edge
// lie). When the runs meet at between 30 and 150 degrees, less than 1.5 h
// beyond the short segment's ends, the two ends are replaced by the point
// where the runs meet. A polygon round a curve turns at every vertex and
// keeps its points.
func squareCorners(l loop, h float64) loop {
	n := len(l.pts)
	if !l.closed || n < 6 {
		return l
	}
	cosLo, cosHi := math.Cos(150*math.Pi/180), math.Cos(30*math.Pi/180)
	straight := math.Cos(2 * math.Pi / 180)
	at := func(i int) r3.Vec { return l.pts[((i%n)+n)%n] }
	unit := func(a, b r3.Vec) (r3.Vec, bool) {
		d := r3.Sub(b, a)
		if ln := r3.Norm(d); ln > 1e-3*h {
			return r3.Scale(1/ln, d), true
		}
		return r3.Vec{}, false
	}
	corner := make([]r3.Vec, n) // corner[k]: the point replacing k and k+1
	has := make([]bool, n)
	for k := range n {
		a0, a, b, c, d, d1 := at(k-2), at(k-1), at(k), at(k+1), at(k+2), at(k+3)
		if short := dist(b, c); !(short < 1.5*h) {
			continue
		}
		u0, ok0 := unit(a0, a)
		u, ok1 := unit(a, b)
		v, ok2 := unit(c, d)
		v1, ok3 := unit(d, d1)
		if !ok0 || !ok1 || !ok2 || !ok3 || r3.Dot(u0, u) < straight || r3.Dot(v, v1) < straight {
			continue
		}
		cs := r3.Dot(u, v)
		if cs < cosLo || cs > cosHi {
			continue
		}
		// The nearest points of the lines b + s u and c + t v.
		w := r3.Sub(b, c)
		den := 1 - cs*cs
		sb := (cs*r3.Dot(w, v) - r3.Dot(w, u)) / den
		tc := (r3.Dot(w, v) - cs*r3.Dot(w, u)) / den
		x, y := r3.Add(b, r3.Scale(sb, u)), r3.Add(c, r3.Scale(tc, v))
		if sb < 0 || tc > 0 || sb > 1.5*h || -tc > 1.5*h || dist(x, y) > 0.01*h {
			continue
		}
		if has[((k-1)%n+n)%n] {
			continue // the previous segment's corner took b
		}
		corner[k], has[k] = r3.Scale(0.5, r3.Add(x, y)), true
	}
	if has[n-1] && has[0] {
		has[n-1] = false // both would replace point 0
	}
	out := loop{closed: true, length: l.length, diag: l.diag}
	for k := 0; k < n; k++ {
		switch {
		case has[k] && k+1 < n:
			out.pts = append(out.pts, corner[k])
			k++ // k+1 is replaced too
		case has[k]:
			out.pts = append(out.pts[1:], corner[k]) // the last segment's corner replaces point 0
		default:
			out.pts = append(out.pts, l.pts[k])
		}
	}
	return out
}

// simplifyClosed returns the indices of the points of a closed polyline
// that the Douglas-Peucker rule keeps at tolerance tol (D. Douglas and
// T. Peucker, Algorithms for the reduction of the number of points
// required to represent a digitized line, 1973), in order: the line is
// split at its first point and the point farthest from it.
func simplifyClosed[T any](pts []T, at func(T) r3.Vec, tol float64) []int {
	n := len(pts)
	if n < 4 {
		idx := make([]int, n)
		for i := range idx {
			idx[i] = i
		}
		return idx
	}
	far, fd := 0, -1.0
	for i := range pts {
		if d := r3.Norm2(r3.Sub(at(pts[i]), at(pts[0]))); d > fd {
			far, fd = i, d
		}
	}
	keep := make([]bool, n)
	keep[0], keep[far] = true, true
	// The span from a to b (b may be n: point 0 again).
	var rdp func(a, b int)
	rdp = func(a, b int) {
		if b-a < 2 {
			return
		}
		pa, pb := at(pts[a]), at(pts[b%n])
		best, bd := -1, tol
		for i := a + 1; i < b; i++ {
			if d := segmentDistance(at(pts[i]), pa, pb); d > bd {
				best, bd = i, d
			}
		}
		if best < 0 {
			return
		}
		keep[best] = true
		rdp(a, best)
		rdp(best, b)
	}
	rdp(0, far)
	rdp(far, n)
	var idx []int
	for i, k := range keep {
		if k {
			idx = append(idx, i)
		}
	}
	return idx
}

// segmentDistance returns the distance from p to the segment a-b.
func segmentDistance(p, a, b r3.Vec) float64 { return dist(p, closestOn(p, a, b)) }
