package native

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"runtime"
	"slices"
	"sync"
	"unicode/utf8"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/internal/decimal"
	"gonum.org/v1/gonum/spatial/r3"
)

// Header is the first record of every file in the format version this
// package reads.
const Header = "joinery-mesh 1"

// Version is the format version this package reads and Write
// writes.
const Version = 1

const (
	// minChunk is the smallest piece of a file worth a goroutine of its own.
	minChunk = 1 << 20
	// maxChunks caps the number of pieces a file is parsed in.
	maxChunks = 8
)

// Read reads a mesh in the native format from r; name is used in error
// messages. The options have no effect on this format, whose shell records
// always name their part; Read takes them to match the other readers.
//
// Errors caused by the content of the input name the file and line and
// satisfy errors.Is(err, geom.ErrInput).
func Read(r io.Reader, name string, opt geom.ReadOptions) (*geom.Mesh, error) {
	var buf bytes.Buffer
	if l, ok := r.(interface{ Len() int }); ok {
		buf.Grow(l.Len() + bytes.MinRead)
	}
	if _, err := buf.ReadFrom(r); err != nil {
		return nil, fmt.Errorf("native: reading %s: %w", name, err)
	}
	return parse(buf.Bytes(), name, opt)
}

// ReadFile reads the mesh in the named file. See Read.
func ReadFile(path string, opt geom.ReadOptions) (*geom.Mesh, error) {
	data, err := geom.ReadFile(path, opt.Digest)
	if err != nil {
		return nil, fmt.Errorf("native: %w", err)
	}
	return parse(data, path, opt)
}

// chunk is a piece of the file that ends at a line boundary, parsed by
// one goroutine straight into its own ranges of the mesh's slices.
type chunk struct {
	data      []byte
	line0     int  // lines before the chunk
	last      bool // the chunk ends the file
	header    bool // the chunk's first record must be the header
	lines     int  // from the counting pass
	records   int  // non-blank, non-comment lines
	nodes     int  // lines whose first character is 'n'
	elems     int  // lines whose first character is 's'
	nodeBase  int  // index of the chunk's first node
	elemBase  int  // index of the chunk's first element
	nconn     int  // connectivity entries found
	connBase  int  // index of the chunk's first entry in Mesh.Conn
	parts     []partRecord
	thickness []float64 // per element of the chunk, nil when no t= seen
	// conn holds the node ids of the chunk's shells once a second-order
	// shell overflowed the 4 per shell the reader's connIDs has room
	// for; nil otherwise.
	conn      []int64
	err       error
	missing   int   // first element (mesh index) with an unknown node, -1 if none
	missingID int64 // the unknown node id of that element
}

// partRecord is a part record and the line it came from.
type partRecord struct {
	part geom.Part
	line int
}

// reader holds the state shared by the chunks of one file.
type reader struct {
	name    string
	data    []byte
	scale   float64 // geom.ReadOptions.Scale
	m       *geom.Mesh
	partIDs []int64 // part id per element, as written
	connIDs []int64 // node ids as written; chunk c uses [4*c.elemBase, 4*c.elemBase+c.nconn) unless c.conn is set
}

// parse reads data in as many pieces as there are processors, up to
// maxChunks, none smaller than minChunk.
func parse(data []byte, name string, opt geom.ReadOptions) (*geom.Mesh, error) {
	// Every shell record names its part: only opt.Scale applies.
	n := min(runtime.GOMAXPROCS(0), maxChunks, len(data)/minChunk)
	return parseScaled(data, name, max(n, 1), opt.Scale)
}

// parseSplit reads data in n pieces. The result does not depend on n.
func parseSplit(data []byte, name string, n int) (*geom.Mesh, error) {
	return parseScaled(data, name, n, 1)
}

