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
	return IndexForAll(m, js, []joints.BuildOptions{o})
}

// IndexForAll builds one index that serves a build of js with each of
// the options opts (the variants of a sweep): the index IndexFor builds
// for the options that reach farthest. Its answers are those of a full
// index, so a build on it is the build on its own index.
func IndexForAll(m *geom.Mesh, js []joints.Joint, opts []joints.BuildOptions) *geom.Index {
	pts, margin := NearAll(m, js, opts)
	return geom.NewIndexNear(m, pts, margin, false)
}

// Near returns what IndexFor indexes around: the points of the spot
// welds among js and the margin round them, mm, so that a caller
// building one index for several jobs covers this one's queries.
func Near(m *geom.Mesh, js []joints.Joint, o joints.BuildOptions) ([]r3.Vec, float64) {
	return NearAll(m, js, []joints.BuildOptions{o})
}

// NearAll is Near for a build with each of the options opts: the margin
// of the one that reaches farthest.
func NearAll(m *geom.Mesh, js []joints.Joint, opts []joints.BuildOptions) ([]r3.Vec, float64) {
	tmax := joints.MaxThickness(m)
	var pts []r3.Vec
	for _, j := range js {
		if j.Kind == joints.Spot {
			pts = append(pts, j.Point)
		}
	}
	far, elemSize := 0.0, -1.0
	for _, o := range opts {
		o = o.Defaults(tmax)
		dmax := o.Rule.Diameter(tmax)
		nodePair := o.Attach == joints.NodePair
		for _, j := range js {
			if j.Kind != joints.Spot {
				continue
			}
			dmax = math.Max(dmax, j.Diameter)
			nodePair = nodePair || o.AttachFor(j.Group) == joints.NodePair
		}
		reach := math.Max(2*o.EdgeFactor*dmax, dmax/2)
		if nodePair {
			if elemSize < 0 {
				elemSize = maxElemSize(m)
			}
			reach = math.Max(reach, elemSize)
		}
		far = math.Max(far, o.Reach+reach)
	}
	// 1% slack against rounding at the margin.
	return pts, 1.01 * far
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
