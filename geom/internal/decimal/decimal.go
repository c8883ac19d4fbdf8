// Package decimal converts decimal number text to float64 for the mesh
// readers of geom, fast and bit-identical to strconv.ParseFloat.
//
// The grammar is the one of the mesh formats' real numbers: an optional
// sign, decimal digits with an optional decimal point (at least one digit
// in all: ".5" and "5." are numbers), and an optional exponent (e or E,
// an optional sign, at least one digit). Hexadecimal floats and digit
// separators are not numbers. The spellings of infinity and NaN are
// accepted only by ParseSpecial, for the formats that allow them.
//
// Short mantissas with small exponents take the exact fast path of
// W. D. Clinger, "How to read floating point numbers accurately" (PLDI
// 1990): when the decimal mantissa fits in 53 bits and the power of ten
// is exact in a float64, one IEEE multiplication or division is correctly
// rounded. Every other number goes to strconv.ParseFloat. A value beyond
// the float64 range gives ±Inf with ok = true: callers check finiteness
// where they need it.
package decimal

import (
	"math"
	"strconv"
)

// pow10 is a read-only table of the powers of ten that are exact in a
// float64 (10^22 is the largest: 5^22 < 2^53).
var pow10 = [...]float64{
	1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
}

// Parse reads s as one decimal number (see the package comment). ok is
// false when s is not exactly one number.
func Parse(s []byte) (v float64, ok bool) {
	v, n, ok := Scan(s)
	return v, ok && n == len(s)
}

// ParseSpecial is Parse that also accepts the spellings of infinity and
// NaN that strconv.ParseFloat reads: "inf", "infinity" and "nan" in any
// case, the first two with an optional sign.
func ParseSpecial(s []byte) (v float64, ok bool) {
	if v, ok = Parse(s); ok || len(s) == 0 || len(s) > len("+infinity") {
		return v, ok
	}
	switch c := s[0]; {
	case c == '+' || c == '-' || c == 'i' || c == 'I' || c == 'n' || c == 'N':
	default:
		return 0, false
	}
	var low [len("+infinity")]byte
	for i, c := range s {
		if c >= 'A' && c <= 'Z' {
			c += 'a' - 'A'
		}
		low[i] = c
	}
	switch string(low[:len(s)]) {
	case "inf", "+inf", "infinity", "+infinity":
		return math.Inf(1), true
	case "-inf", "-infinity":
		return math.Inf(-1), true
	case "nan":
		return math.NaN(), true
	}
	return 0, false
}

// Scan reads the decimal number at the start of s and returns it with
// the number of bytes it takes; what follows is not looked at. ok is
// false when s does not start with a number or its exponent has no
// digits.
func Scan(s []byte) (v float64, n int, ok bool) {
	// The mantissa of a number of at most 19 digits, leading zeros
	// included, fits in a uint64: the common case takes one tight loop
	// per part; longer mantissas go to scanLong.
	i := 0
	neg := false
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		neg = s[i] == '-'
		i++
	}
	start := i
	var mant uint64
	for ; i < len(s); i++ {
		c := s[i] - '0'
		if c > 9 {
			break
		}
		mant = mant*10 + uint64(c)
	}
	nd := i - start
	dp := 0
	if i < len(s) && s[i] == '.' {
		i++
		fs := i
		for ; i < len(s); i++ {
			c := s[i] - '0'
			if c > 9 {
				break
			}
			mant = mant*10 + uint64(c)
		}
		dp = fs - i
		nd -= dp
	}
	switch {
	case nd == 0:
		return 0, 0, false
	case nd > 19:
		return scanLong(s)
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		e, j, ok := exponent(s, i+1)
		if !ok {
			return 0, 0, false
		}
		dp += e
		i = j
	}
	// Clinger's fast path for the usual short numbers, here rather than
	// in convert to save a call per number.
	if mant <= 1<<53 && dp >= -22 && dp <= 22 {
		f := float64(mant)
		switch {
		case dp > 0:
			f *= pow10[dp]
		case dp < 0:
			f /= pow10[-dp]
		}
		if neg {
			f = -f
		}
		return f, i, true
	}
	return convert(s, i, neg, mant, dp, false)
}