// parseScaled reads data in n pieces; scale is ReadOptions.Scale.
func parseScaled(data []byte, name string, n int, scale float64) (*geom.Mesh, error) {
	r := &reader{name: name, data: data, scale: scale}
	chunks := split(data, n)
	parallel(len(chunks), func(i int) { chunks[i].count() })

	var nodes, elems int
	headerDone := false
	for i := range chunks {
		c := &chunks[i]
		if i > 0 {
			c.line0 = chunks[i-1].line0 + chunks[i-1].lines
		}
		c.nodeBase, c.elemBase = nodes, elems
		nodes += c.nodes
		elems += c.elems
		if !headerDone && c.records > 0 {
			c.header, headerDone = true, true
		}
	}
	if !headerDone {
		return nil, geom.FileError(name, "no records: a mesh file starts with the line %q", Header)
	}
	if nodes > math.MaxInt32 || 4*int64(elems) > math.MaxInt32 {
		return nil, geom.FileError(name, "%d nodes and %d elements are more than one mesh holds", nodes, elems)
	}
	r.m = &geom.Mesh{
		NodeIDs:   geom.MakeLarge[int64](nodes),
		Coords:    geom.MakeLarge[r3.Vec](nodes),
		ElemIDs:   geom.MakeLarge[int64](elems),
		ElemPart:  geom.MakeLarge[int32](elems),
		ElemStart: geom.MakeLarge[int32](elems + 1),
		Sources:   []geom.Source{{File: name}},
	}
	r.partIDs = geom.MakeLarge[int64](elems)
	r.connIDs = geom.MakeLarge[int64](4 * elems)
	parallel(len(chunks), func(i int) { r.parseChunk(&chunks[i]) })
	for i := range chunks {
		if chunks[i].err != nil {
			return nil, chunks[i].err
		}
	}
	if err := r.resolveParts(chunks); err != nil {
		return nil, err
	}
	lim := geom.CoordinateLimit(r.scale)
	for i, p := range r.m.Coords {
		if geom.InRange(p.X, p.Y, p.Z, lim) {
			continue
		}
		if err := geom.CheckCoordinates(p.X, p.Y, p.Z, r.scale); err != nil { // nil at the limit's rounding
			return nil, r.lineError(r.recordLine('n', i), "node %d: %v", r.m.NodeIDs[i], err)
		}
	}
	r.mergeThickness(chunks)
	m := r.m
	if err := m.Index(); err != nil {
		return nil, r.duplicateError(err)
	}
	nconn := 0
	for i := range chunks {
		chunks[i].connBase = nconn
		nconn += chunks[i].nconn
	}
	m.Conn = geom.MakeLarge[int32](nconn)
	parallel(len(chunks), func(i int) { r.resolveConn(&chunks[i]) })
	for i := range chunks {
		if e := chunks[i].missing; e >= 0 {
			return nil, r.lineError(r.recordLine('s', e), "shell %d: node %d is not defined in the file", m.ElemIDs[e], chunks[i].missingID)
		}
	}
	r.partIDs, r.connIDs = nil, nil
	return m, nil
}

// split cuts data into at most n pieces at line boundaries.
func split(data []byte, n int) []chunk {
	chunks := make([]chunk, 0, n)
	start := 0
	for k := 1; k <= n && start < len(data); k++ {
		end := len(data)
		if k < n {
			end = max(start, k*len(data)/n)
			if j := bytes.IndexByte(data[end:], '\n'); j >= 0 {
				end += j + 1
			} else {
				end = len(data)
			}
		}
		chunks = append(chunks, chunk{data: data[start:end], missing: -1})
		start = end
	}
	if len(chunks) == 0 {
		chunks = append(chunks, chunk{missing: -1})
	}
	chunks[len(chunks)-1].last = true
	return chunks
}

// parallel runs f(0) ... f(n-1) in n goroutines and waits for them.
func parallel(n int, f func(i int)) {
	if n == 1 {
		f(0)
		return
	}
	var wg sync.WaitGroup
	for i := range n {
		wg.Go(func() { f(i) })
	}
	wg.Wait()
}

func isBlank(c byte) bool { return c == ' ' || c == '\t' || c == '\r' }

