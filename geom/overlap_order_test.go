package geom

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// sheetMesh is a mesh built sheet by sheet, each sheet a grid of quads
// (nx by ny) of its own part, its nodes at pts(i, j).
type sheetMesh struct{ m *Mesh }

func newSheetMesh() *sheetMesh { return &sheetMesh{m: &Mesh{ElemStart: []int32{0}}} }

func (b *sheetMesh) sheet(id int64, nx, ny int, pts func(i, j int) r3.Vec) {
	m := b.m
	pi := int32(len(m.Parts))
	m.Parts = append(m.Parts, Part{ID: id, Thickness: 1})
	base := int32(len(m.Coords))
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			m.NodeIDs = append(m.NodeIDs, int64(len(m.Coords)+1))
			m.Coords = append(m.Coords, pts(i, j))
		}
	}
	for j := range ny {
		for i := range nx {
			n0 := base + int32(j*(nx+1)+i)
			m.Conn = append(m.Conn, n0, n0+1, n0+int32(nx)+2, n0+int32(nx)+1)
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
			m.ElemIDs = append(m.ElemIDs, int64(len(m.ElemIDs)+1))
			m.ElemPart = append(m.ElemPart, pi)
		}
	}
}

func (b *sheetMesh) done() *Mesh {
	if err := b.m.Index(); err != nil {
		panic(err)
	}
	return b.m
}

// hemMesh is a sheet (part 1) under a hem (part 2): a strip folded back
// on itself, its lower layer 1 mm and its upper layer 2.5 mm above the
// sheet, joined by a half round bend, so that the normal line of every
// element of the sheet under the hem meets part 2 twice; and a third
// sheet (part 3) above the hem, 4 mm above the first. The hem's grid is
// finer than the sheet's and offset from it. Turned by rot.
func hemMesh(rot func(r3.Vec) r3.Vec) *Mesh {
	b := newSheetMesh()
	b.sheet(1, 12, 6, func(i, j int) r3.Vec { return rot(r3.Vec{X: float64(i) * 3, Y: float64(j) * 3}) })
	// The hem's path: out along the lower layer (x from 1 to 31), round
	// the bend (radius 0.75 about x = 31, z = 1.75), back along the
	// upper one.
	const nl, nb = 20, 6
	path := func(i int) r3.Vec {
		switch {
		case i <= nl:
			return r3.Vec{X: 1 + 30*float64(i)/nl, Z: 1}
		case i < nl+nb:
			a := math.Pi * float64(i-nl) / nb
			return r3.Vec{X: 31 + 0.75*math.Sin(a), Z: 1.75 - 0.75*math.Cos(a)}
		}
		return r3.Vec{X: 31 - 30*float64(i-nl-nb)/nl, Z: 2.5}
	}
	b.sheet(2, 2*nl+nb, 7, func(i, j int) r3.Vec {
		p := path(i)
		p.Y = 0.4 + float64(j)*2.4
		return rot(p)
	})
	b.sheet(3, 8, 5, func(i, j int) r3.Vec { return rot(r3.Vec{X: 2 + float64(i)*3.7, Y: 1 + float64(j)*3.1, Z: 4}) })
	return b.done()
}

