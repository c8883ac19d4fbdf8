package spot

import "github.com/joinery-cae/joinery/joints"

// CheckFacing returns the nodes-apart findings of a node-pair connector,
// with the rules a build applies: an end node farther than radius (mm)
// from the stack axis through the weld point lies outside the nugget,
// and end nodes of consecutive sheets offset from each other across the
// axis by more than tol (mm) do not face each other. A build uses the
// nugget radius and DefaultNodeFactor (BuildOptions.NodeFactor) times
// it; the audit uses the same for node pairs read from a model.
func CheckFacing(st *joints.Stack, ends []joints.End, radius, tol float64, j *joints.Joint) []joints.Finding {
	return checkFacing(st, ends, radius, tol, j)
}
