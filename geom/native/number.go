package native

import (
	"math"

	"github.com/joinery-cae/joinery/geom/internal/decimal"
)

// parseFloat reads a real number of the format: the decimal grammar of
// package geom/internal/decimal, without infinities or NaN. The result is
// bit-identical to strconv.ParseFloat; a value beyond the float64 range
// yields ±Inf and ok=true, and callers check finiteness.
func parseFloat(s []byte) (float64, bool) { return decimal.Parse(s) }

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
