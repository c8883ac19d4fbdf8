package geom

import (
	"cmp"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// pairsBrute is ElemPairsNear by testing every pair of elements (the
// tests of the one self-join of the element tree, join.go; contactPairs
// has its own in contact_test.go).
func pairsBrute(m *Mesh, r float64, group []int32) [][2]int32 {
	var out [][2]int32
	lo, hi := make([]r3.Vec, m.NumElems()), make([]r3.Vec, m.NumElems())
	for e := range lo {
		lo[e], hi[e] = elemBox(m, e)
	}
	for a := range m.NumElems() {
		alo, ahi := lo[a], hi[a]
		for b := a + 1; b < m.NumElems(); b++ {
			if group[a] == group[b] {
				continue
			}
			blo, bhi := lo[b], hi[b]
			d := 0.0
			for _, g := range []float64{blo.X - ahi.X, alo.X - bhi.X, blo.Y - ahi.Y, alo.Y - bhi.Y, blo.Z - ahi.Z, alo.Z - bhi.Z} {
				if g > 0 {
					d += g * g
				}
			}
			if d <= r*r {
				out = append(out, [2]int32{int32(a), int32(b)})
			}
		}
	}
	return out
}

func sortPairs(p [][2]int32) [][2]int32 {
	p = slices.Clone(p)
	slices.SortFunc(p, func(x, y [2]int32) int { return cmp.Or(cmp.Compare(x[0], y[0]), cmp.Compare(x[1], y[1])) })
	return p
}

// ElemPairsNear against the brute force, on every test mesh with random
// groups (a few large ones and many small ones), at several radii; the
// answer does not depend on GOMAXPROCS.
func TestElemPairsNear(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	for _, tm := range testMeshes() {
		m := tm.m
		x := NewIndex(m)
		for _, ngroups := range []int{1, 2, 7, m.NumElems()} {
			group := make([]int32, m.NumElems())
			for e := range group {
				// Groups in runs of elements, as parts are.
				group[e] = int32(e * ngroups / max(1, m.NumElems()))
				if ngroups == 7 && rng.IntN(10) == 0 {
					group[e] = int32(rng.IntN(ngroups))
				}
			}
			for _, r := range []float64{0, tm.r / 10, tm.r} {
				want := pairsBrute(m, r, group)
				runtime.GOMAXPROCS(1)
				one := x.ElemPairsNear(r, group)
				runtime.GOMAXPROCS(3)
				got := x.ElemPairsNear(r, group)
				if !slices.Equal(one, got) {
					t.Errorf("%s, %d groups, r %g: the answer depends on GOMAXPROCS", tm.name, ngroups, r)
				}
				got = sortPairs(got)
				if len(got) != len(slices.Compact(slices.Clone(got))) {
					t.Errorf("%s, %d groups, r %g: a pair given twice", tm.name, ngroups, r)
				}
				if !slices.Equal(got, want) {
					t.Errorf("%s, %d groups, r %g: %d pairs, want %d", tm.name, ngroups, r, len(got), len(want))
				}
			}
		}
	}
}

// The leaf pairs of the join cover every near pair of elements of
// different groups (the brute force's), and contactPairs gives the same
// answer whatever GOMAXPROCS.
func TestJoinLeafPairsCover(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	rng := rand.New(rand.NewPCG(7, 8))
	for _, n := range []int{2, 17, 3000} {
		m := randomSoup(rng, n, 5)
		x := NewElemIndex(m)
		const r = 1.5
		j := newNearJoin(x, r, m.ElemPart)
		leaf := make([]int32, n) // element -> its leaf
		for pos, e := range x.elems.ids {
			leaf[e] = int32(pos / treeFan)
		}
		have := map[[2]int32]bool{}
		for _, p := range j.leafPairs() {
			have[p] = true
		}
		for _, p := range pairsBrute(m, r, m.ElemPart) {
			a, b := leaf[p[0]], leaf[p[1]]
			if !have[[2]int32{min(a, b), max(a, b)}] {
				t.Fatalf("%d elements: elements %v (leaves %d, %d) near, their leaves not paired", n, p, a, b)
			}
		}
		keep := func(a, b int32, na, nb *[3]float32, d2 float64) bool { return math.Abs(dot32(na, nb)) > 0.5 }
		runtime.GOMAXPROCS(1)
		one := slices.Concat(x.contactPairs(r, keep)...)
		runtime.GOMAXPROCS(3)
		if got := slices.Concat(x.contactPairs(r, keep)...); !slices.Equal(one, got) {
			t.Errorf("%d elements: contactPairs depends on GOMAXPROCS", n)
		}
	}
}
