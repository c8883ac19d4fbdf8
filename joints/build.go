package joints

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"
	"time"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// Status is the outcome of one joint.
type Status int8

// Statuses.
const (
	StatusOK      Status = iota // built, no warning
	StatusWarning               // built, with warnings
	StatusFailed                // not built
)

// String returns "ok", "warning" or "failed".
func (s Status) String() string {
	switch s {
	case StatusWarning:
		return "warning"
	case StatusFailed:
		return "failed"
	}
	return "ok"
}

// Link joins the ends of a connector on two consecutive sheets.
type Link struct {
	ID        int64 // new element id
	From, To  int   // sheet indices in the stack
	Start     r3.Vec
	End       r3.Vec
	Length    float64 // mm
	Direction r3.Vec  // unit, Start to End; the zero vector for a zero-length link
	// Contact is the mid-surface gap of sheets in contact, (t1+t2)/2, mm.
	Contact float64
	// MidGap is the gap between the two sheets' mid-surfaces along the
	// stack axis, mm: the figure to compare with Contact. It differs from
	// Length when a part is meshed on an outer surface, when the ends are
	// nodes (node-pair), or when the sheets are tilted to the axis.
	MidGap float64
}

// Connector is what a build makes of one joint.
type Connector struct {
	Joint          Joint
	Status         Status
	Stack          Stack
	Diameter       float64 // nugget diameter, mm
	DiameterSource string  // "list" or the rule, e.g. "5sqrt"
	Attach         Attach
	DOFs           DOFs
	Ends           []End   // one per sheet, in stack order
	EndIDs         []int64 // new node id per end; 0 where the end is a mesh node
	Links          []Link
	Findings       []Finding
}

// Result is the outcome of a build.
type Result struct {
	Connectors []Connector // sorted by joint id
	Findings   []Finding   // every finding, by joint id, each joint's in the order of the checks
	Options    BuildOptions
	IDStart    int64 // first new id
	NextID     int64 // one past the last new id used
}

// MaxThickness returns the largest sheet thickness of a mesh, mm.
func MaxThickness(m *geom.Mesh) float64 {
	t := 0.0
	for _, p := range m.Parts {
		t = math.Max(t, p.Thickness)
	}
	for _, v := range m.ElemThickness {
		if !math.IsNaN(v) {
			t = math.Max(t, v)
		}
	}
	return t
}

// Build turns joints into connectors. Spot welds are built; other kinds
// are reported as not supported. Joints are processed in parallel and the
// result is the same whatever GOMAXPROCS: connectors come sorted by joint
// id, and new ids are handed out in that order.
func Build(ctx context.Context, x *geom.Index, js []Joint, o BuildOptions, prog geom.Progress) (*Result, error) {
	m := x.Mesh()
	if err := o.Validate(); err != nil {
		return nil, fmt.Errorf("joints: %w", err)
	}
	o = o.Defaults(MaxThickness(m))
	maxID := max(m.MaxNodeID(), m.MaxElemID())
	if o.IDStart > 0 && o.IDStart <= maxID {
		return nil, fmt.Errorf("joints: id start %d would collide with mesh ids (the largest is %d)", o.IDStart, maxID)
	}
	if prog == nil {
		prog = geom.NoProgress{}
	}
	sorted := slices.Clone(js)
	SortJoints(sorted)
	res := &Result{Options: o, Connectors: make([]Connector, len(sorted))}

	var next atomic.Int64
	var done atomic.Int64
	workers := min(runtime.GOMAXPROCS(0), max(1, len(sorted)/64))
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= len(sorted) || ctx.Err() != nil {
					return
				}
				res.Connectors[i] = buildOne(x, &sorted[i], &o)
				done.Add(1)
			}
		})
	}
	prog.Start("building connectors", int64(len(sorted)))
	finished := make(chan struct{})
	go func() { wg.Wait(); close(finished) }()
	tick := time.NewTicker(100 * time.Millisecond)
	var reported int64
	for waiting := true; waiting; {
		select {
		case <-finished:
			waiting = false
		case <-tick.C:
		}
		d := done.Load()
		prog.Add(d - reported)
		reported = d
	}
	tick.Stop()
	prog.Done()
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("joints: build interrupted: %w", err)
	}

	// New ids, in joint order; first make sure they fit in an int64.
	res.IDStart = o.IDStart
	if res.IDStart <= 0 {
		res.IDStart = DefaultIDStart(maxID)
	}
	need := int64(0)
	for _, c := range res.Connectors {
		if c.Status == StatusFailed {
			continue
		}
		need += int64(len(c.Links))
		for _, e := range c.Ends {
			if e.NodeIndex < 0 {
				need++
			}
		}
	}
	if res.IDStart <= 0 || res.IDStart-1 > math.MaxInt64-need {
		return nil, fmt.Errorf("joints: %d new ids do not fit between the mesh's largest id %d (or the id start) and the largest int64", need, maxID)
	}
	id := res.IDStart
	for i := range res.Connectors {
		c := &res.Connectors[i]
		if c.Status == StatusFailed {
			continue
		}
		c.EndIDs = make([]int64, len(c.Ends))
		for k, e := range c.Ends {
			if e.NodeIndex < 0 {
				c.EndIDs[k] = id
				id++
			}
		}
		for k := range c.Links {
			c.Links[k].ID = id
			id++
		}
	}
	res.NextID = id
	for _, c := range res.Connectors {
		res.Findings = append(res.Findings, c.Findings...)
	}
	return res, nil
}

