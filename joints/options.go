package joints

import (
	"fmt"
	"math"
	"strings"

	"github.com/joinery-cae/joinery/geom"
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
	return Interpolated, fmt.Errorf("unknown attachment %q (want interpolated, node-pair or patch)", geom.Excerpt(s))
}

// dofName returns the name of degree of freedom i (0 to 5), in the order
// Joinery writes them: tx ty tz rx ry rz.
func dofName(i int) string { return "txtytzrxryrz"[2*i : 2*i+2] }

// DOFs is a set of degrees of freedom, bit i for dofName(i).
type DOFs uint8

// AllDOFs couples every translation and rotation.
const AllDOFs DOFs = 0x3f

// Translations couples tx, ty and tz only.
const Translations DOFs = 0x07

// ParseDOFs reads a list of names from tx ty tz rx ry rz, separated by
// commas, '+' or spaces, or given as several strings; duplicates are an
// error.
func ParseDOFs(names ...string) (DOFs, error) {
	var d DOFs
	for _, s := range names {
		for _, f := range strings.FieldsFunc(s, func(r rune) bool { return r == ',' || r == ' ' || r == '+' }) {
			i := -1
			for k := range 6 {
				if dofName(k) == strings.ToLower(f) {
					i = k
				}
			}
			if i < 0 {
				return 0, fmt.Errorf("unknown degree of freedom %q (want tx ty tz rx ry rz)", geom.Excerpt(f))
			}
			if d&(1<<i) != 0 {
				return 0, fmt.Errorf("degree of freedom %q given twice", geom.Excerpt(f))
			}
			d |= 1 << i
		}
	}
	if d == 0 {
		return 0, fmt.Errorf("no degree of freedom given")
	}
	return d, nil
}

// String lists the DOFs as the flags take them: "tx,ty,tz".
func (d DOFs) String() string { return strings.Join(d.Names(), ",") }

// Names lists the DOFs in the order tx ty tz rx ry rz.
func (d DOFs) Names() []string {
	out := []string{}
	for i := range 6 {
		if d&(1<<i) != 0 {
			out = append(out, dofName(i))
		}
	}
	return out
}

// Defaults of the build options. Each states its source; "our choice"
// marks a judgement of Joinery's authors, documented in the README.
const (
	// DefaultReachFactor times the largest thickness t of the model is the
	// default reach, mm: from a point on the outer surface of a four-sheet
	// stack of the thickest parts the far mid-surface lies 3.5 t away,
	// plus three gaps at the limit of the default allowance (0.75 t) and
	// 0.25 t to spare (our choice, from that arithmetic).
	DefaultReachFactor = 4.5
	// DefaultGapAllowanceFactor times the contact gap (t1+t2)/2 of a
	// sheet pair is the default gap allowance: 0.25 mm for two 1 mm
	// sheets (our choice: formed parts meshed on their mid-surfaces
	// commonly sit a tenth or two of a millimetre off contact, and the
	// findings are warnings).
	DefaultGapAllowanceFactor = 0.25
	// DefaultAngleLimit, degrees: sheets whose normals differ by more
	// than this from the stack's axis are not part of the stack (our
	// choice: flanges of formed parts are near-parallel, a wall meeting a
	// flange is near-perpendicular).
	DefaultAngleLimit = 20.0
	// DefaultLateralFactor times the nugget radius bounds a sheet's
	// projection's distance from the stack axis (our choice).
	DefaultLateralFactor = 0.5
	// DefaultEdgeFactor nugget diameters is the least distance from a
	// weld centre to a sheet's free edge (common practice: about one
	// nugget diameter; REFERENCES.md gives 1.5 to 2 as a rule of thumb
	// for design, one is the limit below which the nugget runs off).
	DefaultEdgeFactor = 1.0
	// DefaultNodeFactor times the nugget radius bounds how far apart
	// across the stack the nodes of a node-pair connector may lie (our
	// choice).
	DefaultNodeFactor = 0.5
	// DefaultAttach is the default attachment.
	DefaultAttach = Interpolated
	// DefaultSpotDOFs are the degrees of freedom a spot weld couples by
	// default: all six (common practice for spot-weld connectors).
	DefaultSpotDOFs = AllDOFs
	// DefaultNuggetRule gives nugget diameters the list does not give.
	DefaultNuggetRule = Rule5Sqrt
	// NoReachThickness, mm, stands in for the largest thickness of a
	// model that has none, so that the default reach is not zero.
	NoReachThickness = 5.0 / DefaultReachFactor
	// MaxID32 is the largest id a 32-bit signed integer holds; many
	// solvers keep ids in 32 bits (common practice), so new ids above it
	// are reported (id-range).
	MaxID32 = 1<<31 - 1
)

