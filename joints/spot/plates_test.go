package spot

import (
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// plate describes a flat rectangular sheet in a plane z = Z, meshed with
// square quads of size H (or each square split into two triangles).
type plate struct {
	Part      int64
	T         float64 // thickness, mm
	Z         float64
	X0, Y0    float64
	NX, NY    int
	H         float64
	Tri       bool
	Collapsed bool // with Tri: each triangle written as a quad repeating its last corner
	Surface   geom.Surface
	FlipOrder bool // reverse node order: normals point to -z
}

// plates builds a mesh from plates, with sparse ids per part
// (part*100000 + k) so that id handling is exercised.
func plates(ps ...plate) *geom.Mesh {
	m := &geom.Mesh{ElemStart: []int32{0}}
	for pi, p := range ps {
		m.Parts = append(m.Parts, geom.Part{ID: p.Part, Thickness: p.T, Surface: p.Surface})
		base := int32(len(m.Coords))
		for j := 0; j <= p.NY; j++ {
			for i := 0; i <= p.NX; i++ {
				m.NodeIDs = append(m.NodeIDs, p.Part*100000+int64(len(m.Coords)-int(base))+1)
				m.Coords = append(m.Coords, r3.Vec{X: p.X0 + float64(i)*p.H, Y: p.Y0 + float64(j)*p.H, Z: p.Z})
			}
		}
		nEl := 0
		add := func(ns ...int32) {
			if p.FlipOrder {
				for a, b := 0, len(ns)-1; a < b; a, b = a+1, b-1 {
					ns[a], ns[b] = ns[b], ns[a]
				}
			}
			m.Conn = append(m.Conn, ns...)
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
			nEl++
			m.ElemIDs = append(m.ElemIDs, p.Part*100000+int64(nEl))
			m.ElemPart = append(m.ElemPart, int32(pi))
		}
		for j := 0; j < p.NY; j++ {
			for i := 0; i < p.NX; i++ {
				n0 := base + int32(j*(p.NX+1)+i)
				n1, n2, n3 := n0+1, n0+int32(p.NX)+2, n0+int32(p.NX)+1
				switch {
				case p.Tri && p.Collapsed:
					add(n0, n1, n2, n2)
					add(n0, n2, n3, n3)
				case p.Tri:
					add(n0, n1, n2)
					add(n0, n2, n3)
				default:
					add(n0, n1, n2, n3)
				}
			}
		}
	}
	if err := m.Index(); err != nil {
		panic(err)
	}
	return m
}
