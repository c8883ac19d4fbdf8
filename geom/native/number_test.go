package native

import (
	"math"
	"testing"
)

// TestParseFloatFormatRules checks the format's rules on top of the
// shared decimal parser (tested bit for bit against strconv.ParseFloat in
// geom/internal/decimal): infinities, NaN and hexadecimal floats are not
// numbers of the native format; values beyond the float64 range read as
// infinite, for the caller to reject.
func TestParseFloatFormatRules(t *testing.T) {
	for _, s := range []string{"inf", "-Inf", "NaN", "nan", "infinity", "0x1p3", "1_000", "1.5#x"} {
		if v, ok := parseFloat([]byte(s)); ok {
			t.Errorf("parseFloat(%q) = %v, want a rejection", s, v)
		}
	}
	if v, ok := parseFloat([]byte("1e309")); !ok || !math.IsInf(v, 1) {
		t.Errorf("parseFloat(1e309) = %v, %v; want +Inf, true", v, ok)
	}
	if v, ok := parseFloat([]byte("-12.5e-1")); !ok || v != -1.25 {
		t.Errorf("parseFloat(-12.5e-1) = %v, %v", v, ok)
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