// buildOne makes the connector of one joint.
func buildOne(x *geom.Index, j *Joint, o *BuildOptions) Connector {
	c := Connector{Joint: *j, Attach: o.attachFor(j.Group), DOFs: o.SpotDOFs}
	if j.Kind != Spot {
		c.Status = StatusFailed
		c.Findings = []Finding{jointFinding(j, Warning, CodeNotSupported, j.Parts,
			fmt.Sprintf("%s joints are not built yet; joint left out", j.Kind))}
		return c
	}
	m := x.Mesh()
	cands := candidates(x, j.Point, o.SearchDistance)
	if len(j.Parts) > 0 {
		var missing []int64
		c.Stack, missing = listedStack(m, cands, j.Point, j.Parts)
		for _, id := range missing {
			c.Findings = append(c.Findings, jointFinding(j, Error, CodePartNotFound, []int64{id},
				fmt.Sprintf("listed part %d has no element within %s mm of the weld", id, mm(o.SearchDistance))))
		}
	} else {
		c.Stack = autoStack(m, cands, j.Point, o, j.Diameter, o.Rule)
		var dropped []Sheet
		c.Stack, dropped = splitStack(&c.Stack)
		for _, s := range dropped {
			c.Findings = append(c.Findings, jointFinding(j, Info, CodeSheetApart, []int64{s.Part},
				fmt.Sprintf("part %d lies parallel %s mm from the weld, apart from the sheets in contact: not joined", s.Part, mm(math.Abs(s.Position)))))
		}
	}
	switch n := len(c.Stack.Sheets); {
	case n == 0 && len(c.Findings) == 0:
		c.Findings = append(c.Findings, jointFinding(j, Error, CodeNoSheet, nil,
			fmt.Sprintf("no sheet within %s mm of the weld", mm(o.SearchDistance))))
	case n == 1 && len(j.Parts) == 0:
		c.Findings = append(c.Findings, jointFinding(j, Error, CodeSingleSheet, c.Stack.Parts(),
			fmt.Sprintf("only part %d lies under the weld within %s mm: nothing to join", c.Stack.Sheets[0].Part, mm(o.SearchDistance))))
	case n > 4:
		c.Findings = append(c.Findings, jointFinding(j, Warning, CodeStackSize, c.Stack.Parts(),
			fmt.Sprintf("%d sheets in one stack; spot-welded stacks have 2 to 4", n)))
	}
	if len(c.Stack.Sheets) < 2 {
		if len(j.Parts) > 0 && len(c.Findings) == 0 {
			c.Findings = append(c.Findings, jointFinding(j, Error, CodeSingleSheet, c.Stack.Parts(),
				"fewer than two listed parts found: nothing to join"))
		}
		c.Status = StatusFailed
		return c
	}
	ts := c.Stack.Thicknesses()
	for i, t := range ts {
		if !(t > 0) {
			c.Findings = append(c.Findings, jointFinding(j, Error, CodeNoThickness, []int64{c.Stack.Sheets[i].Part},
				fmt.Sprintf("part %d has no thickness: give it one in the parts table", c.Stack.Sheets[i].Part)))
		}
	}
	c.Diameter, c.DiameterSource = j.Diameter, "list"
	if c.Diameter <= 0 {
		c.Diameter, c.DiameterSource = o.Rule.Diameter(GoverningThickness(ts)), o.Rule.String()
	}
	for _, s := range c.Stack.Sheets {
		switch {
		case r3.Norm2(s.Proj.Normal) == 0:
			c.Findings = append(c.Findings, jointFinding(j, Error, CodeDegenerate, []int64{s.Part},
				fmt.Sprintf("the element of part %d under the weld (id %d) has no area, so no normal", s.Part, m.ElemIDs[s.Proj.Elem])))
		case len(j.Parts) > 0 && s.Lateral > o.LateralFactor*c.Diameter/2:
			// Automatic stacks only hold sheets near the axis; listed ones
			// are held to the same limit here: the weld must lie over them.
			c.Findings = append(c.Findings, jointFinding(j, Error, CodeOffSheet, []int64{s.Part},
				fmt.Sprintf("listed part %d does not lie under the weld: its nearest point is %s mm off the weld axis (limit %s mm)",
					s.Part, mm(s.Lateral), mm(o.LateralFactor*c.Diameter/2))))
		}
	}
	if hasError(c.Findings) {
		c.Status = StatusFailed
		return c
	}
	if why := OutsideISO14373(ts); why != "" {
		c.Findings = append(c.Findings, jointFinding(j, Warning, CodeThicknessRange, c.Stack.Parts(),
			"stack outside the scope of ISO 14373: "+why))
	}
	c.Findings = append(c.Findings, checkGaps(&c.Stack, o, j)...)
	// One element query around the weld serves the edge check of every
	// sheet: it reaches 2*edgeLimit around each projection point.
	edgeLimit := o.EdgeFactor * c.Diameter
	reach := 0.0
	for _, s := range c.Stack.Sheets {
		reach = math.Max(reach, s.Proj.Dist)
	}
	var nbuf [256]int32
	near := x.ElemsNear(j.Point, reach+2*edgeLimit, nbuf[:0])
	for i := range c.Stack.Sheets {
		s := &c.Stack.Sheets[i]
		s.EdgeDistance = edgeDistance(m, near, s.Proj.Point, m.ElemPart[s.Proj.Elem], 2*edgeLimit)
		if s.EdgeDistance < edgeLimit {
			c.Findings = append(c.Findings, jointFinding(j, Warning, CodeEdgeClose, []int64{s.Part},
				fmt.Sprintf("weld centre %s mm from a free edge of part %d (minimum %s mm = %g nugget diameter(s))",
					mm(s.EdgeDistance), s.Part, mm(edgeLimit), o.EdgeFactor)))
		}
	}
	c.Ends = make([]End, len(c.Stack.Sheets))
	for i := range c.Stack.Sheets {
		s := &c.Stack.Sheets[i]
		switch c.Attach {
		case NodePair:
			c.Ends[i] = attachNodePair(x, s)
		case Patch:
			c.Ends[i] = attachPatch(x, s, c.Diameter/2)
		default:
			c.Ends[i] = attachInterpolated(m, s)
		}
	}
	if c.Attach == NodePair {
		c.Findings = append(c.Findings, checkFacing(&c.Stack, c.Ends, c.Diameter/2, o.NodeFactor*c.Diameter/2, j)...)
	}
	for i := 0; i+1 < len(c.Ends); i++ {
		a, b := c.Ends[i].Point, c.Ends[i+1].Point
		d := r3.Sub(b, a)
		l := r3.Norm(d)
		dir := r3.Vec{}
		if l > 0 {
			dir = r3.Scale(1/l, d)
		}
		c.Links = append(c.Links, Link{From: i, To: i + 1, Start: a, End: b, Length: l, Direction: dir,
			Contact: (ts[i] + ts[i+1]) / 2, MidGap: c.Stack.Sheets[i+1].Position - c.Stack.Sheets[i].Position})
	}
	c.Status = StatusOK
	if len(c.Findings) > 0 && maxSeverity(c.Findings) >= Warning {
		c.Status = StatusWarning
	}
	return c
}

func hasError(fs []Finding) bool { return len(fs) > 0 && maxSeverity(fs) == Error }

func maxSeverity(fs []Finding) Severity {
	s := Info
	for _, f := range fs {
		s = max(s, f.Severity)
	}
	return s
}
