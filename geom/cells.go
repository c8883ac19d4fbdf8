package geom

import (
	"fmt"
	"io"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"
)

// DefaultPartArray is the name of the cell array that holds part ids
// when ReadOptions.PartArray is empty.
const DefaultPartArray = "part"

// ReadOptions are the settings every mesh reader takes.
type ReadOptions struct {
	// DefaultPart, when HasDefaultPart is set, is the part of every
	// element of a file that carries no part array.
	DefaultPart    int64
	HasDefaultPart bool
	// Digest, when not nil, receives every byte of the file as the reader
	// reads it (ReadFile), so that a caller can hash its inputs without
	// reading them twice. Readers of a stream (Read) ignore it.
	Digest io.Writer
	// PartArray names the cell array that holds part ids in formats
	// with named arrays (VTK); "" means DefaultPartArray. Meshers write
	// their own names (gmsh: CellEntityIds for physical groups).
	PartArray string
	// Scale is the number of millimetres in the unit of the file's
	// lengths (1 for mm, 1000 for m, 25.4 for inches); 0 means 1. Readers
	// do not scale what they read: they use Scale to hold thicknesses and
	// coordinates to the plausible ranges (MaxThickness, MaxCoordinate).
	Scale float64
}

// PartArrayName returns the name of the part array: PartArray, or
// DefaultPartArray when it is empty.
func (o ReadOptions) PartArrayName() string {
	if o.PartArray == "" {
		return DefaultPartArray
	}
	return o.PartArray
}

// CellSet is a mesh as a VTK-style reader holds it just after reading:
// points, cells with VTK type numbers, and the optional data arrays.
// Conn holds point indices; cell c uses Conn[Offsets[c]:Offsets[c+1]].
type CellSet struct {
	File    string
	Points  []r3.Vec
	Types   []uint8
	Offsets []int64 // len(Types)+1
	Conn    []int64
	// Conn32 and Offsets32, when Conn32 is not nil, hold the
	// connectivity and the offsets instead of Conn and Offsets, in 32
	// bits, for a reader that checked that its values fit (Offsets32
	// starts at 0). When every cell is read, MeshFromCells makes them the
	// mesh's Conn and ElemStart without a copy, as it takes ElemIDs and
	// Thickness; the cell set must not be changed afterwards.
	Conn32    []int32
	Offsets32 []int32
	NodeIDs   []int64   // per point; nil means index+1
	ElemIDs   []int64   // per cell (all cells, kept or not); nil means index+1
	Part      []int64   // per cell; nil when the file has no part array
	Thickness []float64 // per cell; nil when absent
	// CellArrays names the cell arrays the file holds, read or not, in
	// file order, for messages about a missing part array.
	CellArrays []string

	// Locate, when set, tells where value index of array a is written in
	// the file: a 1-based line in text data; else line 0 and a byte
	// offset in binary data; else 0 and -1 when the reader cannot tell,
	// and the error names the record instead. MeshFromCells calls it only
	// to report an error.
	Locate func(a CellArray, index int) (line int, offset int64)
}

// CellArray names an array of a CellSet as written in the file, for
// CellSet.Locate.
type CellArray uint8

// The arrays of a CellSet. The index given with each is the one named.
const (
	ArrayPoints    CellArray = iota // point coordinates; index: point
	ArrayConn                       // connectivity; index: entry of Conn
	ArrayOffsets                    // the end of a cell in the cell list; index: cell
	ArrayTypes                      // cell types; index: cell
	ArrayNodeIDs                    // index: point
	ArrayElemIDs                    // index: cell
	ArrayPart                       // index: cell
	ArrayThickness                  // index: cell
)

// errAt returns an input error about value index of array a: at its line
// or byte offset when cs.Locate knows them, else at record.
func (cs *CellSet) errAt(a CellArray, index, record int, format string, args ...any) error {
	if cs.Locate != nil {
		line, off := cs.Locate(a, index)
		switch {
		case line > 0:
			return LineError(cs.File, line, format, args...)
		case off >= 0:
			return OffsetError(cs.File, off, format, args...)
		}
	}
	return RecordError(cs.File, record, format, args...)
}

// where returns "; first at line N" or "; first at byte N" for value index
// of array a, or "" when cs.Locate cannot tell.
func (cs *CellSet) where(a CellArray, index int) string {
	if cs.Locate == nil {
		return ""
	}
	switch line, off := cs.Locate(a, index); {
	case line > 0:
		return fmt.Sprintf("; first at line %d", line)
	case off >= 0:
		return fmt.Sprintf("; first at byte %d", off)
	}
	return ""
}

