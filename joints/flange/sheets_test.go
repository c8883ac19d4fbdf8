package flange

import (
	"context"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// sheet describes a part meshed as a structured patch: node (i, j) at
// At(i, j) for 0 <= i <= NU, 0 <= j <= NV; quads, or each quad split
// into two triangles when Tri is set (along the diagonal from node
// (i, j) to (i+1, j+1), or from (i+1, j) to (i, j+1) when Diag is set).
type sheet struct {
	Part    int64
	T       float64 // thickness, mm
	NU, NV  int
	At      func(i, j int) r3.Vec
	Tri     bool
	Diag    bool
	Surface geom.Surface
	Flip    bool // reverse the node order: normals the other way
	// FlipAt reverses the node order of the elements of quad (i, j)
	// only: a mesh whose normals disagree from element to element.
	FlipAt func(i, j int) bool
	// Skip leaves quad (i, j) out (a hole).
	Skip func(i, j int) bool
	// Wrap joins column NU to column 0 (a closed band round an axis):
	// node (NU, j) is node (0, j).
	Wrap bool
}

// plate returns a flat sheet in the plane z, from (x0, y0), nu by nv
// quads of size h.
func plate(part int64, t, x0, y0, z float64, nu, nv int, h float64) sheet {
	return sheet{Part: part, T: t, NU: nu, NV: nv, At: func(i, j int) r3.Vec {
		return r3.Vec{X: x0 + float64(i)*h, Y: y0 + float64(j)*h, Z: z}
	}}
}

// mesh builds an indexed mesh of the sheets, node and element ids of
// part p from p*100000+1.
func mesh(ss ...sheet) *geom.Mesh {
	m := &geom.Mesh{ElemStart: []int32{0}}
	for pi, s := range ss {
		m.Parts = append(m.Parts, geom.Part{ID: s.Part, Thickness: s.T, Surface: s.Surface})
		base := int32(len(m.Coords))
		cols := s.NU + 1
		if s.Wrap {
			cols = s.NU
		}
		for j := 0; j <= s.NV; j++ {
			for i := 0; i < cols; i++ {
				m.NodeIDs = append(m.NodeIDs, s.Part*100000+int64(len(m.Coords)-int(base))+1)
				m.Coords = append(m.Coords, s.At(i, j))
			}
		}
		node := func(i, j int) int32 {
			if s.Wrap {
				i %= s.NU
			}
			return base + int32(j*cols+i)
		}
		n := 0
		flip := s.Flip
		add := func(ns ...int32) {
			if flip {
				for a, b := 0, len(ns)-1; a < b; a, b = a+1, b-1 {
					ns[a], ns[b] = ns[b], ns[a]
				}
			}
			m.Conn = append(m.Conn, ns...)
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
			n++
			m.ElemIDs = append(m.ElemIDs, s.Part*100000+int64(n))
			m.ElemPart = append(m.ElemPart, int32(pi))
		}
		for j := 0; j < s.NV; j++ {
			for i := 0; i < s.NU; i++ {
				if s.Skip != nil && s.Skip(i, j) {
					continue
				}
				n0, n1, n2, n3 := node(i, j), node(i+1, j), node(i+1, j+1), node(i, j+1)
				flip = s.Flip != (s.FlipAt != nil && s.FlipAt(i, j))
				switch {
				case s.Tri && s.Diag:
					add(n0, n1, n3)
					add(n1, n2, n3)
				case s.Tri:
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

// findAll finds the flanges of m with default options.
func findAll(t *testing.T, m *geom.Mesh, fo joints.FlangeOptions) *Set {
	t.Helper()
	bo := joints.BuildOptions{}.Defaults(joints.MaxThickness(m))
	fo = fo.Defaults()
	c, err := geom.FindContacts(context.Background(), geom.NewIndex(m), Rule(m, &bo, &fo))
	if err != nil {
		t.Fatal(err)
	}
	set, err := Find(context.Background(), c, fo)
	if err != nil {
		t.Fatal(err)
	}
	return set
}
