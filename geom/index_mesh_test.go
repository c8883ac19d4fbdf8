package geom

import (
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/spatial/r3"
)

// gridMesh returns a grid of nx by ny quads of size h in x and y, gently
// curved out of plane: z = amp sin(2 pi x / 1000) cos(2 pi y / 1500).
// Rows of elements are split into four parts (ids 1 to 4) by y.
func gridMesh(nx, ny int, h, amp float64) *Mesh {
	m := &Mesh{
		Parts:     []Part{{ID: 1, Thickness: 1}, {ID: 2, Thickness: 1.2}, {ID: 3, Thickness: 0.8}, {ID: 4, Thickness: 2}},
		NodeIDs:   make([]int64, 0, (nx+1)*(ny+1)),
		Coords:    make([]r3.Vec, 0, (nx+1)*(ny+1)),
		ElemIDs:   make([]int64, 0, nx*ny),
		ElemPart:  make([]int32, 0, nx*ny),
		ElemStart: make([]int32, 1, nx*ny+1),
		Conn:      make([]int32, 0, 4*nx*ny),
	}
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			x, y := h*float64(i), h*float64(j)
			z := amp * math.Sin(2*math.Pi*x/1000) * math.Cos(2*math.Pi*y/1500)
			m.Coords = append(m.Coords, r3.Vec{X: x, Y: y, Z: z})
			m.NodeIDs = append(m.NodeIDs, int64(len(m.Coords)))
		}
	}
	for j := range ny {
		for i := range nx {
			n0 := int32(j*(nx+1) + i)
			m.Conn = append(m.Conn, n0, n0+1, n0+int32(nx)+2, n0+int32(nx)+1)
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
			m.ElemIDs = append(m.ElemIDs, int64(len(m.ElemIDs)+1))
			m.ElemPart = append(m.ElemPart, int32(4*j/ny))
		}
	}
	return m
}

// soupMesh returns n unconnected elements (triangles, planar and warped
// quads, a few collapsed quads) of log-uniform size 0.1 to 30 scattered
// in a 200-unit cube, plus a few orphan nodes: a mesh with very uneven
// element sizes for testing the index against brute force.
func soupMesh(rng *rand.Rand, n int) *Mesh {
	m := &Mesh{Parts: []Part{{ID: 1}, {ID: 2}}, ElemStart: []int32{0}}
	add := func(v r3.Vec) int32 {
		m.Coords = append(m.Coords, v)
		m.NodeIDs = append(m.NodeIDs, int64(len(m.Coords)))
		return int32(len(m.Coords) - 1)
	}
	for e := range n {
		c := randVec(rng, 100)
		size := 0.1 * math.Pow(300, rng.Float64())
		u := r3.Unit(randVec(rng, 1))
		v := r3.Unit(r3.Cross(u, randVec(rng, 1)))
		w := r3.Cross(u, v)
		corner := func(a, b, lift float64) int32 {
			return add(r3.Add(c, r3.Add(r3.Scale(size*a, u), r3.Add(r3.Scale(size*b, v), r3.Scale(size*lift, w)))))
		}
		switch e % 5 {
		case 0, 1:
			m.Conn = append(m.Conn, corner(0, 0, 0), corner(1, rng.Float64()-0.5, 0), corner(rng.Float64(), 1, 0))
		case 2, 3:
			lift := 0.0
			if e%5 == 3 {
				lift = 0.3 * (rng.Float64() - 0.5)
			}
			m.Conn = append(m.Conn, corner(-0.5, -0.5, 0), corner(0.5, -0.5, 0), corner(0.5, 0.5, lift), corner(-0.5, 0.5, 0))
		default:
			a, b, c := corner(0, 0, 0), corner(1, 0, 0), corner(0, 1, 0)
			m.Conn = append(m.Conn, a, b, c, c)
		}
		m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
		m.ElemIDs = append(m.ElemIDs, int64(e+1))
		m.ElemPart = append(m.ElemPart, int32(e%2))
	}
	for range n / 10 {
		add(randVec(rng, 100))
	}
	return m
}
