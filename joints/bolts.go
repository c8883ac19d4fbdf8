package joints

import (
	"fmt"
	"math"

	"github.com/joinery-cae/joinery/geom"
)

// BoltCoupling is how a bolt's centre node on a sheet is coupled to the
// ring of nodes round its hole.
type BoltCoupling int8

// Coupling forms.
const (
	// RigidCoupling: each ring node's tied degrees of freedom follow the
	// centre's rigid motion, u_i = u_c + w_c × r_i (r_i from the centre to
	// the node). The ring moves as a rigid body with the centre, and
	// holds the centre's rotations through the ring's translations even
	// when only translations are tied. The default: with it a bolted pair
	// cannot hinge about the line of its bolts.
	RigidCoupling BoltCoupling = iota
	// AveragingCoupling: the centre follows the weighted mean of its
	// ring's motion; the ring keeps its own stiffness (a hole that can
	// ovalise). With translations only, nothing holds the centre's
	// rotations: the shank between two such centres spins about its own
	// axis, and the checks report it (unrestrained).
	AveragingCoupling
)

// String returns "rigid" or "averaging".
func (c BoltCoupling) String() string {
	if c == AveragingCoupling {
		return "averaging"
	}
	return "rigid"
}

// ParseBoltCoupling reads "rigid" or "averaging"; "" is the default.
func ParseBoltCoupling(s string) (BoltCoupling, error) {
	switch s {
	case "":
		return DefaultBoltCoupling, nil
	case "rigid":
		return RigidCoupling, nil
	case "averaging":
		return AveragingCoupling, nil
	}
	return DefaultBoltCoupling, fmt.Errorf("unknown bolt coupling %q (want rigid or averaging)", geom.Excerpt(s))
}

// ShankForm is what stands for a bolt's shank between the centres of
// consecutive sheets.
type ShankForm int8

// Shank forms.
const (
	// RigidShank: a rigid link on all six degrees of freedom. The default.
	RigidShank ShankForm = iota
	// BeamShank: a beam of the bolt's nominal diameter, of steel
	// (DefaultShankModulus, DefaultShankPoisson) unless an option says
	// otherwise.
	BeamShank
)

// String returns "rigid" or "beam".
func (f ShankForm) String() string {
	if f == BeamShank {
		return "beam"
	}
	return "rigid"
}

// ParseShankForm reads "rigid" or "beam"; "" is the default.
func ParseShankForm(s string) (ShankForm, error) {
	switch s {
	case "":
		return DefaultShank, nil
	case "rigid":
		return RigidShank, nil
	case "beam":
		return BeamShank, nil
	}
	return DefaultShank, fmt.Errorf("unknown shank form %q (want rigid or beam)", geom.Excerpt(s))
}

// BoltRing says which nodes of a holed sheet a bolt's centre couples.
type BoltRing int8

// Ring choices.
const (
	// HoleRing: the hole's edge nodes (the free-edge loop round the
	// axis). The default.
	HoleRing BoltRing = iota
	// WasherRing: every node of the sheet within the washer's radius of
	// the axis, the hole's edge nodes among them: for a fine mesh round
	// the hole, where the washer's footprint, not the hole's edge,
	// carries the clamping load.
	WasherRing
)

// String returns "hole" or "washer".
func (r BoltRing) String() string {
	if r == WasherRing {
		return "washer"
	}
	return "hole"
}

// ParseBoltRing reads "hole" or "washer"; "" is the default.
func ParseBoltRing(s string) (BoltRing, error) {
	switch s {
	case "":
		return DefaultBoltRing, nil
	case "hole":
		return HoleRing, nil
	case "washer":
		return WasherRing, nil
	}
	return DefaultBoltRing, fmt.Errorf("unknown bolt ring %q (want hole or washer)", geom.Excerpt(s))
}

// Defaults of the bolt options.
const (
	// DefaultBoltDOFs are the degrees of freedom a bolt's ring couples:
	// translations only (common practice: tying the shell's rotations at
	// a hole over-stiffens the joint).
	DefaultBoltDOFs = Translations
	// DefaultBoltCoupling is the rigid form (our choice: with averaging
	// rings and translations only, a bolted pair hinges about the line
	// of its bolts and each shank spins; the rigid form is well-posed).
	DefaultBoltCoupling = RigidCoupling
	// DefaultShank is a rigid link (our choice: the shank is far stiffer
	// than the sheets round it).
	DefaultShank = RigidShank
	// DefaultBoltRing is the hole's edge nodes (our choice, as the issue
	// of the design card asks).
	DefaultBoltRing = HoleRing
	// DefaultShankModulus, N/mm^2: structural steel, E = 210,000 N/mm^2
	// (EN 1993-1-1, clause 3.2.6; from memory). Bolts are steel whatever
	// the sheets are.
	DefaultShankModulus = 210000.0
	// DefaultShankPoisson is steel's Poisson's ratio, 0.3 (EN 1993-1-1,
	// clause 3.2.6; from memory).
	DefaultShankPoisson = 0.3
	// DefaultHoleTolerance, mm: how far a measured hole diameter may
	// differ from the declared one before hole-size is reported (our
	// choice: the smallest step between ISO 273 classes from M6 to M12 is
	// 0.2 mm, fine to medium at M6; a quarter millimetre keeps a hole
	// meshed on its nominal circle quiet and tells one class from the
	// next coarser one from M8 up).
	DefaultHoleTolerance = 0.25
	// MaxShankModulus, N/mm^2: far above any metal (steels 210,000,
	// tungsten about 400,000; from memory).
	MaxShankModulus = 1e6
)

