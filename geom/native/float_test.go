package native

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
)

// checkFloat compares parseFloat with strconv.ParseFloat on s: the same
// bits for every token of the decimal grammar, and a rejection for every
// other token.
func checkFloat(t *testing.T, s string, decimal bool) {
	t.Helper()
	got, ok := parseFloat([]byte(s))
	if !decimal {
		if ok {
			t.Errorf("parseFloat(%q) = %v, want a rejection", s, got)
		}
		return
	}
	want, err := strconv.ParseFloat(s, 64)
	if err != nil && !math.IsInf(want, 0) {
		t.Fatalf("strconv.ParseFloat(%q): %v", s, err)
	}
	if !ok || math.Float64bits(got) != math.Float64bits(want) {
		t.Errorf("parseFloat(%q) = %v (%#x), %v; strconv gives %v (%#x)", s, got, math.Float64bits(got), ok, want, math.Float64bits(want))
	}
}

func TestParseFloatEdges(t *testing.T) {
	decimal := []string{
		"0", "-0", "+0", "0.0", "-0.000e-999", "00000", ".5", "5.", "-.5e1", "+5.E+1",
		"1", "-1", "123.456", "-1.5e-3", "1e22", "1e23", "9007199254740992", "9007199254740993",
		"9007199254740993e-3", "123456789012345678", "1234567890123456789", "12345678901234567890",
		"0.30000000000000004", "0.1", "1e-22", "1e-23", "999e20", "1e15e0",
		"4.9e-324", "2.4e-324", "2.5e-324", "1e-400", "1.7976931348623157e308", "1.7976931348623159e308",
		"1e309", "-1e309", "1e100000000", "1e-100000000", "123456789e30", "9e37", "9000000000000000e22",
		"000000000000000000000000001.5", "0.00000000000000000000000000012345678901234567890123",
		"1.00000000000000011102230246251565404236316680908203125",
		"1.00000000000000011102230246251565404236316680908203124",
		"1.00000000000000011102230246251565404236316680908203126",
		"2.2250738585072011e-308", "2.2250738585072012e-308",
	}
	for _, s := range decimal {
		if s == "1e15e0" {
			checkFloat(t, s, false)
			continue
		}
		checkFloat(t, s, true)
	}
	for _, s := range []string{"", "+", "-", ".", "-.", "e5", ".e5", "1e", "1e+", "1e-", "1.5.2", "1,5", "inf", "-Inf", "NaN", "nan",
		"0x1p3", "0X1P-2", "1_000", "1e5x", " 1", "1 ", "--1", "+-1", "1e--5", "١"} {
		checkFloat(t, s, false)
	}
}

// TestParseFloatRandom compares parseFloat with strconv.ParseFloat on a
// million seeded random values in the formats writers and meshing tools
// use: shortest round trip, fixed decimals and exponent notation.
func TestParseFloatRandom(t *testing.T) {
	n := 1000000
	if testing.Short() {
		n = 100000
	}
	rng := rand.New(rand.NewPCG(1, 1))
	buf := make([]byte, 0, 64)
	for i := range n {
		var v float64
		switch i % 4 {
		case 0: // any bit pattern
			v = math.Float64frombits(rng.Uint64())
			if math.IsNaN(v) || math.IsInf(v, 0) {
				continue
			}
		case 1: // model coordinates in mm
			v = (rng.Float64() - 0.5) * 5000
		case 2: // small and large magnitudes
			v = rng.NormFloat64() * math.Pow(10, float64(rng.IntN(80)-40))
		default: // few digits
			v = float64(rng.IntN(2000001)-1000000) / math.Pow(10, float64(rng.IntN(8)))
		}
		var s []byte
		switch i % 5 {
		case 0, 1:
			s = strconv.AppendFloat(buf[:0], v, 'g', -1, 64)
		case 2:
			s = strconv.AppendFloat(buf[:0], v, 'f', rng.IntN(8), 64)
		case 3:
			s = strconv.AppendFloat(buf[:0], v, 'e', rng.IntN(20), 64)
		default:
			s = strconv.AppendFloat(buf[:0], v, 'g', rng.IntN(25)+1, 64)
		}
		got, ok := parseFloat(s)
		want, err := strconv.ParseFloat(string(s), 64)
		if err != nil && !math.IsInf(want, 0) {
			t.Fatalf("strconv.ParseFloat(%q): %v", s, err)
		}
		if !ok || math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("parseFloat(%q) = %v, %v; strconv gives %v", s, got, ok, want)
		}
	}
}

func TestParseInt(t *testing.T) {
	tests := []struct {
		in   string
		want int64
		ok   bool
	}{
		{"0", 0, true},
		{"7", 7, true},
		{"+7", 7, true},
		{"-7", -7, true},
		{"0000000000000000000000001", 0, false}, // more than 19 digits
		{"9223372036854775807", math.MaxInt64, true},
		{"-9223372036854775807", -math.MaxInt64, true},
		{"9223372036854775808", 0, false},
		{"9999999999999999999", 0, false},
		{"", 0, false},
		{"-", 0, false},
		{"1.0", 0, false},
		{"1e3", 0, false},
		{"12a", 0, false},
	}
	for _, tt := range tests {
		got, ok := parseInt([]byte(tt.in))
		if got != tt.want || ok != tt.ok {
			t.Errorf("parseInt(%q) = %d, %v; want %d, %v", tt.in, got, ok, tt.want, tt.ok)
		}
	}
}
