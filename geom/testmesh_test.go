package geom

import "gonum.org/v1/gonum/spatial/r3"

// quadGrid returns an nx-by-ny grid of unit-size h quads in the z=0 plane,
// part id 1, node ids 1.., element ids 1.., skipping the elements for
// which skip(i, j) is true (nil skips none).
func quadGrid(nx, ny int, h float64, skip func(i, j int) bool) *Mesh {
	m := &Mesh{Parts: []Part{{ID: 1, Thickness: 1}}, ElemStart: []int32{0}}
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			m.NodeIDs = append(m.NodeIDs, int64(len(m.NodeIDs)+1))
			m.Coords = append(m.Coords, r3.Vec{X: float64(i) * h, Y: float64(j) * h})
		}
	}
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			if skip != nil && skip(i, j) {
				continue
			}
			n0 := int32(j*(nx+1) + i)
			m.Conn = append(m.Conn, n0, n0+1, n0+int32(nx)+2, n0+int32(nx)+1)
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
			m.ElemIDs = append(m.ElemIDs, int64(len(m.ElemIDs)+1))
			m.ElemPart = append(m.ElemPart, 0)
		}
	}
	if err := m.Index(); err != nil {
		panic(err)
	}
	return m
}
