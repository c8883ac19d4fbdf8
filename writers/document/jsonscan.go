package document

import (
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"unicode/utf8"
)

// scanner reads JSON values from a document in memory, for the
// hand-written decoders of the large documents (connectors.json). It
// accepts RFC 8259 JSON only and gives every value as encoding/json
// would decode it into the Go type asked for (a null leaves a number,
// string, boolean or array as it is and sets a slice, map or pointer to
// nil; strings with escapes or bytes beyond ASCII are unquoted by
// encoding/json itself), except where the published schemas are
// stricter than encoding/json:
//
//   - object keys match exactly (JSON Schema is case-sensitive; a key in
//     other case is an unknown field, ignored by the versioning rule);
//   - a vector has exactly 3 numbers (encoding/json pads or drops);
//   - an integer may be written with a fraction or exponent when its
//     value is whole ("integer" in JSON Schema is any whole number);
//   - a field the decoder knows may appear once per object (JSON leaves
//     repeated keys undefined; encoding/json merges them into the
//     value already decoded).
//
// The first error stops the scan: every method then returns zero values
// without moving, and the caller reads it from err (with its byte
// offset).
type scanner struct {
	data []byte
	pos  int
	err  *scanError
	// key is the key of the member being read and where, when set,
	// names the place further, both for messages.
	key    []byte
	keyOff int // where key starts
	where  func() string
	depth  int // objects and arrays open

	strA arena[string]
	// Arenas for the targets of pointer fields.
	vecA   arena[Vec]
	floatA arena[float64]
	intA   arena[int64]
}

// maxDepth bounds the nesting of objects and arrays, as encoding/json
// does (the same limit), so that a hostile document cannot exhaust the
// stack.
const maxDepth = 10000

// scanError is a syntax or type error at a byte offset of the document.
type scanError struct {
	off int
	msg string
}

func (s *scanner) fail(off int, format string, args ...any) {
	if s.err == nil {
		msg := fmt.Sprintf(format, args...)
		switch {
		case s.where != nil:
			if w := s.where(); w != "" {
				msg = w + ": " + msg
			}
		case s.key != nil:
			msg = fmt.Sprintf("%q: %s", excerptBytes(s.key), msg)
		}
		s.err = &scanError{off: off, msg: msg}
	}
	s.pos = len(s.data)
}

// ok reports whether no error happened yet.
func (s *scanner) ok() bool { return s.err == nil }

// ws skips white space and returns the next byte, 0 at the end.
func (s *scanner) ws() byte {
	for s.pos < len(s.data) {
		switch c := s.data[s.pos]; c {
		case ' ', '\t', '\n', '\r':
			s.pos++
		default:
			return c
		}
	}
	return 0
}

// found describes the value starting at the current position, for
// messages.
func (s *scanner) found() string {
	if s.pos >= len(s.data) {
		return "the end of the file"
	}
	switch c := s.data[s.pos]; {
	case c == '{':
		return "an object"
	case c == '[':
		return "an array"
	case c == '"':
		return "a string"
	case c == 't' || c == 'f':
		return "a boolean"
	case c == 'n':
		return "null"
	case c == '-' || c >= '0' && c <= '9':
		return "a number"
	default:
		return fmt.Sprintf("%q", rune(c))
	}
}

// want fails with "want X, found Y" at the current position.
func (s *scanner) want(what string) {
	s.fail(s.pos, "want %s, found %s", what, s.found())
}

// literal consumes the literal lit (true, false, null) at the position.
func (s *scanner) literal(lit string) bool {
	if len(s.data)-s.pos >= len(lit) && string(s.data[s.pos:s.pos+len(lit)]) == lit {
		s.pos += len(lit)
		return true
	}
	s.fail(s.pos, "invalid literal (want %s)", lit)
	return false
}

// null consumes a null if one comes next.
func (s *scanner) null() bool {
	if s.ws() == 'n' {
		return s.literal("null")
	}
	return false
}

