package tabular

import "strings"

// Suggest returns the name in known that name is most likely a misspelling
// of, or "" when none is close. Names match when they are equal after
// lower-casing and dropping '_', '-', '.' and spaces ("Part_IDs" and
// "partids"), or when their lower-case edit distance (Levenshtein) is at
// most 2 for known names of five letters or more, at most 1 for three or
// four letters, and 0 for shorter ones (so "a" is not taken for "x").
// Ties go to the earlier name in known. An exact match returns that name.
func Suggest(name string, known []string) string {
	if len(name) > 64 {
		return ""
	}
	low := strings.ToLower(strings.TrimSpace(name))
	folded := fold(low)
	best, bestD := "", 3
	for _, k := range known {
		kl := strings.ToLower(k)
		if folded == fold(kl) {
			return k
		}
		limit := 2
		switch {
		case len(kl) <= 2:
			limit = 0
		case len(kl) <= 4:
			limit = 1
		}
		if d := absDiff(len(low), len(kl)); d > limit || d >= bestD {
			continue
		}
		if d := editDistance(low, kl); d <= limit && d < bestD {
			best, bestD = k, d
		}
	}
	return best
}

func fold(s string) string {
	return strings.Map(func(r rune) rune {
		switch r {
		case '_', '-', '.', ' ', '\t':
			return -1
		}
		return r
	}, s)
}

func absDiff(a, b int) int {
	if a > b {
		return a - b
	}
	return b - a
}

// editDistance returns the Levenshtein distance between a and b, counted
// in bytes (names are ASCII in practice).
func editDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}

// didYouMean returns ` (did you mean "x"?)` for a close known name, or the
// list of known names when none is close.
func didYouMean(name string, known []string) string {
	if s := Suggest(name, known); s != "" {
		return ` (did you mean "` + s + `"?)`
	}
	return " (known: " + strings.Join(known, ", ") + ")"
}
