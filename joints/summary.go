package joints

import (
	"cmp"
	"fmt"
	"slices"
)

// Summary counts a build's outcome.
type Summary struct {
	Joints    int            `json:"joints"`
	ByStatus  map[string]int `json:"by_status"`
	ByKind    map[string]int `json:"by_kind"`
	ByStack   map[string]int `json:"by_stack_size"` // "2", "3", ... sheets of built connectors
	ByCode    map[string]int `json:"by_code"`
	BySev     map[string]int `json:"by_severity"`
	PartPairs []PairCount    `json:"part_pairs"`
}

// PairCount counts the connectors that join two parts directly (as
// consecutive sheets of a stack).
type PairCount struct {
	A     int64 `json:"a"` // the smaller part id
	B     int64 `json:"b"`
	Count int   `json:"connectors"`
	// Warnings counts those of them whose connector has a warning.
	Warnings int `json:"with_warnings"`
}

// Summarize counts a build's connectors and findings.
func Summarize(r *Result) Summary {
	s := Summary{
		ByStatus: map[string]int{"ok": 0, "warning": 0, "failed": 0},
		ByKind:   map[string]int{},
		ByStack:  map[string]int{},
		ByCode:   map[string]int{},
		BySev:    map[string]int{"error": 0, "warning": 0, "info": 0},
	}
	type pair struct{ a, b int64 }
	pairs := map[pair]*PairCount{}
	for _, c := range r.Connectors {
		s.Joints++
		s.ByStatus[c.Status.String()]++
		s.ByKind[c.Joint.Kind.String()]++
		if c.Status == StatusFailed {
			continue
		}
		s.ByStack[fmt.Sprint(len(c.Stack.Sheets))]++
		for i := 0; i+1 < len(c.Stack.Sheets); i++ {
			a, b := c.Stack.Sheets[i].Part, c.Stack.Sheets[i+1].Part
			if a > b {
				a, b = b, a
			}
			pc := pairs[pair{a, b}]
			if pc == nil {
				pc = &PairCount{A: a, B: b}
				pairs[pair{a, b}] = pc
			}
			pc.Count++
			if c.Status == StatusWarning {
				pc.Warnings++
			}
		}
	}
	for _, f := range r.Findings {
		s.ByCode[f.Code]++
		s.BySev[f.Severity.String()]++
	}
	for _, pc := range pairs {
		s.PartPairs = append(s.PartPairs, *pc)
	}
	slices.SortFunc(s.PartPairs, func(x, y PairCount) int { return cmp.Or(cmp.Compare(x.A, y.A), cmp.Compare(x.B, y.B)) })
	if s.PartPairs == nil {
		s.PartPairs = []PairCount{}
	}
	return s
}

// Reached reports whether any finding is at or above level.
func (r *Result) Reached(level Severity) bool {
	for _, f := range r.Findings {
		if f.Severity >= level {
			return true
		}
	}
	return false
}
