package geom

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// ElemType is the kind of a shell element, named by its node count.
type ElemType int8

// Element types. Tri6 and Quad8 are reserved for quadratic shells.
const (
	Tri3  ElemType = 3
	Quad4 ElemType = 4
	Tri6  ElemType = 6
	Quad8 ElemType = 8
)

// String returns "tri3", "quad4", "tri6" or "quad8".
func (t ElemType) String() string {
	switch t {
	case Tri3:
		return "tri3"
	case Quad4:
		return "quad4"
	case Tri6:
		return "tri6"
	case Quad8:
		return "quad8"
	}
	return fmt.Sprintf("type%d", int(t))
}

// Corners returns the number of corner nodes: 3 for triangles, 4 for quads.
func (t ElemType) Corners() int {
	if t == Tri3 || t == Tri6 {
		return 3
	}
	return 4
}

// Source records which file a range of nodes and elements came from.
type Source struct {
	File      string
	NodeStart int // first node index from this file
	ElemStart int // first element index from this file
	// NodeOffset and ElemOffset were added to the file's ids when the
	// model was merged with renumbering; 0 otherwise.
	NodeOffset int64
	ElemOffset int64
	Skipped    map[string]int // cells skipped by type name, e.g. "vtk-cell-12"
}

// Mesh is a shell mesh: nodes, elements and parts in dense slices.
//
// Element e has nodes Conn[ElemStart[e]:ElemStart[e+1]] (node indices, not
// ids), belongs to part Parts[ElemPart[e]] and has id ElemIDs[e].
// ElemThickness is nil or holds one value per element, NaN where the
// part's thickness applies. Call Index after filling the slices.
type Mesh struct {
	Parts         []Part
	NodeIDs       []int64
	Coords        []r3.Vec
	ElemIDs       []int64
	ElemPart      []int32
	ElemStart     []int32
	Conn          []int32
	ElemThickness []float64
	Sources       []Source

	nodes, elems IDIndex
	parts        map[int64]int32
}

// NumNodes returns the number of nodes.
func (m *Mesh) NumNodes() int { return len(m.Coords) }

// NumElems returns the number of elements.
func (m *Mesh) NumElems() int { return len(m.ElemIDs) }

// ElemNodes returns the node indices of element e. The slice aliases the
// mesh: do not modify it.
func (m *Mesh) ElemNodes(e int) []int32 { return m.Conn[m.ElemStart[e]:m.ElemStart[e+1]] }

// Type returns the type of element e.
func (m *Mesh) Type(e int) ElemType { return ElemType(m.ElemStart[e+1] - m.ElemStart[e]) }

// Part returns the part of element e.
func (m *Mesh) Part(e int) *Part { return &m.Parts[m.ElemPart[e]] }

// Thickness returns the thickness of element e: its own when set, else
// its part's.
func (m *Mesh) Thickness(e int) float64 {
	if m.ElemThickness != nil {
		if t := m.ElemThickness[e]; !math.IsNaN(t) {
			return t
		}
	}
	return m.Parts[m.ElemPart[e]].Thickness
}

// Index builds the id lookups of nodes, elements and parts. It fails on
// duplicate ids, naming the files they come from.
func (m *Mesh) Index() error {
	var (
		dup Duplicate
		ok  bool
	)
	if m.nodes, dup, ok = NewIDIndex(m.NodeIDs); !ok {
		return fmt.Errorf("node id %d appears twice (%s and %s)", dup.ID, m.nodeFile(dup.First), m.nodeFile(dup.Second))
	}
	if m.elems, dup, ok = NewIDIndex(m.ElemIDs); !ok {
		return fmt.Errorf("element id %d appears twice (%s and %s)", dup.ID, m.elemFile(dup.First), m.elemFile(dup.Second))
	}
	m.parts = make(map[int64]int32, len(m.Parts))
	for i, p := range m.Parts {
		if _, dup := m.parts[p.ID]; dup {
			return fmt.Errorf("part id %d appears twice", p.ID)
		}
		m.parts[p.ID] = int32(i)
	}
	return nil
}

// NodeIndex returns the index of the node with the given id.
func (m *Mesh) NodeIndex(id int64) (int32, bool) { return m.nodes.Lookup(id) }

// ElemIndex returns the index of the element with the given id.
func (m *Mesh) ElemIndex(id int64) (int32, bool) { return m.elems.Lookup(id) }

// PartIndex returns the index in Parts of the part with the given id.
func (m *Mesh) PartIndex(id int64) (int32, bool) {
	i, ok := m.parts[id]
	return i, ok
}

// MaxNodeID returns the largest node id, 0 for an empty mesh.
func (m *Mesh) MaxNodeID() int64 { return maxID(m.NodeIDs) }

// MaxElemID returns the largest element id, 0 for an empty mesh.
func (m *Mesh) MaxElemID() int64 { return maxID(m.ElemIDs) }

func maxID(ids []int64) int64 {
	var hi int64
	for _, id := range ids {
		hi = max(hi, id)
	}
	return hi
}

// Bytes estimates the memory held by the mesh's slices and indices.
func (m *Mesh) Bytes() int {
	return 8*len(m.NodeIDs) + 24*len(m.Coords) + 8*len(m.ElemIDs) + 4*len(m.ElemPart) +
		4*len(m.ElemStart) + 4*len(m.Conn) + 8*len(m.ElemThickness) + m.nodes.Bytes() + m.elems.Bytes()
}

func (m *Mesh) nodeFile(i int) string {
	return m.sourceOf(i, func(s Source) int { return s.NodeStart })
}

func (m *Mesh) elemFile(i int) string {
	return m.sourceOf(i, func(s Source) int { return s.ElemStart })
}

func (m *Mesh) sourceOf(i int, start func(Source) int) string {
	name := "input"
	for _, s := range m.Sources {
		if start(s) <= i {
			name = s.File
		}
	}
	return name
}
