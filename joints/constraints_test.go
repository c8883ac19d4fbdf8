package joints

import (
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

// A spot weld's ties, as Tie documents them.
func TestAddSpotWeld(t *testing.T) {
	m := geomtest.Grid(geomtest.GridSpec{NX: 4, NY: 4, Parts: []geom.Part{{ID: 1}, {ID: 2}}, Part: func(i, j int) int32 { return int32(i / 2) }})
	st := Stack{Axis: r3.Vec{Z: 1}, Sheets: []Sheet{{Part: 1}, {Part: 2}}}
	quad := []int32{6, 7, 12, 11} // corners of element (1, 1): not on one line
	line := []int32{6, 7}
	for _, tc := range []struct {
		name     string
		ends     []End
		dofs     DOFs
		nodes    int    // NodeBodies added
		endTie   []DOFs // the ties of the ends to their parts, in order
		linkTies int
	}{
		{"interpolated ends on quads", []End{{Point: r3.Vec{X: 1.5, Y: 1.5}, NodeIndex: -1, Nodes: quad}, {Point: r3.Vec{X: 1.5, Y: 1.5, Z: 1}, NodeIndex: -1, Nodes: quad}}, Translations, 2, []DOFs{AllDOFs, AllDOFs}, 1},
		{"ends on two nodes", []End{{Point: r3.Vec{X: 1.5, Y: 1}, NodeIndex: -1, Nodes: line}, {Point: r3.Vec{X: 1.5, Y: 1, Z: 1}, NodeIndex: -1, Nodes: quad}}, AllDOFs, 2, []DOFs{Translations, AllDOFs}, 1},
		{"node pair", []End{{Point: m.Coords[6], NodeIndex: 6, Nodes: []int32{6}}, {Point: m.Coords[12], NodeIndex: 12, Nodes: []int32{12}}}, Translations, 0, nil, 1},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := Connector{Joint: Joint{ID: "W1", Kind: Spot}, Stack: st, DOFs: tc.dofs, Ends: tc.ends,
				Links: []Link{{From: 0, To: 1}}, EndIDs: []int64{500, 501}}
			k := NewConstraints([]int64{1, 2})
			k.AddConnector(m, &c)
			if got := len(k.Bodies) - 2; got != tc.nodes {
				t.Fatalf("%d node bodies, want %d", got, tc.nodes)
			}
			var link []Tie
			ends := 0
			for _, tie := range k.Ties {
				a, b := k.Bodies[tie.A], k.Bodies[tie.B]
				if a.Kind == PartBody && b.Kind == NodeBody {
					if tie.DOFs != tc.endTie[ends] || tie.Point != b.Point {
						t.Errorf("end tie %+v, want %v at the end", tie, tc.endTie[ends])
					}
					ends++
					continue
				}
				link = append(link, tie)
			}
			if len(link) != tc.linkTies || link[0].DOFs != tc.dofs {
				t.Fatalf("link ties %+v", link)
			}
			mid := r3.Scale(0.5, r3.Add(tc.ends[0].Point, tc.ends[1].Point))
			if link[0].Point != mid {
				t.Errorf("link tie at %v, want the link's midpoint %v", link[0].Point, mid)
			}
			if tc.nodes > 0 && (k.Bodies[2].Node != 500 || k.Bodies[3].Node != 501) {
				t.Errorf("node ids %d %d", k.Bodies[2].Node, k.Bodies[3].Node)
			}
		})
	}
	// Not built: no ties.
	c := Connector{Joint: Joint{ID: "W2", Kind: Spot}, Status: NotBuilt}
	k := NewConstraints([]int64{1, 2})
	k.AddConnector(m, &c)
	if len(k.Ties) != 0 || k.Ground() != 2 || k.Ground() != 2 {
		t.Errorf("%+v", k)
	}
}

func TestSpanPlane(t *testing.T) {
	m := &geom.Mesh{Coords: []r3.Vec{{}, {X: 10}, {X: 20}, {X: 5, Y: 1e-3}, {X: 5, Y: 1e-7}}}
	for _, tc := range []struct {
		nodes []int32
		want  bool
	}{
		{[]int32{0, 1}, false},
		{[]int32{0, 1, 2}, false},
		{[]int32{0, 1, 3}, true},  // 1e-3 mm off a 10 mm line: 1e-4, above the tolerance
		{[]int32{0, 2, 4}, false}, // 1e-7 mm off a 20 mm line: below it
	} {
		if got := SpanPlane(m, tc.nodes); got != tc.want {
			t.Errorf("SpanPlane(%v) = %v, want %v", tc.nodes, got, tc.want)
		}
	}
}
