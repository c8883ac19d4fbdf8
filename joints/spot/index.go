package spot

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// IndexFor builds the spatial index a build of js with options o needs:
// only the elements within reach of some spot weld, where the reach
// covers every query the build makes around a weld (the search distance,
// then twice the edge limit, the patch radius and, for node-pair
// attachment, an element's size around the projection points). The
// answers are those of a full index; the cost is a fraction of it on a
// large body. Node queries are not needed by a build and find nothing.
func IndexFor(m *geom.Mesh, js []joints.Joint, o joints.BuildOptions) *geom.Index {
	pts, margin := Near(m, js, o)
	return geom.NewIndexNear(m, pts, margin, false)
}

// Near returns what IndexFor indexes around: the points of the spot
// welds among js and the margin round them, mm, so that a caller
// building one index for several jobs covers this one's queries.
func Near(m *geom.Mesh, js []joints.Joint, o joints.BuildOptions) ([]r3.Vec, float64) {
	tmax := joints.MaxThickness(m)
	o = o.Defaults(tmax)
	dmax := o.Rule.Diameter(tmax)
	nodePair := o.Attach == joints.NodePair
	var pts []r3.Vec
	for _, j := range js {
		if j.Kind != joints.Spot {
			continue
		}
		pts = append(pts, j.Point)
		dmax = math.Max(dmax, j.Diameter)
		nodePair = nodePair || o.AttachFor(j.Group) == joints.NodePair
	}
	reach := math.Max(2*o.EdgeFactor*dmax, dmax/2)
	if nodePair {
		reach = math.Max(reach, maxElemSize(m))
	}
	// 1% slack against rounding at the margin.
	return pts, 1.01 * (o.Reach + reach)
}

// maxElemSize returns the largest bounding-box diagonal of an element.
func maxElemSize(m *geom.Mesh) float64 {
	d := 0.0
	for e := range m.ElemIDs {
		b := m.ElemBox(e)
		d = math.Max(d, r3.Norm(r3.Sub(b.Max, b.Min)))
	}
	return d
}
