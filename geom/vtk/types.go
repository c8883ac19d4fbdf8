package vtk

import (
	"bytes"
	"encoding/binary"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// kind is the numeric class of a VTK data type.
type kind uint8

const (
	kSigned kind = iota
	kUnsigned
	kFloat
	kBit
)

// dtype is a VTK legacy data type: its name, its width in binary files
// and its class.
type dtype struct {
	name string
	size int
	kind kind
}

// dtypes lists the data type names of the legacy format (VTK file-format
// documentation, Kitware) plus the fixed-width names newer VTK versions
// write (vtktypeint64 and friends). vtkIdType is taken as a 4-byte int in
// binary files, as VTK's legacy writer converts it (from memory); long as
// 8 bytes, its width on 64-bit Linux and macOS.
var dtypes = [...]dtype{
	{"bit", 0, kBit},
	{"unsigned_char", 1, kUnsigned},
	{"char", 1, kSigned},
	{"signed_char", 1, kSigned},
	{"short", 2, kSigned},
	{"unsigned_short", 2, kUnsigned},
	{"int", 4, kSigned},
	{"unsigned_int", 4, kUnsigned},
	{"long", 8, kSigned},
	{"unsigned_long", 8, kUnsigned},
	{"long_long", 8, kSigned},
	{"unsigned_long_long", 8, kUnsigned},
	{"vtkidtype", 4, kSigned},
	{"vtktypeint8", 1, kSigned},
	{"vtktypeuint8", 1, kUnsigned},
	{"vtktypeint16", 2, kSigned},
	{"vtktypeuint16", 2, kUnsigned},
	{"vtktypeint32", 4, kSigned},
	{"vtktypeuint32", 4, kUnsigned},
	{"vtktypeint64", 8, kSigned},
	{"vtktypeuint64", 8, kUnsigned},
	{"float", 4, kFloat},
	{"double", 8, kFloat},
}

// lookupType finds a data type by name, ignoring case.
func lookupType(name []byte) (dtype, bool) {
	for _, t := range dtypes {
		if bytes.EqualFold(name, []byte(t.name)) {
			return t, true
		}
	}
	return dtype{}, false
}

// binBytes returns the number of bytes n values of t take in a binary
// file: bits are packed eight to a byte.
func (t dtype) binBytes(n int) int {
	if t.kind == kBit {
		return (n + 7) / 8
	}
	return n * t.size
}

// float returns the big-endian value of type t at the start of b.
func (t dtype) float(b []byte) float64 {
	if t.kind == kFloat {
		if t.size == 4 {
			return float64(math.Float32frombits(binary.BigEndian.Uint32(b)))
		}
		return math.Float64frombits(binary.BigEndian.Uint64(b))
	}
	if t.kind == kUnsigned {
		return float64(t.uint(b))
	}
	return float64(t.int(b))
}

// int returns the big-endian signed integer of type t at the start of b.
func (t dtype) int(b []byte) int64 {
	switch t.size {
	case 1:
		return int64(int8(b[0]))
	case 2:
		return int64(int16(binary.BigEndian.Uint16(b)))
	case 4:
		return int64(int32(binary.BigEndian.Uint32(b)))
	}
	return int64(binary.BigEndian.Uint64(b))
}

// uint returns the big-endian unsigned integer of type t at the start of b.
func (t dtype) uint(b []byte) uint64 {
	switch t.size {
	case 1:
		return uint64(b[0])
	case 2:
		return uint64(binary.BigEndian.Uint16(b))
	case 4:
		return uint64(binary.BigEndian.Uint32(b))
	}
	return binary.BigEndian.Uint64(b)
}

// decodeInts fills dst from the big-endian values of type t in src, which
// holds at least len(dst) values. It returns the index of the first value
// that is not a whole number in the range of int64, or -1.
func decodeInts(dst []int64, src []byte, t dtype) int {
	switch {
	case t.kind == kSigned && t.size == 4:
		src = src[:4*len(dst)]
		for i := range dst {
			dst[i] = int64(int32(binary.BigEndian.Uint32(src[4*i:])))
		}
	case t.kind == kSigned && t.size == 8:
		src = src[:8*len(dst)]
		for i := range dst {
			dst[i] = int64(binary.BigEndian.Uint64(src[8*i:]))
		}
	case t.kind == kSigned:
		for i := range dst {
			dst[i] = t.int(src[i*t.size:])
		}
	case t.kind == kUnsigned:
		for i := range dst {
			u := t.uint(src[i*t.size:])
			if u > math.MaxInt64 {
				return i
			}
			dst[i] = int64(u)
		}
	case t.kind == kFloat:
		for i := range dst {
			v, ok := wholeNumber(t.float(src[i*t.size:]))
			if !ok {
				return i
			}
			dst[i] = v
		}
	default: // bit
		for i := range dst {
			dst[i] = int64(src[i/8]>>(7-i%8)) & 1
		}
	}
	return -1
}

// decodeFloats fills dst from the big-endian values of type t in src,
// which holds at least len(dst) values.
func decodeFloats(dst []float64, src []byte, t dtype) {
	switch {
	case t.kind == kFloat && t.size == 8:
		src = src[:8*len(dst)]
		for i := range dst {
			dst[i] = math.Float64frombits(binary.BigEndian.Uint64(src[8*i:]))
		}
	case t.kind == kFloat && t.size == 4:
		src = src[:4*len(dst)]
		for i := range dst {
			dst[i] = float64(math.Float32frombits(binary.BigEndian.Uint32(src[4*i:])))
		}
	case t.kind == kBit:
		for i := range dst {
			dst[i] = float64(src[i/8] >> (7 - i%8) & 1)
		}
	default:
		for i := range dst {
			dst[i] = t.float(src[i*t.size:])
		}
	}
}

// decodePoints fills dst from 3*len(dst) big-endian values of type t in
// src. It returns the index of the first point with a coordinate that is
// NaN or infinite, or -1.
func decodePoints(dst []r3.Vec, src []byte, t dtype) int {
	bad := -1
	switch {
	case t.kind == kFloat && t.size == 8:
		src = src[:24*len(dst)]
		for i := range dst {
			b := src[24*i : 24*i+24]
			x := math.Float64frombits(binary.BigEndian.Uint64(b[0:]))
			y := math.Float64frombits(binary.BigEndian.Uint64(b[8:]))
			z := math.Float64frombits(binary.BigEndian.Uint64(b[16:]))
			dst[i] = r3.Vec{X: x, Y: y, Z: z}
		}
	case t.kind == kFloat && t.size == 4:
		src = src[:12*len(dst)]
		for i := range dst {
			b := src[12*i : 12*i+12]
			x := math.Float32frombits(binary.BigEndian.Uint32(b[0:]))
			y := math.Float32frombits(binary.BigEndian.Uint32(b[4:]))
			z := math.Float32frombits(binary.BigEndian.Uint32(b[8:]))
			dst[i] = r3.Vec{X: float64(x), Y: float64(y), Z: float64(z)}
		}
	case t.kind == kBit:
		for i := range dst {
			bit := func(k int) float64 { return float64(src[k/8] >> (7 - k%8) & 1) }
			dst[i] = r3.Vec{X: bit(3 * i), Y: bit(3*i + 1), Z: bit(3*i + 2)}
		}
	default:
		s := t.size
		for i := range dst {
			b := src[3*s*i:]
			dst[i] = r3.Vec{X: t.float(b), Y: t.float(b[s:]), Z: t.float(b[2*s:])}
		}
	}
	for i, p := range dst {
		if !finite(p.X) || !finite(p.Y) || !finite(p.Z) {
			bad = i
			break
		}
	}
	return bad
}

// wholeNumber converts v to int64 when it is a whole number in range.
func wholeNumber(v float64) (int64, bool) {
	if v != math.Trunc(v) || v < -(1<<63) || v >= 1<<63 {
		return 0, false
	}
	return int64(v), true
}

// finite reports whether v is neither NaN nor infinite.
func finite(v float64) bool { return v-v == 0 }
