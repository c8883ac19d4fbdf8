package joints

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// Status is the state of one connector.
type Status int8

// Connector states.
const (
	// Built: the connector was made and no finding above info concerns it.
	Built Status = iota
	// Flagged: the connector was made, with warnings.
	Flagged
	// NotBuilt: the connector could not be made (an error finding says why).
	NotBuilt
)

// String returns "built", "flagged" or "not-built".
func (s Status) String() string {
	switch s {
	case Flagged:
		return "flagged"
	case NotBuilt:
		return "not-built"
	}
	return "built"
}

// Code returns the number that stands for the state in connectors.vtk's
// cell data "state": 1 built, 2 flagged, 3 not-built (Joinery's own
// numbering; documented in the README and the schema).
func (s Status) Code() int { return int(s) + 1 }

// Statuses lists every state, in order.
func Statuses() []Status { return []Status{Built, Flagged, NotBuilt} }

// Sheet is one sheet of a joint's stack: a part and the closest point of
// its mesh to the joint.
type Sheet struct {
	Part      int64
	Proj      geom.Projection
	Thickness float64 // mm, of the host element
	// Position is the signed coordinate of the sheet's mid-surface along
	// the stack axis, measured from the joint point, mm. It differs from
	// the projection's when the part is meshed on an outer surface.
	Position float64
	// Lateral is the distance of the projection point from the stack
	// axis, mm.
	Lateral float64
	// EdgeDistance is the distance from the projection point to the
	// part's nearest free edge, mm; +Inf when none lies within the
	// search radius of the edge check.
	EdgeDistance float64
}

// Stack is the ordered set of sheets a joint joins.
type Stack struct {
	Axis   r3.Vec  // unit; sheets are ordered by Position along it
	Sheets []Sheet // ordered through the stack
}

// Thicknesses returns the sheet thicknesses in stack order.
func (s *Stack) Thicknesses() []float64 {
	ts := make([]float64, len(s.Sheets))
	for i, sh := range s.Sheets {
		ts[i] = sh.Thickness
	}
	return ts
}

// Gaps returns the gap between the mid-surfaces of sheets i and j, in
// either order, along the axis (the later sheet's Position minus the
// earlier's) and square to the sheets (SquareGap of it), mm: a link's
// MidGap and SquareGap.
func (s *Stack) Gaps(i, j int) (along, square float64) {
	if i > j {
		i, j = j, i
	}
	a, b := &s.Sheets[i], &s.Sheets[j]
	along = b.Position - a.Position
	return along, SquareGap(along, a.Thickness, b.Thickness, a.Proj.Normal, b.Proj.Normal, s.Axis)
}

// Parts returns the part ids in stack order.
func (s *Stack) Parts() []int64 {
	ps := make([]int64, len(s.Sheets))
	for i, sh := range s.Sheets {
		ps[i] = sh.Part
	}
	return ps
}

// End is where a connector meets one sheet.
type End struct {
	Point r3.Vec // the connector's end point, mm
	// NodeIndex is the mesh node the end sits on (node-pair attachment),
	// or -1 when the end is a new node tied to Nodes.
	NodeIndex int32
	Nodes     []int32   // node indices the end is tied to
	Weights   []float64 // one per node, sum 1
}

