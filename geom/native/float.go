package native

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

// parseFloat reads a decimal number: an optional sign, digits with an
// optional decimal point (at least one digit in all), and an optional
// exponent (e or E, optional sign, digits). Anything else, hexadecimal
// floats, underscores, "inf" and "nan" included, is rejected with ok=false.
//
// The result is bit-identical to strconv.ParseFloat(string(s), 64). Short
// mantissas with small exponents take the exact fast path of W. D. Clinger,
// "How to read floating point numbers accurately" (PLDI 1990): when the
// decimal mantissa fits in 53 bits and the power of ten is exact, one IEEE
// multiplication or division is correctly rounded. Every other token goes
// to strconv.ParseFloat. A value out of the float64 range yields ±Inf and
// ok=true; callers check finiteness.
func parseFloat(s []byte) (v float64, ok bool) {
	v, n, ok := scanFloat(s)
	return v, ok && n == len(s)
}

// scanFloat reads the decimal number at the start of s (see parseFloat)
// and returns it with the number of bytes it takes. ok is false when s
// does not start with a number or its exponent has no digits.
func scanFloat(s []byte) (v float64, n int, ok bool) {
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
		i++
		eneg := false
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			eneg = s[i] == '-'
			i++
		}
		e, es := 0, i
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
		dp += e
	}
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

// parseInt reads an optionally signed decimal integer that fits in an
// int64. Anything else yields ok=false.
func parseInt(s []byte) (v int64, ok bool) {
	i := 0
	neg := false
	if len(s) > 0 && (s[0] == '-' || s[0] == '+') {
		neg = s[0] == '-'
		i++
	}
	if i == len(s) || len(s)-i > 19 {
		return 0, false
	}
	var u uint64
	for ; i < len(s); i++ {
		c := s[i] - '0'
		if c > 9 {
			return 0, false
		}
		u = u*10 + uint64(c)
	}
	// 19 digits fit in a uint64; an int64 holds up to 2^63-1.
	if u > math.MaxInt64 {
		return 0, false
	}
	if neg {
		return -int64(u), true
	}
	return int64(u), true
}
