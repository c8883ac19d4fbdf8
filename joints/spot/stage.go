package spot

import (
	"slices"
	"sync"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// Stacks keeps the first stage of building each weld (its stack, its
// nugget and the checks of its sheets and stack: everything before the
// ends are attached) for builds that share it, so that a sweep whose
// variants differ only in attachment, degrees of freedom or link form
// finds each weld's stack once. It is safe for concurrent use; the zero
// value is ready. A build given a Stacks (BuildShared) makes the same
// connectors as Build.
type Stacks struct {
	mu     sync.Mutex
	stages map[stageKey]*stageSet
}

// stageKey holds the options the first stage reads (chooseStack,
// nugget, checkSheets, checkStack); the others (attachment, degrees of
// freedom, link form, node factor, id start) only shape what follows.
type stageKey struct {
	reach, gap, angle, lateral, edge float64
	rule                             joints.NuggetRule
}

func keyOf(o *joints.BuildOptions) stageKey {
	return stageKey{o.Reach, o.GapAllowance, o.AngleLimit, o.LateralFactor, o.EdgeFactor, o.Rule}
}

// stageSet is the first stage of every weld of a build, by weld index,
// computed once.
type stageSet struct {
	once   sync.Once
	stages []stage
}

// stage is the first stage of one weld.
type stage struct {
	stack    joints.Stack
	findings []joints.Finding
	diameter float64
	source   string
	// stop says the weld is not built: too few sheets or an error.
	stop bool
}

// firstStage finds a weld's stack and nugget and checks them.
func firstStage(x *geom.Index, j *joints.Joint, o *joints.BuildOptions) stage {
	var s stage
	var unlisted []joints.Sheet
	s.stack, s.findings, unlisted = chooseStack(x, j, o)
	if len(s.stack.Sheets) < 2 {
		s.stop = true
		return s
	}
	s.diameter, s.source = nugget(j, &s.stack, o)
	s.findings = append(s.findings, checkSheets(x.Mesh(), j, &s.stack, s.diameter, o)...)
	if joints.HasError(s.findings) {
		s.stop = true
		return s
	}
	s.findings = append(s.findings, checkStack(x, j, &s.stack, s.diameter, o, unlisted)...)
	return s
}

// set returns the stage set for the options o, and whether this call
// must fill it.
func (st *Stacks) set(o *joints.BuildOptions) *stageSet {
	st.mu.Lock()
	defer st.mu.Unlock()
	if st.stages == nil {
		st.stages = map[stageKey]*stageSet{}
	}
	k := keyOf(o)
	s := st.stages[k]
	if s == nil {
		s = &stageSet{}
		st.stages[k] = s
	}
	return s
}

// apply copies a stage into a connector, so that connectors of several
// builds share nothing they might change.
func (s *stage) apply(c *joints.Connector) {
	c.Stack = joints.Stack{Axis: s.stack.Axis, Sheets: slices.Clone(s.stack.Sheets)}
	c.Findings = slices.Clone(s.findings)
	c.Diameter, c.DiameterSource = s.diameter, s.source
}