// Link is one element of a connector between two of its nodes: across
// the gap between two consecutive sheets (GapLink), from a sheet's end
// to its faying face (OffsetLink), or between the faying points of two
// consecutive sheets (FayingJoint); see LinkKind.
type Link struct {
	ID   int64 // new element id
	Kind LinkKind
	// From and To are sheet indices in the stack: the two sheets a gap
	// link or faying joint joins; for an offset link, its own sheet
	// (From) and the sheet whose faying face it reaches toward (To).
	From, To  int
	Start     r3.Vec
	End       r3.Vec
	Length    float64 // mm
	Direction r3.Vec  // unit, Start to End; the zero vector for a zero-length link
	// Contact is the mid-surface gap of sheets From and To in contact,
	// (t1+t2)/2, mm.
	Contact float64
	// MidGap is the gap between the mid-surfaces of sheets From and To
	// along the stack axis (the later sheet's minus the earlier's), mm.
	// It differs from a gap link's Length when a part is meshed on an
	// outer surface, when the ends are nodes (node-pair), or when the
	// sheets are tilted to the axis.
	MidGap float64
	// SquareGap is the same gap square to the sheets (SquareGap of
	// MidGap; Stack.Gaps gives both), mm: the figure gap-open and
	// gap-closed compare with Contact. It equals MidGap on sheets square
	// to the axis.
	SquareGap float64
	// StartAt and EndAt name the nodes at the link's two ends.
	StartAt, EndAt NodeRef
	// NewEnd marks a link that brings a new node at End (an offset
	// link's faying point); NewResult gives it the id NewNode.
	NewEnd  bool
	NewNode int64
	// StartNode and EndNode are the ids of the nodes at the two ends,
	// set by NewResult: new end nodes, mesh nodes (node-pair) or new
	// faying nodes.
	StartNode, EndNode int64
	// DOFs are the degrees of freedom the link couples: the connector's
	// for gap links and faying joints, all six for offset links.
	DOFs DOFs
	// Mismatch (faying joints) is the distance across the stack axis
	// between the two faying points, mm; see OffsetMismatchFactor.
	Mismatch float64
}

// Connector is what a builder makes of one joint.
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
	// Bolt holds a bolt's own data; nil for spot welds.
	Bolt *BoltData
}

// SetStatus sets the connector's state from its findings: not-built when
// one is an error, flagged when one is a warning, else built.
func (c *Connector) SetStatus() {
	switch MaxSeverity(c.Findings) {
	case Error:
		c.Status = NotBuilt
	case Warning:
		c.Status = Flagged
	default:
		c.Status = Built
	}
}

// NotSupported returns the not-built connector of a joint whose kind no
// builder handles yet, with the attachment and degrees of freedom that o
// gives its group.
func NotSupported(j *Joint, o *BuildOptions) Connector {
	return Connector{Joint: *j, Status: NotBuilt, Attach: o.AttachFor(j.Group), DOFs: o.SpotDOFs, Findings: []Finding{j.Finding(Warning, CodeNotSupported, j.Parts,
		fmt.Sprintf("%s joints are not built yet; joint left out", j.Kind))}}
}

