package decimal

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
)

// The reference for every check here is strconv.ParseFloat, Go's
// correctly rounded decimal conversion (IEEE 754 round to nearest even).

// checkParse compares Parse with strconv.ParseFloat on s: the same bits
// for every token of the decimal grammar, and a rejection for every
// other token.
func checkParse(t *testing.T, s string, decimal bool) {
	t.Helper()
	got, ok := Parse([]byte(s))
	if !decimal {
		if ok {
			t.Errorf("Parse(%q) = %v, want a rejection", s, got)
		}
		return
	}
	want, err := strconv.ParseFloat(s, 64)
	if err != nil && !math.IsInf(want, 0) {
		t.Fatalf("strconv.ParseFloat(%q): %v", s, err)
	}
	if !ok || math.Float64bits(got) != math.Float64bits(want) {
		t.Errorf("Parse(%q) = %v (%#x), %v; strconv gives %v (%#x)", s, got, math.Float64bits(got), ok, want, math.Float64bits(want))
	}
}

func TestParseEdges(t *testing.T) {
	decimal := []string{
		"0", "-0", "+0", "0.0", "-0.000e-999", "00000", ".5", "5.", "-.5e1", "+5.E+1",
		"1", "-1", "123.456", "-1.5e-3", "1e22", "1e23", "9007199254740992", "9007199254740993",
		"9007199254740993e-3", "123456789012345678", "1234567890123456789", "12345678901234567890",
		"0.30000000000000004", "0.1", "1e-22", "1e-23", "999e20",
		"4.9e-324", "2.4e-324", "2.5e-324", "1e-400", "1.7976931348623157e308", "1.7976931348623159e308",
		"1e309", "-1e309", "1e100000000", "1e-100000000", "123456789e30", "9e37", "9000000000000000e22",
		"000000000000000000000000001.5", "0.00000000000000000000000000012345678901234567890123",
		"1.00000000000000011102230246251565404236316680908203125",
		"1.00000000000000011102230246251565404236316680908203124",
		"1.00000000000000011102230246251565404236316680908203126",
		"2.2250738585072011e-308", "2.2250738585072012e-308", "1e0001", "99999999999999.9",
		"3.14159265358979323846",
	}
	for _, s := range decimal {
		checkParse(t, s, true)
	}
	for _, s := range []string{"", "+", "-", ".", "-.", "e5", ".e5", "1e", "1e+", "1e-", "1.5.2", "1,5", "inf", "-Inf", "NaN", "nan",
		"0x1p3", "0X1P-2", "1_000", "1e5x", " 1", "1 ", "--1", "+-1", "1e--5", "١", "1e15e0"} {
		checkParse(t, s, false)
	}
}

// TestParseRandom compares Parse with strconv.ParseFloat on a million
// seeded random values in the formats writers and meshing tools use:
// shortest round trip, fixed decimals and exponent notation.
func TestParseRandom(t *testing.T) {
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
		got, ok := Parse(s)
		want, err := strconv.ParseFloat(string(s), 64)
		if err != nil && !math.IsInf(want, 0) {
			t.Fatalf("strconv.ParseFloat(%q): %v", s, err)
		}
		if !ok || math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("Parse(%q) = %v, %v; strconv gives %v", s, got, ok, want)
		}
	}
}

// TestScanStopsAtTheNumber checks that Scan reads a number's prefix and
// reports its length, whatever follows.
func TestScanStopsAtTheNumber(t *testing.T) {
	for _, tt := range []struct {
		in   string
		n    int
		want float64
	}{
		{"1.5 2", 3, 1.5}, {"-2e3\n", 4, -2000}, {"7x", 1, 7}, {"1e5e", 3, 1e5}, {".5.5", 2, 0.5}, {"0#c", 1, 0},
	} {
		v, n, ok := Scan([]byte(tt.in))
		if !ok || n != tt.n || v != tt.want {
			t.Errorf("Scan(%q) = %v, %d, %v; want %v, %d", tt.in, v, n, ok, tt.want, tt.n)
		}
	}
	for _, bad := range []string{"", "x", "1e", "1e+ ", "-.e1"} {
		if _, _, ok := Scan([]byte(bad)); ok {
			t.Errorf("Scan(%q) accepted", bad)
		}
	}
}

