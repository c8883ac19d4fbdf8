package geom

import (
	"fmt"
	"maps"
	"slices"
	"strings"
)

// VTK cell type numbers of the shell elements Joinery reads (VTK file
// format documentation, Kitware; vtkCellType.h: VTK_TRIANGLE = 5,
// VTK_QUAD = 9, VTK_QUADRATIC_TRIANGLE = 22, VTK_QUADRATIC_QUAD = 23,
// VTK_BIQUADRATIC_QUAD = 28).
const (
	VTKTriangle          = 5
	VTKQuad              = 9
	VTKQuadraticTriangle = 22
	VTKQuadraticQuad     = 23
	VTKBiquadraticQuad   = 28
)

// VTKElemType returns the element type a VTK cell type is read as, and
// false for the cell types Joinery skips. VTK orders the nodes of these
// cells as Joinery does: the corners around the element, then the
// midside nodes of the edges from corner 0 on, then the centre.
func VTKElemType(t uint8) (ElemType, bool) {
	n := vtkElemNodes[t]
	return ElemType(n), n != 0
}

// vtkElemNodes is a read-only table of the node count of the element
// each VTK cell type is read as, 0 for the types Joinery skips.
var vtkElemNodes = [256]int8{VTKTriangle: 3, VTKQuad: 4, VTKQuadraticTriangle: 6, VTKQuadraticQuad: 8, VTKBiquadraticQuad: 9}

// VTKCellType returns the VTK cell type number of an element type.
func VTKCellType(t ElemType) (uint8, bool) {
	switch t {
	case Tri3:
		return VTKTriangle, true
	case Quad4:
		return VTKQuad, true
	case Tri6:
		return VTKQuadraticTriangle, true
	case Quad8:
		return VTKQuadraticQuad, true
	case Quad9:
		return VTKBiquadraticQuad, true
	}
	return 0, false
}

// vtkCell is the name and dimension of a VTK cell type.
type vtkCell struct {
	name string
	dim  int8
}

// vtkCells names the cell types of vtkCellType.h (VTK file-format
// documentation, Kitware; the list as of VTK 9, from memory of the
// header, checked against VTK 9.1's cell classes by
// geom/meshio's TestCellNamesAgainstVTKLibrary), in words of our own
// derived from the enumerator names (VTK_QUADRATIC_TRIANGLE is "quadratic
// triangle"), with the dimension of the cell: 0 points, 1 curves, 2
// surfaces, 3 volumes.
var vtkCells = map[uint8]vtkCell{
	0: {"empty cell", 0}, 1: {"vertex", 0}, 2: {"poly-vertex", 0}, 3: {"line", 1}, 4: {"poly-line", 1},
	5: {"triangle", 2}, 6: {"triangle strip", 2}, 7: {"polygon", 2}, 8: {"pixel", 2}, 9: {"quad", 2},
	10: {"tetrahedron", 3}, 11: {"voxel", 3}, 12: {"hexahedron", 3}, 13: {"wedge", 3}, 14: {"pyramid", 3},
	15: {"pentagonal prism", 3}, 16: {"hexagonal prism", 3},
	21: {"quadratic edge", 1}, 22: {"quadratic triangle", 2}, 23: {"quadratic quad", 2},
	24: {"quadratic tetrahedron", 3}, 25: {"quadratic hexahedron", 3}, 26: {"quadratic wedge", 3},
	27: {"quadratic pyramid", 3}, 28: {"biquadratic quad", 2}, 29: {"triquadratic hexahedron", 3},
	30: {"quadratic-linear quad", 2}, 31: {"quadratic-linear wedge", 3}, 32: {"biquadratic-quadratic wedge", 3},
	33: {"biquadratic-quadratic hexahedron", 3}, 34: {"biquadratic triangle", 2}, 35: {"cubic line", 1},
	36: {"quadratic polygon", 2}, 37: {"triquadratic pyramid", 3},
	41: {"convex point set", 3}, 42: {"polyhedron", 3},
	51: {"parametric curve", 1}, 52: {"parametric surface", 2}, 53: {"parametric triangle surface", 2},
	54: {"parametric quad surface", 2}, 55: {"parametric tetrahedral region", 3}, 56: {"parametric hexahedral region", 3},
	60: {"higher-order edge", 1}, 61: {"higher-order triangle", 2}, 62: {"higher-order quad", 2},
	63: {"higher-order polygon", 2}, 64: {"higher-order tetrahedron", 3}, 65: {"higher-order wedge", 3},
	66: {"higher-order pyramid", 3}, 67: {"higher-order hexahedron", 3},
	68: {"Lagrange curve", 1}, 69: {"Lagrange triangle", 2}, 70: {"Lagrange quadrilateral", 2},
	71: {"Lagrange tetrahedron", 3}, 72: {"Lagrange hexahedron", 3}, 73: {"Lagrange wedge", 3}, 74: {"Lagrange pyramid", 3},
	75: {"Bezier curve", 1}, 76: {"Bezier triangle", 2}, 77: {"Bezier quadrilateral", 2},
	78: {"Bezier tetrahedron", 3}, 79: {"Bezier hexahedron", 3}, 80: {"Bezier wedge", 3}, 81: {"Bezier pyramid", 3},
}