// MeshFromCells checks a CellSet and turns it into a Mesh holding its
// shells: triangles (VTK type 5), quads (9), quadratic triangles (22),
// quadratic quads (23) and biquadratic quads (28). Other cell types are
// skipped and counted in the mesh's Source; a part all of whose cells are
// skipped surface cells (polygons, triangle strips, higher-order cells)
// is an error naming the cell kinds, so that no sheet is dropped without
// a word. Errors name the file and the line or byte offset of the bad
// value when cs.Locate can tell them, else its record.
func MeshFromCells(cs *CellSet, opt ReadOptions) (*Mesh, error) {
	nc := len(cs.Types)
	partArray := opt.PartArrayName()
	if n := cs.numOffsets(); n != nc+1 {
		return nil, FileError(cs.File, "%d cell offsets for %d cells", n, nc)
	}
	if n := len(cs.NodeIDs); n != 0 && n != len(cs.Points) {
		return nil, FileError(cs.File, "point array node_id has %d values for %d points", n, len(cs.Points))
	}
	for _, a := range [...]struct {
		name string
		n    int
	}{{"element_id", len(cs.ElemIDs)}, {partArray, len(cs.Part)}, {"thickness", len(cs.Thickness)}} {
		if a.n != 0 && a.n != nc {
			return nil, FileError(cs.File, "cell array %s has %d values for %d cells", a.name, a.n, nc)
		}
	}
	if cs.Part == nil && !opt.HasDefaultPart && nc > 0 {
		return nil, FileError(cs.File, "no cell array %q%s and no part in the parts table names this file; name the array that holds part ids (--part-array) or give the file a part in the parts table",
			partArray, cellArraysText(cs.CellArrays))
	}
	scale := opt.scale()
	lim := CoordinateLimit(scale)
	for i, p := range cs.Points {
		if InRange(p.X, p.Y, p.Z, lim) {
			continue
		}
		if !finite(p.X) || !finite(p.Y) || !finite(p.Z) {
			return nil, cs.errAt(ArrayPoints, i, i, "point %d has a non-finite coordinate (%g, %g, %g)", i, p.X, p.Y, p.Z)
		}
		if err := CheckCoordinates(p.X, p.Y, p.Z, scale); err != nil { // nil at the limit's rounding
			return nil, cs.errAt(ArrayPoints, i, i, "point %d: %v", i, err)
		}
	}
	m := &Mesh{Coords: cs.Points}
	if cs.NodeIDs != nil {
		m.NodeIDs = cs.NodeIDs
		for i, id := range m.NodeIDs {
			if id <= 0 {
				return nil, cs.errAt(ArrayNodeIDs, i, i, "point %d: node id %d is not positive", i, id)
			}
		}
	} else {
		m.NodeIDs = MakeLarge[int64](len(cs.Points))
		for i := range m.NodeIDs {
			m.NodeIDs[i] = int64(i) + 1
		}
	}
	kept, nconn := 0, 0
	var skipped SkippedCells
	for _, t := range cs.Types {
		if et, ok := VTKElemType(t); ok {
			kept++
			nconn += int(et)
		} else {
			skipped = skipped.Add(SkippedCells{t: 1})
		}
	}
	// take: every cell is read, so the mesh takes the cell set's arrays
	// over instead of copying them.
	take := skipped == nil
	// 64-bit offsets and connectivity are always narrowed into new
	// arrays.
	takeConn := take && cs.Conn32 != nil
	if takeConn {
		m.Conn, m.ElemStart = cs.Conn32, cs.Offsets32
	} else {
		m.Conn = MakeLargeCap[int32](0, nconn)
		m.ElemStart = MakeLargeCap[int32](1, kept+1)
	}
	if take && cs.ElemIDs != nil {
		m.ElemIDs = cs.ElemIDs
	} else {
		m.ElemIDs = MakeLargeCap[int64](0, kept)
	}
	m.ElemPart = MakeLargeCap[int32](0, kept)
	if cs.Thickness != nil {
		if take {
			m.ElemThickness = cs.Thickness
		} else {
			m.ElemThickness = MakeLargeCap[float64](0, kept)
		}
	}
	var (
		partIdx map[int64]int32
		err     error
	)
	if cs.Conn32 != nil {
		partIdx, err = fillCells(m, cs, cs.Offsets32, cs.Conn32, opt, takeConn, take)
	} else {
		partIdx, err = fillCells(m, cs, cs.Offsets, cs.Conn, opt, false, take)
	}
	if err != nil {
		return nil, err
	}
	if skipped != nil {
		if err := cs.checkDroppedShells(partIdx, opt); err != nil {
			return nil, err
		}
	}
	m.Sources = []Source{{File: cs.File, Skipped: skipped, ImplicitNodeIDs: cs.NodeIDs == nil, ImplicitElemIDs: cs.ElemIDs == nil}}
	if err := m.Index(); err != nil {
		return nil, cs.duplicateError(m, err)
	}
	return m, nil
}