// BuildOptions set how joints become connectors. Zero values mean the
// documented defaults (see Defaults and the Default constants).
type BuildOptions struct {
	// Reach, mm: sheets farther than this from a joint point are not
	// considered. Default DefaultReachFactor times the largest thickness.
	Reach float64
	// GapAllowance, mm: how far a measured gap between consecutive
	// mid-surfaces may differ from contact, (t1+t2)/2, before it is
	// reported. Default 0: DefaultGapAllowanceFactor times the contact
	// gap of each pair.
	GapAllowance float64
	// AngleLimit, degrees (DefaultAngleLimit).
	AngleLimit float64
	// LateralFactor (DefaultLateralFactor).
	LateralFactor float64
	// EdgeFactor (DefaultEdgeFactor).
	EdgeFactor float64
	// NodeFactor (DefaultNodeFactor).
	NodeFactor float64
	Attach     Attach
	// GroupAttach overrides Attach for the joints of a group.
	GroupAttach map[string]Attach
	// SpotDOFs are the degrees of freedom a spot-weld connector couples
	// (DefaultSpotDOFs).
	SpotDOFs DOFs
	// Rule gives nugget diameters where the joint list gives none
	// (DefaultNuggetRule).
	Rule NuggetRule
	// IDStart is the first id for new nodes and elements. Default: the
	// round number above every node and element id of the mesh (see
	// DefaultIDStart).
	IDStart int64
	// Links is the form of the links that bridge a stack (DefaultLinks,
	// the zero value).
	Links LinkForm
	// BoltDOFs are the degrees of freedom a bolt's rings couple, and its
	// support to ground holds (0: DefaultBoltDOFs; see BoltDOFsOrDefault).
	BoltDOFs DOFs
	// BoltCoupling is the coupling of a bolt's centres to their rings
	// (DefaultBoltCoupling, the zero value).
	BoltCoupling BoltCoupling
	// Shank is what stands for a bolt's shank (DefaultShank, the zero
	// value).
	Shank ShankForm
	// BoltRing says which nodes of a holed sheet a bolt couples
	// (DefaultBoltRing, the zero value).
	BoltRing BoltRing
	// ShankModulus, N/mm^2, of a beam shank (0: DefaultShankModulus).
	ShankModulus float64
	// HoleTolerance, mm (0: DefaultHoleTolerance).
	HoleTolerance float64
}

// BoltDOFsOrDefault returns the degrees of freedom a bolt couples.
func (o *BuildOptions) BoltDOFsOrDefault() DOFs {
	if o.BoltDOFs == 0 {
		return DefaultBoltDOFs
	}
	return o.BoltDOFs
}

// ShankModulusOrDefault returns the modulus of a beam shank, N/mm^2.
func (o *BuildOptions) ShankModulusOrDefault() float64 {
	if o.ShankModulus > 0 {
		return o.ShankModulus
	}
	return DefaultShankModulus
}

// HoleToleranceOrDefault returns the hole-size tolerance, mm.
func (o *BuildOptions) HoleToleranceOrDefault() float64 {
	if o.HoleTolerance > 0 {
		return o.HoleTolerance
	}
	return DefaultHoleTolerance
}

// Defaults returns o with zero fields set to their defaults; maxThickness
// is the largest sheet thickness of the model, mm.
func (o BuildOptions) Defaults(maxThickness float64) BuildOptions {
	if o.Reach <= 0 {
		if !(maxThickness > 0) {
			maxThickness = NoReachThickness
		}
		o.Reach = DefaultReachFactor * maxThickness
	}
	if o.AngleLimit <= 0 {
		o.AngleLimit = DefaultAngleLimit
	}
	if o.LateralFactor <= 0 {
		o.LateralFactor = DefaultLateralFactor
	}
	if o.EdgeFactor <= 0 {
		o.EdgeFactor = DefaultEdgeFactor
	}
	if o.NodeFactor <= 0 {
		o.NodeFactor = DefaultNodeFactor
	}
	if o.SpotDOFs == 0 {
		o.SpotDOFs = DefaultSpotDOFs
	}
	if o.Rule == 0 {
		o.Rule = DefaultNuggetRule
	}
	return o
}

// GapAllowanceFor returns the allowance for the gap between sheets of
// thickness t1 and t2, mm.
func (o *BuildOptions) GapAllowanceFor(t1, t2 float64) float64 {
	if o.GapAllowance > 0 {
		return o.GapAllowance
	}
	return DefaultGapAllowanceFactor * (t1 + t2) / 2
}

// AttachFor returns the attachment of a joint's group.
func (o *BuildOptions) AttachFor(group string) Attach {
	if a, ok := o.GroupAttach[group]; ok {
		return a
	}
	return o.Attach
}

// Validate checks the options a user gave: distances and allowances must
// be finite and not negative (0 means the default), factors and angles
// likewise, each at most its plausible bound (MaxReach, MaxGapAllowance,
// MaxAngleLimit, MaxFactor), and the id start not negative.
func (o *BuildOptions) Validate() error {
	for _, f := range []struct {
		name string
		v    float64
		max  float64
		unit string
	}{
		{"reach", o.Reach, MaxReach, " mm"}, {"gap allowance", o.GapAllowance, MaxGapAllowance, " mm"},
		{"angle limit", o.AngleLimit, MaxAngleLimit, " degrees"}, {"lateral factor", o.LateralFactor, MaxFactor, ""},
		{"edge factor", o.EdgeFactor, MaxFactor, ""}, {"node factor", o.NodeFactor, MaxFactor, ""},
	} {
		if math.IsNaN(f.v) || math.IsInf(f.v, 0) || f.v < 0 {
			return fmt.Errorf("%s %g: want a finite number, 0 or more (0 for the default)", f.name, f.v)
		}
		if f.v > f.max {
			return fmt.Errorf("%s %g%s: more than the %g%s that can make sense for a spot weld", f.name, f.v, f.unit, f.max, f.unit)
		}
	}
	if v := o.ShankModulus; math.IsNaN(v) || math.IsInf(v, 0) || v < 0 || v > MaxShankModulus {
		return fmt.Errorf("shank modulus %g: want a finite number from 0 (the default, steel) to %g N/mm^2", v, float64(MaxShankModulus))
	}
	if v := o.HoleTolerance; math.IsNaN(v) || math.IsInf(v, 0) || v < 0 || v > MaxGapAllowance {
		return fmt.Errorf("hole tolerance %g: want a finite number from 0 (the default) to %g mm", v, float64(MaxGapAllowance))
	}
	if o.IDStart < 0 {
		return fmt.Errorf("id start %d: want a positive id, or 0 for the default", o.IDStart)
	}
	return nil
}
