package vtu

import (
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"

	"github.com/joinery-cae/joinery/geom"
)

// Read reads a VTK XML unstructured grid from r and returns its triangles
// and quads as a mesh; name is used in error messages. The whole input is
// read into memory first. Errors caused by the content of the input
// satisfy errors.Is(err, geom.ErrInput) and name the XML line or the byte
// offset of the problem.
func Read(r io.Reader, name string, opt geom.ReadOptions) (*geom.Mesh, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("vtu: reading %s: %w", name, err)
	}
	return readBytes(data, name, opt)
}

// ReadFile reads the mesh in the named file; see Read.
func ReadFile(path string, opt geom.ReadOptions) (*geom.Mesh, error) {
	data, err := geom.ReadFile(path, opt.Digest)
	if err != nil {
		return nil, fmt.Errorf("vtu: %w", err)
	}
	return readBytes(data, path, opt)
}

// readBytes parses a whole .vtu file held in data.
func readBytes(data []byte, name string, opt geom.ReadOptions) (*geom.Mesh, error) {
	p := &parser{file: name, data: data, rd: &byteReader{buf: data}, partArray: opt.PartArrayName()}
	p.dec = xml.NewDecoder(p.rd)
	if err := p.parse(); err != nil {
		return nil, err
	}
	cs, err := p.cellSet()
	if err != nil {
		return nil, err
	}
	if p.endErr != nil {
		return nil, p.endErr
	}
	return geom.MeshFromCells(cs, opt)
}

// byteReader feeds the XML decoder one byte at a time from the input, and
// lets the parser move past long array texts without the decoder seeing
// them.
type byteReader struct {
	buf []byte
	pos int
}

// ReadByte returns the next byte of the input.
func (r *byteReader) ReadByte() (byte, error) {
	if r.pos >= len(r.buf) {
		return 0, io.EOF
	}
	b := r.buf[r.pos]
	r.pos++
	return b, nil
}

// Read copies the next bytes of the input into b.
func (r *byteReader) Read(b []byte) (int, error) {
	if r.pos >= len(r.buf) {
		return 0, io.EOF
	}
	n := copy(b, r.buf[r.pos:])
	r.pos += n
	return n, nil
}

// Data-array formats.
const (
	formatASCII = iota
	formatBinary
	formatAppended
)

// arrayDesc describes one DataArray as declared in the XML; the values are
// decoded later, when all of the file's structure is known.
type arrayDesc struct {
	name   string
	typ    dtype
	ncomp  int
	format int
	offset int64 // appended: offset attribute
	line   int   // line of the DataArray start tag
	// Inline arrays: the element's text, a slice of the input where
	// possible, with the file offset and line where it starts.
	text     []byte
	textOff  int64
	textLine int
}

// piece is one Piece element and the arrays Joinery reads from it.
type piece struct {
	line   int
	np, nc int64
	points *arrayDesc
	conn   *arrayDesc
	offs   *arrayDesc
	types  *arrayDesc
	nodeID *arrayDesc
	elemID *arrayDesc
	part   *arrayDesc
	thick  *arrayDesc
	// A PolyData piece's cell sections (by geom.PolySection): their
	// cell counts (NumberOfVerts, ...), connectivity and offsets.
	polyN    [geom.NumPolySections]int64
	polyConn [geom.NumPolySections]*arrayDesc
	polyOffs [geom.NumPolySections]*arrayDesc
}

// polyNames are the element names of the PolyData cell sections and
// the Piece attributes that count their cells, by geom.PolySection
// (VTK file-format documentation, Kitware).
var (
	polyNames  = [geom.NumPolySections]string{"Verts", "Lines", "Polys", "Strips"}
	polyCounts = [geom.NumPolySections]string{"NumberOfVerts", "NumberOfLines", "NumberOfPolys", "NumberOfStrips"}
)