// MetricBolt holds the published sizes of one metric bolt size.
type MetricBolt struct {
	Nominal float64 // nominal shank diameter d, mm (M10: 10)
	// WasherOuter is the outer diameter of the plain washer, ISO 7089,
	// mm.
	WasherOuter float64
	// Fine, Medium, Coarse are the ISO 273 clearance-hole diameters of
	// the three series, mm.
	Fine, Medium, Coarse float64
}

// MetricBolts returns the sizes Joinery checks bolts against, M6 to M12:
// plain washers ISO 7089 (outer diameter) and clearance holes ISO 273
// (fine, medium and coarse series), as given in REFERENCES.md.
func MetricBolts() []MetricBolt {
	return []MetricBolt{
		{Nominal: 6, WasherOuter: 12, Fine: 6.4, Medium: 6.6, Coarse: 7.0},     // ISO 7089; ISO 273
		{Nominal: 8, WasherOuter: 16, Fine: 8.4, Medium: 9.0, Coarse: 10.0},    // ISO 7089; ISO 273
		{Nominal: 10, WasherOuter: 20, Fine: 10.5, Medium: 11.0, Coarse: 12.0}, // ISO 7089; ISO 273
		{Nominal: 12, WasherOuter: 24, Fine: 13.0, Medium: 13.5, Coarse: 14.5}, // ISO 7089; ISO 273
	}
}

// SizeRoundoff, mm, is how far a listed bolt size (diameter, washer,
// hole) may lie from a value of the tables and still be that value: the
// rounding of sizes given in another unit (our choice: half a unit in
// the fourth significant digit of an inch size under 1 in, 0.00005 in,
// is 0.00127 mm, so that an M10 written 0.3937 in or 0.393701 in, which
// is 9.99998 or 10.0000054 mm, is an M10, and a 12 mm coarse hole
// written 0.472441 in, 12.0000014 mm, is no larger than the coarse
// hole; far below the tables' smallest step, 0.2 mm, and any tolerance
// a clearance hole is drilled to).
const SizeRoundoff = 0.005

// MetricBoltFor returns the tabled size of nominal diameter d, mm, and
// whether the table has it (within SizeRoundoff).
func MetricBoltFor(d float64) (MetricBolt, bool) {
	for _, b := range MetricBolts() {
		if math.Abs(d-b.Nominal) <= SizeRoundoff {
			return b, true
		}
	}
	return MetricBolt{}, false
}

// BoltData is what a bolt connector holds beside the shared connector
// fields: its coupling choices, its holes, and the support to ground.
type BoltData struct {
	Coupling BoltCoupling
	Shank    ShankForm
	Ring     BoltRing
	// ShankModulus and ShankPoisson are the beam shank's material,
	// N/mm^2 and 1 (BeamShank only).
	ShankModulus, ShankPoisson float64
	// Holes holds per sheet, in stack order, the hole found in the mesh.
	Holes []BoltHole
	// Support is the index of the sheet whose centre is supported to
	// ground, -1 when the bolt is not grounded; SupportDOFs are the
	// degrees of freedom held.
	Support     int
	SupportDOFs DOFs
}

// BoltHole is the hole of one sheet of a bolt.
type BoltHole struct {
	// Diameter is the measured diameter of the hole's free-edge loop,
	// that of the circle fitted to its corner nodes (Kasa's algebraic
	// fit; second-order edges' midside nodes left out), mm; 0 when the
	// mesh has no hole there.
	Diameter float64
	// Narrowest is the hole's least width through its centre: twice the
	// least distance of its corner nodes from the centre, mm (the diameter
	// on a round hole, the lesser axis on an oval one); 0 when the mesh
	// has no hole there.
	Narrowest float64
	// Ring says which nodes the centre couples: "hole" (the hole's edge
	// nodes), "washer" (every node within the washer's radius) or
	// "patch" (no hole meshed: the nodes within the washer's radius, at
	// least the host element's).
	Ring string
}
