package vtk

import (
	"bytes"
	"cmp"
	"encoding/binary"
	"fmt"
	"io"
	"io/fs"
	"math"
	"runtime/debug"
	"sort"
	"strconv"
	"strings"
	"sync"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// maxCount bounds point and cell counts: meshes index nodes with int32.
const maxCount = math.MaxInt32

// maxComponents bounds the number of components of an array, maxTuples
// its number of tuples; their product times 8 fits in int64.
const (
	maxComponents = 1 << 16
	maxTuples     = 1 << 40
)

// Read reads a VTK legacy unstructured grid from r; name is used in error
// messages. It reads r to its end.
func Read(r io.Reader, name string, opt geom.ReadOptions) (*geom.Mesh, error) {
	var buf bytes.Buffer
	switch r := r.(type) {
	case interface{ Len() int }: // bytes.Reader, bytes.Buffer, strings.Reader
		buf.Grow(r.Len() + bytes.MinRead)
	case interface{ Stat() (fs.FileInfo, error) }: // os.File
		if fi, err := r.Stat(); err == nil && fi.Mode().IsRegular() && fi.Size() < math.MaxInt32 {
			buf.Grow(int(fi.Size()) + bytes.MinRead)
		}
	}
	if _, err := buf.ReadFrom(r); err != nil {
		return nil, fmt.Errorf("vtk: reading %s: %w", name, err)
	}
	return Parse(buf.Bytes(), name, opt)
}

// ReadFile reads the mesh in the named VTK legacy file. It goes
// through the file once (geom.OpenData): the file's bytes are not held
// whole beside the arrays decoded from them.
func ReadFile(path string, opt geom.ReadOptions) (m *geom.Mesh, err error) {
	d, err := geom.OpenData(path, opt.Digest)
	if err != nil {
		return nil, fmt.Errorf("vtk: %w", err)
	}
	defer d.Close()
	old := debug.SetPanicOnFault(true)
	defer func() {
		debug.SetPanicOnFault(old)
		if r := recover(); r != nil {
			m, err = nil, fmt.Errorf("vtk: %w", d.Fault(r))
		}
	}()
	if m, err = parse(d.Data, path, opt, d.Done); err != nil {
		return nil, err
	}
	if err := d.Finish(); err != nil {
		return nil, fmt.Errorf("vtk: %w", err)
	}
	return m, nil
}

// Parse reads a mesh from the whole content of a VTK legacy file; name is
// used in error messages. The mesh does not keep data.
func Parse(data []byte, name string, opt geom.ReadOptions) (*geom.Mesh, error) {
	return parse(data, name, opt, nil)
}

// parse parses data; done, when not nil, is told how far the parser has
// gone (geom.InputData.Done).
func parse(data []byte, name string, opt geom.ReadOptions, done func(int)) (*geom.Mesh, error) {
	p := parser{name: name, data: data, npoints: -1, ncells: -1, partArray: opt.PartArrayName(), done: done}
	p.cs.File = name
	p.cs.Locate = p.locate
	if err := p.parse(); err != nil {
		return nil, fmt.Errorf("vtk: %w", err)
	}
	p.advance(len(data))
	m, err := geom.MeshFromCells(&p.cs, opt)
	if err != nil {
		return nil, fmt.Errorf("vtk: %w", err)
	}
	return m, nil
}

// attrs says which data the attribute arrays being read belong to.
type attrs uint8

const (
	attrDataset attrs = iota // dataset-level FIELD data, before POINT_DATA and CELL_DATA
	attrPoint
	attrCell
)

// parser reads one file held in memory.
type parser struct {
	name    string
	data    []byte
	pos     int
	binary  bool
	fields  [][]byte // fields of the last keyword line
	npoints int      // -1 until POINTS
	ncells  int      // -1 until CELLS or CELL_TYPES
	cells   bool     // CELLS seen
	types   bool     // CELL_TYPES seen
	sect    string   // the cell section being read, for messages: CELLS, POLYGONS, ...
	// poly is set in a POLYDATA file, whose cells come in the sections
	// of polys (by geom.PolySection) instead of CELLS and CELL_TYPES;
	// sectCells is the cell count of the section being read, cellData
	// is set once CELL_DATA has been read.
	poly      bool
	polys     [geom.NumPolySections]*polySection
	sectCells int
	cellData  bool
	cs        geom.CellSet
	// partArray is the name of the cell array that holds part ids.
	partArray string
	// spans tells where the values of each array of cs start, for
	// locate; classic is set when CELLS has the classic layout, in which
	// span ArrayConn covers both the counts and the point indices.
	spans   [geom.ArrayThickness + 1]span
	classic bool
	// done, when not nil, is told that the parser is done with
	// data[:n] (advance).
	done func(n int)
}

// chunk is how many values of a binary array are decoded between two
// calls of advance.
const chunk = 1 << 18

// advance tells p.done that the parser is done with data[:n].
func (p *parser) advance(n int) {
	if p.done != nil {
		p.done(n)
	}
}

// decodeChunks decodes n values of a binary array chunk by chunk, two
// chunks at a time on two goroutines, and advances past each pair;
// decode(lo, hi) decodes values lo..hi-1 and returns the index of the
// first bad one, or -1, and end(hi) is the offset in the data just past
// value hi-1. It returns the first bad index of the array, or -1: the
// same whatever the number of goroutines. A fault of the second
// goroutine (a mapped file that shrank) is raised again on the caller's.
func (p *parser) decodeChunks(n int, decode func(lo, hi int) int, end func(hi int) int) int {
	for lo := 0; lo < n; lo += 2 * chunk {
		mid, hi := min(lo+chunk, n), min(lo+2*chunk, n)
		var (
			wg    sync.WaitGroup
			bad2  = -1
			fault any
		)
		if mid < hi {
			wg.Go(func() {
				debug.SetPanicOnFault(true)
				defer func() { fault = recover() }()
				bad2 = decode(mid, hi)
			})
		}
		bad := decode(lo, mid)
		wg.Wait()
		if fault != nil {
			panic(fault)
		}
		if bad < 0 {
			bad = bad2
		}
		if bad >= 0 {
			return bad
		}
		p.advance(end(hi))
	}
	return -1
}

// span is where the values of an array start in the data, and their type.
type span struct {
	start int
	t     dtype
	set   bool
}

// locate tells where value index of array a of p.cs is written: its line
// in ASCII files, its byte offset in binary ones (geom.CellSet.Locate). It
// walks the values before it, so it is only for error messages.
func (p *parser) locate(a geom.CellArray, index int) (int, int64) {
	if int(a) >= len(p.spans) || index < 0 {
		return 0, -1
	}
	if p.poly && (a == geom.ArrayConn || a == geom.ArrayOffsets || a == geom.ArrayTypes) {
		return p.locatePoly(a, index)
	}
	return p.locateIn(a, index, p.cs.Offsets32, p.spans, p.classic)
}

// locateIn is locate for value index of array a of a cell list with
// offsets offs, its values written where spans say, in the classic
// CELLS layout when classic is set.
func (p *parser) locateIn(a geom.CellArray, index int, offs []int32, spans [geom.ArrayThickness + 1]span, classic bool) (int, int64) {
	k := index
	switch a {
	case geom.ArrayPoints:
		k = 3 * index
	case geom.ArrayConn, geom.ArrayOffsets:
		if !classic {
			if a == geom.ArrayOffsets {
				k = index + 1 // OFFSETS starts with the 0 before cell 0
			}
			break
		}
		// Classic CELLS: per cell its point count, then its points.
		if len(offs) < 2 {
			return 0, -1
		}
		if a == geom.ArrayOffsets {
			if index >= len(offs) {
				return 0, -1
			}
			k = int(offs[index]) + index
			a = geom.ArrayConn
			break
		}
		// The cell holding entry index: the first c with offs[c+1] > index.
		c := sort.Search(len(offs)-1, func(c int) bool { return int(offs[c+1]) > index })
		k = index + c + 1
	}
	sp := spans[a]
	if !sp.set {
		return 0, -1
	}
	off := p.valueOffset(sp.start, k, sp.t)
	if p.binary {
		return 0, int64(off)
	}
	return p.lineAt(off), -1
}

// lineAt returns the 1-based line of byte offset off.
func (p *parser) lineAt(off int) int {
	off = min(max(off, 0), len(p.data))
	return 1 + bytes.Count(p.data[:off], []byte{'\n'})
}

// errAt returns an input error at byte offset off: a line number in ASCII
// files, the offset in BINARY ones.
func (p *parser) errAt(off int, format string, args ...any) error {
	if p.binary {
		return geom.OffsetError(p.name, int64(off), format, args...)
	}
	return geom.LineError(p.name, p.lineAt(off), format, args...)
}

// rawLine returns the next line (without its end-of-line bytes) and its
// offset, and moves past it; ok is false at the end of the data.
func (p *parser) rawLine() (line []byte, off int, ok bool) {
	if p.pos >= len(p.data) {
		return nil, p.pos, false
	}
	off = p.pos
	rest := p.data[off:]
	n := bytes.IndexByte(rest, '\n')
	if n < 0 {
		n = len(rest)
		p.pos = len(p.data)
	} else {
		p.pos = off + n + 1
	}
	return bytes.TrimRight(rest[:n], "\r"), off, true
}

// nextLine skips blank space and reads the next line into p.fields,
// returning the line's offset; ok is false at the end of the data.
func (p *parser) nextLine() (off int, ok bool) {
	p.pos = skipSpace(p.data, p.pos)
	line, off, ok := p.rawLine()
	if !ok {
		return off, false
	}
	p.fields = p.fields[:0]
	for i := 0; ; {
		i = skipSpace(line, i)
		if i >= len(line) {
			break
		}
		j := tokenEnd(line, i)
		p.fields = append(p.fields, line[i:j])
		i = j
	}
	return off, true
}

// peekKeyword returns the first token of the next line, lower-cased,
// without moving.
func (p *parser) peekKeyword() string {
	i := skipSpace(p.data, p.pos)
	j := i
	for j < len(p.data) && !isSpace(p.data[j]) && j-i < 32 {
		j++
	}
	return string(lower(p.data[i:j]))
}

// keyword returns field i of the last line lower-cased, or "".
func (p *parser) keyword(i int) string {
	if i >= len(p.fields) {
		return ""
	}
	return string(lower(p.fields[i]))
}

// count parses field i of the last line (at offset off) as a count in
// 0..limit.
func (p *parser) count(off, i int, what string, limit int64) (int, error) {
	if i >= len(p.fields) {
		return 0, p.errAt(off, "%s: missing %s", strings.ToUpper(p.keyword(0)), what)
	}
	v, err := strconv.ParseInt(string(p.fields[i]), 10, 64)
	if err != nil || v < 0 || v > limit {
		return 0, p.errAt(off, "%s: %s %q is not a count from 0 to %d", strings.ToUpper(p.keyword(0)), what, geom.Excerpt(p.fields[i]), limit)
	}
	return int(v), nil
}

// dataType parses field i of the last line as a data type name; what
// names the line in errors.
func (p *parser) dataType(off, i int, what string) (dtype, error) {
	if i >= len(p.fields) {
		return dtype{}, p.errAt(off, "%s: missing data type", what)
	}
	t, ok := lookupType(p.fields[i])
	if !ok {
		return dtype{}, p.errAt(off, "%s: unsupported data type %q", what, geom.Excerpt(p.fields[i]))
	}
	return t, nil
}

// parse reads the whole file into p.cs.
func (p *parser) parse() error {
	if err := p.header(); err != nil {
		return err
	}
	where, nvals := attrDataset, 0
	for {
		off, ok := p.nextLine()
		if !ok {
			break
		}
		var err error
		switch kw := p.keyword(0); kw {
		case "points":
			err = p.points(off)
		case "cells", "cell_types":
			if p.poly {
				err = p.errAt(off, "%s in a POLYDATA file: its cells come in VERTICES, LINES, POLYGONS and TRIANGLE_STRIPS", strings.ToUpper(kw))
			} else if kw == "cells" {
				err = p.readCells(off)
			} else {
				err = p.cellTypes(off)
			}
		case "vertices", "lines", "polygons", "triangle_strips":
			err = p.polySection(off, kw)
		case "point_data", "cell_data":
			where, nvals, err = p.attrStart(off, kw)
		case "field":
			err = p.field(off, where, nvals)
		case "scalars":
			err = p.scalars(off, where, nvals)
		case "color_scalars", "lookup_table", "vectors", "normals", "tensors", "tensors6",
			"texture_coordinates", "global_ids", "pedigree_ids":
			err = p.skipAttribute(off, kw, where, nvals)
		case "metadata":
			p.skipMetadata()
		case "dataset":
			err = p.errAt(off, "a second DATASET line")
		default:
			err = p.errAt(off, "unknown keyword %q", geom.Excerpt(p.fields[0]))
		}
		if err != nil {
			return err
		}
		p.advance(p.pos)
	}
	return p.finish()
}

// header reads the version line, the title, the ASCII/BINARY line and the
// DATASET line.
func (p *parser) header() error {
	line, off, ok := p.rawLine()
	const magic = "# vtk datafile version"
	if !ok || len(line) < len(magic) || !bytes.EqualFold(line[:len(magic)], []byte(magic)) {
		return p.errAt(off, "not a VTK legacy file: the first line must start with %q", "# vtk DataFile Version")
	}
	ver := bytes.TrimSpace(line[len(magic):])
	major, minor, ok := parseVersion(ver)
	if !ok || major < 2 || major > 5 || major == 5 && minor > 1 {
		return p.errAt(off, "unsupported file version %q (want 2.0 to 5.1)", geom.Excerpt(ver))
	}
	if _, off, ok = p.rawLine(); !ok {
		return p.errAt(off, "file ends after the first line; want a title line")
	}
	line, off, ok = p.rawLine()
	switch f := bytes.TrimSpace(line); {
	case !ok:
		return p.errAt(off, "file ends after the title; want ASCII or BINARY")
	case bytes.EqualFold(f, []byte("ascii")):
	case bytes.EqualFold(f, []byte("binary")):
		p.binary = true
	default:
		return p.errAt(off, "want ASCII or BINARY, found %q", geom.Excerpt(f))
	}
	off, ok = p.nextLine()
	if !ok {
		return p.errAt(off, "file ends before the DATASET line")
	}
	if p.keyword(0) != "dataset" {
		return p.errAt(off, "want a DATASET line, found %q", geom.Excerpt(p.fields[0]))
	}
	switch ds := p.keyword(1); ds {
	case "unstructured_grid":
	case "polydata":
		p.poly = true
	default:
		return p.errAt(off, "unsupported dataset type %q (want UNSTRUCTURED_GRID or POLYDATA)", geom.Excerpt([]byte(ds)))
	}
	return nil
}

// parseVersion parses "major.minor".
func parseVersion(v []byte) (major, minor int, ok bool) {
	dot := bytes.IndexByte(v, '.')
	if dot < 0 {
		return 0, 0, false
	}
	a, err1 := strconv.Atoi(string(v[:dot]))
	b, err2 := strconv.Atoi(string(v[dot+1:]))
	return a, b, err1 == nil && err2 == nil && b >= 0
}

// need checks that n values of type t can still be in the file, before
// anything is allocated for them; off is the offset of the keyword line.
func (p *parser) need(off int, what string, n int64, t dtype) error {
	rest := int64(len(p.data) - p.pos)
	if n < 0 || n > 8*rest+8 { // also keeps n*size below overflow
		return p.errAt(off, "%s: %d values announced, but only %d bytes left in the file", what, n, rest)
	}
	if p.binary {
		if t.kind == kBit {
			if (n+7)/8 > rest {
				return p.errAt(off, "%s: %d values of type %s need %d bytes, only %d left", what, n, t.name, (n+7)/8, rest)
			}
			return nil
		}
		if n*int64(t.size) > rest {
			return p.errAt(off, "%s: %d values of type %s need %d bytes, only %d left", what, n, t.name, n*int64(t.size), rest)
		}
		return nil
	}
	if n > 0 && 2*n-1 > rest {
		return p.errAt(off, "%s: %d values announced, but only %d bytes left in the file", what, n, rest)
	}
	return nil
}

// asciiFail returns the error for a bad or missing ASCII value: i is
// where scanning stopped, k how many values were read of n.
func (p *parser) asciiFail(i, k, n int, what string) error {
	if i >= len(p.data) {
		return p.errAt(i, "%s: file ends after %d of %d values", what, k, n)
	}
	tok := p.data[i:tokenEnd(p.data, i)]
	return p.errAt(i, "%s: value %d of %d: %q is not a valid number here", what, k+1, n, geom.Excerpt(tok))
}

// readInts reads n integer values of type t; off is the keyword line.
func (p *parser) readInts(off int, n int, t dtype, what string) ([]int64, error) {
	if err := p.need(off, what, int64(n), t); err != nil {
		return nil, err
	}
	dst := geom.MakeLarge[int64](n)
	start := p.pos
	if p.binary {
		bad := p.decodeChunks(n, func(lo, hi int) int {
			if bad := decodeInts(dst[lo:hi], p.data[start+t.binBytes(lo):], t); bad >= 0 {
				return lo + bad
			}
			return -1
		}, func(hi int) int { return start + t.binBytes(hi) })
		if bad >= 0 {
			return nil, p.errAt(start+bad*t.size, "%s: value %d is not an integer in range", what, bad+1)
		}
		p.pos += t.binBytes(n)
		return dst, nil
	}
	var (
		i, k int
		ok   bool
	)
	if t.kind == kFloat {
		i, k, ok = scanWholeFloats(p.data, start, dst, t.size == 4)
	} else {
		i, k, ok = scanInts(p.data, start, dst)
	}
	if !ok {
		return nil, p.asciiFail(i, k, n, what)
	}
	p.pos = i
	return dst, nil
}

// readFloats reads n real values of type t; off is the keyword line.
func (p *parser) readFloats(off int, n int, t dtype, what string) ([]float64, error) {
	if err := p.need(off, what, int64(n), t); err != nil {
		return nil, err
	}
	dst := geom.MakeLarge[float64](n)
	if p.binary {
		start := p.pos
		p.decodeChunks(n, func(lo, hi int) int {
			decodeFloats(dst[lo:hi], p.data[start+t.binBytes(lo):], t)
			return -1
		}, func(hi int) int { return start + t.binBytes(hi) })
		p.pos += t.binBytes(n)
		return dst, nil
	}
	i, k, ok := scanFloats(p.data, p.pos, dst, t.kind == kFloat && t.size == 4)
	if !ok {
		return nil, p.asciiFail(i, k, n, what)
	}
	p.pos = i
	return dst, nil
}

// skipValues skips n values of type t; off is the keyword line.
func (p *parser) skipValues(off int, n int64, t dtype, what string) error {
	if err := p.need(off, what, n, t); err != nil {
		return err
	}
	if p.binary {
		p.pos += int(t.binBytes(int(n)))
		return nil
	}
	i, k, ok := skipNumbers(p.data, p.pos, int(n))
	if !ok {
		return p.asciiFail(i, k, int(n), what)
	}
	p.pos = i
	return nil
}

// points reads "POINTS n type" and its coordinates.
func (p *parser) points(off int) error {
	if p.npoints >= 0 {
		return p.errAt(off, "a second POINTS section")
	}
	n, err := p.count(off, 1, "point count", maxCount)
	if err != nil {
		return err
	}
	t, err := p.dataType(off, 2, "POINTS")
	if err != nil {
		return err
	}
	if err := p.need(off, "POINTS", 3*int64(n), t); err != nil {
		return err
	}
	pts := geom.MakeLarge[r3.Vec](n)
	start := p.pos
	p.spans[geom.ArrayPoints] = span{start, t, true}
	if p.binary {
		bad := p.decodeChunks(n, func(lo, hi int) int {
			if bad := decodePoints(pts[lo:hi], p.data[start+t.binBytes(3*lo):], t); bad >= 0 {
				return lo + bad
			}
			return -1
		}, func(hi int) int { return start + t.binBytes(3*hi) })
		if bad >= 0 {
			return p.errAt(start+t.binBytes(3*bad), "POINTS: point %d has a non-finite coordinate %v", bad, pts[bad])
		}
		p.pos += t.binBytes(3 * n)
	} else {
		i, k, ok := scanPoints(p.data, start, pts, t.kind == kFloat && t.size == 4)
		if !ok {
			if i < len(p.data) {
				if v, _, ok := scanFloat(p.data, i); ok {
					if finite(v) { // so beyond the float32 range
						return p.errAt(i, "POINTS: point %d has a coordinate %g beyond the range of type float", k/3, v)
					}
					return p.errAt(i, "POINTS: point %d has a non-finite coordinate %g", k/3, v)
				}
			}
			return p.asciiFail(i, k, 3*n, "POINTS")
		}
		p.pos = i
	}
	p.npoints = n
	p.cs.Points = pts
	return nil
}

// setCells records the cell count given by CELLS or CELL_TYPES.
func (p *parser) setCells(off, n int) error {
	if p.poly {
		p.sectCells = n
		return nil
	}
	if p.ncells >= 0 && p.ncells != n {
		return p.errAt(off, "%s: %d cells, but %d before", strings.ToUpper(p.keyword(0)), n, p.ncells)
	}
	p.ncells = n
	return nil
}

// readCells reads a CELLS section in either layout: the 5.x layout when
// OFFSETS follows the CELLS line, the classic one otherwise.
func (p *parser) readCells(off int) error {
	if p.cells {
		return p.errAt(off, "a second CELLS section")
	}
	p.cells = true
	p.sect = "CELLS"
	return p.cellList(off)
}

// cellList reads the cell list of a CELLS section, or of a POLYDATA
// section (p.sect names it), into p.cs.Offsets32 and p.cs.Conn32.
func (p *parser) cellList(off int) error {
	if p.peekKeyword() == "offsets" {
		return p.cells5(off)
	}
	n, err := p.count(off, 1, "cell count", maxCount)
	if err != nil {
		return err
	}
	size, err := p.count(off, 2, "size", math.MaxInt64/8)
	if err != nil {
		return err
	}
	if size < n {
		return p.errAt(off, "%s: size %d is smaller than the cell count %d", p.sect, size, n)
	}
	if err := p.setCells(off, n); err != nil {
		return err
	}
	if err := p.need(off, p.sect, int64(size), dtypes[6]); err != nil {
		return err
	}
	if size-n > math.MaxInt32 {
		return p.errAt(off, "%s: %d connectivity entries are more than a mesh can hold (%d)", p.sect, size-n, math.MaxInt32)
	}
	p.cs.Offsets32 = geom.MakeLarge[int32](n + 1)
	p.cs.Conn32 = geom.MakeLarge[int32](size - n)
	p.spans[geom.ArrayConn] = span{p.pos, dtypes[6], true}
	p.classic = true
	if p.binary {
		return p.cellsBinary(n, size)
	}
	return p.cellsASCII(n, size)
}

// cellsBinary decodes classic CELLS data: per cell a 4-byte count and the
// 4-byte point indices.
func (p *parser) cellsBinary(n, size int) error {
	src := p.data[p.pos : p.pos+4*size]
	offs, conn := p.cs.Offsets32, p.cs.Conn32
	np := int64(p.npoints)
	// When every cell has as many points as the first (a mesh of quads
	// only), the cells sit at fixed places and decode two chunks at a
	// time. A cell that breaks the pattern, or a bad point, sends the
	// section to the decoding in order below, which gives the same
	// arrays or the same error.
	if n > 0 {
		k0 := int(int32(binary.BigEndian.Uint32(src)))
		if rec := 1 + k0; k0 > 0 && n*rec == size {
			bad := p.decodeChunks(n, func(lo, hi int) int {
				for c := lo; c < hi; c++ {
					r := src[4*rec*c : 4*rec*(c+1)]
					if int(int32(binary.BigEndian.Uint32(r))) != k0 {
						return c
					}
					dst := conn[k0*c : k0*(c+1)]
					for e := range dst {
						v := int32(binary.BigEndian.Uint32(r[4*(e+1):]))
						if np >= 0 && uint64(v) >= uint64(np) {
							return c
						}
						dst[e] = v
					}
					offs[c+1] = int32(k0 * (c + 1))
				}
				return -1
			}, func(hi int) int { return p.pos + 4*rec*hi })
			if bad < 0 {
				p.pos += 4 * size
				return nil
			}
		}
	}
	r, w := 0, 0 // read index in src (values), write index in conn
	for c := 0; c < n; c++ {
		if c%chunk == 0 {
			p.advance(p.pos + 4*r)
		}
		k := int(int32(binary.BigEndian.Uint32(src[4*r:])))
		if k < 0 || k > len(conn)-w {
			return p.errAt(p.pos+4*r, "%s: cell %d has %d points, more than the size %d leaves", p.sect, c, k, size)
		}
		r++
		idx := src[4*r : 4*(r+k)]
		dst := conn[w : w+k]
		for e := range dst {
			v := int32(binary.BigEndian.Uint32(idx[4*e:]))
			if np >= 0 && uint64(v) >= uint64(np) {
				return p.errAt(p.pos+4*(r+e), "%s: cell %d references point %d; the file has %d points", p.sect, c, v, np)
			}
			dst[e] = v
		}
		r += k
		w += k
		offs[c+1] = int32(w)
	}
	if w != len(conn) {
		return p.errAt(p.pos+4*r, "%s: the cells hold %d values, the size says %d", p.sect, r, size)
	}
	p.pos += 4 * size
	return nil
}

// cellsASCII parses classic CELLS data.
func (p *parser) cellsASCII(n, size int) error {
	b := p.data
	offs, conn := p.cs.Offsets32, p.cs.Conn32
	np := int64(p.npoints)
	i, w, read := p.pos, 0, 0
	for c := 0; c < n; c++ {
		i = skipSpace(b, i)
		k, j, ok := scanInt(b, i)
		if !ok {
			return p.asciiFail(i, read, size, p.sect)
		}
		if k < 0 || k > int64(len(conn)-w) {
			return p.errAt(i, "%s: cell %d has %d points, more than the size %d leaves", p.sect, c, k, size)
		}
		i = j
		read++
		for e := w + int(k); w < e; w++ {
			i = skipSpace(b, i)
			v, j, ok := scanInt(b, i)
			if !ok {
				return p.asciiFail(i, read, size, p.sect)
			}
			if np >= 0 && uint64(v) >= uint64(np) {
				return p.errAt(i, "%s: cell %d references point %d; the file has %d points", p.sect, c, v, np)
			}
			conn[w] = int32(v)
			i = j
			read++
		}
		offs[c+1] = int32(w)
	}
	if w != len(conn) {
		return p.errAt(i, "%s: the cells hold %d values, the size says %d", p.sect, read, size)
	}
	p.pos = i
	return nil
}

// valueOffset returns the offset of value k of an array whose data starts
// at start.
func (p *parser) valueOffset(start, k int, t dtype) int {
	if p.binary {
		return start + t.binBytes(k)
	}
	i := start
	for ; k > 0; k-- {
		i = tokenEnd(p.data, skipSpace(p.data, i))
	}
	return skipSpace(p.data, i)
}

// expect reads the next line, skipping METADATA blocks, and checks that
// it starts with keyword kw.
func (p *parser) expect(kw string) (int, error) {
	p.skipMetadataBlocks()
	off, ok := p.nextLine()
	if !ok {
		return off, p.errAt(off, "file ends; want %s", kw)
	}
	if p.keyword(0) != kw {
		return off, p.errAt(off, "want %s, found %q", kw, geom.Excerpt(p.fields[0]))
	}
	return off, nil
}

// cells5 reads the 5.x layout: "CELLS nOffsets nConn", then the OFFSETS
// and CONNECTIVITY arrays.
func (p *parser) cells5(off int) error {
	nOff, err := p.count(off, 1, "offset count", maxCount+1)
	if err != nil {
		return err
	}
	nConn, err := p.count(off, 2, "connectivity size", maxCount)
	if err != nil {
		return err
	}
	if err := p.setCells(off, max(nOff-1, 0)); err != nil {
		return err
	}
	offOff, err := p.expect("offsets")
	if err != nil {
		return err
	}
	t, err := p.dataType(offOff, 1, "OFFSETS")
	if err != nil {
		return err
	}
	start := p.pos
	p.spans[geom.ArrayOffsets] = span{start, t, true}
	offs, err := p.readInts(offOff, nOff, t, "OFFSETS")
	if err != nil {
		return err
	}
	for i, o := range offs {
		prev := int64(0)
		if i > 0 {
			prev = offs[i-1]
		}
		if o < prev || o > int64(nConn) || i == 0 && o != 0 {
			return p.errAt(p.valueOffset(start, i, t), "OFFSETS: offset %d is %d; offsets must rise from 0 to %d", i, o, nConn)
		}
	}
	if nOff > 0 && offs[nOff-1] != int64(nConn) {
		return p.errAt(p.valueOffset(start, nOff-1, t), "OFFSETS: the last offset is %d, the connectivity size %d", offs[nOff-1], nConn)
	}
	if nOff == 0 {
		if nConn != 0 {
			return p.errAt(off, "%s: no offsets for %d connectivity entries", p.sect, nConn)
		}
		offs = []int64{0}
	}
	connOff, err := p.expect("connectivity")
	if err != nil {
		return err
	}
	if t, err = p.dataType(connOff, 1, "CONNECTIVITY"); err != nil {
		return err
	}
	start = p.pos
	p.spans[geom.ArrayConn] = span{start, t, true}
	conn, err := p.readInts(connOff, nConn, t, "CONNECTIVITY")
	if err != nil {
		return err
	}
	if np := int64(p.npoints); np >= 0 {
		for i, v := range conn {
			if uint64(v) >= uint64(np) {
				return p.errAt(p.valueOffset(start, i, t), "CONNECTIVITY: entry %d references point %d; the file has %d points", i, v, np)
			}
		}
	}
	p.cs.Offsets32, p.cs.Conn32 = narrow(offs), narrow(conn)
	return nil
}

// cellTypes reads "CELL_TYPES n" and the cell type numbers (4-byte ints
// in binary files).
func (p *parser) cellTypes(off int) error {
	if p.types {
		return p.errAt(off, "a second CELL_TYPES section")
	}
	p.types = true
	n, err := p.count(off, 1, "cell count", maxCount)
	if err != nil {
		return err
	}
	if err := p.setCells(off, n); err != nil {
		return err
	}
	t := dtypes[6] // int
	if err := p.need(off, "CELL_TYPES", int64(n), t); err != nil {
		return err
	}
	types := geom.MakeLarge[uint8](n)
	b, i := p.data, p.pos
	p.spans[geom.ArrayTypes] = span{i, t, true}
	for c := range types {
		if p.binary && c%chunk == 0 {
			p.advance(i)
		}
		var (
			v  int64
			at = i
		)
		if p.binary {
			v = int64(int32(binary.BigEndian.Uint32(b[i:])))
			i += 4
		} else {
			at = skipSpace(b, i)
			var ok bool
			if v, i, ok = scanInt(b, at); !ok {
				return p.asciiFail(at, c, n, "CELL_TYPES")
			}
		}
		if v < 0 || v > 255 {
			return p.errAt(at, "CELL_TYPES: cell %d has type %d; VTK cell types are 0 to 255", c, v)
		}
		types[c] = uint8(v)
	}
	p.pos = i
	p.cs.Types = types
	return nil
}

// attrStart reads "POINT_DATA n" or "CELL_DATA n".
func (p *parser) attrStart(off int, kw string) (attrs, int, error) {
	n, err := p.count(off, 1, "count", maxCount)
	if err != nil {
		return 0, 0, err
	}
	if kw == "point_data" {
		if n != max(p.npoints, 0) {
			return 0, 0, p.errAt(off, "POINT_DATA: %d values for %d points", n, max(p.npoints, 0))
		}
		return attrPoint, n, nil
	}
	if n != max(p.ncells, 0) {
		return 0, 0, p.errAt(off, "CELL_DATA: %d values for %d cells", n, max(p.ncells, 0))
	}
	p.cellData = true
	return attrCell, n, nil
}

// array reads or skips one attribute array of ntuples tuples of ncomp
// values of type t; off is its header line.
func (p *parser) array(off int, name []byte, ncomp, ntuples int, t dtype, where attrs, nvals int) error {
	var (
		ints  *[]int64
		reals *[]float64
		arr   geom.CellArray
	)
	if where == attrCell && len(p.cs.CellArrays) < 1000 {
		p.cs.CellArrays = append(p.cs.CellArrays, string(name))
	}
	switch {
	case where == attrPoint && string(name) == "node_id":
		ints, arr = &p.cs.NodeIDs, geom.ArrayNodeIDs
	case where == attrCell && string(name) == cmp.Or(p.partArray, geom.DefaultPartArray):
		ints, arr = &p.cs.Part, geom.ArrayPart
	case where == attrCell && string(name) == "element_id":
		ints, arr = &p.cs.ElemIDs, geom.ArrayElemIDs
	case where == attrCell && string(name) == "thickness":
		reals, arr = &p.cs.Thickness, geom.ArrayThickness
	default:
		what := fmt.Sprintf("array %q", geom.Excerpt(name))
		return p.skipValues(off, int64(ncomp)*int64(ntuples), t, what)
	}
	what := fmt.Sprintf("array %s", name)
	switch {
	case ncomp != 1:
		return p.errAt(off, "%s has %d components, want 1", what, ncomp)
	case ntuples != nvals:
		return p.errAt(off, "%s has %d values for %d items", what, ntuples, nvals)
	case ints != nil && *ints != nil || reals != nil && *reals != nil:
		return p.errAt(off, "a second %s", what)
	}
	p.spans[arr] = span{p.pos, t, true}
	var err error
	if ints != nil {
		*ints, err = p.readInts(off, ntuples, t, what)
	} else {
		*reals, err = p.readFloats(off, ntuples, t, what)
	}
	return err
}

// field reads "FIELD name nArrays" and its arrays, each with a line
// "name ncomp ntuples type" (or "NULL_ARRAY").
func (p *parser) field(off int, where attrs, nvals int) error {
	n, err := p.count(off, 2, "array count", maxCount)
	if err != nil {
		return err
	}
	for a := 0; a < n; a++ {
		p.skipMetadataBlocks()
		aoff, ok := p.nextLine()
		if !ok {
			return p.errAt(aoff, "FIELD: file ends after %d of %d arrays", a, n)
		}
		if p.keyword(0) == "null_array" {
			continue
		}
		if len(p.fields) < 4 {
			return p.errAt(aoff, "FIELD: want an array line \"name components tuples type\", found %d fields", len(p.fields))
		}
		name := p.fields[0]
		ncomp, err := p.count(aoff, 1, "component count", maxComponents)
		if err != nil {
			return err
		}
		ntuples, err := p.count(aoff, 2, "tuple count", maxTuples)
		if err != nil {
			return err
		}
		t, err := p.dataType(aoff, 3, fmt.Sprintf("FIELD array %s", geom.Excerpt(name)))
		if err != nil {
			return err
		}
		if err := p.array(aoff, name, ncomp, ntuples, t, where, nvals); err != nil {
			return err
		}
	}
	return nil
}

// scalars reads "SCALARS name type [ncomp]", the LOOKUP_TABLE line when
// there is one, and the values.
func (p *parser) scalars(off int, where attrs, nvals int) error {
	if where == attrDataset {
		return p.errAt(off, "SCALARS before POINT_DATA or CELL_DATA")
	}
	if len(p.fields) < 3 {
		return p.errAt(off, "SCALARS: want \"SCALARS name type [components]\"")
	}
	name := p.fields[1]
	t, err := p.dataType(off, 2, fmt.Sprintf("SCALARS %s", geom.Excerpt(name)))
	if err != nil {
		return err
	}
	ncomp := 1
	if len(p.fields) > 3 {
		if ncomp, err = p.count(off, 3, "component count", maxComponents); err != nil {
			return err
		}
	}
	if p.peekKeyword() == "lookup_table" {
		p.nextLine()
	}
	return p.array(off, name, ncomp, nvals, t, where, nvals)
}

// skipAttribute skips an attribute Joinery does not use.
func (p *parser) skipAttribute(off int, kw string, where attrs, nvals int) error {
	if where == attrDataset {
		return p.errAt(off, "%s before POINT_DATA or CELL_DATA", p.fields[0])
	}
	perItem, typeField := 0, 2
	switch kw {
	case "vectors", "normals":
		perItem = 3
	case "tensors":
		perItem = 9
	case "tensors6":
		perItem = 6
	case "global_ids", "pedigree_ids":
		perItem = 1
	case "texture_coordinates":
		dim, err := p.count(off, 2, "dimension", 3)
		if err != nil {
			return err
		}
		perItem, typeField = dim, 3
	case "color_scalars":
		nv, err := p.count(off, 2, "value count", maxComponents)
		if err != nil {
			return err
		}
		return p.skipValues(off, int64(nv)*int64(nvals), dtypes[1], "COLOR_SCALARS")
	case "lookup_table":
		size, err := p.count(off, 2, "size", maxCount)
		if err != nil {
			return err
		}
		return p.skipValues(off, 4*int64(size), dtypes[1], "LOOKUP_TABLE")
	}
	t, err := p.dataType(off, typeField, strings.ToUpper(kw))
	if err != nil {
		return err
	}
	return p.skipValues(off, int64(perItem)*int64(nvals), t, strings.ToUpper(kw))
}

// skipMetadata skips the lines after a METADATA line up to the first
// blank line.
func (p *parser) skipMetadata() {
	for {
		line, _, ok := p.rawLine()
		if !ok || len(bytes.TrimSpace(line)) == 0 {
			return
		}
	}
}

// skipMetadataBlocks skips METADATA blocks that come next.
func (p *parser) skipMetadataBlocks() {
	for p.peekKeyword() == "metadata" {
		p.nextLine()
		p.skipMetadata()
	}
}

// finish checks that the sections found make a whole unstructured grid
// or polydata set.
func (p *parser) finish() error {
	end := len(p.data)
	if p.poly {
		p.joinPolys()
	}
	switch {
	case p.poly:
	case p.cells && !p.types:
		return p.errAt(end, "CELLS without CELL_TYPES")
	case p.types && !p.cells:
		return p.errAt(end, "CELL_TYPES without CELLS")
	case !p.cells:
		p.cs.Offsets32, p.cs.Conn32 = []int32{0}, []int32{}
	}
	if p.npoints < 0 && p.ncells > 0 {
		return p.errAt(end, "cells without POINTS")
	}
	return nil
}

// narrow copies values checked to fit in 32 bits (offsets rise to a
// connectivity size, and point indices stay below a point count, both
// at most math.MaxInt32) into int32.
func narrow(v []int64) []int32 {
	out := geom.MakeLarge[int32](len(v))
	for i, x := range v {
		out[i] = int32(x)
	}
	return out
}