// parser walks the XML structure of a .vtu file.
type parser struct {
	file string
	data []byte
	// partArray is the name of the cell array that holds part ids.
	partArray string
	// cellArrays names the cell arrays of the first piece, for messages.
	cellArrays []string
	rd         *byteReader
	dec        *xml.Decoder
	// skipped counts the bytes the parser moved past behind the decoder's
	// back, and lineAdj the newlines among them, so that decoder positions
	// can be turned into file positions.
	skipped int64
	lineAdj int

	// poly is set in a PolyData file, whose pieces hold their cells in
	// Verts, Lines, Polys and Strips instead of Cells.
	poly       bool
	bigEndian  bool
	header64   bool
	compressor compressor
	fileLine   int

	pieces []*piece
	sizes  []pieceSize // per piece, once decoded, for locate
	// inflated counts the bytes compressed arrays have declared so far,
	// for the bound maxCompression.
	inflated int64

	hasAppended   bool
	appendedLine  int
	appendedB64   bool
	appendedStart int // index in data of the first byte after '_'
	appendedEnd   int // base64: end of the text; raw: start of </AppendedData>
	// endErr reports a document that does not end after its appended
	// data, once the arrays have been read (whose errors say more about
	// a truncated file).
	endErr error
}

// dataset returns the name of the file's dataset element.
func (p *parser) dataset() string {
	if p.poly {
		return "PolyData"
	}
	return "UnstructuredGrid"
}

// line returns the file line of the decoder's position.
func (p *parser) line() int {
	l, _ := p.dec.InputPos()
	return l + p.lineAdj
}

// errLine returns an input error at the given line.
func (p *parser) errLine(line int, format string, args ...any) error {
	return geom.LineError(p.file, line, format, args...)
}

// token returns the next XML token, turning syntax errors into located
// input errors.
func (p *parser) token() (xml.Token, error) {
	tok, err := p.dec.Token()
	if err != nil {
		var se *xml.SyntaxError
		if errors.As(err, &se) {
			return nil, p.errLine(se.Line+p.lineAdj, "xml: %s", se.Msg)
		}
		if err == io.EOF {
			return nil, p.errLine(p.line(), "unexpected end of file")
		}
		return nil, p.errLine(p.line(), "xml: %w", err)
	}
	return tok, nil
}

// parse reads the XML structure up to the end of the document or the start
// of the appended data.
func (p *parser) parse() error {
	// Find the root element.
	for {
		tok, err := p.dec.Token()
		if err == io.EOF {
			return geom.FileError(p.file, "no VTKFile element: not a VTK XML file")
		}
		if err != nil {
			var se *xml.SyntaxError
			if errors.As(err, &se) {
				return p.errLine(se.Line+p.lineAdj, "xml: %s", se.Msg)
			}
			return p.errLine(p.line(), "xml: %w", err)
		}
		if se, ok := tok.(xml.StartElement); ok {
			if se.Name.Local != "VTKFile" {
				return p.errLine(p.line(), "root element is <%s>, want <VTKFile>", se.Name.Local)
			}
			if err := p.fileAttrs(se); err != nil {
				return err
			}
			break
		}
	}
	sawGrid := false
	for {
		tok, err := p.token()
		if err != nil {
			return err
		}
		switch t := tok.(type) {
		case xml.EndElement: // </VTKFile>
			if !sawGrid {
				return p.errLine(p.line(), "no %s element", p.dataset())
			}
			return nil
		case xml.StartElement:
			switch t.Name.Local {
			case p.dataset():
				if sawGrid {
					return p.errLine(p.line(), "second %s element", p.dataset())
				}
				sawGrid = true
				if err := p.grid(); err != nil {
					return err
				}
			case "AppendedData":
				if !sawGrid {
					return p.errLine(p.line(), "AppendedData before the %s element", p.dataset())
				}
				return p.appended(t)
			default:
				if err := p.skip(); err != nil {
					return err
				}
			}
		}
	}
}

// skip skips the element just started.
func (p *parser) skip() error {
	for depth := 0; ; {
		tok, err := p.token()
		if err != nil {
			return err
		}
		switch tok.(type) {
		case xml.StartElement:
			depth++
		case xml.EndElement:
			if depth == 0 {
				return nil
			}
			depth--
		}
	}
}

