package audit

import (
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/spot"
)

// spotFacing applies a build's facing rule to a node-pair connector:
// the nugget radius, and the node factor times it across the stack.
func spotFacing(c *joints.Connector, o *joints.BuildOptions) []joints.Finding {
	r := c.Diameter / 2
	return spot.CheckFacing(&c.Stack, c.Ends, r, o.NodeFactor*r, &c.Joint)
}

// spotGap applies a build's gap rule to the sheets a link of a stack
// with the given axis joins.
func spotGap(j *joints.Joint, axis r3.Vec, a, b joints.Sheet, o *joints.BuildOptions) (joints.Finding, bool) {
	return spot.GapFinding(j, axis, a, b, o)
}