// shuffledMesh returns m with its elements and its nodes in a random order,
// each keeping its id, its nodes and its part; with far set, with a
// sheet of a random size added far away (part 99), which faces nothing
// but moves the bounds of the index and thus the shape of its tree.
func shuffledMesh(m *Mesh, rng *rand.Rand, far bool) *Mesh {
	if far {
		b := &sheetMesh{m: &Mesh{Parts: slices.Clone(m.Parts), NodeIDs: slices.Clone(m.NodeIDs), Coords: slices.Clone(m.Coords),
			ElemIDs: slices.Clone(m.ElemIDs), ElemPart: slices.Clone(m.ElemPart), ElemStart: slices.Clone(m.ElemStart), Conn: slices.Clone(m.Conn)}}
		n0, e0 := int64(m.NumNodes()), int64(m.NumElems())
		at := r3.Add(m.Coords[0], randVec(rng, 300))
		h := 1 + 4*rng.Float64()
		b.sheet(99, 1+rng.IntN(30), 1+rng.IntN(30), func(i, j int) r3.Vec {
			return r3.Add(at, r3.Vec{X: 200 + float64(i)*h, Y: float64(j) * h})
		})
		for i := n0; i < int64(len(b.m.NodeIDs)); i++ {
			b.m.NodeIDs[i] = 1_000_000 + i
		}
		for i := e0; i < int64(len(b.m.ElemIDs)); i++ {
			b.m.ElemIDs[i] = 1_000_000 + i
		}
		m = b.m
	}
	np, ep := rng.Perm(m.NumNodes()), rng.Perm(m.NumElems())
	s := &Mesh{Parts: slices.Clone(m.Parts), ElemStart: []int32{0}}
	where := make([]int32, m.NumNodes())
	for k, n := range np {
		where[n] = int32(k)
		s.NodeIDs = append(s.NodeIDs, m.NodeIDs[n])
		s.Coords = append(s.Coords, m.Coords[n])
	}
	for _, e := range ep {
		for _, n := range m.ElemNodes(e) {
			s.Conn = append(s.Conn, where[n])
		}
		s.ElemStart = append(s.ElemStart, int32(len(s.Conn)))
		s.ElemIDs = append(s.ElemIDs, m.ElemIDs[e])
		s.ElemPart = append(s.ElemPart, m.ElemPart[e])
	}
	if err := s.Index(); err != nil {
		panic(err)
	}
	return s
}

// facingByID is an answer of FacingElements by ids: (element id, part id
// faced) to the facing element's id and the distance.
type facingByID map[[2]int64]struct {
	other int64
	dist  float64
}

func byID(m *Mesh, fs []Facing) facingByID {
	out := facingByID{}
	for _, f := range fs {
		out[[2]int64{m.ElemIDs[f.Elem], m.Parts[m.ElemPart[f.Other]].ID}] = struct {
			other int64
			dist  float64
		}{m.ElemIDs[f.Other], f.Dist}
	}
	return out
}

// nearestBrute is the stated rule by brute force: for every element e
// and every other part, of the elements of that part that meet e's
// normal line (meets), the one met nearest, ties to the lowest id.
func nearestBrute(m *Mesh, r, cosTol float64) facingByID {
	w := &facingSearch{m: m, group: m.ElemPart, r: r, cosTol: cosTol}
	type best struct {
		f int32
		s float64
	}
	bs := map[[2]int64]best{}
	var x [4]r3.Vec
	for e := range m.NumElems() {
		_, ne, ce := corners(m, e, &x)
		if r3.Norm2(ne) == 0 {
			continue
		}
		for f := range m.NumElems() {
			if m.ElemPart[f] == m.ElemPart[e] {
				continue
			}
			s, ok := w.meets(ce, ne, int32(f), &x)
			if !ok {
				continue
			}
			k := [2]int64{m.ElemIDs[e], m.Parts[m.ElemPart[f]].ID}
			if b, seen := bs[k]; !seen || closer(s, int32(f), b.s, b.f, m.ElemIDs) {
				bs[k] = best{int32(f), s}
			}
		}
	}
	out := facingByID{}
	for k, b := range bs {
		out[k] = struct {
			other int64
			dist  float64
		}{m.ElemIDs[b.f], b.s}
	}
	return out
}

