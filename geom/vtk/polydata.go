package vtk

import (
	"math"
	"slices"
	"strings"

	"github.com/joinery-cae/joinery/geom"
)

// polyKeywords are the keywords of the polydata cell sections, by
// geom.PolySection.
var polyKeywords = [geom.NumPolySections]string{"vertices", "lines", "polygons", "triangle_strips"}

// polySection is one cell section of a POLYDATA file as read: its cell
// list, and where its values are written (for locate).
type polySection struct {
	offs, conn []int32
	spans      [geom.ArrayThickness + 1]span
	classic    bool
}

// polySection reads a VERTICES, LINES, POLYGONS or TRIANGLE_STRIPS
// section (keyword kw, at offset off). Each is laid out as a CELLS
// section, in the classic or the 5.x layout; the cell types follow from
// the section and the cells' point counts (geom.VTKPolyCellType).
func (p *parser) polySection(off int, kw string) error {
	s := slices.Index(polyKeywords[:], kw)
	name := strings.ToUpper(kw)
	switch {
	case !p.poly:
		return p.errAt(off, "%s in an UNSTRUCTURED_GRID file: its cells come in CELLS and CELL_TYPES", name)
	case p.polys[s] != nil:
		return p.errAt(off, "a second %s section", name)
	case p.cellData:
		return p.errAt(off, "%s after CELL_DATA: the cell data must follow every cell section", name)
	}
	p.sect = name
	if err := p.cellList(off); err != nil {
		return err
	}
	sec := &polySection{offs: p.cs.Offsets32, conn: p.cs.Conn32, spans: p.spans, classic: p.classic}
	p.cs.Offsets32, p.cs.Conn32, p.classic = nil, nil, false
	p.spans[geom.ArrayConn], p.spans[geom.ArrayOffsets] = span{}, span{}
	cells, entries := int64(len(sec.offs)-1), int64(len(sec.conn))
	for _, o := range p.polys {
		if o != nil {
			cells += int64(len(o.offs) - 1)
			entries += int64(len(o.conn))
		}
	}
	if cells > maxCount || entries > math.MaxInt32 {
		return p.errAt(off, "%s: the sections hold %d cells of %d points in all, more than a mesh can hold (%d)", name, cells, entries, math.MaxInt32)
	}
	p.polys[s] = sec
	p.ncells = int(cells)
	return nil
}

// joinPolys puts the polydata sections read into p.cs as one cell list
// in VTK's cell order (geom.PolySection), with their cell types.
func (p *parser) joinPolys() {
	var (
		n, size, count int
		only           *polySection
	)
	for _, s := range p.polys {
		if s != nil {
			n += len(s.offs) - 1
			size += len(s.conn)
			count++
			only = s
		}
	}
	types := geom.MakeLarge[uint8](n)
	offs, conn := []int32{0}, []int32{}
	switch {
	case count == 1:
		offs, conn = only.offs, only.conn
	case count > 1:
		offs, conn = geom.MakeLarge[int32](n+1), geom.MakeLarge[int32](size)
		c, w := 0, 0
		for _, s := range p.polys {
			if s == nil {
				continue
			}
			for i := 1; i < len(s.offs); i++ {
				offs[c+i] = int32(w) + s.offs[i]
			}
			copy(conn[w:], s.conn)
			c += len(s.offs) - 1
			w += len(s.conn)
		}
	}
	c := 0
	for k, s := range p.polys {
		if s == nil {
			continue
		}
		for i := 1; i < len(s.offs); i++ {
			types[c] = geom.VTKPolyCellType(geom.PolySection(k), int(s.offs[i]-s.offs[i-1]))
			c++
		}
	}
	p.cs.Offsets32, p.cs.Conn32, p.cs.Types = offs, conn, types
}

// locatePoly is locate for the cell lists of a POLYDATA file: it finds
// the section that holds cell or entry index. A cell's type is located
// at the start of its cell (its count, or its offset), since the type
// follows from the section and the count.
func (p *parser) locatePoly(a geom.CellArray, index int) (int, int64) {
	if a == geom.ArrayTypes {
		a = geom.ArrayOffsets
	}
	cells, entries := 0, 0
	for _, s := range p.polys {
		if s == nil {
			continue
		}
		nc, ne := len(s.offs)-1, len(s.conn)
		switch {
		case a == geom.ArrayOffsets && index < cells+nc:
			return p.locateIn(a, index-cells, s.offs, s.spans, s.classic)
		case a == geom.ArrayConn && index < entries+ne:
			return p.locateIn(a, index-entries, s.offs, s.spans, s.classic)
		}
		cells += nc
		entries += ne
	}
	return 0, -1
}