// end checks that nothing but white space follows the top-level value.
func (s *scanner) end() {
	if s.ws() != 0 && s.ok() {
		s.fail(s.pos, "data after the end of the document")
	}
}

// object reads an object, calling member for each key (unquoted; the
// slice is valid until the next read) with the position at its value,
// which member must consume. It returns false for a null (the caller
// leaves or clears its value, as encoding/json does) and on errors.
func (s *scanner) object(member func(key []byte)) bool {
	switch s.ws() {
	case '{':
	case 'n':
		s.literal("null")
		return false
	default:
		s.want("an object")
		return false
	}
	if !s.open() {
		return false
	}
	defer s.close()
	if s.ws() == '}' {
		s.pos++
		return true
	}
	outer := s.key
	defer func() { s.key = outer }()
	for s.ok() {
		if s.ws() != '"' {
			s.want("a key (a string)")
			return false
		}
		keyOff := s.pos
		key := s.stringBytes()
		if s.ws() != ':' {
			s.want("':' after a key")
			return false
		}
		s.pos++
		s.key, s.keyOff = key, keyOff
		member(key)
		s.key = outer
		switch s.ws() {
		case ',':
			s.pos++
		case '}':
			s.pos++
			return s.ok()
		default:
			s.want("',' or '}' after an object member")
		}
	}
	return false
}

// open enters the object or array at the position.
func (s *scanner) open() bool {
	if s.depth++; s.depth > maxDepth {
		s.fail(s.pos, "objects and arrays nested more than %d deep", maxDepth)
		return false
	}
	s.pos++
	return true
}

func (s *scanner) close() { s.depth-- }

// once fails when the key of bit was seen before in this object (seen
// holds one bit per known key).
func (s *scanner) once(seen *uint64, bit uint, key []byte) bool {
	if *seen&(1<<bit) != 0 {
		s.fail(s.keyOff, "key %q given twice in one object", excerptBytes(key))
		return false
	}
	*seen |= 1 << bit
	return true
}

// array reads an array, calling item for each element with the position
// at it. It returns false for a null and on errors, true for an array
// (even an empty one).
func (s *scanner) array(item func()) bool {
	switch s.ws() {
	case '[':
	case 'n':
		s.literal("null")
		return false
	default:
		s.want("an array")
		return false
	}
	if !s.open() {
		return false
	}
	defer s.close()
	if s.ws() == ']' {
		s.pos++
		return true
	}
	for s.ok() {
		item()
		switch s.ws() {
		case ',':
			s.pos++
		case ']':
			s.pos++
			return s.ok()
		default:
			s.want("',' or ']' after an array element")
		}
	}
	return false
}

// stringBytes reads a string at the position (which holds its opening
// quote) and returns its contents unquoted. Strings of plain ASCII
// without escapes are returned as a slice of the document; others are
// unquoted by encoding/json (escapes, surrogate pairs, invalid UTF-8
// replaced by U+FFFD), so that every string reads as encoding/json
// reads it.
func (s *scanner) stringBytes() []byte {
	start := s.pos
	i := start + 1
	plain := true
	for {
		if i >= len(s.data) {
			s.fail(start, "string not closed")
			return nil
		}
		c := s.data[i]
		if c == '"' {
			break
		}
		switch {
		case c < 0x20:
			s.fail(i, "control character %#x in a string", c)
			return nil
		case c == '\\':
			plain = false
			i++
			if i >= len(s.data) {
				s.fail(start, "string not closed")
				return nil
			}
			switch s.data[i] {
			case '"', '\\', '/', 'b', 'f', 'n', 'r', 't':
			case 'u':
				for k := 1; k <= 4; k++ {
					if i+k >= len(s.data) || !isHex(s.data[i+k]) {
						s.fail(i-1, "invalid \\u escape in a string")
						return nil
					}
				}
				i += 4
			default:
				s.fail(i-1, "invalid escape \\%c in a string", s.data[i])
				return nil
			}
		case c >= utf8.RuneSelf:
			plain = false
		}
		i++
	}
	s.pos = i + 1
	if plain {
		return s.data[start+1 : i]
	}
	var out string
	if err := json.Unmarshal(s.data[start:i+1], &out); err != nil {
		s.fail(start, "%v", err)
		return nil
	}
	return []byte(out)
}