// fileAttrs reads the attributes of the VTKFile element.
func (p *parser) fileAttrs(se xml.StartElement) error {
	p.fileLine = p.line()
	typ := ""
	for _, a := range se.Attr {
		switch a.Name.Local {
		case "type":
			typ = a.Value
		case "byte_order":
			switch a.Value {
			case "LittleEndian":
			case "BigEndian":
				p.bigEndian = true
			default:
				return p.errLine(p.fileLine, "byte_order %q: want LittleEndian or BigEndian", geom.Excerpt(a.Value))
			}
		case "header_type":
			switch a.Value {
			case "UInt32":
			case "UInt64":
				p.header64 = true
			default:
				return p.errLine(p.fileLine, "header_type %q: want UInt32 or UInt64", geom.Excerpt(a.Value))
			}
		case "compressor":
			switch a.Value {
			case "":
			case "vtkZLibDataCompressor":
				p.compressor = compressZlib
			case "vtkLZMADataCompressor":
				p.compressor = compressLZMA
			default:
				return p.errLine(p.fileLine, "compressor %q is not supported (Joinery reads vtkZLibDataCompressor and vtkLZMADataCompressor)", geom.Excerpt(a.Value))
			}
		}
	}
	switch typ {
	case "UnstructuredGrid":
	case "PolyData":
		p.poly = true
	default:
		return p.errLine(p.fileLine, "VTKFile type %q: want UnstructuredGrid or PolyData", geom.Excerpt(typ))
	}
	return nil
}

// grid reads the UnstructuredGrid or PolyData element.
func (p *parser) grid() error {
	for {
		tok, err := p.token()
		if err != nil {
			return err
		}
		switch t := tok.(type) {
		case xml.EndElement:
			if len(p.pieces) == 0 {
				return p.errLine(p.line(), "%s has no Piece", p.dataset())
			}
			return nil
		case xml.StartElement:
			if t.Name.Local != "Piece" {
				if err := p.skip(); err != nil {
					return err
				}
				continue
			}
			if err := p.piece(t); err != nil {
				return err
			}
		}
	}
}

// maxCount bounds point and cell counts so that sums and products of them
// cannot overflow; the real bound comes from the data present.
const maxCount = 1 << 40

// piece reads a Piece element.
func (p *parser) piece(se xml.StartElement) error {
	pc := &piece{line: p.line(), np: -1, nc: -1}
	if p.poly {
		// A PolyData piece counts its cells by section; a count left out
		// is 0 (VTK's XML polydata reader does the same, from memory).
		pc.nc = 0
	}
	for _, a := range se.Attr {
		var dst *int64
		switch name := a.Name.Local; {
		case name == "NumberOfPoints":
			dst = &pc.np
		case name == "NumberOfCells" && !p.poly:
			dst = &pc.nc
		case p.poly && slices.Contains(polyCounts[:], name):
			dst = &pc.polyN[slices.Index(polyCounts[:], name)]
		default:
			continue
		}
		v, err := strconv.ParseInt(a.Value, 10, 64)
		if err != nil || v < 0 || v > maxCount {
			return p.errLine(pc.line, "Piece %s=%q is not a valid count", a.Name.Local, geom.Excerpt(a.Value))
		}
		*dst = v
	}
	if pc.np < 0 || pc.nc < 0 {
		if p.poly {
			return p.errLine(pc.line, "Piece needs NumberOfPoints")
		}
		return p.errLine(pc.line, "Piece needs NumberOfPoints and NumberOfCells")
	}
	for _, n := range pc.polyN {
		pc.nc += n
	}
	p.pieces = append(p.pieces, pc)
	for {
		tok, err := p.token()
		if err != nil {
			return err
		}
		switch t := tok.(type) {
		case xml.EndElement:
			return nil
		case xml.StartElement:
			switch name := t.Name.Local; {
			case name == "Points" || name == "PointData" || name == "CellData" ||
				name == "Cells" && !p.poly || p.poly && slices.Contains(polyNames[:], name):
				// A Cells element in a PolyData piece is skipped, as VTK
				// skips it.
				if err := p.section(pc, name); err != nil {
					return err
				}
			default:
				if err := p.skip(); err != nil {
					return err
				}
			}
		}
	}
}

