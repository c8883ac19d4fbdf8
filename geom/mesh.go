package geom

import (
	"fmt"
	"math"
	"strings"
	"sync"

	"gonum.org/v1/gonum/spatial/r3"
)

// ElemType is the kind of a shell element, named by its node count.
type ElemType int8

// Element types: linear triangles and quads, and second-order (quadratic)
// ones. The nodes of an element come corners first, in order around the
// element (the normal follows the right-hand rule), then for quadratic
// elements the midside node of each edge, from the edge of corners 0-1
// on, then for Quad9 the centre node: Tri6 is corners 0 1 2 and midsides
// 3 (0-1) 4 (1-2) 5 (2-0); Quad8 is corners 0 1 2 3 and midsides 4 (0-1)
// 5 (1-2) 6 (2-3) 7 (3-0); Quad9 adds the centre 8. This is the order of
// the VTK cell types 22, 23 and 28 (VTK file-format documentation,
// Kitware). Quad8 is the serendipity element, Quad9 the biquadratic
// (Lagrange) one.
const (
	Tri3  ElemType = 3
	Quad4 ElemType = 4
	Tri6  ElemType = 6
	Quad8 ElemType = 8
	Quad9 ElemType = 9
)

// String returns "tri3", "quad4", "tri6", "quad8" or "quad9".
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
	case Quad9:
		return "quad9"
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

// Quadratic reports whether t is a second-order element, with midside
// nodes.
func (t ElemType) Quadratic() bool { return t == Tri6 || t == Quad8 || t == Quad9 }

// Valid reports whether t is one of the element types above.
func (t ElemType) Valid() bool {
	switch t {
	case Tri3, Quad4, Tri6, Quad8, Quad9:
		return true
	}
	return false
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
	// Skipped counts the cells of the file its reader did not read;
	// nil when none were skipped.
	Skipped SkippedCells
	// ImplicitNodeIDs and ImplicitElemIDs are set when the file gave no
	// ids (no node_id or element_id array): its nodes or elements are
	// numbered 1, 2, 3, ... in file order.
	ImplicitNodeIDs bool
	ImplicitElemIDs bool
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
// duplicate ids, naming the files they come from and, when a file gave
// no ids of its own, saying so.
func (m *Mesh) Index() error {
	var (
		dup, edup Duplicate
		ok, eok   bool
		wg        sync.WaitGroup
	)
	// The two lookups are built at once; the nodes' error comes first.
	wg.Go(func() { m.elems, edup, eok = NewIDIndex(m.ElemIDs) })
	m.nodes, dup, ok = NewIDIndex(m.NodeIDs)
	wg.Wait()
	if !ok {
		a, b := m.source(dup.First, nodeStart), m.source(dup.Second, nodeStart)
		return fmt.Errorf("node id %d appears twice (%s and %s)%s", dup.ID, m.sourceName(a), m.sourceName(b),
			m.implicitHint(a, b, "node", "a node_id", func(s Source) bool { return s.ImplicitNodeIDs }))
	}
	if dup = edup; !eok {
		a, b := m.source(dup.First, elemStart), m.source(dup.Second, elemStart)
		return fmt.Errorf("element id %d appears twice (%s and %s)%s", dup.ID, m.sourceName(a), m.sourceName(b),
			m.implicitHint(a, b, "element", "an element_id", func(s Source) bool { return s.ImplicitElemIDs }))
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

// implicitHint explains a duplicate id between sources a and b when one
// of them or both numbered their nodes or elements themselves (what
// names them, array the id array with its article, implicit tells a
// source without it), and points to renumbering; "" otherwise.
func (m *Mesh) implicitHint(a, b int, what, array string, implicit func(Source) bool) string {
	if a < 0 || b < 0 || a == b {
		return ""
	}
	ia, ib := implicit(m.Sources[a]), implicit(m.Sources[b])
	const renumber = "; --renumber shifts the ids of the later file"
	switch {
	case ia && ib:
		return fmt.Sprintf(": neither file has %s array, so both number their %ss 1, 2, 3, ...%s", array, what, renumber)
	case ia || ib:
		f := m.Sources[a].File
		if ib {
			f = m.Sources[b].File
		}
		return fmt.Sprintf(": %s has no %s array and numbers its %ss 1, 2, 3, ...%s", f, strings.TrimPrefix(strings.TrimPrefix(array, "an "), "a "), what, renumber)
	}
	return ""
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

// PartsInUse reports, aligned with Parts, whether any element belongs to
// each part: a part a mesh file or a parts table declares without
// elements is in Parts but not in use.
func (m *Mesh) PartsInUse() []bool {
	used := make([]bool, len(m.Parts))
	for _, pi := range m.ElemPart {
		used[pi] = true
	}
	return used
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

func nodeStart(s Source) int { return s.NodeStart }

func elemStart(s Source) int { return s.ElemStart }

// source returns the index in m.Sources of the source that node or
// element i comes from (start picks which), or -1 when m has none.
func (m *Mesh) source(i int, start func(Source) int) int {
	k := -1
	for j, s := range m.Sources {
		if start(s) <= i {
			k = j
		}
	}
	return k
}

// sourceName returns the file of source k, "input" when k < 0.
func (m *Mesh) sourceName(k int) string {
	if k < 0 {
		return "input"
	}
	return m.Sources[k].File
}