// count counts the chunk's lines, and its node and shell records by their
// first character. A line counted here that is not a valid record of its
// kind fails the parse, so the counts are exact for every file that reads.
func (c *chunk) count() {
	b := c.data
	for len(b) > 0 {
		i := 0
		for i < len(b) && isBlank(b[i]) {
			i++
		}
		if i < len(b) {
			switch b[i] {
			case 'n':
				c.nodes++
			case 's':
				c.elems++
			}
			if b[i] != '\n' && b[i] != '#' {
				c.records++
			}
		}
		c.lines++
		j := bytes.IndexByte(b[i:], '\n')
		if j < 0 {
			break
		}
		b = b[i+j+1:]
	}
}

// nextField returns the blank-separated field of l that starts at or after
// i, and the position after it. At the end of the line or at a comment
// ('#' starting a field) it returns nil.
func nextField(l []byte, i int) ([]byte, int) {
	for i < len(l) && isBlank(l[i]) {
		i++
	}
	if i == len(l) || l[i] == '#' {
		return nil, len(l)
	}
	s := i
	for i < len(l) && !isBlank(l[i]) {
		i++
	}
	return l[s:i], i
}

// countFields returns the number of fields of l from position i on.
func countFields(l []byte, i int) int {
	n := 0
	for {
		var f []byte
		if f, i = nextField(l, i); f == nil {
			return n
		}
		n++
	}
}