// TestFacingElementsOrder checks that the facing pairs, by element id,
// do not depend on the order of the elements and nodes nor on the shape
// of the index: random rotations of the stack of sheets and of a hem (a
// part whose surface meets a normal line twice), each with its elements
// and nodes shuffled, and every other time a sheet far away added (which
// moves the index's bounds, so cuts its tree elsewhere), give the same
// pairs and distances as the
// mesh in its own order, and the pairs the stated rule gives by brute
// force (the nearest crossing; by construction of the hem, the lower
// layer 1 mm above the sheet, not the upper one 2.5 mm above).
func TestFacingElementsOrder(t *testing.T) {
	cosTol := math.Cos(20 * math.Pi / 180)
	const r = 4.5
	for seed := range uint64(4) {
		rng := rand.New(rand.NewPCG(seed, 77))
		meshes := []struct {
			name string
			m    *Mesh
		}{{"stack", stackMesh(rng)}, {"hem", hemMesh(rotation(rng))}}
		for _, mc := range meshes {
			m := mc.m
			want := nearestBrute(m, r, cosTol)
			if len(want) < 100 {
				t.Fatalf("seed %d %s: only %d facing pairs", seed, mc.name, len(want))
			}
			for _, upward := range []bool{false, true} {
				ref := byID(m, NewElemIndex(m).FacingElements(m.ElemPart, r, cosTol, upward))
				if !upward {
					for k, v := range want {
						if g, ok := ref[k]; !ok || g != v {
							t.Errorf("seed %d %s: element %d faces part %d at element %d, %g; want element %d, %g (nearest, lowest id)",
								seed, mc.name, k[0], k[1], g.other, g.dist, v.other, v.dist)
						}
					}
					if len(ref) != len(want) {
						t.Errorf("seed %d %s: %d facing pairs, want %d", seed, mc.name, len(ref), len(want))
					}
				}
				for round := range 4 {
					s := shuffledMesh(m, rng, round%2 == 1)
					got := byID(s, NewElemIndex(s).FacingElements(s.ElemPart, r, cosTol, upward))
					for k, v := range ref {
						if g, ok := got[k]; !ok || g != v {
							t.Errorf("seed %d %s upward %v shuffle %d: element %d faces part %d at element %d, %g; in file order at %d, %g",
								seed, mc.name, upward, round, k[0], k[1], g.other, g.dist, v.other, v.dist)
						}
					}
					if len(got) != len(ref) {
						t.Errorf("seed %d %s upward %v shuffle %d: %d facing pairs, %d in file order", seed, mc.name, upward, round, len(got), len(ref))
					}
				}
			}
		}
	}
}

// TestFacingElementsTieLowestID checks the tie rule on exact ties: a
// 2 mm square element of part 1 at z = 0 whose normal line (x = y = 1)
// runs along the shared edge of two elements of part 2 at z = 1 (met at
// 1 mm by both, exactly: integer coordinates) and meets a third element
// of part 2, coincident with one of them, at the same 1 mm; a fourth at
// z = 0.5 beside the line is not met. By construction the line meets
// part 2 first at 1 mm, and of the three elements met there the one of
// lowest id must be given, whatever their ids and order; a nearer
// element of higher id (z = 0.75, over the line) comes before all.
func TestFacingElementsTieLowestID(t *testing.T) {
	quad := func(x0, y0, z, w float64) [4]r3.Vec {
		return [4]r3.Vec{{X: x0, Y: y0, Z: z}, {X: x0 + w, Y: y0, Z: z}, {X: x0 + w, Y: y0 + w, Z: z}, {X: x0, Y: y0 + w, Z: z}}
	}
	build := func(elems [][4]r3.Vec, parts []int32, ids []int64) *Mesh {
		m := &Mesh{Parts: []Part{{ID: 1, Thickness: 1}, {ID: 2, Thickness: 1}}, ElemStart: []int32{0}}
		for k, q := range elems {
			for _, p := range q {
				m.NodeIDs = append(m.NodeIDs, int64(len(m.Coords)+1))
				m.Coords = append(m.Coords, p)
				m.Conn = append(m.Conn, int32(len(m.Coords)-1))
			}
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
			m.ElemIDs = append(m.ElemIDs, ids[k])
			m.ElemPart = append(m.ElemPart, parts[k])
		}
		if err := m.Index(); err != nil {
			t.Fatal(err)
		}
		return m
	}
	base := quad(0, 0, 0, 2)
	// Part 2: two elements sharing the edge x = 1 (0 <= y <= 2) at z = 1,
	// one coincident with the first, and one beside the line at z = 0.5.
	left, right := quad(-1, 0, 1, 2), quad(1, 0, 1, 2)
	beside := quad(3, 3, 0.5, 2)
	cosTol := math.Cos(20 * math.Pi / 180)
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := range 24 {
		elems := [][4]r3.Vec{base, left, right, left, beside}
		parts := []int32{0, 1, 1, 1, 1}
		ids := []int64{100, 0, 0, 0, 0}
		near := trial%4 == 3
		if near {
			elems = append(elems, quad(0.5, 0.5, 0.75, 1))
			parts = append(parts, 1)
			ids = append(ids, 0)
		}
		for k, v := range rng.Perm(len(ids) - 1) {
			ids[k+1] = int64(10 + 7*v) // distinct, in a random order
		}
		wantID := min(ids[1], ids[2], ids[3])
		if near {
			ids[len(ids)-1] = 1000 // higher than all: distance comes first
			wantID = 1000
		}
		perm := rng.Perm(len(elems))
		pe, pp, pi := make([][4]r3.Vec, len(elems)), make([]int32, len(elems)), make([]int64, len(elems))
		for k, p := range perm {
			pe[k], pp[k], pi[k] = elems[p], parts[p], ids[p]
		}
		m := build(pe, pp, pi)
		got := byID(m, NewElemIndex(m).FacingElements(m.ElemPart, 4.5, cosTol, false))
		f, ok := got[[2]int64{100, 2}]
		wantDist := 1.0
		if near {
			wantDist = 0.75
		}
		if !ok || f.other != wantID || f.dist != wantDist {
			t.Errorf("trial %d (ids %v, order %v): element 100 faces part 2 at %d, %g (found %v); want %d, %g",
				trial, ids, perm, f.other, f.dist, ok, wantID, wantDist)
		}
	}
}

