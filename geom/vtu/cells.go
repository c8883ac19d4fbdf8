package vtu

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// pieceData holds the decoded arrays of one piece.
type pieceData struct {
	points  []r3.Vec
	conn    []int64
	offsets []int64 // nc+1 values from 0
	types   []uint8
	nodeID  []int64
	elemID  []int64
	part    []int64
	thick   []float64
	// The cells and connectivity entries of each PolyData section.
	polyCells, polyConn [geom.NumPolySections]int
}

// cellSet decodes the arrays of every piece and joins the pieces.
func (p *parser) cellSet() (*geom.CellSet, error) {
	datas := make([]*pieceData, len(p.pieces))
	for i, pc := range p.pieces {
		d, err := p.decodePiece(pc, i)
		if err != nil {
			return nil, err
		}
		datas[i] = d
	}
	cs := &geom.CellSet{File: p.file, CellArrays: p.cellArrays}
	p.sizes = make([]pieceSize, len(datas))
	for i, d := range datas {
		p.sizes[i] = pieceSize{points: len(d.points), cells: len(d.types), conn: len(d.conn), polyCells: d.polyCells, polyConn: d.polyConn}
	}
	cs.Locate = p.locate
	if len(datas) == 1 {
		d := datas[0]
		cs.Points, cs.Conn, cs.Offsets, cs.Types = d.points, d.conn, d.offsets, d.types
		cs.NodeIDs, cs.ElemIDs, cs.Part, cs.Thickness = d.nodeID, d.elemID, d.part, d.thick
		return cs, nil
	}
	// Several pieces: every optional array must be in all of them or none.
	for i, d := range datas[1:] {
		pc := p.pieces[i+1]
		for _, c := range []struct {
			name       string
			has, first bool
		}{
			{"node_id", d.nodeID != nil, datas[0].nodeID != nil},
			{"element_id", d.elemID != nil, datas[0].elemID != nil},
			{p.partArray, d.part != nil, datas[0].part != nil},
			{"thickness", d.thick != nil, datas[0].thick != nil},
		} {
			if c.has != c.first {
				return nil, p.errLine(pc.line, "piece %d %s array %q and the first piece %s", i+1, hasWord(c.has), c.name, hasWord(c.first))
			}
		}
	}
	var np, nc, nconn int
	for _, d := range datas {
		np += len(d.points)
		nc += len(d.types)
		nconn += len(d.conn)
	}
	if np > math.MaxInt32 || nconn > math.MaxInt32 {
		return nil, geom.FileError(p.file, "%d points and %d connectivity entries are more than a mesh can hold", np, nconn)
	}
	cs.Points = geom.MakeLargeCap[r3.Vec](0, np)
	cs.Conn = geom.MakeLargeCap[int64](0, nconn)
	cs.Offsets = geom.MakeLargeCap[int64](1, nc+1)
	cs.Types = geom.MakeLargeCap[uint8](0, nc)
	first := datas[0]
	if first.nodeID != nil {
		cs.NodeIDs = geom.MakeLargeCap[int64](0, np)
	}
	if first.elemID != nil {
		cs.ElemIDs = geom.MakeLargeCap[int64](0, nc)
	}
	if first.part != nil {
		cs.Part = geom.MakeLargeCap[int64](0, nc)
	}
	if first.thick != nil {
		cs.Thickness = geom.MakeLargeCap[float64](0, nc)
	}
	for _, d := range datas {
		pbase, cbase := int64(len(cs.Points)), int64(len(cs.Conn))
		cs.Points = append(cs.Points, d.points...)
		for _, c := range d.conn {
			cs.Conn = append(cs.Conn, c+pbase)
		}
		for _, o := range d.offsets[1:] {
			cs.Offsets = append(cs.Offsets, o+cbase)
		}
		cs.Types = append(cs.Types, d.types...)
		cs.NodeIDs = append(cs.NodeIDs, d.nodeID...)
		cs.ElemIDs = append(cs.ElemIDs, d.elemID...)
		cs.Part = append(cs.Part, d.part...)
		cs.Thickness = append(cs.Thickness, d.thick...)
	}
	return cs, nil
}

// pieceSize is how many points, cells and connectivity entries a piece
// adds to the CellSet.
type pieceSize struct {
	points, cells, conn int
	// The cells and connectivity entries of each PolyData section.
	polyCells, polyConn [geom.NumPolySections]int
}

