package vtu

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// Binary decoding. Each function decodes len(dst) values of type t from b,
// which holds exactly len(dst)*t.size() bytes.

func le16(b []byte) uint16 { return binary.LittleEndian.Uint16(b) }
func be16(b []byte) uint16 { return binary.BigEndian.Uint16(b) }

// u16, u32 and u64 read an unsigned value in the given byte order.
func u16(b []byte, big bool) uint16 {
	if big {
		return be16(b)
	}
	return le16(b)
}

func u32(b []byte, big bool) uint32 {
	if big {
		return binary.BigEndian.Uint32(b)
	}
	return binary.LittleEndian.Uint32(b)
}

func u64(b []byte, big bool) uint64 {
	if big {
		return binary.BigEndian.Uint64(b)
	}
	return binary.LittleEndian.Uint64(b)
}

// valueError reports a value that does not fit its target.
type valueError struct {
	index int
	msg   string
}

func (e *valueError) Error() string { return fmt.Sprintf("value %d: %s", e.index, e.msg) }

// binInts decodes integers; floats must be integral.
func binInts(b []byte, t dtype, big bool, dst []int64) error {
	switch t {
	case typeInt8:
		for i := range dst {
			dst[i] = int64(int8(b[i]))
		}
	case typeUInt8:
		for i := range dst {
			dst[i] = int64(b[i])
		}
	case typeInt16:
		for i := range dst {
			dst[i] = int64(int16(u16(b[2*i:], big)))
		}
	case typeUInt16:
		for i := range dst {
			dst[i] = int64(u16(b[2*i:], big))
		}
	case typeInt32:
		if !big {
			b = b[:4*len(dst)]
			for i := range dst {
				dst[i] = int64(int32(binary.LittleEndian.Uint32(b[4*i:])))
			}
			break
		}
		for i := range dst {
			dst[i] = int64(int32(u32(b[4*i:], big)))
		}
	case typeUInt32:
		for i := range dst {
			dst[i] = int64(u32(b[4*i:], big))
		}
	case typeInt64:
		if !big {
			b = b[:8*len(dst)]
			for i := range dst {
				dst[i] = int64(binary.LittleEndian.Uint64(b[8*i:]))
			}
			break
		}
		for i := range dst {
			dst[i] = int64(u64(b[8*i:], big))
		}
	case typeUInt64:
		for i := range dst {
			v := u64(b[8*i:], big)
			if v > math.MaxInt64 {
				return &valueError{i, fmt.Sprintf("%d does not fit a signed 64-bit integer", v)}
			}
			dst[i] = int64(v)
		}
	case typeFloat32, typeFloat64:
		for i := range dst {
			var f float64
			if t == typeFloat32 {
				f = float64(math.Float32frombits(u32(b[4*i:], big)))
			} else {
				f = math.Float64frombits(u64(b[8*i:], big))
			}
			v, ok := integral(f)
			if !ok {
				return &valueError{i, fmt.Sprintf("%g is not an integer", f)}
			}
			dst[i] = v
		}
	}
	return nil
}

// integral returns f as an int64 when it is a whole number in range.
func integral(f float64) (int64, bool) {
	if f != math.Trunc(f) || f < -(1<<63) || f >= 1<<63 {
		return 0, false
	}
	return int64(f), true
}

// binFloats decodes floating-point values; integers are converted.
func binFloats(b []byte, t dtype, big bool, dst []float64) error {
	switch t {
	case typeFloat32:
		for i := range dst {
			dst[i] = float64(math.Float32frombits(u32(b[4*i:], big)))
		}
	case typeFloat64:
		for i := range dst {
			dst[i] = math.Float64frombits(u64(b[8*i:], big))
		}
	case typeUInt64:
		for i := range dst {
			dst[i] = float64(u64(b[8*i:], big))
		}
	default:
		tmp := make([]int64, len(dst))
		if err := binInts(b, t, big, tmp); err != nil {
			return err
		}
		for i, v := range tmp {
			dst[i] = float64(v)
		}
	}
	return nil
}

