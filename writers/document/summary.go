package document

import (
	"cmp"
	"fmt"
	"slices"

	"github.com/joinery-cae/joinery/joints"
)

// Summary counts a build's outcome.
type Summary struct {
	Joints    int            `json:"joints"`
	ByState   map[string]int `json:"by_state"`
	ByKind    map[string]int `json:"by_kind"`
	ByStack   map[string]int `json:"by_stack_size"` // "2", "3", ... sheets of built connectors
	ByCode    map[string]int `json:"by_code"`
	BySev     map[string]int `json:"by_severity"`
	PartPairs []PairCount    `json:"part_pairs"`
	// Assembly holds the counts of the kinematic checks; absent when they
	// did not run.
	Assembly *AssemblyCounts `json:"assembly,omitempty"`
}

// AssemblyCounts are the counts of the kinematic checks (see
// joints.Kinematics).
type AssemblyCounts struct {
	// Groups of parts joined by connectors (a part alone is a group).
	Groups int `json:"groups"`
	// Grounded groups are tied to ground.
	Grounded int `json:"grounded"`
	// RigidBodyModes: free motions of the whole assembly, 6 per group not
	// grounded plus every mechanism and unrestrained motion.
	RigidBodyModes int `json:"rigid_body_modes"`
	// Mechanisms: free motions of parts relative to each other.
	Mechanisms int `json:"mechanism_motions"`
	// Unrestrained: free motions of nodes that connectors create.
	Unrestrained int `json:"unrestrained_motions"`
}

// PairCount counts the connectors that join two parts directly (as
// consecutive sheets of a stack).
type PairCount struct {
	A     int64 `json:"a"` // the smaller part id
	B     int64 `json:"b"`
	Count int   `json:"connectors"`
	// Flagged counts those of them whose connector is flagged.
	Flagged int `json:"flagged"`
}

// Summarize counts a build's connectors and findings.
func Summarize(r *joints.Result) Summary {
	s := Summary{
		ByState: map[string]int{},
		ByKind:  map[string]int{},
		ByStack: map[string]int{},
		ByCode:  map[string]int{},
		BySev:   map[string]int{"error": 0, "warning": 0, "info": 0},
	}
	for _, st := range joints.Statuses() {
		s.ByState[st.String()] = 0
	}
	type pair struct{ a, b int64 }
	pairs := map[pair]*PairCount{}
	for _, c := range r.Connectors {
		s.Joints++
		s.ByState[c.Status.String()]++
		s.ByKind[c.Joint.Kind.String()]++
		if c.Status == joints.NotBuilt {
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
			if c.Status == joints.Flagged {
				pc.Flagged++
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
	if k := r.Kinematics; k != nil {
		s.Assembly = &AssemblyCounts{Groups: k.Groups, Grounded: k.Grounded, RigidBodyModes: k.RigidBodyModes,
			Mechanisms: k.Mechanisms, Unrestrained: k.Unrestrained}
	}
	return s
}