func isHex(c byte) bool { return c >= '0' && c <= '9' || c >= 'a' && c <= 'f' || c >= 'A' && c <= 'F' }

// str reads a string into *v; a null leaves *v as it is.
func (s *scanner) str(v *string) {
	switch s.ws() {
	case '"':
		*v = intern(s.stringBytes())
	case 'n':
		s.literal("null")
	default:
		s.want("a string")
	}
}

// intern returns b as a string, without allocating for the words that
// documents repeat (kinds, states, attachments, degrees of freedom).
func intern(b []byte) string {
	switch string(b) {
	case "":
		return ""
	case "tx":
		return "tx"
	case "ty":
		return "ty"
	case "tz":
		return "tz"
	case "rx":
		return "rx"
	case "ry":
		return "ry"
	case "rz":
		return "rz"
	case "spot":
		return "spot"
	case "bolt":
		return "bolt"
	case "built":
		return "built"
	case "flagged":
		return "flagged"
	case "not-built":
		return "not-built"
	case "interpolated":
		return "interpolated"
	case "node-pair":
		return "node-pair"
	case "patch":
		return "patch"
	case "ring":
		return "ring"
	case "gap":
		return "gap"
	case "offset":
		return "offset"
	case "faying":
		return "faying"
	case "shank":
		return "shank"
	case "list":
		return "list"
	case "4sqrt":
		return "4sqrt"
	case "5sqrt":
		return "5sqrt"
	case "hole":
		return "hole"
	case "washer":
		return "washer"
	case "rigid":
		return "rigid"
	}
	return string(b)
}

// number returns the bytes of the number at the position, checked
// against JSON's grammar, and whether it is written as an integer (no
// fraction, no exponent).
func (s *scanner) number() ([]byte, bool) {
	start, i := s.pos, s.pos
	digits := func() int {
		n := 0
		for i < len(s.data) && s.data[i] >= '0' && s.data[i] <= '9' {
			i++
			n++
		}
		return n
	}
	if i < len(s.data) && s.data[i] == '-' {
		i++
	}
	switch {
	case i < len(s.data) && s.data[i] == '0':
		i++
	case digits() == 0:
		s.want("a number")
		return nil, false
	}
	integer := true
	if i < len(s.data) && s.data[i] == '.' {
		i++
		integer = false
		if digits() == 0 {
			s.fail(start, "invalid number: no digit after the decimal point")
			return nil, false
		}
	}
	if i < len(s.data) && (s.data[i] == 'e' || s.data[i] == 'E') {
		i++
		integer = false
		if i < len(s.data) && (s.data[i] == '+' || s.data[i] == '-') {
			i++
		}
		if digits() == 0 {
			s.fail(start, "invalid number: no digit in the exponent")
			return nil, false
		}
	}
	s.pos = i
	return s.data[start:i], integer
}

// float reads a number into *v; a null leaves *v as it is.
func (s *scanner) float(v *float64) {
	c := s.ws()
	if c == 'n' {
		s.literal("null")
		return
	}
	if c != '-' && (c < '0' || c > '9') {
		s.want("a number")
		return
	}
	start := s.pos
	b, _ := s.number()
	if !s.ok() {
		return
	}
	if f, ok := exactFloat(b); ok {
		*v = f
		return
	}
	f, err := strconv.ParseFloat(string(b), 64)
	if err != nil {
		s.fail(start, "number %s out of range", excerptBytes(b))
		return
	}
	*v = f
}