// parseChunk parses the records of c into the reader's slices. It stops at
// the first error and leaves it in c.err.
func (r *reader) parseChunk(c *chunk) {
	m := r.m
	nodeIDs := m.NodeIDs[c.nodeBase : c.nodeBase+c.nodes]
	coords := m.Coords[c.nodeBase : c.nodeBase+c.nodes]
	elemIDs := m.ElemIDs[c.elemBase : c.elemBase+c.elems]
	partIDs := r.partIDs[c.elemBase : c.elemBase+c.elems]
	starts := m.ElemStart[c.elemBase+1 : c.elemBase+c.elems+1]
	conn := r.connIDs[4*c.elemBase : 4*(c.elemBase+c.elems)]
	var shellNodes [geom.MaxElemNodes]int64
	var nn, ne, nc int
	line := c.line0
	needHeader := c.header
	data := c.data
	fail := func(format string, args ...any) {
		err := fmt.Errorf(format, args...)
		if c.last && len(data) > 0 && data[len(data)-1] != '\n' && line == c.line0+c.lines {
			err = fmt.Errorf("%w (the last line has no newline: is the file truncated?)", err)
		}
		c.err = geom.LineError(r.name, line, "%w", err)
	}
	for pos := 0; pos < len(data); {
		line++
		// Fast paths for records in the layout writers use; anything
		// they do not take goes to the general code below.
		switch {
		case needHeader:
		case data[pos] == 'n' && nn < len(nodeIDs) && bytes.HasPrefix(data[pos:], []byte("node ")):
			if id, p, next, ok := fastNode(data, pos+len("node ")); ok {
				nodeIDs[nn], coords[nn] = id, p
				nn++
				pos = next
				continue
			}
		case data[pos] == 's' && ne < len(elemIDs) && bytes.HasPrefix(data[pos:], []byte("shell ")):
			if id, pid, n, next, ok := fastShell(data, pos+len("shell "), &shellNodes); ok {
				if c.thickness != nil {
					c.thickness[ne] = math.NaN()
				}
				if nc+n > len(conn) {
					conn = growConn(conn, nc, n, len(elemIDs))
					c.conn = conn
				}
				copy(conn[nc:], shellNodes[:n])
				nc += n
				elemIDs[ne], partIDs[ne], starts[ne] = id, pid, int32(nc)
				ne++
				pos = next
				continue
			}
		}
		end := bytes.IndexByte(data[pos:], '\n')
		if end < 0 {
			end = len(data)
		} else {
			end += pos
		}
		l := data[pos:end]
		pos = end + 1
		kw, i := nextField(l, 0)
		if kw == nil {
			continue
		}
		afterKw := i
		if needHeader {
			if !r.header(l, fail) {
				return
			}
			needHeader = false
			continue
		}
		switch string(kw) {
		case "node":
			if nn == len(nodeIDs) {
				fail("internal error: more node records than counted")
				return
			}
			var f [4][]byte
			for k := range f {
				f[k], i = nextField(l, i)
			}
			if f[3] == nil || countFields(l, i) != 0 {
				fail("node record needs an id and 3 coordinates, has %d fields", countFields(l, afterKw))
				return
			}
			id, ok := parseInt(f[0])
			if !ok {
				fail("node id %q is not an integer", geom.Excerpt(f[0]))
				return
			}
			if id <= 0 {
				fail("node id %d is not positive", id)
				return
			}
			var p [3]float64
			for k := range p {
				v, ok := parseFloat(f[k+1])
				if !ok || math.IsInf(v, 0) {
					fail("node %d: %c coordinate %q is not a finite decimal number", id, "xyz"[k], geom.Excerpt(f[k+1]))
					return
				}
				p[k] = v
			}
			nodeIDs[nn] = id
			coords[nn] = r3.Vec{X: p[0], Y: p[1], Z: p[2]}
			nn++
		case "shell":
			if ne == len(elemIDs) {
				fail("internal error: more shell records than counted")
				return
			}
			var f []byte
			f, i = nextField(l, i)
			id, ok := parseInt(f)
			if !ok {
				if f == nil {
					fail("shell record needs an element id, a part id and 3, 4, 6, 8 or 9 node ids")
				} else {
					fail("shell id %q is not an integer", geom.Excerpt(f))
				}
				return
			}
			if id <= 0 {
				fail("shell id %d is not positive", id)
				return
			}
			f, i = nextField(l, i)
			pid, ok := parseInt(f)
			if !ok {
				if f == nil {
					fail("shell %d: no part id", id)
				} else {
					fail("shell %d: part id %q is not an integer", id, geom.Excerpt(f))
				}
				return
			}
			if pid <= 0 {
				fail("shell %d: part id %d is not positive", id, pid)
				return
			}
			n := 0
			t := math.NaN()
			for {
				f, i = nextField(l, i)
				if f == nil {
					break
				}
				if len(f) > 2 && f[0] == 't' && f[1] == '=' {
					v, ok := parseFloat(f[2:])
					if !ok || !(v > 0) || math.IsInf(v, 0) {
						fail("shell %d: thickness %q is not a positive finite number", id, geom.Excerpt(f[2:]))
						return
					}
					if err := geom.CheckThickness(v, r.scale); err != nil {
						fail("shell %d: %v", id, err)
						return
					}
					if more := countFields(l, i); more != 0 {
						fail("shell %d: %d fields after the thickness, which must come last", id, more)
						return
					}
					t = v
					break
				}
				nid, ok := parseInt(f)
				if !ok {
					fail("shell %d: node id %q is not an integer", id, geom.Excerpt(f))
					return
				}
				if nid <= 0 {
					fail("shell %d: node id %d is not positive", id, nid)
					return
				}
				if n < len(shellNodes) {
					shellNodes[n] = nid
				}
				n++
			}
			if !geom.ElemType(min(n, 127)).Valid() {
				fail("shell %d: needs 3, 4, 6, 8 or 9 node ids, has %d", id, n)
				return
			}
			if nc+n > len(conn) {
				conn = growConn(conn, nc, n, len(elemIDs))
				c.conn = conn
			}
			copy(conn[nc:], shellNodes[:n])
			if !math.IsNaN(t) && c.thickness == nil {
				c.thickness = make([]float64, len(elemIDs))
				for k := range c.thickness {
					c.thickness[k] = math.NaN()
				}
			}
			if c.thickness != nil {
				c.thickness[ne] = t
			}
			nc += n
			elemIDs[ne] = id
			partIDs[ne] = pid
			starts[ne] = int32(nc)
			ne++
		case "part":
			p, ok := r.part(l, i, fail)
			if !ok {
				return
			}
			c.parts = append(c.parts, partRecord{part: p, line: line})
		case "joinery-mesh":
			fail("the header %q may only be the first record", Header)
			return
		default:
			fail("unknown record %q (want part, node or shell)", geom.Excerpt(kw))
			return
		}
	}
	if nn != len(nodeIDs) || ne != len(elemIDs) {
		// A counted line that is none of these records has failed above.
		c.err = geom.FileError(r.name, "internal error: counted %d nodes and %d shells, read %d and %d", len(nodeIDs), len(elemIDs), nn, ne)
		return
	}
	c.nconn = nc
}