// locate tells the line where value index of array a of the CellSet is
// written, when its piece holds that array in ascii format
// (geom.CellSet.Locate); binary and appended arrays give 0 and -1, so
// that errors name the record. It is only for error messages.
func (p *parser) locate(a geom.CellArray, index int) (int, int64) {
	if index < 0 {
		return 0, -1
	}
	for i, sz := range p.sizes {
		n := sz.cells
		switch a {
		case geom.ArrayPoints, geom.ArrayNodeIDs:
			n = sz.points
		case geom.ArrayConn:
			n = sz.conn
		}
		if index >= n {
			index -= n
			continue
		}
		pc := p.pieces[i]
		var desc *arrayDesc
		switch a {
		case geom.ArrayPoints:
			desc, index = pc.points, 3*index
		case geom.ArrayConn:
			desc = pc.conn
		case geom.ArrayOffsets:
			desc = pc.offs // its value c is the end of cell c
		case geom.ArrayTypes:
			desc = pc.types
		case geom.ArrayNodeIDs:
			desc = pc.nodeID
		case geom.ArrayElemIDs:
			desc = pc.elemID
		case geom.ArrayPart:
			desc = pc.part
		case geom.ArrayThickness:
			desc = pc.thick
		}
		if p.poly && (a == geom.ArrayConn || a == geom.ArrayOffsets || a == geom.ArrayTypes) {
			// The section holding the entry or the cell; a cell's type
			// follows from its section and count, so it is located at
			// the cell's offset.
			desc = nil
			for k := range geom.NumPolySections {
				n := sz.polyCells[k]
				if a == geom.ArrayConn {
					n = sz.polyConn[k]
				}
				if index < n {
					desc = pc.polyOffs[k]
					if a == geom.ArrayConn {
						desc = pc.polyConn[k]
					}
					break
				}
				index -= n
			}
		}
		if desc == nil || desc.format != formatASCII {
			return 0, -1
		}
		return p.valueLine(desc, index), -1
	}
	return 0, -1
}

// valueLine returns the line of value k of array a: the line of the value
// in an ascii array, of the DataArray element otherwise. It walks the
// values before it, so it is only for error messages.
func (p *parser) valueLine(a *arrayDesc, k int) int {
	if a.format != formatASCII {
		return a.line
	}
	s := asciiScanner{text: a.text}
	for ; k >= 0 && s.next() != nil; k-- {
	}
	return textLine(a, s.tok)
}

// textLine returns the line of byte i of the text of an ascii array.
func textLine(a *arrayDesc, i int) int {
	return a.textLine + bytes.Count(a.text[:min(i, len(a.text))], []byte{'\n'})
}

func hasWord(has bool) string {
	if has {
		return "has"
	}
	return "has no"
}

// decodePiece decodes and checks the arrays of one piece.
func (p *parser) decodePiece(pc *piece, idx int) (*pieceData, error) {
	where := ""
	if len(p.pieces) > 1 {
		where = fmt.Sprintf("piece %d: ", idx)
	}
	d := &pieceData{}
	np, nc := pc.np, pc.nc
	if np > math.MaxInt32 {
		return nil, p.errLine(pc.line, "%sNumberOfPoints=%d is more than a mesh can hold", where, np)
	}
	// Points.
	if pc.points == nil {
		if np > 0 {
			return nil, p.errLine(pc.line, "%sPiece has %d points but no Points array", where, np)
		}
	} else {
		a := pc.points
		if a.ncomp != 3 {
			return nil, p.errLine(a.line, "%sPoints array has %d components, want 3", where, a.ncomp)
		}
		var err error
		if d.points, err = p.pointValues(a, np, where); err != nil {
			return nil, err
		}
		for i, v := range d.points {
			if !finite(v.X) || !finite(v.Y) || !finite(v.Z) {
				return nil, p.errLine(p.valueLine(a, 3*i), "%spoint %d has a non-finite coordinate (%g, %g, %g)", where, i, v.X, v.Y, v.Z)
			}
		}
	}
	// Cells.
	if p.poly {
		if err := p.decodePolys(pc, d, where); err != nil {
			return nil, err
		}
	} else {
		var err error
		if d.offsets, d.conn, err = p.decodeCells(pc.offs, pc.conn, nc, np, "Cells", where); err != nil {
			return nil, err
		}
		if nc > 0 && pc.types == nil {
			return nil, p.errLine(pc.line, "%sPiece has %d cells but no %q array in Cells", where, nc, "types")
		}
		if nc > 0 {
			if d.types, err = p.typeValues(pc.types, nc, where); err != nil {
				return nil, err
			}
		}
	}
	// Data arrays.
	var err error
	if pc.nodeID != nil {
		if d.nodeID, err = p.intValues(pc.nodeID, np, 0, fmt.Sprintf("NumberOfPoints=%d", np), where); err != nil {
			return nil, err
		}
	}
	if pc.elemID != nil {
		if d.elemID, err = p.intValues(pc.elemID, nc, 0, p.cellsWhy(nc), where); err != nil {
			return nil, err
		}
	}
	if pc.part != nil {
		if d.part, err = p.intValues(pc.part, nc, 0, p.cellsWhy(nc), where); err != nil {
			return nil, err
		}
	}
	if pc.thick != nil {
		if d.thick, err = p.floatValues(pc.thick, nc, p.cellsWhy(nc), where); err != nil {
			return nil, err
		}
	}
	return d, nil
}