// TestParseSpecial checks the spellings of infinity and NaN against
// strconv.ParseFloat, which reads the same set.
func TestParseSpecial(t *testing.T) {
	for _, s := range []string{"inf", "Inf", "-inf", "+INF", "infinity", "-Infinity", "+infinity", "nan", "NaN", "NAN",
		"+nan", "-nan", "infin", "infinityx", "in", "n", "+", "-", "1.5", "-0", "1e999", "0x1p-2", "nanx", ""} {
		want, err := strconv.ParseFloat(s, 64)
		wantOK := err == nil || err.(*strconv.NumError).Err == strconv.ErrRange
		if s == "0x1p-2" {
			wantOK = false // hexadecimal floats are not in the grammar
		}
		got, ok := ParseSpecial([]byte(s))
		if ok != wantOK || ok && math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
			t.Errorf("ParseSpecial(%q) = %v, %v; want %v, %v", s, got, ok, want, wantOK)
		}
	}
}

// TestFloat32 checks the rounding of values declared 32-bit against
// strconv.ParseFloat with bitSize 32, one correctly rounded
// decimal-to-float32 conversion.
func TestFloat32(t *testing.T) {
	cases := []string{
		"0", "-0", "0.8", "1.25", "21.25", "0.1", "1e-3", "3.4028234663852886e38",
		"3.4028235677973366e38", "1e-45", "1.4e-45", "7e-46", "1e-40", "1.1754942e-38",
		"1e-50", "nan", "inf", "-Inf", "1e999", "16777217",
		// The float64 nearest to these is halfway between the float32
		// values 1 and 1+2^-23, but the decimals are not (1+2^-24 plus or
		// minus 2^-54): rounding twice would give 1 for both.
		"1.000000059604644830901776231257827021181583404541015625",
		"1.000000059604644719879473768742172978818416595458984375",
		"1.000000059604644775390625", // exactly halfway: ties to even, 1
	}
	rng := rand.New(rand.NewPCG(3, 3))
	for range 5000 {
		f := float32((rng.Float64() - 0.5) * math.Pow(10, float64(rng.IntN(80)-40)))
		v := (rng.Float64() - 0.5) * math.Pow(10, float64(rng.IntN(80)-40))
		cases = append(cases, strconv.FormatFloat(float64(f), 'g', -1, 32), strconv.FormatFloat(v, 'g', -1, 64),
			strconv.FormatFloat(v, 'g', 9, 64), strconv.FormatFloat(v, 'e', 20, 64))
	}
	for _, s := range cases {
		want, err := strconv.ParseFloat(s, 32)
		if err != nil && err.(*strconv.NumError).Err != strconv.ErrRange {
			t.Fatalf("strconv.ParseFloat(%q, 32): %v", s, err)
		}
		v, ok := ParseSpecial([]byte(s))
		if !ok {
			t.Fatalf("ParseSpecial(%q) rejected", s)
		}
		got, ok := Float32(v, []byte(s))
		if !ok || math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
			t.Fatalf("Float32(%q) = %v, %v; want %v", s, got, ok, want)
		}
	}
}

// FuzzParse checks Parse against strconv.ParseFloat on any input: the
// same value for every number of the grammar, and never a value for
// text strconv rejects.
func FuzzParse(f *testing.F) {
	for _, s := range []string{"0", "1.5", "-2e-3", ".5", "5.", "1e309", "9007199254740993", "inf", "0x1p3", "1_0"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		got, ok := Parse([]byte(s))
		if !ok {
			return
		}
		want, err := strconv.ParseFloat(s, 64)
		if err != nil && !math.IsInf(want, 0) {
			t.Fatalf("Parse(%q) = %v, strconv rejects it: %v", s, got, err)
		}
		if math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("Parse(%q) = %v, strconv gives %v", s, got, want)
		}
	})
}

func BenchmarkParse(b *testing.B) {
	toks := [][]byte{[]byte("123.456"), []byte("-1.5e-3"), []byte("0"), []byte("2047.125"), []byte("-0.30000000000000004")}
	b.Run("fast", func(b *testing.B) {
		for b.Loop() {
			for _, t := range toks {
				Parse(t)
			}
		}
	})
	b.Run("strconv", func(b *testing.B) {
		for b.Loop() {
			for _, t := range toks {
				strconv.ParseFloat(string(t), 64)
			}
		}
	})
}
