package vtu

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

func TestParseInt(t *testing.T) {
	for _, c := range []struct {
		in   string
		want int64
		ok   bool
	}{
		{"0", 0, true},
		{"-0", 0, true},
		{"+17", 17, true},
		{"-42", -42, true},
		{"000000000000000000000123", 123, true},
		{"9223372036854775807", math.MaxInt64, true},
		{"-9223372036854775808", math.MinInt64, true},
		{"9223372036854775808", 0, false},
		{"-9223372036854775809", 0, false},
		{"99999999999999999999", 0, false},
		{"", 0, false},
		{"-", 0, false},
		{"1.0", 0, false},
		{"1e3", 0, false},
		{"0x10", 0, false},
		{"12a", 0, false},
	} {
		got, ok := parseInt([]byte(c.in))
		if got != c.want || ok != c.ok {
			t.Errorf("parseInt(%q) = %d, %v; want %d, %v", c.in, got, ok, c.want, c.ok)
		}
		// Agrees with the standard library where both accept the text.
		if v, err := strconv.ParseInt(c.in, 10, 64); (err == nil) != ok || (ok && v != got) {
			t.Errorf("parseInt(%q) = %d, %v; strconv says %d, %v", c.in, got, ok, v, err)
		}
	}
}

func TestASCIIValue(t *testing.T) {
	for _, c := range []struct {
		tok   string
		typ   dtype
		asInt bool
		i     int64
		f     float64
		err   string
	}{
		{"300", typeUInt8, true, 0, 0, "300 is out of range for UInt8"},
		{"-1", typeUInt32, true, 0, 0, "-1 is out of range for UInt32"},
		{"-128", typeInt8, true, -128, -128, ""},
		{"65535", typeUInt16, true, 65535, 65535, ""},
		{"18446744073709551615", typeUInt64, true, 0, 0, "18446744073709551615 does not fit a signed 64-bit integer"},
		{"2.0", typeFloat64, true, 2, 0, ""},
		{"2.5", typeFloat64, true, 0, 0, `"2.5" is not an integer`},
		{"2.5", typeInt32, true, 0, 0, `"2.5" is not an integer, as type Int32 requires`},
		{"0.1", typeFloat32, false, 0, float64(float32(0.1)), ""}, // Float32 arrays hold single-precision values
		{"0.1", typeFloat64, false, 0, 0.1, ""},
		{"1e400", typeFloat64, false, 0, 0, `"1e400" is out of range for Float64`},
		{"abc", typeFloat64, false, 0, 0, `"abc" is not a number`},
	} {
		i, f, err := asciiValue([]byte(c.tok), c.typ, c.asInt)
		switch {
		case c.err != "":
			if err == nil || err.Error() != c.err {
				t.Errorf("asciiValue(%q, %s) error = %v, want %q", c.tok, c.typ, err, c.err)
			}
		case err != nil:
			t.Errorf("asciiValue(%q, %s): %v", c.tok, c.typ, err)
		case c.asInt && i != c.i, !c.asInt && f != c.f:
			t.Errorf("asciiValue(%q, %s) = %d, %g; want %d, %g", c.tok, c.typ, i, f, c.i, c.f)
		}
	}
}

func TestParseType(t *testing.T) {
	for typ := typeInt8; typ < typeUnknown; typ++ {
		if got := parseType(typ.String()); got != typ {
			t.Errorf("parseType(%q) = %v", typ.String(), got)
		}
	}
	// Type names of the VTK XML format (VTK file-format documentation,
	// Kitware); others are not numeric arrays Joinery reads.
	for _, name := range []string{"String", "Bit", "Float128", ""} {
		if got := parseType(name); got != -1 {
			t.Errorf("parseType(%q) = %v, want -1", name, got)
		}
	}
}

// TestEveryType reads a two-triangle mesh whose arrays all have one
// numeric type, for every type and several layouts.
func TestEveryType(t *testing.T) {
	layouts := []wOpts{
		{format: "ascii"},
		{format: "binary", bigEndian: true},
		{format: "appended"},
		{format: "appended", encoding: "base64", compress: true, header64: true},
	}
	for typ := typeInt8; typ < typeUnknown; typ++ {
		for _, o := range layouts {
			pc := wPiece{
				np: 4, nc: 2,
				points:    wArray{name: "Points", typ: typ, ncomp: 3, ints: []int64{0, 0, 0, 1, 0, 0, 1, 1, 0, 0, 1, 1}},
				conn:      wArray{name: "connectivity", typ: typ, ints: []int64{0, 1, 2, 0, 2, 3}},
				offsets:   wArray{name: "offsets", typ: typ, ints: []int64{3, 6}},
				types:     wArray{name: "types", typ: typ, ints: []int64{5, 5}},
				pointData: []wArray{{name: "node_id", typ: typ, ints: []int64{4, 3, 2, 1}}},
				cellData: []wArray{
					{name: "element_id", typ: typ, ints: []int64{7, 9}},
					{name: "part", typ: typ, ints: []int64{2, 1}},
					{name: "thickness", typ: typ, ints: []int64{1, 2}},
				},
			}
			var b bytes.Buffer
			if err := writeVTU(&b, []wPiece{pc}, o); err != nil {
				t.Fatal(err)
			}
			name := fmt.Sprintf("%s/%s/%v", typ, o.format, o.bigEndian)
			m, err := Read(&b, name, geom.ReadOptions{})
			if err != nil {
				t.Errorf("%s: %v", name, err)
				continue
			}
			want := &geom.Mesh{
				Parts:         []geom.Part{{ID: 2}, {ID: 1}},
				NodeIDs:       []int64{4, 3, 2, 1},
				Coords:        []r3.Vec{{X: 0, Y: 0, Z: 0}, {X: 1, Y: 0, Z: 0}, {X: 1, Y: 1, Z: 0}, {X: 0, Y: 1, Z: 1}},
				ElemIDs:       []int64{7, 9},
				ElemPart:      []int32{0, 1},
				ElemStart:     []int32{0, 3, 6},
				Conn:          []int32{0, 1, 2, 0, 2, 3},
				ElemThickness: []float64{1, 2},
				Sources:       []geom.Source{{File: name}},
			}
			if d := geomtest.Diff(m, want); d != "" {
				t.Errorf("%s:\n%s", name, d)
			}
		}
	}
}
