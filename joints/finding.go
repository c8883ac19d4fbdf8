package joints

import (
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// Severity ranks findings.
type Severity int8

// Severities, lowest first.
const (
	Info Severity = iota
	Warning
	Error
)

// String returns "info", "warning" or "error".
func (s Severity) String() string {
	switch s {
	case Warning:
		return "warning"
	case Error:
		return "error"
	}
	return "info"
}

// ParseFailOn reads the failure level of a run: "error", "warning",
// "info" or "never". The second result is false for "never".
func ParseFailOn(s string) (Severity, bool, error) {
	switch s {
	case "", "error":
		return Error, true, nil
	case "warning":
		return Warning, true, nil
	case "info":
		return Info, true, nil
	case "never":
		return Error, false, nil
	}
	return Error, false, fmt.Errorf("unknown failure level %q (want error, warning, info or never)", geom.Excerpt(s))
}

// Finding codes. Each names one kind of problem a run can report; the
// README lists them with their severities. The set is open: later
// versions add codes (see the schemas' versioning rule).
const (
	CodeNoSheet        = "no-sheet"        // no sheet within reach
	CodeSingleSheet    = "single-sheet"    // only one sheet found: nothing to join
	CodeGapOpen        = "gap-open"        // sheets do not touch: the weld would bridge air
	CodeGapClosed      = "gap-closed"      // mid-surfaces closer than contact allows
	CodeEdgeClose      = "edge-close"      // weld centre too near a sheet's free edge
	CodePartNotFound   = "part-not-found"  // a listed part has nothing within reach
	CodeNotSupported   = "not-supported"   // joint kind not built yet
	CodeThicknessRange = "thickness-range" // stack outside the ISO 14373 scope
	CodeStackSize      = "stack-size"      // more than four sheets
	CodeNodesApart     = "nodes-apart"     // node-pair attachment: nodes do not face each other
	CodeNoThickness    = "no-thickness"    // a sheet of the stack has no thickness
	CodeSheetApart     = "sheet-apart"     // a parallel sheet within reach but apart from the stack: left out
	CodeOffSheet       = "off-sheet"       // a listed sheet's nearest point lies off the weld axis
	CodeDegenerate     = "degenerate-host" // the host element has no area, so no normal
	CodeCellsSkipped   = "cells-skipped"   // a mesh file held cells of kinds Joinery does not read
	CodeIDRange        = "id-range"        // new ids above 2,147,483,647
	CodeIDDigits       = "id-digits"       // new ids have more digits than the mesh's
	CodeThicknessClash = "thickness-mismatch"
	CodeUnitsSuspect   = "units-suspect" // thicknesses and element sizes implausible for sheet metal in mm
	CodePatchCapped    = "patch-capped"  // a patch end ties MaxPatchNodes nodes, fewer than its nugget covers
	CodeSheetTilted    = "sheet-tilted"  // a listed sheet's normal lies beyond the angle limit of the weld axis

	// Codes of the audit of a set of welds (joints/audit), run by check
	// and after every build.
	CodeSeam         = "seam"         // welds whose attachments on a sheet touch, in a chain: the flange cannot open between them
	CodeDuplicate    = "duplicate"    // two welds whose nuggets overlap on a shared sheet, or on the same node pair
	CodePitchShort   = "pitch-short"  // consecutive welds of a part pair closer than the minimum spacing
	CodeFreePart     = "free-part"    // a part or group of parts joined by no connector to the largest group
	CodeMechanism    = "mechanism"    // parts the connectors do not hold against every rigid-body motion
	CodeUnrestrained = "unrestrained" // a node a connector creates with degrees of freedom nothing holds
	// Check only: a connectors.json read against a mesh that changed.
	CodeEndMoved = "end-moved" // an end rebuilt from its nodes and weights lies off the end point the document records
	// Flange finding and weld placement (joinery flanges); they use the
	// audit's pitch-short for a pitch below the table's minimum spacing.
	CodeFlangeNarrow   = "flange-narrow"   // flange narrower than the minimum overlap, or than the edge rule needs
	CodePitchTooFine   = "pitch-too-fine"  // mesh too coarse for the pitch: welds spaced wider so that they stay apart
	CodeFlangeShort    = "flange-short"    // flange shorter than its two end margins: no weld placed
	CodeStationSkipped = "station-skipped" // a station left empty (another weld or a sheet edge too near)
	CodeNoFlange       = "no-flange"       // a part pair asked for has no flange
	// Offset links and reference surfaces (--links offset, joinery offsets).
	CodeOffsetMismatch   = "offset-mismatch"   // faying points of consecutive sheets apart across the stack
	CodeNormalsFlipped   = "normals-flipped"   // elements whose normals disagree with their neighbours'
	CodeSurfaceDiffers   = "surface-differs"   // inferred reference surface differs from the parts table's
	CodeContactDisagrees = "contact-disagrees" // a contact the inferred surfaces do not explain
	CodeSurfaceUnsure    = "surface-unsure"    // too little evidence to tell a part's surface
	// Bolts (joints/bolt); they use the spot welds' no-sheet,
	// single-sheet, part-not-found, gap-open, gap-closed, no-thickness
	// and degenerate-host for the same problems.
	CodeHoleSize        = "hole-size"        // measured hole differs from the declared one by more than the tolerance
	CodeHoleClass       = "hole-class"       // declared hole larger than ISO 273's coarse series for the size
	CodeWasherSmall     = "washer-small"     // washer smaller than ISO 7089's for the size
	CodeWasherHole      = "washer-hole"      // washer does not cover the measured hole
	CodeShankShort      = "shank-short"      // a beam shank between centres that (nearly) coincide
	CodeHoleOffCentre   = "hole-off-centre"  // the bolt's point off the centre of a meshed hole
	CodeHolesMisaligned = "holes-misaligned" // a meshed hole's centre off the axis through the stack's holes by more than the clearance
	CodeFixtureSide     = "fixture-side"     // a grounded bolt's support side taken from an element normal
)

// Finding is one problem found with a joint (or with the run when Joint
// is empty).
type Finding struct {
	Severity Severity
	Code     string
	Joint    string  // joint id; "" for run-level findings
	Parts    []int64 // part ids concerned, in stack order
	Message  string
	Point    r3.Vec // where, mm
	HasPoint bool
	// Joints lists every joint a finding about several concerns, Joint
	// first (a seam chain, a duplicate pair, the welds of a hinge); nil
	// when it concerns Joint alone.
	Joints []string
	// Motion is the free motion of a mechanism or unrestrained finding;
	// nil for the others.
	Motion *Motion
}

// AllJoints returns the joints f concerns: Joints, else Joint alone,
// else none.
func (f *Finding) AllJoints() []string {
	switch {
	case len(f.Joints) > 0:
		return f.Joints
	case f.Joint != "":
		return []string{f.Joint}
	}
	return nil
}

// Finding returns a finding about j, located at its point.
func (j *Joint) Finding(sev Severity, code string, parts []int64, msg string) Finding {
	return Finding{Severity: sev, Code: code, Joint: j.ID, Parts: parts, Message: msg, Point: j.Point, HasPoint: true}
}

// MaxSeverity returns the highest severity among fs, Info when fs is empty.
func MaxSeverity(fs []Finding) Severity {
	s := Info
	for _, f := range fs {
		s = max(s, f.Severity)
	}
	return s
}

// HasError reports whether one of fs is an error.
func HasError(fs []Finding) bool { return MaxSeverity(fs) == Error }

// MM formats a length for messages: at most three decimals, no trailing
// zeros, "0" for values that round to zero; magnitudes of a billion or
// more in exponent form (1e+300, not 301 digits).
func MM(v float64) string {
	if math.Abs(v) >= 1e9 {
		return strconv.FormatFloat(v, 'g', 6, 64)
	}
	s := strconv.FormatFloat(v, 'f', 3, 64)
	for len(s) > 1 && s[len(s)-1] == '0' {
		s = s[:len(s)-1]
	}
	if s[len(s)-1] == '.' {
		s = s[:len(s)-1]
	}
	if s == "-0" {
		s = "0"
	}
	return s
}
