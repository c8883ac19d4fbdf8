package vtk

import (
	"math"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom/internal/decimal"
)

// isSpace reports whether c separates tokens: space, \t, \n, \v, \f, \r.
func isSpace(c byte) bool { return c == ' ' || c-'\t' <= '\r'-'\t' }

// skipSpace returns the index of the first non-space byte of b at or after i.
func skipSpace(b []byte, i int) int {
	for i < len(b) && isSpace(b[i]) {
		i++
	}
	return i
}

// tokenEnd returns the index just past the token that starts at i.
func tokenEnd(b []byte, i int) int {
	for i < len(b) && !isSpace(b[i]) {
		i++
	}
	return i
}

// scanInt parses the decimal integer token that starts at b[i] (i is not
// at a space). It returns the value and the index after the token, or
// ok=false when the token is not an integer that fits in int64.
func scanInt(b []byte, i int) (v int64, j int, ok bool) {
	start := i
	neg := false
	if i < len(b) && (b[i] == '-' || b[i] == '+') {
		neg = b[i] == '-'
		i++
	}
	ds := i
	var u uint64
	for i < len(b) {
		c := b[i] - '0'
		if c > 9 {
			break
		}
		u = u*10 + uint64(c)
		i++
	}
	if n := i - ds; n == 0 || n > 18 || (i < len(b) && !isSpace(b[i])) {
		return scanIntSlow(b, start)
	}
	if neg {
		return -int64(u), i, true
	}
	return int64(u), i, true
}

// scanIntSlow is scanInt's general path, through strconv.
func scanIntSlow(b []byte, i int) (int64, int, bool) {
	j := tokenEnd(b, i)
	v, err := strconv.ParseInt(string(b[i:j]), 10, 64)
	return v, j, err == nil
}

// scanFloat parses the real-number token that starts at b[i] (i is not at
// a space), with the decimal parser shared by the readers
// (geom/internal/decimal: bit-identical to strconv.ParseFloat). Besides
// decimal numbers the legacy format's text holds infinities and NaN in
// the spellings strconv.ParseFloat reads ("inf", "-Infinity", "nan"; VTK
// writes non-finite values so); hexadecimal floats are not numbers.
// Overflowing values become infinite.
func scanFloat(b []byte, i int) (v float64, j int, ok bool) {
	v, n, ok := decimal.Scan(b[i:])
	if j = i + n; ok && (j == len(b) || isSpace(b[j])) {
		return v, j, true
	}
	j = tokenEnd(b, i)
	v, ok = decimal.ParseSpecial(b[i:j])
	return v, j, ok
}

// scanFloat32 is scanFloat for values declared float (32 bits): the value
// is rounded to the nearest float32, as VTK's own reader stores it (the
// declared type of the legacy format, VTK file-format documentation,
// Kitware), so that an ASCII file and its binary twin give the same
// model. Values beyond the float32 range become infinite, as they do in
// scanFloat beyond the float64 range.
func scanFloat32(b []byte, i int) (float64, int, bool) {
	v, j, ok := scanFloat(b, i)
	if !ok {
		return v, j, false
	}
	v, ok = decimal.Float32(v, b[i:j])
	return v, j, ok
}

// scanInts parses len(dst) integer tokens from b starting at i. It returns
// the index after the last one; on failure it returns the start of the
// offending token (len(b) at the end of the data), how many values were
// read and ok=false.
func scanInts(b []byte, i int, dst []int64) (int, int, bool) {
	for k := range dst {
		i = skipSpace(b, i)
		v, j, ok := scanInt(b, i)
		if !ok {
			return i, k, false
		}
		dst[k] = v
		i = j
	}
	return i, len(dst), true
}

// scanWholeFloats is scanInts for integer arrays stored as reals: every
// value must be a whole number. f32 rounds the values to float32 first
// (scanFloat32).
func scanWholeFloats(b []byte, i int, dst []int64, f32 bool) (int, int, bool) {
	scan := scanFloat
	if f32 {
		scan = scanFloat32
	}
	for k := range dst {
		i = skipSpace(b, i)
		v, j, ok := scan(b, i)
		if !ok {
			return i, k, false
		}
		w, ok := wholeNumber(v)
		if !ok {
			return i, k, false
		}
		dst[k] = w
		i = j
	}
	return i, len(dst), true
}

// scanFloats parses len(dst) real tokens from b starting at i, with the
// results of scanInts. f32 rounds the values to float32 (scanFloat32).
func scanFloats(b []byte, i int, dst []float64, f32 bool) (int, int, bool) {
	for k := range dst {
		i = skipSpace(b, i)
		var (
			v  float64
			j  int
			ok bool
		)
		if f32 {
			v, j, ok = scanFloat32(b, i)
		} else {
			v, j, ok = scanFloat(b, i)
		}
		if !ok {
			return i, k, false
		}
		dst[k] = v
		i = j
	}
	return i, len(dst), true
}

// scanPoints parses 3*len(dst) real tokens into points, with the results
// of scanInts, counting values (not points). A NaN or infinite coordinate
// fails like a bad token. f32 rounds the values to float32 (scanFloat32).
func scanPoints(b []byte, i int, dst []r3.Vec, f32 bool) (int, int, bool) {
	var xyz [3]float64
	for k := range dst {
		for c := range xyz {
			i = skipSpace(b, i)
			var (
				v  float64
				j  int
				ok bool
			)
			if f32 {
				v, j, ok = scanFloat32(b, i)
			} else {
				v, j, ok = scanFloat(b, i)
			}
			if !ok || math.IsNaN(v) || math.IsInf(v, 0) {
				return i, 3*k + c, false
			}
			xyz[c] = v
			i = j
		}
		dst[k] = r3.Vec{X: xyz[0], Y: xyz[1], Z: xyz[2]}
	}
	return i, 3 * len(dst), true
}

// skipNumbers skips n number tokens from b starting at i, with the
// results of scanInts. Tokens are not converted, only checked to look
// like numbers (a digit, sign or point first, or a spelling of NaN or
// infinity), so that a short array is not read past the next keyword.
func skipNumbers(b []byte, i, n int) (int, int, bool) {
	for k := 0; k < n; k++ {
		i = skipSpace(b, i)
		if i >= len(b) {
			return i, k, false
		}
		j := tokenEnd(b, i)
		if !looksNumeric(b[i:j]) {
			return i, k, false
		}
		i = j
	}
	return i, n, true
}

// looksNumeric reports whether tok may be a number: it starts with a
// digit, a sign or a point, or spells NaN or infinity.
func looksNumeric(tok []byte) bool {
	c := tok[0]
	if c >= '0' && c <= '9' || c == '-' || c == '+' || c == '.' {
		return true
	}
	switch string(lower(tok)) {
	case "nan", "inf", "infinity":
		return true
	}
	return false
}

// lower returns tok in lower case (ASCII), reusing tok when it has no
// upper-case letters.
func lower(tok []byte) []byte {
	for i, c := range tok {
		if c >= 'A' && c <= 'Z' {
			out := make([]byte, len(tok))
			copy(out, tok)
			for j := i; j < len(out); j++ {
				if out[j] >= 'A' && out[j] <= 'Z' {
					out[j] += 'a' - 'A'
				}
			}
			return out
		}
	}
	return tok
}
