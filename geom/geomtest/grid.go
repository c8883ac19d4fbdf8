package geomtest

import (
	"fmt"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// GridSpec describes a structured grid of quads for Grid.
type GridSpec struct {
	// NX and NY are the numbers of quads along i (x) and j (y).
	NX, NY int
	// Node returns the coordinates of grid point (i, j), 0 <= i <= NX and
	// 0 <= j <= NY. Nil places the point at (i, j, 0).
	Node func(i, j int) r3.Vec
	// Parts are the parts of the mesh; nil means one part with id 1.
	Parts []geom.Part
	// Part returns the index in Parts of quad (i, j); nil means 0.
	Part func(i, j int) int32
	// FirstNodeID and FirstElemID are the ids of the first node and
	// element; ids then count up by one. Zero means 1.
	FirstNodeID, FirstElemID int64
}

// Grid returns the indexed mesh of s: (NX+1)(NY+1) nodes, row by row
// (i fastest), and NX·NY quads in the same order, each with corners
// (i, j), (i+1, j), (i+1, j+1), (i, j+1), so that their normals point
// along +z for a flat grid in the xy plane. The mesh has no per-element
// thickness. Grid panics if s.Parts repeats a part id (a programmer error).
func Grid(s GridSpec) *geom.Mesh {
	nx, ny := s.NX, s.NY
	nn, ne := (nx+1)*(ny+1), nx*ny
	firstNode, firstElem := s.FirstNodeID, s.FirstElemID
	if firstNode == 0 {
		firstNode = 1
	}
	if firstElem == 0 {
		firstElem = 1
	}
	m := &geom.Mesh{
		Parts:     s.Parts,
		NodeIDs:   make([]int64, 0, nn),
		Coords:    make([]r3.Vec, 0, nn),
		ElemIDs:   make([]int64, 0, ne),
		ElemPart:  make([]int32, 0, ne),
		ElemStart: make([]int32, 1, ne+1),
		Conn:      make([]int32, 0, 4*ne),
	}
	if m.Parts == nil {
		m.Parts = []geom.Part{{ID: 1}}
	}
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			p := r3.Vec{X: float64(i), Y: float64(j)}
			if s.Node != nil {
				p = s.Node(i, j)
			}
			m.NodeIDs = append(m.NodeIDs, firstNode+int64(len(m.NodeIDs)))
			m.Coords = append(m.Coords, p)
		}
	}
	row := int32(nx) + 1
	for j := range ny {
		for i := range nx {
			n := int32(j)*row + int32(i)
			part := int32(0)
			if s.Part != nil {
				part = s.Part(i, j)
			}
			m.Conn = append(m.Conn, n, n+1, n+row+1, n+row)
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
			m.ElemIDs = append(m.ElemIDs, firstElem+int64(len(m.ElemIDs)))
			m.ElemPart = append(m.ElemPart, part)
		}
	}
	if err := m.Index(); err != nil {
		panic(fmt.Sprintf("geomtest: grid: %v", err))
	}
	return m
}