// decodeCells decodes and checks the offsets and connectivity of nc
// cells of a piece of np points, held in section sec (Cells, or a
// PolyData section). The offsets come first, as they give the
// connectivity length; they are returned with a 0 before cell 0.
func (p *parser) decodeCells(offs, conn *arrayDesc, nc, np int64, sec, where string) ([]int64, []int64, error) {
	if nc == 0 {
		return []int64{0}, nil, nil
	}
	label := ""
	if sec != "Cells" {
		label = sec + " "
	}
	for _, c := range []struct {
		a    *arrayDesc
		name string
	}{{offs, "offsets"}, {conn, "connectivity"}} {
		if c.a == nil {
			return nil, nil, p.errLine(p.pieces[len(p.pieces)-1].line, "%sPiece has %d cells but no %q array in %s", where, nc, c.name, sec)
		}
	}
	offsets, err := p.intValues(offs, nc, 1, fmt.Sprintf("%s=%d", cellCountName(sec), nc), where)
	if err != nil {
		return nil, nil, err
	}
	prev := int64(0)
	for c, o := range offsets[1:] {
		if o < prev {
			return nil, nil, p.errLine(p.valueLine(offs, c), "%s%soffsets: cell %d ends at %d, before its start %d", where, label, c, o, prev)
		}
		prev = o
	}
	last := offsets[nc]
	if last > math.MaxInt32 {
		return nil, nil, p.errLine(offs.line, "%s%soffsets: %d connectivity entries are more than a mesh can hold", where, label, last)
	}
	ids, err := p.intValues(conn, last, 0, fmt.Sprintf("the last offset, %d", last), where)
	if err != nil {
		return nil, nil, err
	}
	for i, v := range ids {
		if v < 0 || v >= np {
			return nil, nil, p.errLine(p.valueLine(conn, i), "%s%sconnectivity value %d (cell %d) refers to point %d; the piece has %d points", where, label, i, cellOf(offsets, i), v, np)
		}
	}
	return offsets, ids, nil
}

// cellCountName names the Piece attribute that counts the cells of
// section sec.
func cellCountName(sec string) string {
	if k := slices.Index(polyNames[:], sec); k >= 0 {
		return polyCounts[k]
	}
	return "NumberOfCells"
}

// decodePolys decodes the cell sections of a PolyData piece into d as one
// cell list in VTK's cell order (geom.PolySection: verts, lines, polys,
// strips), with the cell types VTK gives them (geom.VTKPolyCellType).
func (p *parser) decodePolys(pc *piece, d *pieceData, where string) error {
	if pc.nc > math.MaxInt32 {
		return p.errLine(pc.line, "%s%d cells are more than a mesh can hold", where, pc.nc)
	}
	// The lists grow as the sections are decoded, each checked against
	// the data it has, rather than trusting the counts up front.
	d.offsets = []int64{0}
	for k := range geom.NumPolySections {
		offs, conn, err := p.decodeCells(pc.polyOffs[k], pc.polyConn[k], pc.polyN[k], pc.np, polyNames[k], where)
		if err != nil {
			return err
		}
		base := int64(len(d.conn))
		if base+int64(len(conn)) > math.MaxInt32 {
			return p.errLine(pc.line, "%s%d connectivity entries are more than a mesh can hold", where, base+int64(len(conn)))
		}
		if d.conn == nil {
			d.conn = conn
		} else {
			d.conn = append(d.conn, conn...)
		}
		for c := 1; c < len(offs); c++ {
			d.offsets = append(d.offsets, base+offs[c])
			d.types = append(d.types, geom.VTKPolyCellType(k, int(offs[c]-offs[c-1])))
		}
		d.polyCells[k], d.polyConn[k] = len(offs)-1, len(conn)
	}
	return nil
}

