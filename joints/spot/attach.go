package spot

import (
	"cmp"
	"fmt"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// attach ties an end to every sheet of a stack with the given
// attachment; diameter is the nugget diameter, mm (the patch radius is
// half of it). It reports patch ends capped at joints.MaxPatchNodes.
func attach(x *geom.Index, st *joints.Stack, a joints.Attach, diameter float64, j *joints.Joint) ([]joints.End, []joints.Finding) {
	ends := make([]joints.End, len(st.Sheets))
	var out []joints.Finding
	for i := range st.Sheets {
		s := &st.Sheets[i]
		switch a {
		case joints.NodePair:
			ends[i] = attachNodePair(x, s)
		case joints.Patch:
			var within int
			ends[i], within = attachPatch(x, s, diameter/2)
			if within > joints.MaxPatchNodes {
				out = append(out, j.Finding(joints.Warning, joints.CodePatchCapped, []int64{s.Part},
					fmt.Sprintf("%d nodes of part %d lie within the nugget radius %s mm; the patch ties the %d nearest", within, s.Part, joints.MM(diameter/2), joints.MaxPatchNodes)))
			}
		default:
			ends[i] = attachInterpolated(x.Mesh(), s)
		}
	}
	return ends, out
}

// attachInterpolated ties the end to every node of the host element with
// the shape-function weights at the projection point: the corners of a
// linear element, all the nodes of a second-order one with its quadratic
// shape functions (some of whose weights are negative, see
// geom.ShapeWeights). A node the element repeats (a quad collapsed to
// a triangle, geom.Quality.Collapsed) is tied once, with the sum of its
// corners' weights.
func attachInterpolated(m *geom.Mesh, s *joints.Sheet) joints.End {
	nodes := m.ElemNodes(s.Proj.Elem)
	e := joints.End{Point: s.Proj.Point, NodeIndex: -1, Nodes: make([]int32, 0, len(nodes)), Weights: make([]float64, 0, len(nodes))}
	for k, n := range nodes {
		if i := slices.Index(e.Nodes, n); i >= 0 {
			e.Weights[i] += s.Proj.Weights[k]
			continue
		}
		e.Nodes = append(e.Nodes, n)
		e.Weights = append(e.Weights, s.Proj.Weights[k])
	}
	return e
}

// attachNodePair puts the end on the sheet's node nearest to the
// projection point (ties, within geom.TieDistance, to the lower node id;
// joints.NearestNode).
func attachNodePair(x *geom.Index, s *joints.Sheet) joints.End {
	m := x.Mesh()
	best := joints.NearestNode(x, s.Proj.Point, m.ElemPart[s.Proj.Elem], s.Proj.Elem)
	return joints.End{Point: m.Coords[best], NodeIndex: best, Nodes: []int32{best}, Weights: []float64{1}}
}

// attachPatch ties the end to every node of the sheet within radius of
// the projection point (midside nodes of second-order elements too;
// a node exactly at the radius is within it, joints.LengthRoundoff
// allowed, so the same model in any unit ties the same nodes), plus
// the host element's nodes unless those within the radius surround the
// point (joints.PatchNodes). The weights are
// the most uniform ones (least sum of squared deviations from 1/N) that
// sum to 1 and reproduce the projection point's position in the sheet's
// tangent plane exactly: w = w0 + Aᵀ(AAᵀ)⁻¹(b − A w0), with w0 uniform and
// A the rows (1), (u_i), (v_i) of in-plane node coordinates about the
// point. A rigid translation of the nodes thus moves the end by the same
// amount, and loads spread as evenly as the geometry allows. When the
// nodes do not span the plane, the interpolated weights are used.
//
// At most joints.MaxPatchNodes nodes are tied: the host's corners and the
// nodes nearest the point (ties to the lower node id). attachPatch also
// returns how many nodes the patch would hold without the cap.
func attachPatch(x *geom.Index, s *joints.Sheet, radius float64) (joints.End, int) {
	m := x.Mesh()
	q := s.Proj.Point
	host := attachInterpolated(m, s)
	nodes := joints.PatchNodes(x, q, s.Proj.Normal, m.ElemPart[s.Proj.Elem], s.Proj.Elem, radius)
	within := len(nodes)
	byID := func(a, b int32) int { return cmp.Compare(m.NodeIDs[a], m.NodeIDs[b]) }
	if len(nodes) > joints.MaxPatchNodes {
		// Host corners first, then by distance from the point.
		isHost := func(n int32) bool { return slices.Contains(host.Nodes, n) }
		slices.SortFunc(nodes, func(a, b int32) int {
			if ha, hb := isHost(a), isHost(b); ha != hb {
				if ha {
					return -1
				}
				return 1
			}
			da, db := r3.Norm2(r3.Sub(m.Coords[a], q)), r3.Norm2(r3.Sub(m.Coords[b], q))
			return cmp.Or(cmp.Compare(da, db), byID(a, b))
		})
		nodes = nodes[:joints.MaxPatchNodes]
	}
	slices.SortFunc(nodes, byID)
	w, ok := joints.EvenWeights(m, nodes, q, s.Proj.Normal, nil)
	if !ok {
		return host, within
	}
	return joints.End{Point: q, NodeIndex: -1, Nodes: nodes, Weights: w}, within
}

// checkFacing reports node-pair ends that stray from the weld: a node
// outside the nugget (farther than radius from the stack axis through the
// weld point), and nodes of consecutive sheets offset from each other
// across the axis by more than tol.
func checkFacing(st *joints.Stack, ends []joints.End, radius, tol float64, j *joints.Joint) []joints.Finding {
	across := func(d r3.Vec) float64 { return r3.Norm(r3.Sub(d, r3.Scale(r3.Dot(d, st.Axis), st.Axis))) }
	var out []joints.Finding
	for i, e := range ends {
		if lat := across(r3.Sub(e.Point, j.Point)); lat > radius+joints.LengthRoundoff {
			p := st.Sheets[i].Part
			out = append(out, j.Finding(joints.Warning, joints.CodeNodesApart, []int64{p},
				fmt.Sprintf("nearest node of part %d lies %s mm from the weld axis, outside the nugget (radius %s mm): the connector moves off the weld", p, joints.MM(lat), joints.MM(radius))))
		}
	}
	for i := 0; i+1 < len(ends); i++ {
		if lat := across(r3.Sub(ends[i+1].Point, ends[i].Point)); lat > tol+joints.LengthRoundoff {
			a, b := st.Sheets[i].Part, st.Sheets[i+1].Part
			out = append(out, j.Finding(joints.Warning, joints.CodeNodesApart, []int64{a, b},
				fmt.Sprintf("nearest nodes of parts %d and %d are %s mm apart across the stack (limit %s mm): the meshes do not face each other here", a, b, joints.MM(lat), joints.MM(tol))))
		}
	}
	return out
}
