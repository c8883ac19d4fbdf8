package stiffness

import (
	"cmp"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// Pair is the stiffness summary of the connectors joining two parts
// directly (as consecutive sheets of a stack).
type Pair struct {
	A, B     int64 // part ids, A < B
	Springs  int   // springs assembled: one per connector and sheet pair
	Centroid r3.Vec
	Material string // "steel", "aluminium" or "mixed"
	// Translational and Rotational are the principal stiffnesses of the
	// two blocks of the pair's 6 x 6 stiffness about Centroid,
	// ascending: N/mm and N mm/rad.
	Translational, Rotational [3]float64
}

// Springs returns the springs of a connector, one per pair of
// consecutive sheets, with the parts each joins; none for a connector
// not built. material gives a part's material.
//
// A spot weld is a beam of the nugget diameter and the contact length
// (t1+t2)/2 of the two sheets, at the midpoint of their two ends, along
// the stack axis, of the softer of the two materials, coupling the
// connector's degrees of freedom, whatever the form of its links or
// attachment (which change where it is tied, not what ties it).
func Springs(c *joints.Connector, material func(part int64) Material) ([]Spring, [][2]int64) {
	if c.Status == joints.NotBuilt || len(c.Ends) != len(c.Stack.Sheets) {
		return nil, nil
	}
	switch c.Joint.Kind {
	case joints.Spot:
	default:
		// Bolts (issue 10): a bolt by its shank and ring, once bolts are
		// built; until then they carry nothing here.
		return nil, nil
	}
	var springs []Spring
	var pairs [][2]int64
	for i := 0; i+1 < len(c.Stack.Sheets); i++ {
		a, b := c.Stack.Sheets[i], c.Stack.Sheets[i+1]
		s := Beam(c.Diameter, (a.Thickness+b.Thickness)/2, Softer(material(a.Part), material(b.Part)))
		s.Point = r3.Scale(0.5, r3.Add(c.Ends[i].Point, c.Ends[i+1].Point))
		s.Axis = c.Stack.Axis
		s.DOFs = c.DOFs
		springs = append(springs, s)
		pairs = append(pairs, joints.PairKey(a.Part, b.Part))
	}
	return springs, pairs
}

// Pairs assembles the springs of every connector per part pair and
// returns the pairs' summaries, sorted by part ids.
func Pairs(conns []joints.Connector, material func(part int64) Material) []Pair {
	type acc struct {
		springs []Spring
		mats    map[string]bool
	}
	by := map[[2]int64]*acc{}
	for i := range conns {
		springs, pairs := Springs(&conns[i], material)
		for k, s := range springs {
			p := pairs[k]
			a := by[p]
			if a == nil {
				a = &acc{mats: map[string]bool{}}
				by[p] = a
			}
			a.springs = append(a.springs, s)
			a.mats[Softer(material(p[0]), material(p[1])).Name] = true
		}
	}
	out := make([]Pair, 0, len(by))
	for p, a := range by {
		var c r3.Vec
		for _, s := range a.springs {
			c = r3.Add(c, s.Point)
		}
		c = r3.Scale(1/float64(len(a.springs)), c)
		pr := Pair{A: p[0], B: p[1], Springs: len(a.springs), Centroid: c, Material: "mixed"}
		for m := range a.mats {
			if len(a.mats) == 1 {
				pr.Material = m
			}
		}
		pr.Translational, pr.Rotational = Principal(Assemble(a.springs, c))
		out = append(out, pr)
	}
	slices.SortFunc(out, func(x, y Pair) int { return cmp.Or(cmp.Compare(x.A, y.A), cmp.Compare(x.B, y.B)) })
	return out
}
