package joints

import (
	"cmp"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// The nodes an end ties to, chosen alike by the spot-weld builder and by
// the flanges' weld placer (which must know them to keep welds apart).

// NearestNode returns the node of part nearest to q, a point on element
// host of that part: nodes whose distances differ by geom.TieDistance or
// less are tied (the corners round the centre of a square element, a
// weld midway between two nodes), and the lowest node id among them
// wins, so that the rounding of coordinates (another unit, the model
// moved) does not pick another node. The nearest node (corner or
// midside) is no farther than host's farthest node, so the elements
// within that radius hold it.
func NearestNode(x *geom.Index, q r3.Vec, part int32, host int) int32 {
	m := x.Mesh()
	r := 0.0
	for _, n := range m.ElemNodes(host) {
		r = math.Max(r, r3.Norm(r3.Sub(m.Coords[n], q)))
	}
	var buf [64]int32
	near := x.ElemsNear(q, r, buf[:0])
	bestD := math.Inf(1)
	for _, e := range near {
		if m.ElemPart[e] != part {
			continue
		}
		for _, n := range m.ElemNodes(int(e)) {
			bestD = math.Min(bestD, r3.Norm(r3.Sub(m.Coords[n], q)))
		}
	}
	best := int32(-1)
	for _, e := range near {
		if m.ElemPart[e] != part {
			continue
		}
		for _, n := range m.ElemNodes(int(e)) {
			if r3.Norm(r3.Sub(m.Coords[n], q)) <= bestD+geom.TieDistance && (best < 0 || m.NodeIDs[n] < m.NodeIDs[best]) {
				best = n
			}
		}
	}
	return best
}

// PatchNodes returns, in increasing node id order, the nodes of a
// spot-weld patch: every node of part within radius of q (a node exactly
// at the radius is within it, LengthRoundoff allowed, so the same model
// in any unit ties the same nodes), and the nodes of host, the element q
// lies on, unless the nodes within the radius already span the sheet's
// plane (normal) round q: so a weld on a node of a regular grid ties
// that node and its neighbours at the radius, whatever element was taken
// as host among those that meet there, and a nugget smaller than the
// elements still ties the element it lies on.
func PatchNodes(x *geom.Index, q, normal r3.Vec, part int32, host int, radius float64) []int32 {
	m := x.Mesh()
	var nodes []int32
	reach := radius + LengthRoundoff
	var buf [64]int32
	for _, e := range x.ElemsNear(q, reach, buf[:0]) {
		if m.ElemPart[e] != part {
			continue
		}
		for _, n := range m.ElemNodes(int(e)) {
			if r3.Norm(r3.Sub(m.Coords[n], q)) <= reach {
				nodes = append(nodes, n)
			}
		}
	}
	if !surround(m, nodes, q, normal) {
		nodes = append(nodes, m.ElemNodes(host)...)
	}
	slices.SortFunc(nodes, func(a, b int32) int { return cmp.Compare(m.NodeIDs[a], m.NodeIDs[b]) })
	return slices.Compact(nodes)
}

// surround reports whether the nodes, seen along normal, span the plane
// (not all on one line) and hold q in their convex hull, boundary
// included: q is one of them, or their directions from q leave no gap
// wider than a half turn.
func surround(m *geom.Mesh, nodes []int32, q, normal r3.Vec) bool {
	n := r3.Unit(normal)
	if !(r3.Norm2(n) > 0) {
		return false
	}
	u := r3.Unit(r3.Cross(n, anyAxis(n)))
	v := r3.Cross(n, u)
	var angles []float64
	centre := false
	for _, k := range nodes {
		d := r3.Sub(m.Coords[k], q)
		du, dv := r3.Dot(d, u), r3.Dot(d, v)
		if math.Hypot(du, dv) <= LengthRoundoff {
			centre = true
			continue
		}
		angles = append(angles, math.Atan2(dv, du))
	}
	// Rounding of the angles of nodes straight across from each other
	// (the neighbours of a node on a grid) is allowed for.
	const slack = 1e-9
	line := true // every direction along one line through q
	for _, a := range angles {
		line = line && math.Abs(math.Remainder(a-angles[0], math.Pi)) <= slack
	}
	if line {
		return false
	}
	if centre {
		return true
	}
	slices.Sort(angles)
	gap := angles[0] + 2*math.Pi - angles[len(angles)-1]
	for i := 1; i < len(angles); i++ {
		gap = math.Max(gap, angles[i]-angles[i-1])
	}
	return gap <= math.Pi+slack
}

// anyAxis returns a coordinate axis not parallel to n.
func anyAxis(n r3.Vec) r3.Vec {
	if math.Abs(n.X) <= math.Abs(n.Y) && math.Abs(n.X) <= math.Abs(n.Z) {
		return r3.Vec{X: 1}
	}
	if math.Abs(n.Y) <= math.Abs(n.Z) {
		return r3.Vec{Y: 1}
	}
	return r3.Vec{Z: 1}
}