// section reads the DataArrays of a Points, Cells, PointData or CellData
// element.
func (p *parser) section(pc *piece, sec string) error {
	for {
		tok, err := p.token()
		if err != nil {
			return err
		}
		switch t := tok.(type) {
		case xml.EndElement:
			return nil
		case xml.StartElement:
			if t.Name.Local != "DataArray" {
				if err := p.skip(); err != nil {
					return err
				}
				continue
			}
			a, err := p.dataArray(t)
			if err != nil {
				return err
			}
			var slot **arrayDesc
			switch sec {
			case "Points":
				if a.name == "" {
					a.name = "Points"
				}
				slot = &pc.points
			case "Cells":
				switch a.name {
				case "connectivity":
					slot = &pc.conn
				case "offsets":
					slot = &pc.offs
				case "types":
					slot = &pc.types
				}
			case "Verts", "Lines", "Polys", "Strips":
				k := slices.Index(polyNames[:], sec)
				switch a.name {
				case "connectivity":
					slot = &pc.polyConn[k]
				case "offsets":
					slot = &pc.polyOffs[k]
				}
			case "PointData":
				if a.name == "node_id" {
					slot = &pc.nodeID
				}
			case "CellData":
				if len(p.pieces) == 1 && len(p.cellArrays) < 1000 {
					p.cellArrays = append(p.cellArrays, a.name)
				}
				switch a.name {
				case p.partArray:
					slot = &pc.part
				case "element_id":
					slot = &pc.elemID
				case "thickness":
					slot = &pc.thick
				}
			}
			if slot == nil {
				continue
			}
			if *slot != nil {
				return p.errLine(a.line, "second %s array %q in one piece (first at line %d)", sec, a.name, (*slot).line)
			}
			*slot = a
		}
	}
}

// dataArray reads a DataArray element: its attributes and, for inline
// formats, its text. Long texts are sliced from the input directly rather
// than copied through the decoder.
func (p *parser) dataArray(se xml.StartElement) (*arrayDesc, error) {
	a := &arrayDesc{line: p.line(), ncomp: 1, offset: -1, typ: -1}
	formatName := "ascii"
	for _, at := range se.Attr {
		switch at.Name.Local {
		case "Name":
			// Cut to an excerpt for messages: a long name is none of
			// the few Joinery reads either way.
			a.name = geom.Excerpt(at.Value)
		case "type":
			a.typ = parseType(at.Value)
			if a.typ < 0 {
				a.typ = typeUnknown
			}
		case "NumberOfComponents":
			v, err := strconv.Atoi(at.Value)
			if err != nil || v < 1 || v > 1<<20 {
				return nil, p.errLine(a.line, "DataArray %q: NumberOfComponents=%q is not a positive count", a.name, geom.Excerpt(at.Value))
			}
			a.ncomp = v
		case "format":
			formatName = at.Value
		case "offset":
			v, err := strconv.ParseInt(at.Value, 10, 64)
			if err != nil || v < 0 {
				return nil, p.errLine(a.line, "DataArray %q: offset=%q is not a valid offset", a.name, geom.Excerpt(at.Value))
			}
			a.offset = v
		}
	}
	switch formatName {
	case "ascii":
		a.format = formatASCII
	case "binary":
		a.format = formatBinary
	case "appended":
		a.format = formatAppended
		if a.offset < 0 {
			return nil, p.errLine(a.line, "appended DataArray %q has no offset attribute", a.name)
		}
	default:
		return nil, p.errLine(a.line, "DataArray %q: unknown format %q", a.name, geom.Excerpt(formatName))
	}
	if a.typ < 0 {
		return nil, p.errLine(a.line, "DataArray %q has no type attribute", a.name)
	}
	selfClosing := p.rd.pos >= 2 && p.data[p.rd.pos-2] == '/'
	var (
		runs  [][]byte
		nRuns int // runs holding more than white space
	)
	addRun := func(b []byte, off int64, line int) {
		if len(runs) == 0 {
			a.textOff, a.textLine = off, line
		}
		runs = append(runs, b)
		if !isSpace(b) {
			nRuns++
		}
	}
	for depth, first := 0, true; ; first = false {
		if depth == 0 && !(first && selfClosing) {
			if run, off, line, ok := p.fastText(); ok {
				addRun(run, off, line)
			}
		}
		tok, err := p.token()
		if err != nil {
			return nil, err
		}
		switch t := tok.(type) {
		case xml.StartElement:
			depth++
		case xml.EndElement:
			if depth == 0 {
				a.text = joinRuns(runs, nRuns)
				return a, nil
			}
			depth--
		case xml.CharData:
			if depth == 0 && a.format != formatAppended {
				addRun(bytes.Clone(t), p.dec.InputOffset()+p.skipped-int64(len(t)), p.line())
			}
		}
	}
}

