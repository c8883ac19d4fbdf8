package geomtest

import (
	"errors"
	"fmt"
	"math"
	"unicode/utf8"

	"github.com/joinery-cae/joinery/geom"
)

// CheckRead checks what a reader returned for arbitrary input, as fuzz
// targets do: a failure must be an input error (errors.Is(err,
// geom.ErrInput)) and a mesh must pass CheckMesh. It returns nil when
// both hold.
func CheckRead(m *geom.Mesh, err error) error {
	if err != nil {
		if !errors.Is(err, geom.ErrInput) {
			return fmt.Errorf("error %w is not an input error", err)
		}
		return nil
	}
	if err := CheckMesh(m); err != nil {
		return fmt.Errorf("inconsistent mesh: %w", err)
	}
	return nil
}

// CheckMesh reports the first internal inconsistency of a mesh as a
// reader returns it, or nil: slice lengths that disagree (nodes and ids,
// elements and starts, parts and thicknesses), starts that do not begin
// at 0, step back or end past the connectivity, elements that are not
// linear triangles or quads (the only kinds the readers make),
// coordinates and thicknesses outside the plausible ranges
// (geom.CheckCoordinates, geom.CheckThickness, at Scale 1), part names or
// materials that are not UTF-8, node or
// part indices out of range, and id lookups (NodeIndex, ElemIndex,
// PartIndex) that do not lead back to the same node, element or part; m
// must therefore have been indexed.
func CheckMesh(m *geom.Mesh) error {
	nn, ne := m.NumNodes(), m.NumElems()
	if len(m.NodeIDs) != nn {
		return fmt.Errorf("%d node ids for %d nodes", len(m.NodeIDs), nn)
	}
	if len(m.ElemPart) != ne || len(m.ElemStart) != ne+1 {
		return fmt.Errorf("%d elements, %d part indices, %d starts (want %d)", ne, len(m.ElemPart), len(m.ElemStart), ne+1)
	}
	if m.ElemStart[0] != 0 || int(m.ElemStart[ne]) != len(m.Conn) {
		return fmt.Errorf("starts run from %d to %d, want 0 to %d (len(Conn))", m.ElemStart[0], m.ElemStart[ne], len(m.Conn))
	}
	if m.ElemThickness != nil && len(m.ElemThickness) != ne {
		return fmt.Errorf("%d thicknesses for %d elements", len(m.ElemThickness), ne)
	}
	// Values the readers hold to the plausible ranges (read with the
	// default ReadOptions.Scale).
	for i, p := range m.Coords {
		if err := geom.CheckCoordinates(p.X, p.Y, p.Z, 1); err != nil {
			return fmt.Errorf("node %d (id %d): %w", i, m.NodeIDs[i], err)
		}
	}
	for e, t := range m.ElemThickness {
		if !math.IsNaN(t) && geom.CheckThickness(t, 1) != nil {
			return fmt.Errorf("element %d: thickness %g", e, t)
		}
	}
	for _, p := range m.Parts {
		if p.Thickness != 0 && geom.CheckThickness(p.Thickness, 1) != nil || !utf8.ValidString(p.Name) || !utf8.ValidString(p.Material) {
			return fmt.Errorf("part %+v", p)
		}
	}
	for e := range ne {
		if k := m.ElemStart[e+1] - m.ElemStart[e]; k < 0 || k > geom.MaxElemNodes || !geom.ElemType(k).Valid() {
			return fmt.Errorf("element %d (id %d) has %d nodes, want 3, 4, 6, 8 or 9", e, m.ElemIDs[e], k)
		}
		for _, n := range m.ElemNodes(e) {
			if n < 0 || int(n) >= nn {
				return fmt.Errorf("element %d (id %d): node index %d out of range (%d nodes)", e, m.ElemIDs[e], n, nn)
			}
		}
		if p := m.ElemPart[e]; p < 0 || int(p) >= len(m.Parts) {
			return fmt.Errorf("element %d (id %d): part index %d out of range (%d parts)", e, m.ElemIDs[e], p, len(m.Parts))
		}
		if i, ok := m.ElemIndex(m.ElemIDs[e]); !ok || int(i) != e {
			return fmt.Errorf("ElemIndex(%d) = %d, %v; want %d", m.ElemIDs[e], i, ok, e)
		}
	}
	for i, id := range m.NodeIDs {
		if j, ok := m.NodeIndex(id); !ok || int(j) != i {
			return fmt.Errorf("NodeIndex(%d) = %d, %v; want %d", id, j, ok, i)
		}
	}
	for i, p := range m.Parts {
		if j, ok := m.PartIndex(p.ID); !ok || int(j) != i {
			return fmt.Errorf("PartIndex(%d) = %d, %v; want %d", p.ID, j, ok, i)
		}
	}
	return nil
}