// growConn returns a copy of the first nc node ids of conn with room for
// n more, and for second-order shells of all elems shells: the 4 per
// shell the reader's connIDs holds do not suffice for them.
func growConn(conn []int64, nc, n, elems int) []int64 {
	w := geom.MakeLarge[int64](max(nc+n, geom.MaxElemNodes*elems))
	copy(w, conn[:nc])
	return w
}

// The fast paths below read records in the layout writers use: fields
// separated by spaces, no comment, no thickness. They work on the whole
// chunk from position i, stop at the newline and return the position after
// it. Anything else, valid or not, yields ok=false and is left to the
// general code, which reads it or reports it.

// fastInt reads a positive integer of at most 18 digits after spaces from
// b[i:], followed by a space, a newline or the end of b.
func fastInt(b []byte, i int) (v int64, next int, ok bool) {
	for i < len(b) && b[i] == ' ' {
		i++
	}
	s := i
	var u uint64
	for ; i < len(b); i++ {
		c := b[i] - '0'
		if c > 9 {
			break
		}
		u = u*10 + uint64(c)
	}
	if i == s || i-s > 18 || u == 0 || (i < len(b) && b[i] != ' ' && b[i] != '\n') {
		return 0, 0, false
	}
	return int64(u), i, true
}

// endLine skips spaces from b[i:] and returns the position after the
// newline that must follow, or len(b) at the end of b.
func endLine(b []byte, i int) (next int, ok bool) {
	for i < len(b) && b[i] == ' ' {
		i++
	}
	switch {
	case i == len(b):
		return i, true
	case b[i] == '\n':
		return i + 1, true
	}
	return 0, false
}

// fastNode reads the fields of a node record from b[i:].
func fastNode(b []byte, i int) (id int64, p r3.Vec, next int, ok bool) {
	if id, i, ok = fastInt(b, i); !ok {
		return 0, p, 0, false
	}
	var x [3]float64
	for k := range x {
		for i < len(b) && b[i] == ' ' {
			i++
		}
		v, n, ok := decimal.Scan(b[i:])
		i += n
		if !ok || math.IsInf(v, 0) || (i < len(b) && b[i] != ' ' && b[i] != '\n') {
			return 0, p, 0, false
		}
		x[k] = v
	}
	if next, ok = endLine(b, i); !ok {
		return 0, p, 0, false
	}
	return id, r3.Vec{X: x[0], Y: x[1], Z: x[2]}, next, true
}

// fastShell reads the fields of a shell record from b[i:], storing its
// node ids in conn.
func fastShell(b []byte, i int, conn *[geom.MaxElemNodes]int64) (id, pid int64, n, next int, ok bool) {
	if id, i, ok = fastInt(b, i); !ok {
		return 0, 0, 0, 0, false
	}
	if pid, i, ok = fastInt(b, i); !ok {
		return 0, 0, 0, 0, false
	}
	for n < len(conn) {
		for i < len(b) && b[i] == ' ' {
			i++
		}
		if i == len(b) || b[i] == '\n' {
			break
		}
		if conn[n], i, ok = fastInt(b, i); !ok {
			return 0, 0, 0, 0, false
		}
		n++
	}
	if !geom.ElemType(n).Valid() {
		return 0, 0, 0, 0, false
	}
	if next, ok = endLine(b, i); !ok {
		return 0, 0, 0, 0, false
	}
	return id, pid, n, next, true
}