// VTKCellName returns the name of a VTK cell type in words, e.g.
// "polygon" for 7, and "unknown cell type" for numbers VTK does not
// define.
func VTKCellName(t uint8) string {
	if c, ok := vtkCells[t]; ok {
		return c.name
	}
	return "unknown cell type"
}

// VTKCellKind returns the name of a VTK cell type with its number, as
// messages show it: "polygon (VTK type 7)".
func VTKCellKind(t uint8) string { return fmt.Sprintf("%s (VTK type %d)", VTKCellName(t), t) }

// VTKCellDimension returns the dimension of the cells of VTK type t: 0
// for points, 1 for curves, 2 for surfaces, 3 for volumes, and -1 for
// numbers VTK does not define.
func VTKCellDimension(t uint8) int {
	if c, ok := vtkCells[t]; ok {
		return int(c.dim)
	}
	return -1
}

// vtkSurfaceCell reports whether VTK cell type t is a surface cell (of
// dimension 2): a shell Joinery would have to read.
func vtkSurfaceCell(t uint8) bool { return VTKCellDimension(t) == 2 }

// SkippedCells counts the cells of a file that its reader did not read,
// by VTK cell type number.
type SkippedCells map[uint8]int

// Types returns the cell types counted, in increasing order.
func (s SkippedCells) Types() []uint8 { return slices.Sorted(maps.Keys(s)) }

// Total returns the number of cells counted.
func (s SkippedCells) Total() int {
	n := 0
	for _, c := range s {
		n += c
	}
	return n
}

// String lists the counts in increasing type order, as
// "vertex (VTK type 1): 4, line (VTK type 3): 252"; "" when s is empty.
func (s SkippedCells) String() string {
	var b strings.Builder
	for i, t := range s.Types() {
		if i > 0 {
			b.WriteString(", ")
		}
		fmt.Fprintf(&b, "%s: %d", VTKCellKind(t), s[t])
	}
	return b.String()
}

// Add adds the counts of o to s, allocating s when it is nil, and
// returns it.
func (s SkippedCells) Add(o SkippedCells) SkippedCells {
	for t, n := range o {
		if s == nil {
			s = SkippedCells{}
		}
		s[t] += n
	}
	return s
}

// PolySection is one of the four cell lists of a VTK polydata set, in
// the order VTK numbers their cells: the vertices first, then the lines,
// the polygons and the triangle strips, whatever their order in the file
// (vtkPolyData; VTK file-format documentation, Kitware). Cell data
// follows the same numbering.
type PolySection uint8

// The polydata cell lists, in VTK's order.
const (
	PolyVerts PolySection = iota
	PolyLines
	PolyPolys
	PolyStrips
	NumPolySections
)

// VTKPolyCellType returns the VTK cell type of a cell of n points in
// polydata section s, as VTK gives it (vtkPolyData::GetCellType): a
// vertex (1) or, with more points, a poly-vertex (2); a line (3) or a
// poly-line (4); a triangle (5), a quad (9) or, with more or fewer
// points, a polygon (7); a triangle strip (6). So a polydata file's
// triangles and quads are read as shells and its other cells skipped and
// counted, as in an unstructured grid.
func VTKPolyCellType(s PolySection, n int) uint8 {
	switch s {
	case PolyVerts:
		if n == 1 {
			return 1
		}
		return 2
	case PolyLines:
		if n == 2 {
			return 3
		}
		return 4
	case PolyPolys:
		switch n {
		case 3:
			return VTKTriangle
		case 4:
			return VTKQuad
		}
		return 7
	}
	return 6
}
