package geom_test

import (
	"fmt"
	"math"

	"github.com/joinery-cae/joinery/geom"
	"gonum.org/v1/gonum/spatial/r3"
)

func ExampleIndex() {
	// Two 10 mm quads side by side in the plane z = 0.
	m := &geom.Mesh{
		Parts:   []geom.Part{{ID: 1, Thickness: 1}},
		NodeIDs: []int64{1, 2, 3, 4, 5, 6},
		Coords: []r3.Vec{
			{X: 0, Y: 0}, {X: 10, Y: 0}, {X: 20, Y: 0},
			{X: 0, Y: 10}, {X: 10, Y: 10}, {X: 20, Y: 10},
		},
		ElemIDs:   []int64{101, 102},
		ElemPart:  []int32{0, 0},
		ElemStart: []int32{0, 4, 8},
		Conn:      []int32{0, 1, 4, 3, 1, 2, 5, 4},
	}
	x := geom.NewIndex(m)
	p := r3.Vec{X: 12, Y: 5, Z: 2}
	for _, pr := range x.ProjectNear(p, 5, nil) {
		w := pr.Weights
		fmt.Printf("element %d: %.2f mm to (%.2f, %.2f, %.2f), weights %.2f %.2f %.2f %.2f, normal %.0f\n",
			m.ElemIDs[pr.Elem], pr.Dist, pr.Point.X, pr.Point.Y, pr.Point.Z, w[0], w[1], w[2], w[3], pr.Normal)
	}
	if pr, ok := x.ProjectNearest(p, math.Inf(1), func(e int) bool { return e == 0 }); ok {
		fmt.Printf("nearest of element 101: %.2f mm\n", pr.Dist)
	}
	for _, n := range x.NearestNodes(p, 2, nil) {
		fmt.Println("node", m.NodeIDs[n])
	}
	// Output:
	// element 102: 2.00 mm to (12.00, 5.00, 0.00), weights 0.40 0.10 0.10 0.40, normal {0 0 1}
	// element 101: 2.83 mm to (10.00, 5.00, 0.00), weights 0.00 0.50 0.50 0.00, normal {0 0 1}
	// nearest of element 101: 2.83 mm
	// node 2
	// node 5
}