// header checks the header line l.
func (r *reader) header(l []byte, fail func(string, ...any)) bool {
	kw, i := nextField(l, 0)
	v, i := nextField(l, i)
	switch {
	case string(kw) != "joinery-mesh":
		fail("not a Joinery mesh: the first record must be %q", Header)
	case v == nil:
		fail("header has no format version (want %q)", Header)
	case string(v) != "1":
		fail("format version %q is not supported (this reader reads version %d)", geom.Excerpt(v), Version)
	case countFields(l, i) != 0:
		fail("header has extra fields (want %q)", Header)
	default:
		return true
	}
	return false
}

// part parses a part record whose fields start at l[i:].
func (r *reader) part(l []byte, i int, fail func(string, ...any)) (geom.Part, bool) {
	var p geom.Part
	f, i := nextField(l, i)
	id, ok := parseInt(f)
	switch {
	case f == nil:
		fail("part record needs a part id")
		return p, false
	case !ok:
		fail("part id %q is not an integer", geom.Excerpt(f))
		return p, false
	case id <= 0:
		fail("part id %d is not positive", id)
		return p, false
	}
	p.ID = id
	var seen [4]bool
	for {
		start := i
		for start < len(l) && isBlank(l[start]) {
			start++
		}
		f, i = nextField(l, i)
		if f == nil {
			return p, true
		}
		key, val, ok := bytes.Cut(f, []byte{'='})
		if !ok {
			fail("part %d: field %q is not key=value", id, geom.Excerpt(f))
			return p, false
		}
		k := -1
		switch string(key) {
		case "thickness":
			k = 0
		case "surface":
			k = 1
		case "material":
			k = 2
		case "name":
			k = 3
			// The name is the rest of the line, blanks around it dropped.
			val = bytes.TrimRight(l[start+len("name="):], " \t\r")
			val = bytes.TrimLeft(val, " \t\r")
			i = len(l)
		default:
			fail("part %d: unknown key %q (want thickness, surface, material or name)", id, geom.Excerpt(key))
			return p, false
		}
		if seen[k] {
			fail("part %d: %s given twice", id, key)
			return p, false
		}
		seen[k] = true
		if len(val) == 0 {
			fail("part %d: %s has no value", id, key)
			return p, false
		}
		if !utf8.Valid(val) {
			fail("part %d: %s %q is not valid UTF-8 text", id, key, geom.Excerpt(val))
			return p, false
		}
		switch k {
		case 0:
			t, ok := parseFloat(val)
			if !ok || !(t > 0) || math.IsInf(t, 0) {
				fail("part %d: thickness %q is not a positive finite number", id, geom.Excerpt(val))
				return p, false
			}
			if err := geom.CheckThickness(t, r.scale); err != nil {
				fail("part %d: %v", id, err)
				return p, false
			}
			p.Thickness = t
		case 1:
			s, err := geom.ParseSurface(string(val))
			if err != nil {
				fail("part %d: %w", id, err)
				return p, false
			}
			p.Surface = s
		case 2:
			p.Material = string(val)
		case 3:
			p.Name = string(val)
		}
	}
}

// resolveParts fills Mesh.Parts, part records first in file order, then
// parts that only shell records name, in order of first use, and maps
// every element to its part.
func (r *reader) resolveParts(chunks []chunk) error {
	m := r.m
	index := map[int64]int32{}
	lines := map[int64]int{}
	for i := range chunks {
		for _, pr := range chunks[i].parts {
			if first, dup := lines[pr.part.ID]; dup {
				return r.lineError(pr.line, "part %d already defined on line %d", pr.part.ID, first)
			}
			lines[pr.part.ID] = pr.line
			index[pr.part.ID] = int32(len(m.Parts))
			m.Parts = append(m.Parts, pr.part)
		}
	}
	lastID, lastIdx := int64(0), int32(-1)
	for e, pid := range r.partIDs {
		if pid != lastID {
			pi, ok := index[pid]
			if !ok {
				pi = int32(len(m.Parts))
				index[pid] = pi
				m.Parts = append(m.Parts, geom.Part{ID: pid})
			}
			lastID, lastIdx = pid, pi
		}
		m.ElemPart[e] = lastIdx
	}
	return nil
}

