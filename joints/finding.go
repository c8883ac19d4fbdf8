package joints

import (
	"fmt"

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

// Finding codes. Each names one kind of problem a build can report.
const (
	CodeNoSheet        = "no-sheet"        // no sheet within the search distance
	CodeSingleSheet    = "single-sheet"    // only one sheet found: nothing to join
	CodeGapOpen        = "gap-open"        // sheets do not touch: the weld would bridge air
	CodeGapClosed      = "gap-closed"      // mid-surfaces closer than contact allows
	CodeEdgeClose      = "edge-close"      // weld centre too near a sheet's free edge
	CodePartNotFound   = "part-not-found"  // a listed part has nothing within reach
	CodeNotSupported   = "not-supported"   // joint kind not built yet (bolts)
	CodeThicknessRange = "thickness-range" // stack outside the ISO 14373 scope
	CodeStackSize      = "stack-size"      // more than four sheets
	CodeNodesApart     = "nodes-apart"     // node-pair attachment: nodes do not face each other
	CodeNoThickness    = "no-thickness"    // a sheet of the stack has no thickness
	CodeSheetApart     = "sheet-apart"     // a parallel sheet within reach but apart from the stack: left out
	CodeOffSheet       = "off-sheet"       // a listed sheet's nearest point lies off the weld axis
	CodeDegenerate     = "degenerate-host" // the host element has no area, so no normal
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
