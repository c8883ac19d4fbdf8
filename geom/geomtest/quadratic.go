package geomtest

import (
	"fmt"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// SecondOrderSpec describes a structured grid of second-order elements
// for SecondOrder.
type SecondOrderSpec struct {
	// Type is geom.Tri6, geom.Quad8 or geom.Quad9.
	Type geom.ElemType
	// NX and NY are the numbers of grid squares along x and y, of side H
	// (mm), from (X0, Y0).
	NX, NY int
	H      float64
	X0, Y0 float64
	// Surface returns the point above (x, y); nil places it at (x, y, 0).
	Surface func(x, y float64) r3.Vec
	// Part is the part id (1 when zero), FirstNodeID and FirstElemID the
	// first ids (1 when zero).
	Part                     int64
	FirstNodeID, FirstElemID int64
}

// SecondOrder returns the indexed mesh of s: the nodes of a lattice of
// spacing H/2 row by row (the corners and midside nodes of the grid, and
// the squares' centres, which Quad8 grids leave unused), and per grid
// square one Quad8 or Quad9, or two Tri6 split along the diagonal from
// (x+H, y) to (x, y+H), in the node order of geom.ElemType. A Surface
// that is a quadratic polynomial of x and y (a paraboloid, a parabolic
// cylinder) is reproduced exactly by the elements.
func SecondOrder(s SecondOrderSpec) *geom.Mesh {
	part, firstNode, firstElem := s.Part, s.FirstNodeID, s.FirstElemID
	if part == 0 {
		part = 1
	}
	if firstNode == 0 {
		firstNode = 1
	}
	if firstElem == 0 {
		firstElem = 1
	}
	m := &geom.Mesh{Parts: []geom.Part{{ID: part}}, ElemStart: []int32{0}}
	w := 2*s.NX + 1
	for b := 0; b <= 2*s.NY; b++ {
		for a := 0; a < w; a++ {
			x, y := s.X0+float64(a)*s.H/2, s.Y0+float64(b)*s.H/2
			p := r3.Vec{X: x, Y: y}
			if s.Surface != nil {
				p = s.Surface(x, y)
			}
			m.NodeIDs = append(m.NodeIDs, firstNode+int64(len(m.NodeIDs)))
			m.Coords = append(m.Coords, p)
		}
	}
	L := func(a, b int) int32 { return int32(b*w + a) }
	add := func(nodes ...int32) {
		m.Conn = append(m.Conn, nodes...)
		m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
		m.ElemIDs = append(m.ElemIDs, firstElem+int64(len(m.ElemIDs)))
		m.ElemPart = append(m.ElemPart, 0)
	}
	for j := range s.NY {
		for i := range s.NX {
			a, b := 2*i, 2*j
			switch s.Type {
			case geom.Tri6:
				add(L(a, b), L(a+2, b), L(a, b+2), L(a+1, b), L(a+1, b+1), L(a, b+1))
				add(L(a+2, b), L(a+2, b+2), L(a, b+2), L(a+2, b+1), L(a+1, b+2), L(a+1, b+1))
			case geom.Quad8:
				add(L(a, b), L(a+2, b), L(a+2, b+2), L(a, b+2), L(a+1, b), L(a+2, b+1), L(a+1, b+2), L(a, b+1))
			case geom.Quad9:
				add(L(a, b), L(a+2, b), L(a+2, b+2), L(a, b+2), L(a+1, b), L(a+2, b+1), L(a+1, b+2), L(a, b+1), L(a+1, b+1))
			default:
				panic(fmt.Sprintf("geomtest: second order: type %v", s.Type))
			}
		}
	}
	if err := m.Index(); err != nil {
		panic(fmt.Sprintf("geomtest: second order: %v", err))
	}
	return m
}