// mergeThickness fills Mesh.ElemThickness when any shell record has t=.
func (r *reader) mergeThickness(chunks []chunk) {
	some := false
	for i := range chunks {
		some = some || chunks[i].thickness != nil
	}
	if !some {
		return
	}
	if len(chunks) == 1 {
		r.m.ElemThickness = chunks[0].thickness
		return
	}
	t := make([]float64, 0, len(r.m.ElemIDs))
	for i := range chunks {
		c := &chunks[i]
		if c.thickness != nil {
			t = append(t, c.thickness...)
			continue
		}
		for range c.elems {
			t = append(t, math.NaN())
		}
	}
	r.m.ElemThickness = t
}

// resolveConn maps the node ids of the chunk's shells to node indices and
// moves the chunk's entries to their place in Mesh.Conn. It leaves the
// first element with an unknown node in c.missing.
func (r *reader) resolveConn(c *chunk) {
	m := r.m
	var ids []int64
	if c.conn != nil {
		ids = c.conn[:c.nconn]
	} else {
		ids = r.connIDs[4*c.elemBase : 4*c.elemBase+c.nconn]
	}
	out := m.Conn[c.connBase : c.connBase+c.nconn]
	starts := m.ElemStart[c.elemBase+1 : c.elemBase+c.elems+1]
	for k, id := range ids {
		n, ok := m.NodeIndex(id)
		if !ok {
			// The element holding entry k is the first that ends after it.
			e, _ := slices.BinarySearch(starts, int32(k+1))
			c.missing, c.missingID = c.elemBase+e, id
			return
		}
		out[k] = n
	}
	base := int32(c.connBase)
	for k := range starts {
		starts[k] += base
	}
}

// recordLine returns the line of the k-th (0-based) record whose first
// character is kind, in a file that has parsed without error.
func (r *reader) recordLine(kind byte, k int) int {
	b := r.data
	line := 0
	for len(b) > 0 {
		line++
		i := 0
		for i < len(b) && isBlank(b[i]) {
			i++
		}
		if i < len(b) && b[i] == kind {
			if k == 0 {
				return line
			}
			k--
		}
		j := bytes.IndexByte(b[i:], '\n')
		if j < 0 {
			break
		}
		b = b[i+j+1:]
	}
	return 0
}

// lineError is an input error at a line found after the records were
// parsed (a node not defined, an id defined twice), with the hint that
// the file may be truncated when that line is its last and has no
// newline, as parseChunk gives for errors within a line.
func (r *reader) lineError(line int, format string, args ...any) error {
	err := fmt.Errorf(format, args...)
	if n := len(r.data); n > 0 && r.data[n-1] != '\n' && line == bytes.Count(r.data, []byte{'\n'})+1 {
		err = fmt.Errorf("%w (the last line has no newline: is the file truncated?)", err)
	}
	return geom.LineError(r.name, line, "%w", err)
}

// duplicateError turns a failed Mesh.Index into an error that names both
// lines of the duplicate id.
func (r *reader) duplicateError(err error) error {
	m := r.m
	if _, d, ok := geom.NewIDIndex(m.NodeIDs); !ok {
		return r.lineError(r.recordLine('n', d.Second), "node %d already defined on line %d", d.ID, r.recordLine('n', d.First))
	}
	if _, d, ok := geom.NewIDIndex(m.ElemIDs); !ok {
		return r.lineError(r.recordLine('s', d.Second), "shell %d already defined on line %d", d.ID, r.recordLine('s', d.First))
	}
	var ie *geom.InputError
	if errors.As(err, &ie) {
		return err
	}
	return geom.FileError(r.name, "%w", err)
}