// numOffsets returns the number of cell offsets of cs, in 64 or 32 bits.
func (cs *CellSet) numOffsets() int {
	if cs.Conn32 != nil || cs.Offsets32 != nil {
		return len(cs.Offsets32)
	}
	return len(cs.Offsets)
}

// fillCells checks the cells of cs (offsets offs into conn) and fills
// m's elements: their connectivity (unless takeConn: m.Conn and
// m.ElemStart are offs and conn themselves), ids, parts and thicknesses
// (unless takeArrays: m holds cs's arrays already, which are only
// checked). It returns the index in m.Parts of each part id. The checks
// run on blocks of cells at once; the error is the first cell's, as if
// they ran in order.
func fillCells[T int32 | int64](m *Mesh, cs *CellSet, offs, conn []T, opt ReadOptions, takeConn, takeArrays bool) (map[int64]int32, error) {
	if takeConn && len(offs) > 0 && offs[0] != 0 {
		return nil, cs.errAt(ArrayOffsets, 0, 0, "cell 0: offsets start at %d, not 0", offs[0])
	}
	// The blocks only tell whether they hold a bad cell (Locate, which
	// may walk the file, is not for concurrent use); the first bad block
	// is checked again for the error.
	nc := len(cs.Types)
	quiet := *cs
	quiet.Locate = nil
	bad := make([]bool, (nc+parallelBlock-1)/parallelBlock)
	parallelBlocks(nc, func(from, to int) {
		bad[from/parallelBlock] = checkCells(&quiet, offs, conn, opt, from, to) != nil
	})
	for b, isBad := range bad {
		if isBad {
			return nil, checkCells(cs, offs, conn, opt, b*parallelBlock, min((b+1)*parallelBlock, nc))
		}
	}
	partIdx := map[int64]int32{}
	lastPID, lastPI := int64(0), int32(-1) // elements of a part come in runs
	for c, t := range cs.Types {
		if _, ok := VTKElemType(t); !ok {
			continue
		}
		if !takeConn {
			for _, p := range conn[offs[c]:offs[c+1]] {
				m.Conn = append(m.Conn, int32(p))
			}
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
		}
		if !takeArrays || cs.ElemIDs == nil {
			id := int64(c) + 1
			if cs.ElemIDs != nil {
				id = cs.ElemIDs[c]
			}
			m.ElemIDs = append(m.ElemIDs, id)
		}
		pid := opt.DefaultPart
		if cs.Part != nil {
			pid = cs.Part[c]
		}
		if pid != lastPID || lastPI < 0 {
			pi, ok := partIdx[pid]
			if !ok {
				pi = int32(len(m.Parts))
				partIdx[pid] = pi
				m.Parts = append(m.Parts, Part{ID: pid})
			}
			lastPID, lastPI = pid, pi
		}
		m.ElemPart = append(m.ElemPart, lastPI)
		if cs.Thickness != nil && !takeArrays {
			m.ElemThickness = append(m.ElemThickness, cs.Thickness[c])
		}
	}
	return partIdx, nil
}

// checkCells checks cells from..to-1 of cs and returns the error of the
// first bad one.
func checkCells[T int32 | int64](cs *CellSet, offs, conn []T, opt ReadOptions, from, to int) error {
	scale := opt.scale()
	np := int64(len(cs.Points))
	for c := from; c < to; c++ {
		t := cs.Types[c]
		lo, hi := int64(offs[c]), int64(offs[c+1])
		if lo < 0 || hi < lo || hi > int64(len(conn)) {
			return cs.errAt(ArrayOffsets, c, c, "cell %d: offsets %d..%d outside the %d connectivity entries", c, lo, hi, len(conn))
		}
		et, ok := VTKElemType(t)
		if !ok {
			continue
		}
		if want := int64(et); hi-lo != want {
			return cs.errAt(ArrayTypes, c, c, "cell %d: type %d (%s) needs %d points, has %d", c, t, VTKCellName(t), want, hi-lo)
		}
		for k, p := range conn[lo:hi] {
			if int64(p) < 0 || int64(p) >= np {
				return cs.errAt(ArrayConn, int(lo)+k, c, "cell %d references point %d; the file has %d points", c, p, np)
			}
		}
		if cs.ElemIDs != nil {
			if id := cs.ElemIDs[c]; id <= 0 {
				return cs.errAt(ArrayElemIDs, c, c, "cell %d: element id %d is not positive", c, id)
			}
		}
		if cs.Part != nil {
			if pid := cs.Part[c]; pid <= 0 {
				return cs.errAt(ArrayPart, c, c, "cell %d: part id %d is not positive", c, pid)
			}
		}
		if cs.Thickness != nil {
			if err := CheckThickness(cs.Thickness[c], scale); err != nil {
				return cs.errAt(ArrayThickness, c, c, "cell %d: %v", c, err)
			}
		}
	}
	return nil
}

