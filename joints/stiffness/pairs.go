package stiffness

import (
	"cmp"
	"slices"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// Pair is the stiffness summary of the connectors joining two parts
// directly (as consecutive sheets of a stack).
type Pair struct {
	A, B     int64  // part ids, A < B
	Springs  int    // springs assembled: one per connector and sheet pair
	Centroid r3.Vec // the plain mean of the springs' points, where the stiffness is assembled
	// Material names the springs' material: "steel", "aluminium", a bolt
	// shank's own constants (ShankMaterial), or "mixed".
	Material string
	// Translational and Rotational are the principal stiffnesses of the
	// pair's 6 x 6 stiffness (see Principal), ascending: N/mm of its
	// translational block, and N mm/rad of its rotational block with the
	// translations condensed out, the rotational stiffness about the
	// pair's elastic centre. Neither depends on the point the stiffness
	// is assembled about.
	Translational, Rotational [3]float64
}

// RigidShankFactor is how many times stiffer than the beam shank of
// the same bolt a rigid shank is taken to be in the summary (our
// choice: a rigid link has no stiffness of its own to report, and an
// infinite one would leave no ratio to read; a large finite factor on
// the beam of the same diameter and length keeps every term finite, in
// the beam's proportions, and the ratios between variants that share
// the shank form exact).
const RigidShankFactor = 1000.0

// Springs returns the springs of a connector, one per pair of
// consecutive sheets, with the parts each joins; none for a connector
// not built. material gives a part's material.
//
// A spot weld is a beam of the nugget diameter and the contact length
// (t1+t2)/2 of the two sheets, at the midpoint of their two ends, along
// the stack axis, of the softer of the two materials, coupling the
// connector's degrees of freedom, whatever the form of its links or
// attachment (which change where it is tied, not what ties it).
//
// A bolt is, per pair of consecutive sheets, the part of its shank
// between the two sheets' centres: a beam of the bolt's diameter and
// the distance between the centres (the contact length (t1+t2)/2 where
// the centres coincide), at their midpoint, along the stack axis, of
// the shank's material (ShankModulus, ShankPoisson); a rigid shank is
// that beam times RigidShankFactor, in steel (a rigid shank records no
// modulus: --shank-modulus is a beam shank's). It couples the bolt's ring degrees
// of freedom: the shank ties all six between the centres, but each
// sheet is held only on what its ring couples. The ring's own spread
// is left out, as the nugget's is for a weld: with translations-only
// rings, the rotational stiffness of a pair comes only from the spread
// of its several connectors (parallel-axis rule), so releasing a
// bolt's rotations lowers it.
func Springs(c *joints.Connector, material func(part int64) Material) ([]Spring, [][2]int64) {
	if c.Status == joints.NotBuilt || len(c.Ends) != len(c.Stack.Sheets) {
		return nil, nil
	}
	switch c.Joint.Kind {
	case joints.Spot:
	case joints.Bolt:
		if c.Bolt == nil {
			return nil, nil
		}
	default:
		return nil, nil
	}
	var springs []Spring
	var pairs [][2]int64
	for i := 0; i+1 < len(c.Stack.Sheets); i++ {
		a, b := c.Stack.Sheets[i], c.Stack.Sheets[i+1]
		contact := (a.Thickness + b.Thickness) / 2
		var s Spring
		if c.Joint.Kind == joints.Bolt {
			s = shankSpring(c, contact, r3.Norm(r3.Sub(c.Ends[i+1].Point, c.Ends[i].Point)))
		} else {
			s = Beam(c.Diameter, contact, Softer(material(a.Part), material(b.Part)))
		}
		s.Point = r3.Scale(0.5, r3.Add(c.Ends[i].Point, c.Ends[i+1].Point))
		s.Axis = c.Stack.Axis
		s.DOFs = c.DOFs
		springs = append(springs, s)
		pairs = append(pairs, joints.PairKey(a.Part, b.Part))
	}
	return springs, pairs
}

// shankSpring returns the spring of a bolt's shank between two centres
// a distance length apart, contact when they coincide (mm).
func shankSpring(c *joints.Connector, contact, length float64) Spring {
	if length <= contact*1e-6 {
		length = contact
	}
	s := Beam(c.Diameter, length, ShankMaterial(c))
	if c.Bolt.Shank == joints.RigidShank {
		s.Axial *= RigidShankFactor
		s.Shear *= RigidShankFactor
		s.Torsion *= RigidShankFactor
		s.Bending *= RigidShankFactor
	}
	return s
}

// ShankMaterial returns the material of a bolt's shank: steel (Steel)
// unless its connector records another modulus or Poisson's ratio, then
// the material of those constants, named by them ("E=70000 N/mm^2
// nu=0.3", no comma to quote in a CSV cell): a modulus the user gave
// need not be steel's, and a summary that said steel would misname it.
func ShankMaterial(c *joints.Connector) Material {
	m := Steel()
	if c.Bolt == nil {
		return m
	}
	e, nu := c.Bolt.ShankModulus, c.Bolt.ShankPoisson
	if !(e > 0 && nu > -1 && nu < 0.5) || e == m.E && nu == m.Nu {
		return m
	}
	// G = E / (2 (1 + nu)) of an isotropic material (any strength of
	// materials text; from memory).
	return Material{Name: "E=" + strconv.FormatFloat(e, 'g', -1, 64) + " N/mm^2 nu=" + strconv.FormatFloat(nu, 'g', -1, 64),
		E: e, Nu: nu, G: e / (2 * (1 + nu))}
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
			m := Softer(material(p[0]), material(p[1])).Name
			if conns[i].Joint.Kind == joints.Bolt {
				m = ShankMaterial(&conns[i]).Name // a bolt's shank's, whatever its sheets
			}
			a.mats[m] = true
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
