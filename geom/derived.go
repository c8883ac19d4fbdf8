package geom

import (
	"cmp"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"
)

// Corner returns the coordinates of corner k of element e.
func (m *Mesh) Corner(e, k int) r3.Vec { return m.Coords[m.Conn[int(m.ElemStart[e])+k]] }

// Centroid returns the mean of the corner nodes of element e.
func (m *Mesh) Centroid(e int) r3.Vec {
	nc := m.Type(e).Corners()
	var c r3.Vec
	for k := 0; k < nc; k++ {
		c = r3.Add(c, m.Corner(e, k))
	}
	return r3.Scale(1/float64(nc), c)
}

// areaVector returns a vector normal to element e whose length is its area:
// (b-a)x(c-a)/2 for a triangle, and (c-a)x(d-b)/2 for a quad (the cross
// product of the diagonals, exact for planar quads and the area of the
// quad's projection onto its mean plane for warped ones). For a
// second-order element it is the integral of the surface's normal vector
// dx/dxi x dx/deta: the area of its projection onto its mean plane.
func (m *Mesh) areaVector(e int) r3.Vec {
	if m.Type(e).Quadratic() {
		return m.quadraticAreaVector(e)
	}
	a, b, c := m.Corner(e, 0), m.Corner(e, 1), m.Corner(e, 2)
	if m.Type(e).Corners() == 3 {
		return r3.Scale(0.5, r3.Cross(r3.Sub(b, a), r3.Sub(c, a)))
	}
	d := m.Corner(e, 3)
	return r3.Scale(0.5, r3.Cross(r3.Sub(c, a), r3.Sub(d, b)))
}

// Normal returns the unit normal of element e by the right-hand rule over
// its node order (for quads, the normal of the mean plane through the
// diagonals; for second-order elements, of their curved surface's mean
// plane, see areaVector). It returns the zero vector for a degenerate
// element.
func (m *Mesh) Normal(e int) r3.Vec {
	v := m.areaVector(e)
	n := r3.Norm(v)
	if n == 0 {
		return r3.Vec{}
	}
	return r3.Scale(1/n, v)
}

// Area returns the area of element e in mm² (see areaVector for warped
// quads). For a second-order element it is the area of its curved
// surface, integrated numerically (exact for flat elements, see
// patch.area).
func (m *Mesh) Area(e int) float64 {
	if m.Type(e).Quadratic() {
		return m.quadraticArea(e)
	}
	return r3.Norm(m.areaVector(e))
}

// ElemBox returns an axis-aligned box that holds element e's surface: the
// box of its corners for linear elements, of the control points of its
// curved surface for second-order ones (which the surface lies within;
// for a curved element the box reaches past the surface by up to its
// sagitta). It is the box the spatial index uses.
func (m *Mesh) ElemBox(e int) r3.Box {
	lo, hi := elemBox(m, e)
	return r3.Box{Min: lo, Max: hi}
}

// EmptyBox is the box that contains nothing; growing it by a point gives
// that point's box.
func EmptyBox() r3.Box {
	inf := math.Inf(1)
	return r3.Box{Min: r3.Vec{X: inf, Y: inf, Z: inf}, Max: r3.Vec{X: -inf, Y: -inf, Z: -inf}}
}

func growBox(b r3.Box, p r3.Vec) r3.Box {
	b.Min = r3.Vec{X: math.Min(b.Min.X, p.X), Y: math.Min(b.Min.Y, p.Y), Z: math.Min(b.Min.Z, p.Z)}
	b.Max = r3.Vec{X: math.Max(b.Max.X, p.X), Y: math.Max(b.Max.Y, p.Y), Z: math.Max(b.Max.Z, p.Z)}
	return b
}

// BoxContains reports whether p lies in b grown by margin on every side.
func BoxContains(b r3.Box, p r3.Vec, margin float64) bool {
	return p.X >= b.Min.X-margin && p.X <= b.Max.X+margin &&
		p.Y >= b.Min.Y-margin && p.Y <= b.Max.Y+margin &&
		p.Z >= b.Min.Z-margin && p.Z <= b.Max.Z+margin
}

// PartStats holds per-part totals.
type PartStats struct {
	Elems int
	Tris  int
	Quads int
	// SecondOrder counts the second-order elements among them (Tri6,
	// Quad8, Quad9).
	SecondOrder int
	Area        float64 // mm²
	Box         r3.Box  // bounding box of the nodes of the part's elements
	// ThicknessMin and ThicknessMax are the smallest and largest
	// thickness of the part's elements (Mesh.Thickness: an element's
	// own, else its part's), mm; 0 for a part without elements.
	ThicknessMin, ThicknessMax float64
}

// PartStats returns element counts, areas and bounding boxes per part,
// aligned with m.Parts. The elements are split into fixed blocks that are
// summed concurrently and merged in block order, so the result does not
// depend on GOMAXPROCS.
func (m *Mesh) PartStats() []PartStats {
	parts := make([][]PartStats, (m.NumElems()+parallelBlock-1)/parallelBlock)
	parallelBlocks(m.NumElems(), func(from, to int) {
		parts[from/parallelBlock] = m.partStats(from, to)
	})
	st := make([]PartStats, len(m.Parts))
	for i := range st {
		st[i].Box = EmptyBox()
	}
	for _, ps := range parts {
		for i, s := range ps {
			if s.Elems == 0 {
				continue
			}
			if st[i].Elems == 0 {
				st[i].ThicknessMin, st[i].ThicknessMax = s.ThicknessMin, s.ThicknessMax
			}
			st[i].ThicknessMin = math.Min(st[i].ThicknessMin, s.ThicknessMin)
			st[i].ThicknessMax = math.Max(st[i].ThicknessMax, s.ThicknessMax)
			st[i].Elems += s.Elems
			st[i].Tris += s.Tris
			st[i].Quads += s.Quads
			st[i].SecondOrder += s.SecondOrder
			st[i].Area += s.Area
			st[i].Box = unionBox(st[i].Box, s.Box)
		}
	}
	return st
}

