package joints

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// LinkKind is what one link of a connector stands for.
type LinkKind int8

// Link kinds.
const (
	// GapLink joins the ends of a connector on two consecutive sheets
	// across the gap between their meshes (--links gap), coupling the
	// connector's degrees of freedom.
	GapLink LinkKind = iota
	// OffsetLink runs from a sheet's end along the sheet's normal to its
	// faying face, where it brings a new node (the faying point): a rigid
	// link, all six degrees of freedom (--links offset).
	OffsetLink
	// FayingJoint joins the faying points of two consecutive sheets: a
	// zero-length joint where the sheets touch, coupling the connector's
	// degrees of freedom (--links offset).
	FayingJoint
	// ShankLink is a bolt's shank between its centres on two consecutive
	// sheets (--links gap), or between their faying points (--links
	// offset): a rigid link or a beam (--shank), all six degrees of
	// freedom.
	ShankLink
)

// String returns "gap", "offset", "faying" or "shank".
func (k LinkKind) String() string {
	switch k {
	case OffsetLink:
		return "offset"
	case FayingJoint:
		return "faying"
	case ShankLink:
		return "shank"
	}
	return "gap"
}

// Code returns the number that stands for the kind in connectors.vtk's
// cell data "link_kind": 1 gap, 2 offset, 3 faying, 4 shank (Joinery's
// own numbering; documented in the README).
func (k LinkKind) Code() int { return int(k) + 1 }

// LinkKinds lists every link kind, in order.
func LinkKinds() []LinkKind { return []LinkKind{GapLink, OffsetLink, FayingJoint, ShankLink} }

// NodeRef names a node of a connector: the connector's end on sheet
// Index (New false), or the new node that link Index of the same
// connector brings at its End (New true).
type NodeRef struct {
	New   bool
	Index int
}

// SheetEnd names the connector's end on sheet i.
func SheetEnd(i int) NodeRef { return NodeRef{Index: i} }

// LinkNode names the new node link i brings at its End.
func LinkNode(i int) NodeRef { return NodeRef{New: true, Index: i} }

// resolveLinkNodes sets the node ids at the ends of c's links from their
// references, once the ids of the ends and link nodes are known. A
// reference to no such end or node is an error of the builder.
func (c *Connector) resolveLinkNodes(m *geom.Mesh) error {
	id := func(r NodeRef) (int64, error) {
		if r.New {
			if r.Index < 0 || r.Index >= len(c.Links) || !c.Links[r.Index].NewEnd {
				return 0, fmt.Errorf("joints: joint %s: a link refers to link %d, which brings no node", c.Joint.ID, r.Index)
			}
			return c.Links[r.Index].NewNode, nil
		}
		if r.Index < 0 || r.Index >= len(c.Ends) {
			return 0, fmt.Errorf("joints: joint %s: a link refers to sheet %d of %d", c.Joint.ID, r.Index, len(c.Ends))
		}
		if e := c.Ends[r.Index]; e.NodeIndex >= 0 {
			return m.NodeIDs[e.NodeIndex], nil
		}
		return c.EndIDs[r.Index], nil
	}
	for k := range c.Links {
		l := &c.Links[k]
		var err error
		if l.StartNode, err = id(l.StartAt); err != nil {
			return err
		}
		if l.EndNode, err = id(l.EndAt); err != nil {
			return err
		}
	}
	return nil
}

// LinkForm says how a connector bridges the sheets of its stack.
type LinkForm int8

// Link forms.
const (
	// GapLinks: one link per pair of consecutive sheets, between their
	// ends, across the gap (today's form, the default).
	GapLinks LinkForm = iota
	// OffsetLinks: per sheet an offset link from its end along its
	// normal to its faying face, and a zero-length faying joint between
	// the faying points of consecutive sheets.
	OffsetLinks
)

// DefaultLinks is the default link form: gap links, the form every
// earlier version wrote (our choice: it keeps outputs as they were).
const DefaultLinks = GapLinks

// String returns "gap" or "offset".
func (f LinkForm) String() string {
	if f == OffsetLinks {
		return "offset"
	}
	return "gap"
}

// ParseLinkForm reads "gap" or "offset"; "" is the default.
func ParseLinkForm(s string) (LinkForm, error) {
	switch s {
	case "":
		return DefaultLinks, nil
	case "gap":
		return GapLinks, nil
	case "offset":
		return OffsetLinks, nil
	}
	return DefaultLinks, fmt.Errorf("unknown link form %q (want gap or offset)", s)
}

// OffsetMismatchFactor times the thinner sheet's thickness is the largest
// distance across the stack axis between the faying points of two
// consecutive sheets before offset-mismatch is reported (our choice: a
// shell model resolves nothing finer than its thickness through the
// thickness, so faying points a tenth of it apart are one point at the
// model's scale; beyond that the zero-length joint couples points that
// are visibly apart, as when the normals at the two ends differ on a
// coarsely meshed curved flange).
const OffsetMismatchFactor = 0.1

// MinBeamShank, mm, is the shortest beam shank a bolt gets: a beam of
// no length has no stiffness matrix (EA/L, 12EI/L^3), so a shorter one
// is an error, shank-short (our choice: a hundredth of a millimetre,
// far below any sheet's thickness, far above rounding).
const MinBeamShank = 0.01

// FayingSide returns the side of a sheet, relative to its normal, on
// which a neighbour lies in direction toward: +1 when the neighbour lies
// on the side the normal points to, -1 when opposite. A normal square
// to toward (or zero) gives +1.
func FayingSide(normal, toward r3.Vec) int {
	if r3.Dot(normal, toward) < 0 {
		return -1
	}
	return 1
}

// NewOffsetLink returns the offset link of a sheet of thickness t meshed
// on surface s, from its attachment point at along its unit normal (the
// local normal at the point on curved sheets) to its faying face on side
// (+1: the face the normal points to, -1: the other; see FayingSide).
// The offset is the distance from the meshed surface to the faying face:
// t/2 for a mid-surface mesh, 0 for a mesh drawn on its faying face, t
// for one drawn on its far face. The link brings a new node at End (the
// faying point) and couples all six degrees of freedom; the caller sets
// From, To and the node references. The same form serves any joint that
// reaches a sheet through its thickness (spot welds, bolt shank ends).
func NewOffsetLink(at, normal r3.Vec, t float64, s geom.Surface, side int) Link {
	face := t / 2
	if side < 0 {
		face = -face
	}
	off := s.MidOffset(t) + face // signed, along the normal
	l := Link{Kind: OffsetLink, Start: at, End: r3.Add(at, r3.Scale(off, normal)), Length: math.Abs(off), NewEnd: true, DOFs: AllDOFs}
	if off > 0 {
		l.Direction = normal
	} else if off < 0 {
		l.Direction = r3.Scale(-1, normal)
	}
	return l
}

// LinkSpan returns the length and unit direction of a link from a to b. Ends
// within LengthRoundoff of each other are one point: the link has length
// 0 and the zero direction (a zero-length link, as the documents define
// it), so that the rounding of coordinates (1e-16 mm between faying
// points that coincide) gives a faying joint neither a length nor a
// direction, whatever the unit or the model's position.
func LinkSpan(a, b r3.Vec) (float64, r3.Vec) {
	d := r3.Sub(b, a)
	l := r3.Norm(d)
	if !(l > LengthRoundoff) {
		return 0, r3.Vec{}
	}
	return l, r3.Scale(1/l, d)
}

// Across returns the length of v's component square to the unit axis.
func Across(v, axis r3.Vec) float64 { return r3.Norm(r3.Sub(v, r3.Scale(r3.Dot(v, axis), axis))) }