// fastText moves the reader past the text that follows the decoder's
// position up to the next '<', when the decoder holds no look-ahead byte
// and the text has no entity references, and returns that text with its
// file offset and line.
func (p *parser) fastText() ([]byte, int64, int, bool) {
	pos := p.rd.pos
	if int64(pos) != p.dec.InputOffset()+p.skipped {
		return nil, 0, 0, false
	}
	i := bytes.IndexByte(p.data[pos:], '<')
	if i <= 0 {
		return nil, 0, 0, false
	}
	run := p.data[pos : pos+i]
	if bytes.IndexByte(run, '&') >= 0 {
		return nil, 0, 0, false
	}
	line := p.line()
	p.rd.pos += i
	p.skipped += int64(i)
	p.lineAdj += bytes.Count(run, []byte{'\n'})
	return run, int64(pos), line, true
}

// joinRuns returns the text of an element made of several runs: the one run
// holding more than white space when there is only one, else all of them
// joined.
func joinRuns(runs [][]byte, nonSpace int) []byte {
	switch {
	case nonSpace == 0:
		return nil
	case nonSpace == 1:
		for _, r := range runs {
			if !isSpace(r) {
				return r
			}
		}
	}
	return bytes.Join(runs, nil)
}

// isSpace reports whether b holds only XML white space.
func isSpace(b []byte) bool {
	for _, c := range b {
		if c != ' ' && c != '\t' && c != '\n' && c != '\r' {
			return false
		}
	}
	return true
}

// appended locates the data of the AppendedData element just started:
// after white space, a '_' marks its first byte. Parsing stops there, as
// raw data is not XML.
func (p *parser) appended(se xml.StartElement) error {
	p.hasAppended = true
	p.appendedLine = p.line()
	enc := "raw"
	for _, a := range se.Attr {
		if a.Name.Local == "encoding" {
			enc = a.Value
		}
	}
	switch enc {
	case "raw":
	case "base64":
		p.appendedB64 = true
	default:
		return p.errLine(p.appendedLine, "AppendedData encoding %q: want raw or base64", geom.Excerpt(enc))
	}
	pos := p.rd.pos
	if int64(pos) != p.dec.InputOffset()+p.skipped || (pos >= 2 && p.data[pos-2] == '/') {
		return p.errLine(p.appendedLine, "AppendedData element has no data")
	}
	i := bytes.IndexByte(p.data[pos:], '_')
	if i < 0 || !isSpace(p.data[pos:pos+i]) {
		return p.errLine(p.appendedLine, "AppendedData does not start with '_'")
	}
	p.appendedStart = pos + i + 1
	p.appendedEnd = len(p.data)
	if p.appendedB64 {
		if j := bytes.IndexByte(p.data[p.appendedStart:], '<'); j >= 0 {
			p.appendedEnd = p.appendedStart + j
		}
	}
	// The document must end with the closing tags after the data; raw
	// data ends where they start.
	const ws = " \t\r\n"
	tail, ok := bytes.CutSuffix(bytes.TrimRight(p.data[p.appendedStart:], ws), []byte("</VTKFile>"))
	if ok {
		tail, ok = bytes.CutSuffix(bytes.TrimRight(tail, ws), []byte("</AppendedData>"))
	}
	switch {
	case !ok:
		p.endErr = p.errLine(1+bytes.Count(p.data, []byte{'\n'}), "the file does not end with </AppendedData> and </VTKFile>: is it truncated?")
	case p.appendedB64 && p.appendedStart+len(tail) != p.appendedEnd:
		p.endErr = p.errLine(p.appendedLine, "AppendedData: base64 text followed by something else than </AppendedData> and </VTKFile>")
	case !p.appendedB64:
		p.appendedEnd = p.appendedStart + len(tail)
	}
	return nil
}