// Result is the outcome of a build.
type Result struct {
	Connectors []Connector // sorted by joint id
	// Findings holds every finding: the run's own (Joint == ""), then the
	// connectors' in joint order, each joint's in the order of the checks.
	Findings []Finding
	Options  BuildOptions
	IDStart  int64 // first new id
	NextID   int64 // one past the last new id used
	// Kinematics holds the counts of the kinematic checks run on the
	// connectors (joints/audit); nil when they were not run.
	Kinematics *Kinematics
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

// NewResult sorts the connectors by joint id (natural order, see
// CompareIDs), hands out new node and element ids in that order from
// o.IDStart (or DefaultIDStart above every id of m): per connector its
// new end nodes, then the new nodes its links bring, then its link
// elements. It sets every link's node ids and collects the findings,
// run findings first, then those about the new ids (see idFindings).
// It fails when the id start collides with the mesh's ids or the new
// ids do not fit in an int64.
func NewResult(m *geom.Mesh, conns []Connector, run []Finding, o BuildOptions) (*Result, error) {
	maxID := max(m.MaxNodeID(), m.MaxElemID())
	if o.IDStart > 0 && o.IDStart <= maxID {
		return nil, fmt.Errorf("joints: id start %d would collide with mesh ids (the largest is %d)", o.IDStart, maxID)
	}
	slices.SortStableFunc(conns, func(a, b Connector) int { return CompareIDs(a.Joint.ID, b.Joint.ID) })
	res := &Result{Connectors: conns, Options: o, IDStart: o.IDStart}
	if res.IDStart <= 0 {
		res.IDStart = DefaultIDStart(maxID)
	}
	need := int64(0)
	for _, c := range conns {
		if c.Status == NotBuilt {
			continue
		}
		need += int64(len(c.Links))
		for _, e := range c.Ends {
			if e.NodeIndex < 0 {
				need++
			}
		}
		for _, l := range c.Links {
			if l.NewEnd {
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
		if c.Status == NotBuilt {
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
			if c.Links[k].NewEnd {
				c.Links[k].NewNode = id
				id++
			}
		}
		for k := range c.Links {
			c.Links[k].ID = id
			id++
		}
		if err := c.resolveLinkNodes(m); err != nil {
			return nil, err
		}
	}
	res.NextID = id
	res.Findings = append(res.Findings, run...)
	res.Findings = append(res.Findings, idFindings(res.IDStart, res.NextID, maxID)...)
	for _, c := range res.Connectors {
		res.Findings = append(res.Findings, c.Findings...)
	}
	return res, nil
}

// idFindings returns the run findings about the new ids first to
// next-1 beside the mesh's largest id maxID: a warning (id-range) when
// they exceed MaxID32, which many solvers cannot hold, and a note
// (id-digits) when they have more digits than every id of the mesh, for
// readers of fixed-width id columns. None when no id was handed out.
func idFindings(first, next, maxID int64) []Finding {
	last := next - 1
	if last < first {
		return nil
	}
	var fs []Finding
	if last > MaxID32 {
		fs = append(fs, Finding{Severity: Warning, Code: CodeIDRange, Message: fmt.Sprintf(
			"new ids %d to %d exceed %d, the largest a 32-bit integer holds: solvers that keep ids in 32 bits cannot read them (choose a lower id start, or renumber the mesh)",
			first, last, int64(MaxID32))})
	}
	if digits(last) > digits(maxID) && maxID > 0 {
		fs = append(fs, Finding{Severity: Info, Code: CodeIDDigits, Message: fmt.Sprintf(
			"new ids %d to %d have up to %d digits, the mesh's ids at most %d (largest %d): fixed-width id columns must widen",
			first, last, digits(last), digits(maxID), maxID)})
	}
	return fs
}

// digits returns the number of decimal digits of a positive n.
func digits(n int64) int {
	d := 1
	for n >= 10 {
		n /= 10
		d++
	}
	return d
}

// DefaultIDStart returns the first id for new nodes and elements: the
// smallest multiple of the leading power of ten of maxID that exceeds
// maxID (412345 -> 500000, 99 -> 100, 0 -> 1), or maxID+1 when that
// multiple would not fit in an int64. It returns 0 when maxID is the
// largest int64: no id is left above it.
func DefaultIDStart(maxID int64) int64 {
	if maxID <= 0 {
		return 1
	}
	if maxID == math.MaxInt64 {
		return 0
	}
	step := int64(1)
	for step <= maxID/10 {
		step *= 10
	}
	if q := maxID/step + 1; q <= math.MaxInt64/step {
		return q * step
	}
	return maxID + 1
}

// MaxThickness returns the largest thickness of an element of a mesh,
// mm: of the thicknesses a build uses (geom.Mesh.Thickness: an element's
// own where its file gives one, else its part's), so that defaults taken
// from it (the reach) follow the same values.
func MaxThickness(m *geom.Mesh) float64 {
	t := 0.0
	if m.ElemThickness == nil {
		used := make([]bool, len(m.Parts))
		for _, pi := range m.ElemPart {
			used[pi] = true
		}
		for i, p := range m.Parts {
			if used[i] {
				t = math.Max(t, p.Thickness)
			}
		}
		return t
	}
	// What math.Max over every element's m.Thickness gives (+Inf if any is
	// +Inf, else NaN if any is NaN, else the largest), in a loop a build
	// can afford several times over 2,000,000 elements.
	nan := false
	for e, et := range m.ElemThickness {
		if et != et { // NaN: the part's thickness applies
			et = m.Parts[m.ElemPart[e]].Thickness
		}
		if et > t {
			t = et
		} else if et != et {
			nan = true
		}
	}
	if nan && !math.IsInf(t, 1) {
		return math.NaN()
	}
	return t
}

// PairKey orders two part ids: the smaller first.
func PairKey(a, b int64) [2]int64 {
	if a > b {
		a, b = b, a
	}
	return [2]int64{a, b}
}

// ComparePairs orders part pairs by their first, then second id.
func ComparePairs(a, b [2]int64) int { return cmp.Or(cmp.Compare(a[0], b[0]), cmp.Compare(a[1], b[1])) }