// TestFacingElementsOrdered: the groups relabelled in reverse (g ->
// n-1-g) and searched by value give the same facings, in the same order,
// as the groups searched in the reverse order (order[g] = n-1-g); with
// upward, every facing pair (upward false) lies in the half searched
// from its lower group: by value, or in the reverse order.
func TestFacingElementsOrdered(t *testing.T) {
	cosTol := math.Cos(20 * math.Pi / 180)
	const r = 4.5
	m := stackMesh(rand.New(rand.NewPCG(3, 77)))
	n := int32(len(m.Parts))
	order := make([]int32, n)
	for g := range order {
		order[g] = n - 1 - int32(g)
	}
	relabelled := make([]int32, len(m.ElemPart))
	for e, g := range m.ElemPart {
		relabelled[e] = order[g]
	}
	x := NewElemIndex(m)
	for _, upward := range []bool{false, true} {
		got := x.FacingElementsOrdered(m.ElemPart, order, r, cosTol, upward)
		want := x.FacingElements(relabelled, r, cosTol, upward)
		if !slices.Equal(got, want) {
			t.Errorf("upward %v: %d facings in reverse order, %d relabelled; they differ", upward, len(got), len(want))
		}
	}
	all := byID(m, x.FacingElements(m.ElemPart, r, cosTol, false))
	up, down := byID(m, x.FacingElements(m.ElemPart, r, cosTol, true)), byID(m, x.FacingElementsOrdered(m.ElemPart, order, r, cosTol, true))
	pairs := 0
	for k, v := range all {
		a, b := m.ElemPart[mustElem(t, m, k[0])], mustPart(t, m, k[1])
		half := up
		if a > b {
			half = down
		}
		if g, ok := half[k]; !ok || g != v {
			t.Errorf("element %d, part %d: %v in its half, want %v", k[0], k[1], g, v)
		}
		pairs++
	}
	if pairs < 100 {
		t.Fatalf("only %d facing pairs", pairs)
	}
}

func mustElem(t *testing.T, m *Mesh, id int64) int32 {
	e, ok := m.ElemIndex(id)
	if !ok {
		t.Fatalf("element %d not found", id)
	}
	return e
}

func mustPart(t *testing.T, m *Mesh, id int64) int32 {
	p, ok := m.PartIndex(id)
	if !ok {
		t.Fatalf("part %d not found", id)
	}
	return p
}