// exactFloat returns the value of the JSON number b (checked against
// the grammar) when it can be had exactly in one floating-point
// operation: its significant digits make an integer m below 10^15 (so
// below 2^53) and its decimal exponent e is within 22 of 0, so that m
// and 10^|e| are exact float64s and m * 10^e (or m / 10^-e), rounded
// once, is the correctly rounded value that strconv.ParseFloat gives
// (the fast path of Clinger 1990, which strconv takes too, after a
// slower scan of the digits). ok is false otherwise.
func exactFloat(b []byte) (f float64, ok bool) {
	i, neg := 0, false
	if b[0] == '-' {
		i, neg = 1, true
	}
	var m uint64
	digits, frac, point := 0, 0, false
	for ; i < len(b); i++ {
		c := b[i]
		if c == '.' {
			point = true
			continue
		}
		if c < '0' || c > '9' {
			break // the exponent
		}
		if point {
			frac++
		}
		if m == 0 && c == '0' {
			continue // a leading zero
		}
		if digits == 15 {
			return 0, false
		}
		m = 10*m + uint64(c-'0')
		digits++
	}
	e := -frac
	if i < len(b) { // e or E, a sign, digits
		i++
		eneg := b[i] == '-'
		if b[i] == '+' || b[i] == '-' {
			i++
		}
		x := 0
		for ; i < len(b); i++ {
			if x = 10*x + int(b[i]-'0'); x > 1000 {
				return 0, false
			}
		}
		if eneg {
			x = -x
		}
		e += x
	}
	f = float64(m)
	switch {
	case m == 0 || e == 0:
	case e > 0 && e <= 22:
		f *= math.Pow10(e)
	case e < 0 && e >= -22:
		f /= math.Pow10(-e)
	default:
		return 0, false
	}
	if neg {
		f = -f
	}
	return f, true
}

// maxExactInt is 2^53: integers up to it are exact in a float64.
const maxExactInt = 1 << 53

// int64 reads an integer into *v; a null leaves *v as it is.
func (s *scanner) int64(v *int64) {
	c := s.ws()
	if c == 'n' {
		s.literal("null")
		return
	}
	if c != '-' && (c < '0' || c > '9') {
		s.want("an integer")
		return
	}
	start := s.pos
	b, integer := s.number()
	if !s.ok() {
		return
	}
	if integer {
		n, err := strconv.ParseInt(string(b), 10, 64)
		if err != nil {
			s.fail(start, "integer %s out of range", excerptBytes(b))
			return
		}
		*v = n
		return
	}
	f, err := strconv.ParseFloat(string(b), 64)
	if err != nil || f != math.Trunc(f) || math.Abs(f) > maxExactInt {
		s.fail(start, "want an integer, found %s", excerptBytes(b))
		return
	}
	*v = int64(f)
}

// int reads an integer into *v as int64 does.
func (s *scanner) int(v *int) {
	n := int64(*v)
	s.int64(&n)
	if n != int64(int(n)) {
		s.fail(s.pos, "integer %d out of range", n)
		return
	}
	*v = int(n)
}

// bool reads a boolean into *v; a null leaves *v as it is.
func (s *scanner) bool(v *bool) {
	switch s.ws() {
	case 't':
		if s.literal("true") {
			*v = true
		}
	case 'f':
		if s.literal("false") {
			*v = false
		}
	case 'n':
		s.literal("null")
	default:
		s.want("a boolean")
	}
}

// vec reads a vector of exactly 3 numbers into *v; a null leaves *v as
// it is, as does a null element its component.
func (s *scanner) vec(v *Vec) {
	if s.null() {
		return
	}
	n := 0
	start := s.pos
	s.array(func() {
		if n == 3 {
			s.fail(s.pos, "a vector has 3 numbers, found more")
			return
		}
		s.float(&v[n])
		n++
	})
	if s.ok() && n != 3 {
		s.fail(start, "a vector has 3 numbers, found %d", n)
	}
}

