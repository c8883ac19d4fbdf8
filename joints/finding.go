package joints

import (
	"fmt"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"
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
	return Error, false, fmt.Errorf("unknown failure level %q (want error, warning, info or never)", s)
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
	// Offset links and reference surfaces (--links offset, joinery offsets).
	CodeOffsetMismatch   = "offset-mismatch"   // faying points of consecutive sheets apart across the stack
	CodeNormalsFlipped   = "normals-flipped"   // elements whose normals disagree with their neighbours'
	CodeSurfaceDiffers   = "surface-differs"   // inferred reference surface differs from the parts table's
	CodeContactDisagrees = "contact-disagrees" // a contact the inferred surfaces do not explain
	CodeSurfaceUnsure    = "surface-unsure"    // too little evidence to tell a part's surface
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
// zeros, "0" for values that round to zero.
func MM(v float64) string {
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
