package joints

import (
	"fmt"
	"math"
	"slices"
	"strings"
)

// Attach says how a connector end is tied to its sheet.
type Attach int8

// Attachment methods.
const (
	// Interpolated puts the end at the projection point and ties it to the
	// host element's nodes with the shape-function weights; independent of
	// the mesh. The default.
	Interpolated Attach = iota
	// NodePair uses the nearest node of each sheet; the classic
	// mesh-dependent form, which needs facing nodes.
	NodePair
	// Patch ties the end to every node of the sheet within the nugget
	// radius (at least the host element's nodes).
	Patch
)

// String returns "interpolated", "node-pair" or "patch".
func (a Attach) String() string {
	switch a {
	case NodePair:
		return "node-pair"
	case Patch:
		return "patch"
	}
	return "interpolated"
}

// ParseAttach reads "interpolated", "node-pair" or "patch".
func ParseAttach(s string) (Attach, error) {
	switch s {
	case "", "interpolated":
		return Interpolated, nil
	case "node-pair":
		return NodePair, nil
	case "patch":
		return Patch, nil
	}
	return Interpolated, fmt.Errorf("unknown attachment %q (want interpolated, node-pair or patch)", s)
}

// DOF names, in the order Joinery writes them.
var dofOrder = [6]string{"tx", "ty", "tz", "rx", "ry", "rz"}

// DOFs is a set of degrees of freedom, bit i for dofOrder[i].
type DOFs uint8

// AllDOFs couples every translation and rotation.
const AllDOFs DOFs = 0x3f

// Translations couples tx, ty and tz only.
const Translations DOFs = 0x07

// ParseDOFs reads a list of names from tx ty tz rx ry rz, separated by
// commas or spaces, or given as several strings; duplicates are an error.
func ParseDOFs(names ...string) (DOFs, error) {
	var d DOFs
	for _, s := range names {
		for _, f := range strings.FieldsFunc(s, func(r rune) bool { return r == ',' || r == ' ' }) {
			i := slices.Index(dofOrder[:], strings.ToLower(f))
			if i < 0 {
				return 0, fmt.Errorf("unknown degree of freedom %q (want tx ty tz rx ry rz)", f)
			}
			if d&(1<<i) != 0 {
				return 0, fmt.Errorf("degree of freedom %q given twice", f)
			}
			d |= 1 << i
		}
	}
	if d == 0 {
		return 0, fmt.Errorf("no degree of freedom given")
	}
	return d, nil
}

// Names lists the DOFs in the order tx ty tz rx ry rz.
func (d DOFs) Names() []string {
	out := []string{}
	for i, n := range dofOrder {
		if d&(1<<i) != 0 {
			out = append(out, n)
		}
	}
	return out
}

// BuildOptions set how spot welds become connectors. Zero values mean the
// documented defaults (see Defaults).
type BuildOptions struct {
	// SearchDistance, mm: sheets farther than this from a weld point are
	// not considered. Default 4.5 times the largest thickness t in the
	// model: from a point on the outer surface of a four-sheet stack of
	// the thickest parts the far mid-surface lies 3.5 t away, plus three
	// gaps at the limit of the default tolerance (0.75 t) and 0.25 t to
	// spare.
	SearchDistance float64
	// GapTolerance, mm: how far a measured gap between consecutive
	// mid-surfaces may differ from contact, (t1+t2)/2, before it is
	// reported. Default 0: a quarter of the contact gap of each pair,
	// 0.25*(t1+t2)/2 (our choice: 0.25 mm for two 1 mm sheets; formed
	// parts meshed on their mid-surfaces commonly sit a tenth or two of a
	// millimetre off contact, and the findings are warnings).
	GapTolerance float64
	// AngleTolerance, degrees: sheets whose normals differ by more than
	// this from the stack's axis are not part of the stack. Default 20
	// degrees (our choice: flanges of formed parts are near-parallel, a
	// wall meeting a flange is near-perpendicular).
	AngleTolerance float64
	// LateralFactor: a sheet's projection must lie within LateralFactor
	// times the nugget radius of the stack's axis. Default 0.5 (our
	// choice).
	LateralFactor float64
	// EdgeFactor: a weld centre closer than EdgeFactor nugget diameters to
	// a sheet's free edge is reported. Default 1 (common practice: about
	// one nugget diameter from the weld centre to the edge).
	EdgeFactor float64
	// NodeFactor, node-pair attachment: nodes of consecutive sheets face
	// each other when their offset across the stack axis is at most
	// NodeFactor times the nugget radius. Default 0.5 (our choice).
	NodeFactor float64
	Attach     Attach
	// GroupAttach overrides Attach for the joints of a group.
	GroupAttach map[string]Attach
	// SpotDOFs are the degrees of freedom a spot-weld connector couples.
	// Default all six.
	SpotDOFs DOFs
	// Rule gives nugget diameters where the joint list gives none.
	// Default 5*sqrt(t).
	Rule NuggetRule
	// IDStart is the first id for new nodes and elements. Default: the
	// round number above every node and element id of the mesh (see
	// DefaultIDStart).
	IDStart int64
}

// Defaults returns o with zero fields set to their defaults; maxThickness
// is the largest sheet thickness of the model, mm.
func (o BuildOptions) Defaults(maxThickness float64) BuildOptions {
	if o.SearchDistance <= 0 {
		o.SearchDistance = 4.5 * maxThickness
		if o.SearchDistance <= 0 {
			o.SearchDistance = 5
		}
	}
	if o.AngleTolerance <= 0 {
		o.AngleTolerance = 20
	}
	if o.LateralFactor <= 0 {
		o.LateralFactor = 0.5
	}
	if o.EdgeFactor <= 0 {
		o.EdgeFactor = 1
	}
	if o.NodeFactor <= 0 {
		o.NodeFactor = 0.5
	}
	if o.SpotDOFs == 0 {
		o.SpotDOFs = AllDOFs
	}
	if o.Rule == 0 {
		o.Rule = Rule5Sqrt
	}
	return o
}

// gapTolerance returns the tolerance for the gap between sheets of
// thickness t1 and t2.
func (o *BuildOptions) gapTolerance(t1, t2 float64) float64 {
	if o.GapTolerance > 0 {
		return o.GapTolerance
	}
	return 0.25 * (t1 + t2) / 2
}

// attachFor returns the attachment of a joint's group.
func (o *BuildOptions) attachFor(group string) Attach {
	if a, ok := o.GroupAttach[group]; ok {
		return a
	}
	return o.Attach
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

// Validate checks the options a user gave: distances and tolerances must
// be finite and not negative (0 means the default), factors and angles
// likewise, and the id start not negative.
func (o *BuildOptions) Validate() error {
	for _, f := range []struct {
		name string
		v    float64
	}{
		{"search distance", o.SearchDistance}, {"gap tolerance", o.GapTolerance},
		{"angle tolerance", o.AngleTolerance}, {"lateral factor", o.LateralFactor},
		{"edge factor", o.EdgeFactor}, {"node factor", o.NodeFactor},
	} {
		if math.IsNaN(f.v) || math.IsInf(f.v, 0) || f.v < 0 {
			return fmt.Errorf("%s %g: want a finite number, 0 or more (0 for the default)", f.name, f.v)
		}
	}
	if o.IDStart < 0 {
		return fmt.Errorf("id start %d: want a positive id, or 0 for the default", o.IDStart)
	}
	return nil
}