// vecPtr reads a vector or null into *v, as encoding/json does into a
// *Vec (null sets nil; a vector fills the vector *v points to, a new
// one if nil).
func (s *scanner) vecPtr(v **Vec) {
	if s.null() {
		*v = nil
		return
	}
	if *v == nil {
		*v = s.vecA.one()
	}
	s.vec(*v)
}

// floatPtr reads a number or null into *v (null sets nil).
func (s *scanner) floatPtr(v **float64) {
	if s.null() {
		*v = nil
		return
	}
	if *v == nil {
		*v = s.floatA.one()
	}
	s.float(*v)
}

// int64Ptr reads an integer or null into *v (null sets nil).
func (s *scanner) int64Ptr(v **int64) {
	if s.null() {
		*v = nil
		return
	}
	if *v == nil {
		*v = s.intA.one()
	}
	s.int64(*v)
}

// strings reads an array of strings into *v (null sets nil), in the
// scanner's arena.
func (s *scanner) strings(v *[]string) {
	s.strA.begin()
	if !s.array(func() { s.str(s.strA.next()) }) {
		if s.ok() {
			*v = nil
		}
		return
	}
	*v = s.strA.end()
}

// stringMap reads an object of strings into *v, adding to the map there
// as encoding/json does (null sets nil).
func (s *scanner) stringMap(v *map[string]string) {
	m := *v
	if !s.object(func(key []byte) {
		if m == nil {
			m = map[string]string{}
		}
		var val string
		s.str(&val)
		m[string(key)] = val
	}) {
		if s.ok() {
			*v = nil
		}
		return
	}
	if m == nil {
		m = map[string]string{}
	}
	*v = m
}

// skip reads and drops any value.
func (s *scanner) skip() {
	switch c := s.ws(); {
	case c == '{':
		s.object(func([]byte) { s.skip() })
	case c == '[':
		s.array(s.skip)
	case c == '"':
		s.stringBytes()
	case c == 't':
		s.literal("true")
	case c == 'f':
		s.literal("false")
	case c == 'n':
		s.literal("null")
	case c == '-' || c >= '0' && c <= '9':
		s.number()
	default:
		s.want("a value")
	}
}

func excerptBytes(b []byte) string {
	const n = 40
	if len(b) > n {
		return string(b[:n]) + "..."
	}
	return string(b)
}

// arena hands out slices of large backing arrays, so that the many
// short arrays of a large document (nodes, weights, sheets) cost a few
// allocations instead of one each, and are decoded in place. A run of
// items (one array) is begun, extended item by item and ended; each run
// is capped at its length, so appending to it copies instead of
// overwriting its neighbour.
type arena[T any] struct {
	buf  []T
	from int // where the current run starts in buf
}

// arenaChunk is the smallest backing array, in items.
const arenaChunk = 2048

// begin starts a run.
func (a *arena[T]) begin() { a.from = len(a.buf) }

// next returns a new zero item at the end of the current run; the
// pointer is valid until the next call (a full backing array moves the
// run into a new one).
func (a *arena[T]) next() *T {
	if len(a.buf) == cap(a.buf) {
		run := a.buf[a.from:]
		b := make([]T, len(run), max(arenaChunk, 2*len(run)))
		copy(b, run)
		a.buf, a.from = b, 0
	}
	a.buf = a.buf[:len(a.buf)+1]
	return &a.buf[len(a.buf)-1]
}

// end returns the run's items: empty, not nil, for none, as
// encoding/json gives [].
func (a *arena[T]) end() []T {
	if len(a.buf) == a.from {
		return []T{}
	}
	return a.buf[a.from:len(a.buf):len(a.buf)]
}

// one returns a pointer to a new zero item (a run of one).
func (a *arena[T]) one() *T {
	a.begin()
	return a.next()
}
