package audit

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// EndMovedSeverity is the severity of end-moved: a connector whose ends
// no longer lie where its nodes put them ties the sheets somewhere else
// than the document says (documented in the README).
const EndMovedSeverity = joints.Error

// EndMovedTolerance, mm, is how far an end reconstructed on the mesh
// may lie from the end point a connectors.json records before end-moved
// is reported (our choice: a thousand times joints.LengthRoundoff. It
// lies far above what the unchanged mesh gives: connectors.json writes
// lengths in mm as the shortest decimal that reads back exactly, and in
// m or in to 15 significant digits, 5e-15 of a coordinate, 5e-11 mm at
// 10 m; weighted sums of node positions round by about 1e-16 of the
// coordinates; a bolt centre on a sheet without a hole lies on it to
// the crossing's Newton tolerance, 1e-6 mm per mm along the axis, 1e-5
// mm within a reach. It lies far below any change of a mesh that
// matters to a connector: a tenth of the thinnest sheet ISO 14373
// covers, 0.04 mm, is forty times it).
const EndMovedTolerance = 1e-3

// RecordedRing is what a connectors.json records of a bolt centre's
// ring beyond its nodes and weights: the ring's kind ("hole", "washer"
// or "patch", see joints.BoltHole) and the ring nodes' positions at the
// build, in the order of the end's nodes, mm (nil when the document
// gives none).
type RecordedRing struct {
	Kind   string
	Points []r3.Vec
}

// EndsMoved reports the ends of connector c, as a connectors.json
// records them (joints.End.Point, its nodes and weights; c is not
// rebuilt), that no longer lie where mesh m puts them: per end, the end
// point is reconstructed on m from what the connector records, in the
// way that is exact for the end's form on the mesh it was built on, and
// a reconstruction farther than EndMovedTolerance from the recorded
// point is an end-moved error naming the part and the distance. rings
// holds a bolt's recorded rings per sheet (nil for spot welds). The
// reconstructions (see endOffset) give, for a sheet moved rigidly by d,
// a distance of exactly |d|.
// cause ends the message (the caller's view of why, such as units that
// differ from the build's); "" gives the mesh changed since the build.
func EndsMoved(m *geom.Mesh, c *joints.Connector, rings []RecordedRing, cause string) []joints.Finding {
	if cause == "" {
		cause = "the mesh changed since the build (the part moved or was remeshed); build the connectors again"
	}
	var out []joints.Finding
	for i := range c.Ends {
		if i >= len(c.Stack.Sheets) {
			break
		}
		var ring *RecordedRing
		if c.Bolt != nil && i < len(rings) {
			ring = &rings[i]
		}
		form := endForm(c, &c.Ends[i], ring)
		if d := endOffset(m, &c.Ends[i], &c.Stack.Sheets[i], form, ring); d > EndMovedTolerance {
			part := c.Stack.Sheets[i].Part
			out = append(out, c.Joint.Finding(EndMovedSeverity, joints.CodeEndMoved, []int64{part}, fmt.Sprintf(
				"connector %s: its end on part %d, rebuilt from its nodes and weights on this mesh, lies %s mm from the end point the connector records (tolerance %s mm): %s",
				geom.Excerpt(c.Joint.ID), part, joints.MM(d), joints.MM(EndMovedTolerance), cause)))
		}
	}
	return out
}

// The forms of an end, as far as its reconstruction goes.
const (
	formExact  = iota // a mesh node, or interpolated: the weighted sum is the point
	formPatch         // a spot-weld patch, or a bolt ring without a hole
	formHole          // a bolt ring of a hole's edge nodes
	formWasher        // a bolt ring of a hole's edge nodes and the nodes round it
)

// endForm returns the form of end e of connector c (ring: its recorded
// ring, bolts only).
func endForm(c *joints.Connector, e *joints.End, ring *RecordedRing) int {
	switch {
	case c.Bolt != nil && ring != nil && ring.Kind == "hole":
		return formHole
	case c.Bolt != nil && ring != nil && ring.Kind == "washer":
		return formWasher
	case c.Bolt != nil, c.Attach == joints.Patch && len(e.Nodes) > 1:
		return formPatch
	}
	return formExact
}

// endOffset returns how far end e of sheet s lies, rebuilt on m, from
// its recorded point P, mm (0 when the numbers give none: a distance
// that is not finite). The reconstruction is the one exact for the
// end's form:
//
//   - an end on a mesh node (node-pair): the node's position;
//   - interpolated (the host element's nodes with their shape-function
//     weights, linear, bilinear or quadratic): the sum of weight x node
//     position, which is the point on the element at the projection's
//     parametric coordinates (geom.Projection: Point is that sum);
//   - a spot-weld patch and a bolt ring: their weights (joints.EvenWeights)
//     sum to 1 and reproduce P in the sheet's plane only, so the
//     weighted mean counts in that plane (normal n: the host element's
//     where the mean lies over it, at P on the mesh as built), and across it the distance is that from the surface P was
//     put on: for a patch, and a bolt ring without a hole, the host
//     element's surface, from P carried along the plane by the weighted
//     mean's offset; for a ring of a meshed hole's edge nodes, the plane
//     through their mean square to the host's normal, where the bolt
//     builder puts the centre; for a washer ring, whose hole's edge
//     nodes are among others, the weighted mean's move across the
//     plane since the build, from the ring positions the document
//     records (without them, the plane through the ring's mean: exact
//     on a flat sheet).
//
// A sheet moved rigidly by d gives |d| in every case.
func endOffset(m *geom.Mesh, e *joints.End, s *joints.Sheet, form int, ring *RecordedRing) float64 {
	p := e.Point
	var mean r3.Vec // the weighted mean of the end's nodes
	for k, n := range e.Nodes {
		mean = r3.Add(mean, r3.Scale(e.Weights[k], m.Coords[n]))
	}
	r := r3.Sub(mean, p)
	if form == formExact {
		return finite(r3.Norm(r))
	}
	host := s.Proj.Elem
	var n r3.Vec
	if form == formPatch {
		// The normal where the weighted mean lies over the host: on the
		// mesh as built it lies on the normal through P, and it moves
		// with the sheet.
		n = m.Project(host, mean).Normal
	} else {
		n = m.Normal(host)
	}
	rt := r3.Sub(r, r3.Scale(r3.Dot(r, n), n))
	var across float64
	switch {
	case form == formWasher && ring != nil && len(ring.Points) == len(e.Nodes):
		var was r3.Vec
		for k, x := range ring.Points {
			was = r3.Add(was, r3.Scale(e.Weights[k], x))
		}
		across = r3.Dot(r3.Sub(mean, was), n)
	case form == formHole, form == formWasher:
		across = r3.Dot(r3.Sub(p, centroid(m, e.Nodes)), n)
	default:
		q := r3.Add(p, rt)
		across = r3.Norm(r3.Sub(q, m.Project(host, q).Point))
	}
	return finite(math.Hypot(r3.Norm(rt), across))
}

// centroid returns the plain mean of the nodes' positions.
func centroid(m *geom.Mesh, nodes []int32) r3.Vec {
	var c r3.Vec
	for _, n := range nodes {
		c = r3.Add(c, m.Coords[n])
	}
	return r3.Scale(1/float64(len(nodes)), c)
}

// finite returns d, or 0 when it is not a number.
func finite(d float64) float64 {
	if math.IsNaN(d) || math.IsInf(d, 0) {
		return 0
	}
	return d
}