// partStats sums elements lo..hi-1.
func (m *Mesh) partStats(lo, hi int) []PartStats {
	st := make([]PartStats, len(m.Parts))
	for i := range st {
		st[i].Box = EmptyBox()
	}
	for e := lo; e < hi; e++ {
		s := &st[m.ElemPart[e]]
		t := m.Thickness(e)
		if s.Elems == 0 {
			s.ThicknessMin, s.ThicknessMax = t, t
		}
		s.ThicknessMin, s.ThicknessMax = math.Min(s.ThicknessMin, t), math.Max(s.ThicknessMax, t)
		s.Elems++
		switch t := m.Type(e); {
		case t.Corners() == 3:
			s.Tris++
		default:
			s.Quads++
		}
		if m.Type(e).Quadratic() {
			s.SecondOrder++
		}
		s.Area += m.Area(e)
		b := &s.Box
		for _, n := range m.ElemNodes(e) {
			p := m.Coords[n]
			if p.X < b.Min.X {
				b.Min.X = p.X
			}
			if p.X > b.Max.X {
				b.Max.X = p.X
			}
			if p.Y < b.Min.Y {
				b.Min.Y = p.Y
			}
			if p.Y > b.Max.Y {
				b.Max.Y = p.Y
			}
			if p.Z < b.Min.Z {
				b.Min.Z = p.Z
			}
			if p.Z > b.Max.Z {
				b.Max.Z = p.Z
			}
		}
	}
	return st
}

func unionBox(a, b r3.Box) r3.Box {
	a = growBox(a, b.Min)
	return growBox(a, b.Max)
}

// PartsWithoutThickness returns, in increasing order, the ids of parts
// with at least one element that has no positive thickness (neither its
// own nor its part's).
func (m *Mesh) PartsWithoutThickness() []int64 {
	missing := make([]bool, len(m.Parts))
	for e := range m.ElemIDs {
		if !(m.Thickness(e) > 0) {
			missing[m.ElemPart[e]] = true
		}
	}
	var ids []int64
	for i, miss := range missing {
		if miss {
			ids = append(ids, m.Parts[i].ID)
		}
	}
	slices.Sort(ids)
	return ids
}

// ThicknessClash is where the elements of a part read from one file
// carry thicknesses of their own that disagree with the part's thickness
// (from the parts table, or from a part record of the file).
type ThicknessClash struct {
	PartIndex     int32   // index into Mesh.Parts
	File          string  // the file the elements come from
	PartThickness float64 // the part's thickness, mm
	Elems         int     // elements of the part in the file whose own thickness disagrees
	Min, Max      float64 // the range of those elements' thicknesses, mm
}

// ThicknessClashes returns, by part id and then file order, the elements
// whose own thickness differs from their part's positive thickness by
// more than relTol times the part's. Element values win over the part's
// (Mesh.Thickness), so these are the places where the part's value is
// not the one used. Parts without a thickness are left out: there the
// elements' values are the only ones.
func (m *Mesh) ThicknessClashes(relTol float64) []ThicknessClash {
	if m.ElemThickness == nil {
		return nil
	}
	type key struct{ part, src int32 }
	found := map[key]*ThicknessClash{}
	var keys []key
	src := -1
	for e, t := range m.ElemThickness {
		for src+1 < len(m.Sources) && m.Sources[src+1].ElemStart <= e {
			src++
		}
		pi := m.ElemPart[e]
		pt := m.Parts[pi].Thickness
		if math.IsNaN(t) || !(pt > 0) || math.Abs(t-pt) <= relTol*pt {
			continue
		}
		k := key{pi, int32(src)}
		c := found[k]
		if c == nil {
			c = &ThicknessClash{PartIndex: pi, File: m.sourceName(src), PartThickness: pt, Min: t, Max: t}
			found[k] = c
			keys = append(keys, k)
		}
		c.Elems++
		c.Min, c.Max = math.Min(c.Min, t), math.Max(c.Max, t)
	}
	slices.SortFunc(keys, func(a, b key) int {
		return cmp.Or(cmp.Compare(m.Parts[a.part].ID, m.Parts[b.part].ID), cmp.Compare(a.src, b.src))
	})
	out := make([]ThicknessClash, len(keys))
	for i, k := range keys {
		out[i] = *found[k]
	}
	return out
}

// SignLargest returns v or -v, whichever has its component of largest
// magnitude positive (the first of equal ones), so that a direction found
// up to its sign is always given the same way.
func SignLargest(v r3.Vec) r3.Vec {
	c := v.X
	if math.Abs(v.Y) > math.Abs(c) {
		c = v.Y
	}
	if math.Abs(v.Z) > math.Abs(c) {
		c = v.Z
	}
	if c < 0 {
		return r3.Scale(-1, v)
	}
	return v
}
