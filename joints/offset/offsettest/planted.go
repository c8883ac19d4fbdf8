// Package offsettest holds test fixtures for reference surfaces and
// offset links: flat sheets stacked with known surfaces, thicknesses,
// normals and gaps, whose true reference surfaces and flipped elements
// are known exactly. Only tests import it.
package offsettest

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// Plate is one flat rectangular sheet of the xy plane, meshed with
// square quads of side H (the mesh's, unless the plate gives its own).
type Plate struct {
	ID        int64
	Thickness float64
	// Surface is the surface the mesh is drawn on, relative to the
	// element normals (+z unless flipped).
	Surface geom.Surface
	// Mid is the z of the sheet's mid-surface, mm.
	Mid            float64
	X0, X1, Y0, Y1 float64
	// Flip reverses the node order (normal -z) of the elements whose
	// centre satisfies it; nil flips none.
	Flip func(x, y float64) bool
	// FlipAll reverses every element (applied before Flip).
	FlipAll bool
	// H, when positive, is the plate's own element size, mm, in place
	// of the mesh's.
	H float64
}

// size returns the plate's element size in a mesh of element size h.
func (p *Plate) size(h float64) float64 {
	if p.H > 0 {
		return p.H
	}
	return h
}

// MeshZ returns the z of the plate's mesh: the mid-surface moved by the
// surface's offset, against the normals (+z, or -z when FlipAll).
func (p *Plate) MeshZ() float64 {
	n := 1.0
	if p.FlipAll {
		n = -1
	}
	return p.Mid - n*p.Surface.MidOffset(p.Thickness)
}

// Mesh builds the indexed mesh of plates with quads of side h. Part p's
// node and element ids start at p.ID*1000+1, row by row (x fastest). The
// parts carry thickness and the mid surface, as a parts table that says
// nothing of surfaces would; Plates keeps the truth.
func Mesh(plates []Plate, h float64) (*geom.Mesh, error) {
	m := &geom.Mesh{ElemStart: []int32{0}}
	for pi, p := range plates {
		m.Parts = append(m.Parts, geom.Part{ID: p.ID, Thickness: p.Thickness, Name: fmt.Sprintf("plate %d", p.ID)})
		h := p.size(h)
		nx := int(math.Round((p.X1 - p.X0) / h))
		ny := int(math.Round((p.Y1 - p.Y0) / h))
		first := int32(len(m.Coords))
		z := p.MeshZ()
		for j := 0; j <= ny; j++ {
			for i := 0; i <= nx; i++ {
				m.NodeIDs = append(m.NodeIDs, p.ID*1000+int64(j*(nx+1)+i)+1)
				m.Coords = append(m.Coords, r3.Vec{X: p.X0 + float64(i)*h, Y: p.Y0 + float64(j)*h, Z: z})
			}
		}
		for j := range ny {
			for i := range nx {
				n0 := first + int32(j*(nx+1)+i)
				q := []int32{n0, n0 + 1, n0 + int32(nx) + 2, n0 + int32(nx) + 1}
				cx, cy := p.X0+(float64(i)+0.5)*h, p.Y0+(float64(j)+0.5)*h
				flip := p.FlipAll
				if p.Flip != nil && p.Flip(cx, cy) {
					flip = !flip
				}
				if flip {
					q[1], q[3] = q[3], q[1]
				}
				m.Conn = append(m.Conn, q...)
				m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
				m.ElemIDs = append(m.ElemIDs, p.ID*1000+int64(j*nx+i)+1)
				m.ElemPart = append(m.ElemPart, int32(pi))
			}
		}
	}
	if err := m.Index(); err != nil {
		return nil, err
	}
	return m, nil
}

// FlippedIDs returns, in increasing order, the ids of the elements of
// plate p whose centre satisfies p.Flip: those Mesh turns against the
// rest of the plate.
func FlippedIDs(p Plate, h float64) []int64 {
	var ids []int64
	h = p.size(h)
	nx := int(math.Round((p.X1 - p.X0) / h))
	ny := int(math.Round((p.Y1 - p.Y0) / h))
	for j := range ny {
		for i := range nx {
			if p.Flip != nil && p.Flip(p.X0+(float64(i)+0.5)*h, p.Y0+(float64(j)+0.5)*h) {
				ids = append(ids, p.ID*1000+int64(j*nx+i)+1)
			}
		}
	}
	return ids
}

// H is the element size of the planted model, mm.
const H = 5.0

// Planted returns the planted model of the surface-inference tests:
//
//   - 10: 1 mm, meshed on its mid-surface at z = 0, x 0 to 80;
//   - 20: 1.5 mm on top of 10, meshed on its top face, x 0 to 50;
//   - 30: 0.8 mm under 10, meshed on its bottom face, x 0 to 40;
//   - 40: 1.2 mm on top of 20, on its mid-surface, x 10 to 50, with the
//     normals of its elements beyond x = 30 (half of them) flipped;
//   - 50: 1 mm under 10 between x 60 and 80 (and on to 100), mid-surface,
//     standing 0.5 mm off 10: the contact that disagrees;
//   - 60: 2 mm under 50, touching it, mid-surface, x 60 to 100.
//
// All are 50 mm wide (y 0 to 50) but 50 and 60, which are 20 mm wide, so
// that the contact of 50 with 60 (800 mm²) outweighs its stand-off from
// 10 (400 mm²). The thicknesses differ, so no shift of surfaces fits the
// stand-off without breaking a contact.
func Planted() []Plate {
	return []Plate{
		{ID: 10, Thickness: 1, Surface: geom.SurfaceMid, Mid: 0, X0: 0, X1: 80, Y0: 0, Y1: 50},
		{ID: 20, Thickness: 1.5, Surface: geom.SurfaceTop, Mid: 0.5 + 0.75, X0: 0, X1: 50, Y0: 0, Y1: 50},
		{ID: 30, Thickness: 0.8, Surface: geom.SurfaceBottom, Mid: -0.5 - 0.4, X0: 0, X1: 40, Y0: 0, Y1: 50},
		{ID: 40, Thickness: 1.2, Surface: geom.SurfaceMid, Mid: 2 + 0.6, X0: 10, X1: 50, Y0: 0, Y1: 50,
			Flip: func(x, _ float64) bool { return x > 30 }},
		{ID: 50, Thickness: 1, Surface: geom.SurfaceMid, Mid: -0.5 - 0.5 - 0.5, X0: 60, X1: 100, Y0: 0, Y1: 20},
		{ID: 60, Thickness: 2, Surface: geom.SurfaceMid, Mid: -1.5 - 1.5, X0: 60, X1: 100, Y0: 0, Y1: 20},
	}
}

// PlantedWelds are spot welds through the planted model's stacks, each
// at the middle of its stack, away from the stand-off between 10 and 50:
// with the true surfaces every one of them is in contact.
func PlantedWelds() []joints.Joint {
	return []joints.Joint{
		{ID: "W1", Kind: joints.Spot, Point: r3.Vec{X: 22.5, Y: 22.5, Z: 0.5}}, // 30, 10, 20, 40
		{ID: "W2", Kind: joints.Spot, Point: r3.Vec{X: 7.5, Y: 32.5, Z: 0.5}},  // 30, 10, 20
		{ID: "W3", Kind: joints.Spot, Point: r3.Vec{X: 87.5, Y: 12.5, Z: -2}},  // 50, 60
	}
}
