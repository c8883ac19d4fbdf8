package vtu

import (
	"encoding/binary"
	"math"
)

// dtype is the numeric type of a DataArray.
type dtype int8

// The numeric types of the VTK XML format (VTK file-format documentation,
// Kitware: the type attribute of DataArray).
const (
	typeInt8 dtype = iota
	typeUInt8
	typeInt16
	typeUInt16
	typeInt32
	typeUInt32
	typeInt64
	typeUInt64
	typeFloat32
	typeFloat64
	typeUnknown // a type Joinery does not decode, e.g. String
)

// parseType returns the dtype named s, or -1.
func parseType(s string) dtype {
	for t := typeInt8; t < typeUnknown; t++ {
		if t.String() == s {
			return t
		}
	}
	return -1
}

// String returns the VTK name of the type.
func (t dtype) String() string {
	switch t {
	case typeInt8:
		return "Int8"
	case typeUInt8:
		return "UInt8"
	case typeInt16:
		return "Int16"
	case typeUInt16:
		return "UInt16"
	case typeInt32:
		return "Int32"
	case typeUInt32:
		return "UInt32"
	case typeInt64:
		return "Int64"
	case typeUInt64:
		return "UInt64"
	case typeFloat32:
		return "Float32"
	case typeFloat64:
		return "Float64"
	}
	return "unknown"
}

// size returns the size in bytes of one value.
func (t dtype) size() int {
	switch t {
	case typeInt8, typeUInt8:
		return 1
	case typeInt16, typeUInt16:
		return 2
	case typeInt32, typeUInt32, typeFloat32:
		return 4
	case typeInt64, typeUInt64, typeFloat64:
		return 8
	}
	return 0
}

// isFloat reports whether t is a floating-point type.
func (t dtype) isFloat() bool { return t == typeFloat32 || t == typeFloat64 }

// intRange returns the range of values of an integer type.
func (t dtype) intRange() (lo int64, hi uint64) {
	switch t {
	case typeInt8:
		return math.MinInt8, math.MaxInt8
	case typeUInt8:
		return 0, math.MaxUint8
	case typeInt16:
		return math.MinInt16, math.MaxInt16
	case typeUInt16:
		return 0, math.MaxUint16
	case typeInt32:
		return math.MinInt32, math.MaxInt32
	case typeUInt32:
		return 0, math.MaxUint32
	case typeUInt64:
		return 0, math.MaxUint64
	}
	return math.MinInt64, math.MaxInt64
}

// order returns the byte order of binary data.
func order(big bool) binary.ByteOrder {
	if big {
		return binary.BigEndian
	}
	return binary.LittleEndian
}