// binPoints decodes point coordinates, three values per point.
func binPoints(b []byte, t dtype, big bool, dst []r3.Vec) error {
	switch {
	case t == typeFloat64 && !big:
		b = b[:24*len(dst)]
		for i := range dst {
			q := b[24*i : 24*i+24]
			dst[i] = r3.Vec{
				X: math.Float64frombits(binary.LittleEndian.Uint64(q)),
				Y: math.Float64frombits(binary.LittleEndian.Uint64(q[8:])),
				Z: math.Float64frombits(binary.LittleEndian.Uint64(q[16:])),
			}
		}
	case t == typeFloat32 && !big:
		b = b[:12*len(dst)]
		for i := range dst {
			q := b[12*i : 12*i+12]
			dst[i] = r3.Vec{
				X: float64(math.Float32frombits(binary.LittleEndian.Uint32(q))),
				Y: float64(math.Float32frombits(binary.LittleEndian.Uint32(q[4:]))),
				Z: float64(math.Float32frombits(binary.LittleEndian.Uint32(q[8:]))),
			}
		}
	default:
		tmp := make([]float64, 3*len(dst))
		if err := binFloats(b, t, big, tmp); err != nil {
			return err
		}
		for i := range dst {
			dst[i] = r3.Vec{X: tmp[3*i], Y: tmp[3*i+1], Z: tmp[3*i+2]}
		}
	}
	return nil
}

// ASCII decoding: values are separated by white space.

// asciiScanner walks the white-space separated tokens of an array text.
type asciiScanner struct {
	text []byte
	pos  int
	tok  int // start of the last token
}

// next returns the next token, or nil at the end.
func (s *asciiScanner) next() []byte {
	t := s.text
	i := s.pos
	for i < len(t) && (t[i] == ' ' || t[i] == '\n' || t[i] == '\t' || t[i] == '\r') {
		i++
	}
	s.tok = i
	for i < len(t) && t[i] != ' ' && t[i] != '\n' && t[i] != '\t' && t[i] != '\r' {
		i++
	}
	s.pos = i
	if s.tok == i {
		return nil
	}
	return t[s.tok:i]
}

// countTokens returns the number of tokens in text.
func countTokens(text []byte) int {
	s := asciiScanner{text: text}
	n := 0
	for s.next() != nil {
		n++
	}
	return n
}

// parseInt parses a decimal integer with an optional sign.
func parseInt(b []byte) (int64, bool) {
	neg := false
	if len(b) > 0 && (b[0] == '-' || b[0] == '+') {
		neg = b[0] == '-'
		b = b[1:]
	}
	for len(b) > 1 && b[0] == '0' {
		b = b[1:]
	}
	if len(b) == 0 || len(b) > 19 {
		return 0, false
	}
	var v uint64 // 19 digits cannot overflow 64 bits
	for _, c := range b {
		if c < '0' || c > '9' {
			return 0, false
		}
		v = v*10 + uint64(c-'0')
	}
	if neg {
		if v > 1<<63 {
			return 0, false
		}
		return -int64(v), true
	}
	if v > math.MaxInt64 {
		return 0, false
	}
	return int64(v), true
}

// asciiValue parses one token of an array of type t, as an integer when
// asInt is set (floats must then be whole numbers) or as a float.
func asciiValue(tok []byte, t dtype, asInt bool) (int64, float64, error) {
	if t.isFloat() {
		bits := 64
		if t == typeFloat32 {
			bits = 32
		}
		f, err := strconv.ParseFloat(string(tok), bits)
		if err != nil {
			if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
				return 0, 0, fmt.Errorf("%q is out of range for %s", geom.Excerpt(tok), t)
			}
			return 0, 0, fmt.Errorf("%q is not a number", geom.Excerpt(tok))
		}
		if !asInt {
			return 0, f, nil
		}
		v, ok := integral(f)
		if !ok {
			return 0, 0, fmt.Errorf("%q is not an integer", geom.Excerpt(tok))
		}
		return v, 0, nil
	}
	v, ok := parseInt(tok)
	if !ok {
		if t == typeUInt64 && len(tok) > 0 && tok[0] != '-' {
			if u, err := strconv.ParseUint(string(tok), 10, 64); err == nil {
				return 0, 0, fmt.Errorf("%d does not fit a signed 64-bit integer", u)
			}
		}
		if bytes.ContainsAny(tok, ".eE") {
			if _, err := strconv.ParseFloat(string(tok), 64); err == nil {
				return 0, 0, fmt.Errorf("%q is not an integer, as type %s requires", geom.Excerpt(tok), t)
			}
		}
		return 0, 0, fmt.Errorf("%q is not a number", geom.Excerpt(tok))
	}
	lo, hi := t.intRange()
	if v < lo || (v > 0 && uint64(v) > hi) {
		return 0, 0, fmt.Errorf("%d is out of range for %s", v, t)
	}
	return v, float64(v), nil
}
