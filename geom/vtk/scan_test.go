package vtk

import (
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// TestScanFloat checks the token scanner built on the shared decimal
// parser against strconv.ParseFloat, the reference for correctly rounded
// conversion: the same value and the token's end, whatever follows it.
func TestScanFloat(t *testing.T) {
	cases := []string{
		"0", "-0", "+0", "0.0", "1", "-1", "10.5", "21.25", ".5", "5.", "-.5", "0.125",
		"1e3", "1E3", "1e+03", "1e-3", "2.0e+01", "123456789012345", "1234567890123456",
		"12345678901234567890", "0.1", "0.2", "0.3", "1e22", "1e23", "1e-22", "1e-23",
		"9007199254740993", "4.35", "1.7976931348623157e308", "5e-324", "1e-400",
		"0.000000000000000000000001", "3.14159265358979323846", "1e0001", "NaN", "inf", "-Inf",
		"1e999", "-1e999", "0x1p-2", "99999999999999.9",
	}
	rng := rand.New(rand.NewPCG(1, 1))
	for range 5000 {
		v := (rng.Float64() - 0.5) * math.Pow(10, float64(rng.IntN(30)-12))
		for _, prec := range []int{-1, 3, 6, 9, 15} {
			cases = append(cases, strconv.FormatFloat(v, 'g', prec, 64), strconv.FormatFloat(v, 'f', prec, 64))
		}
	}
	for _, s := range cases {
		want, err := strconv.ParseFloat(s, 64)
		wantOK := err == nil || err.(*strconv.NumError).Err == strconv.ErrRange
		if strings.HasPrefix(s, "0x") {
			wantOK = false // hexadecimal floats are not numbers of the format
		}
		for _, tail := range []string{"", " ", "\n7"} {
			b := []byte(s + tail)
			got, j, ok := scanFloat(b, 0)
			if ok != wantOK || ok && (math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) || j != len(s)) {
				t.Fatalf("scanFloat(%q) = %v, %d, %v; want %v, %d, %v", b, got, j, ok, want, len(s), wantOK)
			}
		}
	}
	for _, bad := range []string{"", "-", ".", "e5", "1e", "1e+", "1x", "1.2.3", "--1", "abc", "1,5"} {
		if _, _, ok := scanFloat([]byte(bad), 0); ok {
			t.Errorf("scanFloat(%q) accepted", bad)
		}
	}
}

// TestScanFloat32 checks the scanner for values declared float against
// strconv.ParseFloat with bitSize 32, a single correctly rounded
// decimal-to-float32 conversion (what VTK's reader does, the declared type
// of the legacy format, VTK file-format documentation, Kitware).
func TestScanFloat32(t *testing.T) {
	cases := []string{
		"0", "-0", "0.8", "1.25", "21.25", "0.1", "1e-3", "3.4028234663852886e38",
		"3.4028235677973366e38", "1e-45", "1.4e-45", "7e-46", "1e-40", "1.1754942e-38",
		"1e-50", "NaN", "inf", "-Inf", "1e999", "16777217", "0x1p-2",
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
		wantOK := (err == nil || err.(*strconv.NumError).Err == strconv.ErrRange) && !strings.HasPrefix(s, "0x")
		got, j, ok := scanFloat32([]byte(s+" "), 0)
		if ok != wantOK || ok && (math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) || j != len(s)) {
			t.Fatalf("scanFloat32(%q) = %v, %d, %v; want %v, %v", s, got, j, ok, want, wantOK)
		}
	}
	for _, bad := range []string{"", "-", "1x", "abc"} {
		if _, _, ok := scanFloat32([]byte(bad), 0); ok {
			t.Errorf("scanFloat32(%q) accepted", bad)
		}
	}
}

// TestScanInt checks the integer scanner against strconv.ParseInt.
func TestScanInt(t *testing.T) {
	cases := []string{"0", "-0", "+7", "42", "-42", "999999999999999999", "1000000000000000000",
		"9223372036854775807", "-9223372036854775808", "9223372036854775808", "",
		"-", "1.0", "1e3", "12a", "0x10", "007"}
	rng := rand.New(rand.NewPCG(2, 2))
	for range 10000 {
		cases = append(cases, strconv.FormatInt(rng.Int64()>>rng.IntN(63), 10), strconv.FormatInt(-rng.Int64N(1e12), 10))
	}
	for _, s := range cases {
		want, err := strconv.ParseInt(s, 10, 64)
		got, j, ok := scanInt([]byte(s+"\t"), 0)
		if ok != (err == nil) || ok && (got != want || j != len(s)) {
			t.Errorf("scanInt(%q) = %d, %d, %v; want %d, %v", s, got, j, ok, want, err)
		}
	}
}

// TestSkipNumbers checks the token skipper used for unused ASCII arrays.
func TestSkipNumbers(t *testing.T) {
	b := []byte(" 1 -2.5e3\n nan -inf Infinity +3 .5 POINTS 3")
	i, k, ok := skipNumbers(b, 0, 7)
	if !ok || k != 7 || string(b[skipSpace(b, i):]) != "POINTS 3" {
		t.Errorf("skipNumbers = %d, %d, %v", i, k, ok)
	}
	if _, k, ok := skipNumbers(b, 0, 8); ok || k != 7 {
		t.Errorf("skipNumbers ran past a keyword: %d, %v", k, ok)
	}
}