// cellOf returns the cell whose connectivity holds entry i.
func cellOf(offsets []int64, i int) int {
	lo, hi := 0, len(offsets)-1
	for lo+1 < hi {
		m := (lo + hi) / 2
		if offsets[m] <= int64(i) {
			lo = m
		} else {
			hi = m
		}
	}
	return lo
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// count checks the number of values n of an array of ncomp components
// against the tuples wanted.
func (p *parser) count(a *arrayDesc, n int64, want int64, why, where string) error {
	if n != want*int64(a.ncomp) {
		if a.ncomp == 1 {
			return p.errLine(a.line, "%sarray %q has %d values, want %d (%s)", where, a.name, n, want, why)
		}
		return p.errLine(a.line, "%sarray %q has %d values, want %d tuples of %d (%s)", where, a.name, n, want, a.ncomp, why)
	}
	return nil
}

// binaryBytes returns the payload of a binary array of want tuples,
// checked to hold a whole number of values, and their number. The size
// the array's header declares is checked against want (why says where
// want comes from) before the data is read or inflated.
func (p *parser) binaryBytes(a *arrayDesc, want int64, why, where string) ([]byte, int, error) {
	size := int64(a.typ.size())
	b, err := p.payload(a, func(declared int64) error {
		if declared%size != 0 {
			return p.errLine(a.line, "%sarray %q: %d bytes is not a whole number of %d-byte %s values", where, a.name, declared, size, a.typ)
		}
		return p.count(a, declared/size, want, why, where)
	})
	if err != nil {
		return nil, 0, err
	}
	return b, len(b) / int(size), nil
}

// checkASCII checks that an ascii text can hold want values at all before
// memory is set aside for them: each takes a character and a separator.
func (p *parser) checkASCII(a *arrayDesc, want int64, why, where string) error {
	if want*int64(a.ncomp) > int64(len(a.text)+1)/2 {
		return p.count(a, int64(countTokens(a.text)), want, why, where)
	}
	return nil
}

// asciiError locates a bad token of an ascii array by its line.
func (p *parser) asciiError(a *arrayDesc, s *asciiScanner, i int, err error, where string) error {
	return p.errLine(textLine(a, s.tok), "%sarray %q: value %d: %v", where, a.name, i, err)
}

// valueErr turns an error from binary decoding into a located input error.
func (p *parser) valueErr(a *arrayDesc, err error, where string) error {
	var ve *valueError
	if errors.As(err, &ve) {
		return p.errLine(a.line, "%sarray %q: %v", where, a.name, ve)
	}
	return err
}

func (p *parser) checkType(a *arrayDesc, where string) error {
	if a.typ == typeUnknown {
		return p.errLine(a.line, "%sarray %q has a type Joinery cannot read as numbers", where, a.name)
	}
	return nil
}

// typeValues decodes the cell types array of nc cells.
func (p *parser) typeValues(a *arrayDesc, nc int64, where string) ([]uint8, error) {
	why := p.cellsWhy(nc)
	if a.format != formatASCII && (a.typ == typeUInt8 || a.typ == typeInt8) && a.ncomp == 1 {
		b, _, err := p.binaryBytes(a, nc, why, where)
		if err != nil {
			return nil, err
		}
		if a.typ == typeInt8 {
			for i, v := range b {
				if v > 127 {
					return nil, p.errLine(a.line, "%stypes: cell %d has type %d, not a VTK cell type", where, i, int8(v))
				}
			}
		}
		return bytes.Clone(b), nil
	}
	tv, err := p.intValues(a, nc, 0, why, where)
	if err != nil {
		return nil, err
	}
	types := make([]uint8, nc)
	for i, v := range tv {
		if v < 0 || v > 255 {
			return nil, p.errLine(p.valueLine(a, i), "%stypes: cell %d has type %d, not a VTK cell type", where, i, v)
		}
		types[i] = uint8(v)
	}
	return types, nil
}

// intValues decodes an integer array of want tuples into a new slice after
// lead zeros.
func (p *parser) intValues(a *arrayDesc, want int64, lead int, why, where string) ([]int64, error) {
	if err := p.checkType(a, where); err != nil {
		return nil, err
	}
	if a.ncomp != 1 {
		return nil, p.errLine(a.line, "%sarray %q has %d components, want 1", where, a.name, a.ncomp)
	}
	if a.format == formatASCII {
		if err := p.checkASCII(a, want, why, where); err != nil {
			return nil, err
		}
		all := make([]int64, int64(lead)+want)
		dst := all[lead:]
		s := asciiScanner{text: a.text}
		n := 0
		for tok := s.next(); tok != nil; tok = s.next() {
			if n < len(dst) {
				v, _, err := asciiValue(tok, a.typ, true)
				if err != nil {
					return nil, p.asciiError(a, &s, n, err, where)
				}
				dst[n] = v
			}
			n++
		}
		if err := p.count(a, int64(n), want, why, where); err != nil {
			return nil, err
		}
		return all, nil
	}
	b, n, err := p.binaryBytes(a, want, why, where)
	if err != nil {
		return nil, err
	}
	all := make([]int64, lead+n)
	if err := binInts(b, a.typ, p.bigEndian, all[lead:]); err != nil {
		return nil, p.valueErr(a, err, where)
	}
	return all, nil
}

// floatValues decodes a floating-point array of want tuples.
func (p *parser) floatValues(a *arrayDesc, want int64, why, where string) ([]float64, error) {
	if err := p.checkType(a, where); err != nil {
		return nil, err
	}
	if a.ncomp != 1 {
		return nil, p.errLine(a.line, "%sarray %q has %d components, want 1", where, a.name, a.ncomp)
	}
	if a.format == formatASCII {
		if err := p.checkASCII(a, want, why, where); err != nil {
			return nil, err
		}
		dst := make([]float64, want)
		if err := p.asciiFloats(a, dst, want, why, where); err != nil {
			return nil, err
		}
		return dst, nil
	}
	b, n, err := p.binaryBytes(a, want, why, where)
	if err != nil {
		return nil, err
	}
	dst := make([]float64, n)
	if err := binFloats(b, a.typ, p.bigEndian, dst); err != nil {
		return nil, p.valueErr(a, err, where)
	}
	return dst, nil
}

// asciiFloats parses the text of a into dst, which must end up full.
func (p *parser) asciiFloats(a *arrayDesc, dst []float64, want int64, why, where string) error {
	s := asciiScanner{text: a.text}
	n := 0
	for tok := s.next(); tok != nil; tok = s.next() {
		if n < len(dst) {
			_, f, err := asciiValue(tok, a.typ, false)
			if err != nil {
				return p.asciiError(a, &s, n, err, where)
			}
			dst[n] = f
		}
		n++
	}
	return p.count(a, int64(n), want, why, where)
}

// pointValues decodes the Points array of np points.
func (p *parser) pointValues(a *arrayDesc, np int64, where string) ([]r3.Vec, error) {
	if err := p.checkType(a, where); err != nil {
		return nil, err
	}
	why := fmt.Sprintf("NumberOfPoints=%d", np)
	if a.format == formatASCII {
		if err := p.checkASCII(a, np, why, where); err != nil {
			return nil, err
		}
		flat := make([]float64, 3*np)
		if err := p.asciiFloats(a, flat, np, why, where); err != nil {
			return nil, err
		}
		pts := make([]r3.Vec, np)
		for i := range pts {
			pts[i] = r3.Vec{X: flat[3*i], Y: flat[3*i+1], Z: flat[3*i+2]}
		}
		return pts, nil
	}
	b, _, err := p.binaryBytes(a, np, why, where)
	if err != nil {
		return nil, err
	}
	pts := make([]r3.Vec, np)
	if err := binPoints(b, a.typ, p.bigEndian, pts); err != nil {
		return nil, p.valueErr(a, err, where)
	}
	return pts, nil
}

// cellsWhy says where a piece's count of nc cells comes from, for
// messages about the length of a cell array.
func (p *parser) cellsWhy(nc int64) string {
	if p.poly {
		return fmt.Sprintf("%d cells in Verts, Lines, Polys and Strips", nc)
	}
	return fmt.Sprintf("NumberOfCells=%d", nc)
}