// checkDroppedShells fails when surface cells were skipped that belong
// to a part none of whose cells was read (kept holds the parts read): the
// sheet would vanish from the model. Skipped points, curves and volumes
// (gmsh writes its physical curves and points beside the surfaces) are
// only counted.
func (cs *CellSet) checkDroppedShells(kept map[int64]int32, opt ReadOptions) error {
	var (
		lost  map[int64]SkippedCells
		first = map[int64]int{}
	)
	for c, t := range cs.Types {
		if _, ok := VTKElemType(t); ok || !vtkSurfaceCell(t) {
			continue
		}
		pid := opt.DefaultPart
		if cs.Part != nil {
			pid = cs.Part[c]
		}
		if _, ok := kept[pid]; ok {
			continue
		}
		if lost == nil {
			lost = map[int64]SkippedCells{}
		}
		if _, seen := first[pid]; !seen {
			first[pid] = c
		}
		lost[pid] = lost[pid].Add(SkippedCells{t: 1})
	}
	if lost == nil {
		return nil
	}
	pids := make([]int64, 0, len(lost))
	for pid := range lost {
		pids = append(pids, pid)
	}
	slices.Sort(pids)
	pid := pids[0]
	more := ""
	if len(pids) > 1 {
		more = fmt.Sprintf(" (and %d more part(s) alike)", len(pids)-1)
	}
	return cs.errAt(ArrayTypes, first[pid], first[pid], "part %d has no cell Joinery reads: its %d surface cell(s) are of kinds it does not read (%s)%s; Joinery reads triangles, quads, quadratic triangles, quadratic quads and biquadratic quads (VTK types 5, 9, 22, 23, 28)",
		pid, lost[pid].Total(), lost[pid], more)
}

// cellArraysText lists the cell arrays of a file for a message about a
// missing one: "; its cell arrays: a, b", or "; it has no cell arrays".
func cellArraysText(names []string) string {
	if len(names) == 0 {
		return "; the file has no cell arrays"
	}
	const most = 8
	list := names
	more := ""
	if len(list) > most {
		list, more = list[:most], fmt.Sprintf(", ... (%d more)", len(names)-most)
	}
	q := make([]string, len(list))
	for i, n := range list {
		q[i] = fmt.Sprintf("%q", excerpt(n))
	}
	return "; the file's cell arrays are " + strings.Join(q, ", ") + more
}

// excerpt cuts text echoed from an input to a short excerpt.
func excerpt(s string) string {
	if len(s) > 40 {
		return s[:40] + "..."
	}
	return s
}

// duplicateError turns the error of m.Index, for a mesh read from cs, into
// one that names the two points or cells that share an id, located at the
// second. It repeats the id check, which is only done once reading failed.
func (cs *CellSet) duplicateError(m *Mesh, err error) error {
	if _, dup, ok := NewIDIndex(m.NodeIDs); !ok {
		return cs.errAt(ArrayNodeIDs, dup.Second, dup.Second, "node id %d appears twice (points %d and %d%s)",
			dup.ID, dup.First, dup.Second, cs.where(ArrayNodeIDs, dup.First))
	}
	if _, dup, ok := NewIDIndex(m.ElemIDs); !ok {
		first, second := cs.cellOfElem(dup.First), cs.cellOfElem(dup.Second)
		return cs.errAt(ArrayElemIDs, second, second, "element id %d appears twice (cells %d and %d%s)",
			dup.ID, first, second, cs.where(ArrayElemIDs, first))
	}
	return FileError(cs.File, "%w", err)
}

// cellOfElem returns the cell that became element e: the e-th cell of a
// type that is read.
func (cs *CellSet) cellOfElem(e int) int {
	for c, t := range cs.Types {
		if _, ok := VTKElemType(t); ok {
			if e == 0 {
				return c
			}
			e--
		}
	}
	return -1
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