// exponent reads the optionally signed digits of an exponent from s[i:]
// and returns its value (capped far beyond any float64 exponent) and the
// index after it; ok is false when there are no digits.
func exponent(s []byte, i int) (e, j int, ok bool) {
	eneg := false
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		eneg = s[i] == '-'
		i++
	}
	es := i
	for ; i < len(s); i++ {
		c := s[i] - '0'
		if c > 9 {
			break
		}
		if e < 100000 {
			e = e*10 + int(c)
		}
	}
	if i == es {
		return 0, 0, false
	}
	if eneg {
		e = -e
	}
	return e, i, true
}

// scanLong is Scan for mantissas of more than 19 digits: it keeps the 19
// significant ones and notes whether non-zero digits were dropped.
func scanLong(s []byte) (v float64, n int, ok bool) {
	i := 0
	neg := false
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		neg = s[i] == '-'
		i++
	}
	var (
		mant   uint64
		nd     int  // significant digits in mant
		dp     int  // decimal exponent to apply to mant
		digits bool // saw at least one mantissa digit
		trunc  bool // dropped non-zero digits beyond the 19th
	)
	for ; i < len(s); i++ {
		c := s[i] - '0'
		if c > 9 {
			break
		}
		digits = true
		switch {
		case mant == 0 && c == 0:
		case nd < 19:
			mant = mant*10 + uint64(c)
			nd++
		default:
			trunc = trunc || c != 0
			dp++
		}
	}
	if i < len(s) && s[i] == '.' {
		i++
		for ; i < len(s); i++ {
			c := s[i] - '0'
			if c > 9 {
				break
			}
			digits = true
			switch {
			case mant == 0 && c == 0:
				dp--
			case nd < 19:
				mant = mant*10 + uint64(c)
				nd++
				dp--
			default:
				trunc = trunc || c != 0
			}
		}
	}
	if !digits {
		return 0, 0, false
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		e, j, ok := exponent(s, i+1)
		if !ok {
			return 0, 0, false
		}
		dp += e
		i = j
	}
	return convert(s, i, neg, mant, dp, trunc)
}

// convert returns the value of the number s[:i], whose mantissa digits
// (without sign, point and exponent) are mant times 10^dp, trunc telling
// that non-zero digits beyond mant were dropped: by Clinger's fast path
// when it is exact, else by strconv.ParseFloat.
func convert(s []byte, i int, neg bool, mant uint64, dp int, trunc bool) (float64, int, bool) {
	if mant == 0 {
		if neg {
			return math.Copysign(0, -1), i, true
		}
		return 0, i, true
	}
	if !trunc && mant <= 1<<53 {
		f := float64(mant)
		if neg {
			f = -f
		}
		switch {
		case dp == 0:
			return f, i, true
		case dp > 0 && dp <= 22:
			return f * pow10[dp], i, true
		case dp < 0 && dp >= -22:
			return f / pow10[-dp], i, true
		case dp > 22 && dp <= 22+15:
			// mant * 10^(dp-22) may still be an exact integer; 1e15 is
			// the safe bound strconv uses (below 2^53, so no rounding
			// can slip under it).
			f *= pow10[dp-22]
			if f <= 1e15 && f >= -1e15 {
				return f * 1e22, i, true
			}
		}
	}
	v, err := strconv.ParseFloat(string(s[:i]), 64)
	if err != nil && !math.IsInf(v, 0) {
		return 0, 0, false
	}
	return v, i, true
}

// Float32 rounds v, the float64 nearest to the number text s, to the
// float32 nearest to s (returned as a float64), as a reader of values
// declared 32-bit must: rounding the decimal once, not twice. Values
// beyond the float32 range become infinite. The fast conversion float32(v)
// is exact except when v lies halfway between two float32 values or in
// their subnormal range; there s itself is converted, which strconv does
// correctly. ok is false only when s is not a number strconv reads.
func Float32(v float64, s []byte) (float64, bool) {
	const half = 1 << 28 // half a float32 unit in the last place, in float64 mantissa bits
	if bits := math.Float64bits(v); bits&(2*half-1) != half && !(v != 0 && math.Abs(v) < 0x1p-126) {
		return float64(float32(v)), true
	}
	w, err := strconv.ParseFloat(string(s), 32)
	if err != nil {
		if ne, ok := err.(*strconv.NumError); !ok || ne.Err != strconv.ErrRange {
			return 0, false
		}
	}
	return w, true
}
