package tabular

import "testing"

func TestSuggest(t *testing.T) {
	known := []string{"id", "x", "y", "z", "kind", "parts", "diameter", "washer", "hole", "group"}
	tests := []struct {
		name, want string
	}{
		{"diamter", "diameter"},  // one letter dropped
		{"diametre", "diameter"}, // two letters swapped: distance 2
		{"Part_s", "parts"},      // case and underscore variant
		{"part", "parts"},        // distance 1
		{"Kind", "kind"},         // case only
		{"hol", "hole"},          // distance 1 on a four-letter name
		{"hl", ""},               // distance 2 on a four-letter name: too far
		{"a", ""},                // single letters match only folded: no "x"
		{"X ", "x"},              // trimmed and folded
		{"_id", "id"},            // folded
		{"ib", ""},               // two-letter names need a folded match
		{"torque", ""},           // nothing close
		{"washers", "washer"},    // distance 1
		{"gruop", "group"},       // distance 2
		{"diameter", "diameter"}, // exact
		{"nugget_diameter", ""},  // too far
		{string(make([]byte, 100)), ""},
	}
	for _, tt := range tests {
		if got := Suggest(tt.name, known); got != tt.want {
			t.Errorf("Suggest(%q) = %q, want %q", tt.name, got, tt.want)
		}
	}
}

func TestEditDistance(t *testing.T) {
	// Classic Levenshtein examples (closed-form by hand).
	tests := []struct {
		a, b string
		want int
	}{
		{"", "", 0},
		{"abc", "", 3},
		{"kitten", "sitting", 3},
		{"flaw", "lawn", 2},
		{"same", "same", 0},
	}
	for _, tt := range tests {
		if got := editDistance(tt.a, tt.b); got != tt.want {
			t.Errorf("editDistance(%q, %q) = %d, want %d", tt.a, tt.b, got, tt.want)
		}
		if got := editDistance(tt.b, tt.a); got != tt.want {
			t.Errorf("editDistance(%q, %q) = %d, want %d", tt.b, tt.a, got, tt.want)
		}
	}
}
