package joints_test

import (
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
	"github.com/joinery-cae/joinery/joints"
)

// PatchNodes on a 4 x 4 grid of 2.5 mm quads (nodes (i, j) at (2.5 i,
// 2.5 j), id 1 + i + 5 j): the nodes within the radius, and the host's
// when those do not span the plane round the point (hand calculation).
func TestPatchNodes(t *testing.T) {
	m := geomtest.Grid(geomtest.GridSpec{NX: 4, NY: 4, Node: func(i, j int) r3.Vec {
		return r3.Vec{X: 2.5 * float64(i), Y: 2.5 * float64(j)}
	}})
	x := geom.NewIndex(m)
	id := func(i, j int) int64 { return int64(1 + i + 5*j) }
	up := r3.Vec{Z: 1}
	for _, c := range []struct {
		name   string
		q      r3.Vec
		host   int // element index (i + 4 j)
		radius float64
		want   []int64
	}{
		// A node and its four neighbours at exactly the radius: no
		// element's far corner, whichever element is host.
		{"on a node, host below left", r3.Vec{X: 5, Y: 5}, 1 + 4*1, 2.5, []int64{id(2, 1), id(1, 2), id(2, 2), id(3, 2), id(2, 3)}},
		{"on a node, host above right", r3.Vec{X: 5, Y: 5}, 2 + 4*2, 2.5, []int64{id(2, 1), id(1, 2), id(2, 2), id(3, 2), id(2, 3)}},
		// A nugget smaller than the elements: the node under it alone
		// does not span the plane, so the host's corners are tied.
		{"on a node, small nugget", r3.Vec{X: 5, Y: 5}, 1 + 4*1, 1, []int64{id(1, 1), id(2, 1), id(1, 2), id(2, 2)}},
		// An element's centre with a radius short of its corners (1.77
		// mm): its four corners only.
		{"element centre", r3.Vec{X: 3.75, Y: 3.75}, 1 + 4*1, 1.5, []int64{id(1, 1), id(2, 1), id(1, 2), id(2, 2)}},
		// Midway along an edge, the edge's two nodes within 1.25 mm lie
		// on a line through the point: the host's corners are added.
		{"edge midpoint", r3.Vec{X: 3.75, Y: 5}, 1 + 4*1, 1.25, []int64{id(1, 1), id(2, 1), id(1, 2), id(2, 2)}},
		// A sheet's corner node: it and its two neighbours span the
		// plane round it.
		{"sheet corner", r3.Vec{}, 0, 2.5, []int64{id(0, 0), id(1, 0), id(0, 1)}},
	} {
		got := joints.PatchNodes(x, c.q, up, 0, c.host, c.radius)
		var ids []int64
		for _, n := range got {
			ids = append(ids, m.NodeIDs[n])
		}
		if !slices.Equal(ids, c.want) {
			t.Errorf("%s: nodes %v, want %v", c.name, ids, c.want)
		}
	}
}
