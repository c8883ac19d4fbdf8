package flange

import (
	"context"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/spot"
)

// shuffleElemIDs hands every part's element ids out again in random
// order, so that among the elements tied at a point the one first in
// file order (the placer's old choice) is not always the one of lowest
// id (build's, geom.Index.ClosestPerPart), and which neighbour has the
// lower id changes from place to place.
func shuffleElemIDs(m *geom.Mesh, rng *rand.Rand) {
	byPart := map[int32][]int{}
	for e, p := range m.ElemPart {
		byPart[p] = append(byPart[p], e)
	}
	for _, es := range byPart {
		ids := make([]int64, len(es))
		for k, e := range es {
			ids[k] = m.ElemIDs[e]
		}
		rng.Shuffle(len(ids), func(i, j int) { ids[i], ids[j] = ids[j], ids[i] })
		for k, e := range es {
			m.ElemIDs[e] = ids[k]
		}
	}
	if err := m.Index(); err != nil {
		panic(err)
	}
}

// builtNodes returns the mesh nodes build ties connector c's ends to.
func builtNodes(c joints.Connector) []int32 {
	var out []int32
	for _, e := range c.Ends {
		if e.NodeIndex >= 0 {
			out = append(out, e.NodeIndex)
		}
		out = append(out, e.Nodes...)
	}
	return out
}

// The placer keeps welds from acting as a seam (common practice: at
// least one node left unconnected between two welds, so that the sheets
// can open between them): no two welds' attachment nodes share an
// element, and on a congruent flange a facing node pair between
// consecutive welds stays unconnected. It must judge that on the
// attachments build makes, so this checks build's connectors
// (spot.Build on the welds as placed, their points rounded as joints.csv
// gives them), not the placer's own view.
//
// The case is made to bite: two 1 mm sheets (nugget 5 sqrt(1) = 5 mm,
// common practice) on the same 5 mm grid, 200 mm long, the centreline
// on the node row y = 20. Pitch 5 and 10 are too fine for this mesh: the
// placer searches for the smallest pitch that keeps the rule, about
// 15 mm, which puts the welds (13 stations in the 190 mm between the
// 5 mm end margins) next to the node columns x = 10 + 15 k; the search
// ends where welds just stop sharing elements, as close to a node as it
// can get. The element ids are shuffled against the file's order, so
// that the element first in the file (the placer's choice before it
// judged at build's point with build's tie rule) and the one of lowest
// id among those tied (build's) differ, and not the same way from weld
// to weld. With the old judging (the parent of commit 02e001a) the
// search stops 4e-5 mm from the nodes (pitch 15.0000066), within build's
// ties, and build's interpolated and patch attachments then share
// elements between consecutive welds at pitch 5 and 10 on every seed
// here; with build's judging it goes on to 15.00059 (3.5e-3 mm off) and
// they do not.
func TestSeamRuleHoldsOnBuildsAttachments(t *testing.T) {
	for seed := range uint64(4) {
		m := mesh(plate(1, 1, 0, 0, 0, 40, 10, 5), plate(2, 1, 0, 10, 1, 40, 4, 5))
		shuffleElemIDs(m, rand.New(rand.NewPCG(seed, 5)))
		seamOnBuild(t, m, seed)
	}
}

func seamOnBuild(t *testing.T, m *geom.Mesh, seed uint64) {
	t.Helper()
	uses := elemsOf(m)
	x := geom.NewElemIndex(m)
	for _, a := range []joints.Attach{joints.Interpolated, joints.NodePair, joints.Patch} {
		for _, pitch := range []float64{5, 10, 15} {
			bo := joints.BuildOptions{Attach: a}
			set, _ := place(t, m, joints.FlangeOptions{Pitch: joints.Pitch{MM: pitch}}, bo)
			f := one(t, set)
			if f.Match != joints.Congruent || len(f.Welds) < 2 {
				t.Fatalf("seed %d, %v, pitch %g: %v flange with %d welds, want congruent with some", seed, a, pitch, f.Match, len(f.Welds))
			}
			var js []joints.Joint
			for _, w := range f.Welds {
				js = append(js, w.Joint)
			}
			conns, err := spot.Build(context.Background(), x, js, bo.Defaults(joints.MaxThickness(m)), nil)
			if err != nil {
				t.Fatal(err)
			}
			touched := make([]map[int32]bool, len(conns))
			nodes := make([]map[int32]bool, len(conns))
			for i, c := range conns {
				if c.Status == joints.NotBuilt {
					t.Fatalf("seed %d, %v, pitch %g: weld %s not built: %v", seed, a, pitch, c.Joint.ID, c.Findings)
				}
				touched[i], nodes[i] = map[int32]bool{}, map[int32]bool{}
				for _, n := range builtNodes(c) {
					nodes[i][n] = true
					for _, e := range uses[n] {
						touched[i][e] = true
					}
				}
			}
			for i := range conns {
				for j := range i {
					for e := range touched[i] {
						if touched[j][e] {
							t.Errorf("seed %d, %v, pitch %g (spaced at %g): welds %s and %s as built share element %d",
								seed, a, pitch, f.Pitch, conns[j].Joint.ID, conns[i].Joint.ID, m.ElemIDs[e])
						}
					}
				}
			}
			for i := 1; i < len(conns); i++ {
				x0, x1 := conns[i-1].Joint.Point.X, conns[i].Joint.Point.X
				x0, x1 = min(x0, x1), max(x0, x1)
				free := slices.ContainsFunc(f.Facing, func(fp geom.FacingPair) bool {
					px := m.Coords[fp.A].X
					return px > x0 && px < x1 && !nodes[i-1][fp.A] && !nodes[i][fp.A] && !nodes[i-1][fp.B] && !nodes[i][fp.B]
				})
				if !free {
					t.Errorf("seed %d, %v, pitch %g (spaced at %g): no unconnected facing pair between welds %s and %s as built",
						seed, a, pitch, f.Pitch, conns[i-1].Joint.ID, conns[i].Joint.ID)
				}
			}
		}
	}
}
