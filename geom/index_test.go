package geom

import (
	"cmp"
	"math"
	"math/rand/v2"
	"slices"
	"sync"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// Brute-force references for the index queries.

func bruteElemsNear(m *Mesh, p r3.Vec, r float64) []int32 {
	var out []int32
	for e := range m.NumElems() {
		if lo, hi := elemBox(m, e); boxDist2(lo, hi, p) <= r*r {
			out = append(out, int32(e))
		}
	}
	return out
}

func bruteProjectNear(m *Mesh, p r3.Vec, r float64, filter func(int) bool) []Projection {
	var out []Projection
	for e := range m.NumElems() {
		if filter != nil && !filter(e) {
			continue
		}
		if pr := m.Project(e, p); pr.Dist <= r {
			out = append(out, pr)
		}
	}
	slices.SortFunc(out, func(a, b Projection) int {
		return cmp.Or(cmp.Compare(a.Dist, b.Dist), cmp.Compare(a.Elem, b.Elem))
	})
	return out
}

func bruteNodes(m *Mesh, p r3.Vec, filter func(int) bool) []nodeDist {
	var all []nodeDist
	for n, c := range m.Coords {
		if filter == nil || filter(n) {
			all = append(all, nodeDist{r3.Norm2(r3.Sub(c, p)), int32(n)})
		}
	}
	slices.SortFunc(all, compareNodeDist)
	return all
}

func nodeIDs(nd []nodeDist) []int32 {
	out := make([]int32, len(nd))
	for i, c := range nd {
		out[i] = c.n
	}
	return out
}

// numQueries is the number of random queries per mesh: 300, or 60 with
// -short.
func numQueries() int {
	if testing.Short() {
		return 60
	}
	return 300
}

// testMeshes returns the meshes the index is checked on, with a query
// radius scale for each.
func testMeshes() []struct {
	name string
	m    *Mesh
	r    float64
} {
	rng := rand.New(rand.NewPCG(7, 7))
	return []struct {
		name string
		m    *Mesh
		r    float64
	}{
		{"grid", gridMesh(60, 40, 5, 20), 12},
		{"soup", soupMesh(rng, 3000), 15},
		{"one element", soupMesh(rng, 1), 50},
		{"tiny", soupMesh(rng, 17), 50},
		{"cylinder", cylinderMesh(50, 80, 32, 10), 10},
	}
}

// queryPoint draws a point near the mesh: a random node moved by up to
// 2r, or a uniformly random point in the mesh's box.
func queryPoint(rng *rand.Rand, m *Mesh, r float64) r3.Vec {
	if rng.IntN(4) == 0 {
		lo, hi := m.Coords[0], m.Coords[0]
		for _, c := range m.Coords {
			lo = r3.Vec{X: min(lo.X, c.X), Y: min(lo.Y, c.Y), Z: min(lo.Z, c.Z)}
			hi = r3.Vec{X: max(hi.X, c.X), Y: max(hi.Y, c.Y), Z: max(hi.Z, c.Z)}
		}
		return r3.Vec{
			X: lo.X + rng.Float64()*(hi.X-lo.X),
			Y: lo.Y + rng.Float64()*(hi.Y-lo.Y),
			Z: lo.Z + rng.Float64()*(hi.Z-lo.Z),
		}
	}
	return r3.Add(m.Coords[rng.IntN(len(m.Coords))], randVec(rng, 2*r))
}

func TestIndexElemsNear(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, tm := range testMeshes() {
		x := NewIndex(tm.m)
		for i := range numQueries() {
			p := queryPoint(rng, tm.m, tm.r)
			r := tm.r * rng.Float64()
			prefix := []int32{-7}
			got := x.ElemsNear(p, r, prefix)
			want := append([]int32{-7}, bruteElemsNear(tm.m, p, r)...)
			if !slices.Equal(got, want) {
				t.Fatalf("%s query %d: ElemsNear(%v, %g) = %v, brute force %v", tm.name, i, p, r, got, want)
			}
		}
	}
}

func TestIndexProjectNear(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, tm := range testMeshes() {
		x := NewIndex(tm.m)
		for i := range numQueries() {
			p := queryPoint(rng, tm.m, tm.r)
			r := tm.r * rng.Float64()
			var filter func(int) bool
			if i%3 == 0 {
				filter = func(e int) bool { return tm.m.ElemPart[e] == 0 }
			}
			got := x.ProjectNear(p, r, filter)
			want := bruteProjectNear(tm.m, p, r, filter)
			if !slices.Equal(got, want) {
				t.Fatalf("%s query %d: ProjectNear(%v, %g) gives %d projections, brute force %d", tm.name, i, p, r, len(got), len(want))
			}
			// ProjectNearest agrees with the first of an unbounded search.
			r = math.Inf(1)
			if i%2 == 0 {
				r = tm.r
			}
			all := bruteProjectNear(tm.m, p, r, filter)
			best, ok := x.ProjectNearest(p, r, filter)
			if ok != (len(all) > 0) || ok && best != all[0] {
				t.Fatalf("%s query %d: ProjectNearest(%v, %g) = %+v %v, brute force %d results", tm.name, i, p, r, best, ok, len(all))
			}
		}
	}
}

func TestIndexNearestNodes(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for _, tm := range testMeshes() {
		x := NewIndex(tm.m)
		for i := range numQueries() {
			p := queryPoint(rng, tm.m, tm.r)
			var filter func(int) bool
			if i%3 == 0 {
				filter = func(n int) bool { return n%2 == 1 }
			}
			all := bruteNodes(tm.m, p, filter)
			for _, k := range []int{1, 4, 30} {
				got := x.NearestNodes(p, k, filter)
				want := nodeIDs(all[:min(k, len(all))])
				if !slices.Equal(got, want) {
					t.Fatalf("%s query %d: NearestNodes(%v, %d) = %v, brute force %v", tm.name, i, p, k, got, want)
				}
			}
			r := tm.r * rng.Float64()
			var want []int32
			for _, c := range all {
				if c.d2 <= r*r {
					want = append(want, c.n)
				}
			}
			if got := x.NodesWithin(p, r, filter); !slices.Equal(got, want) {
				t.Fatalf("%s query %d: NodesWithin(%v, %g) = %v, brute force %v", tm.name, i, p, r, got, want)
			}
		}
	}
}

func TestIndexTies(t *testing.T) {
	// The centre node of a 2 x 2 grid is shared by four elements, all at
	// the same distance from a point above it: ties go to the lowest
	// element id, and equidistant nodes come in index order.
	m := gridMesh(2, 2, 1, 0)
	x := NewIndex(m)
	p := v3(1, 1, 3)
	best, ok := x.ProjectNearest(p, 10, nil)
	if !ok || best.Elem != 0 || best.Dist != 3 {
		t.Errorf("ProjectNearest = %+v, want element 0 at 3", best)
	}
	got := x.ProjectNear(p, 3, nil)
	if len(got) != 4 || got[0].Elem != 0 || got[3].Elem != 3 {
		t.Errorf("ProjectNear = %+v, want elements 0..3", got)
	}
	// With the ids in reverse, the nearest is the last element.
	r := gridMesh(2, 2, 1, 0)
	slices.Reverse(r.ElemIDs)
	if best, ok := NewIndex(r).ProjectNearest(p, 10, nil); !ok || best.Elem != 3 {
		t.Errorf("ProjectNearest with ids reversed = %+v, want element 3 (id 1)", best)
	}
	if got := x.NearestNodes(v3(1, 1, 0), 5, nil); !slices.Equal(got, []int32{4, 1, 3, 5, 7}) {
		t.Errorf("NearestNodes = %v, want [4 1 3 5 7]", got)
	}
}

func TestIndexEdgeCases(t *testing.T) {
	empty := NewIndex(&Mesh{ElemStart: []int32{0}})
	if got := empty.ElemsNear(v3(0, 0, 0), 1, nil); got != nil {
		t.Errorf("empty ElemsNear = %v", got)
	}
	if _, ok := empty.ProjectNearest(v3(0, 0, 0), math.Inf(1), nil); ok {
		t.Error("empty ProjectNearest found something")
	}
	if got := empty.NearestNodes(v3(0, 0, 0), 3, nil); len(got) != 0 {
		t.Errorf("empty NearestNodes = %v", got)
	}

	m := gridMesh(3, 3, 1, 0)
	m.Coords[5] = v3(math.NaN(), 0, 0)
	m.Coords[6] = v3(math.Inf(1), 0, math.Inf(-1))
	x := NewIndex(m)
	nan := math.NaN()
	for _, q := range []struct {
		p r3.Vec
		r float64
	}{
		{v3(nan, 0, 0), 1}, {v3(0, math.Inf(1), 0), 1}, {v3(0, 0, 0), -1}, {v3(0, 0, 0), nan},
	} {
		if got := x.ElemsNear(q.p, q.r, nil); got != nil {
			t.Errorf("ElemsNear(%v, %g) = %v, want nothing", q.p, q.r, got)
		}
		if got := x.ProjectNear(q.p, q.r, nil); got != nil {
			t.Errorf("ProjectNear(%v, %g) = %v, want nothing", q.p, q.r, got)
		}
		if got := x.NodesWithin(q.p, q.r, nil); got != nil {
			t.Errorf("NodesWithin(%v, %g) = %v, want nothing", q.p, q.r, got)
		}
	}
	if got := x.NearestNodes(v3(0, 0, 0), 0, nil); got != nil {
		t.Errorf("NearestNodes(k=0) = %v", got)
	}
	// Nodes with non-finite coordinates are never returned; the rest are.
	got := x.NearestNodes(v3(0, 0, 0), 100, nil)
	if len(got) != 14 || slices.Contains(got, 5) || slices.Contains(got, 6) {
		t.Errorf("NearestNodes over a mesh with bad nodes = %v", got)
	}
	// Infinite radius returns every element with finite coordinates.
	if got := x.ProjectNear(v3(0, 0, 0), math.Inf(1), nil); len(got) < 5 {
		t.Errorf("ProjectNear(+Inf) = %d projections", len(got))
	}
}

func TestIndexConcurrent(t *testing.T) {
	m := soupMesh(rand.New(rand.NewPCG(9, 9)), 2000)
	x := NewIndex(m)
	rng := rand.New(rand.NewPCG(10, 10))
	pts := make([]r3.Vec, 200)
	for i := range pts {
		pts[i] = queryPoint(rng, m, 10)
	}
	want := make([][]Projection, len(pts))
	for i, p := range pts {
		want[i] = x.ProjectNear(p, 10, nil)
	}
	var wg sync.WaitGroup
	errs := make([]int, 4)
	for g := range 4 {
		wg.Go(func() {
			for i, p := range pts {
				if !slices.Equal(x.ProjectNear(p, 10, nil), want[i]) {
					errs[g]++
				}
				x.NearestNodes(p, 5, nil)
			}
		})
	}
	wg.Wait()
	for g, n := range errs {
		if n > 0 {
			t.Errorf("goroutine %d: %d queries differ from the serial answer", g, n)
		}
	}
}

func TestIndexDeterministic(t *testing.T) {
	m := soupMesh(rand.New(rand.NewPCG(11, 11)), 1000)
	a, b := NewIndex(m), NewIndex(m)
	if !slices.Equal(a.elems.ids, b.elems.ids) || !slices.Equal(a.elems.boxes, b.elems.boxes) ||
		!slices.Equal(a.nodes.ids, b.nodes.ids) {
		t.Error("two builds over the same mesh differ")
	}
}

func TestMorton(t *testing.T) {
	// Reference: interleave bit by bit (definition of the Z-order curve).
	naive := func(x, y, z uint64) uint64 {
		var c uint64
		for b := range mortonBits {
			c |= (x>>b&1)<<(3*b) | (y>>b&1)<<(3*b+1) | (z>>b&1)<<(3*b+2)
		}
		return c
	}
	rng := rand.New(rand.NewPCG(1, 1))
	for range 10000 {
		x, y, z := rng.Uint64N(1<<mortonBits), rng.Uint64N(1<<mortonBits), rng.Uint64N(1<<mortonBits)
		if got, want := morton3(x, y, z), naive(x, y, z); got != want {
			t.Fatalf("morton3(%d, %d, %d) = %x, want %x", x, y, z, got, want)
		}
	}
	for _, tt := range []struct {
		v, lo, scale float64
		want         uint64
	}{
		{5, 0, 1, 5}, {-1, 0, 1, 0}, {1e9, 0, 1, 1023}, {math.NaN(), 0, 1, 0}, {3, 3, 0, 0}, {7.5, 2, 2, 11},
	} {
		if got := quantize(tt.v, tt.lo, tt.scale, 1023); got != tt.want {
			t.Errorf("quantize(%g, %g, %g) = %d, want %d", tt.v, tt.lo, tt.scale, got, tt.want)
		}
	}
}

func TestRadixSort(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 2))
	for _, n := range []int{0, 1, 2, 100, 5000} {
		for _, spread := range []uint64{1, 7, 1 << 20, 1 << 48} {
			keys := make([]uint64, n)
			ids := make([]int32, n)
			type pair struct {
				k  uint64
				id int32
			}
			ref := make([]pair, n)
			for i := range keys {
				keys[i] = rng.Uint64N(spread)
				ids[i] = int32(i)
				ref[i] = pair{keys[i], int32(i)}
			}
			slices.SortStableFunc(ref, func(a, b pair) int { return cmp.Compare(a.k, b.k) })
			radixSort(keys, ids, 48)
			for i := range ref {
				if keys[i] != ref[i].k || ids[i] != ref[i].id {
					t.Fatalf("n=%d spread=%d: position %d has (%d, %d), want (%d, %d)", n, spread, i, keys[i], ids[i], ref[i].k, ref[i].id)
				}
			}
		}
	}
}

func TestRound32(t *testing.T) {
	for _, v := range []float64{0, 1, -1, 0.1, -0.1, 1e-30, 234567.891, -98765.4321, 3e38, math.Inf(1)} {
		if lo := float64(down32(v)); lo > v {
			t.Errorf("down32(%g) = %g", v, lo)
		}
		if hi := float64(up32(v)); hi < v {
			t.Errorf("up32(%g) = %g", v, hi)
		}
	}
}

// TestRound32Nextafter wants down32 and up32 to give what rounding and
// one step of math.Nextafter32 (the standard library) give.
func TestRound32Nextafter(t *testing.T) {
	ref := func(x float64, dir float32) float32 {
		f := float32(x)
		if dir < 0 && float64(f) > x || dir > 0 && float64(f) < x {
			f = math.Nextafter32(f, dir)
		}
		return f
	}
	vals := []float64{0, math.Copysign(0, -1), 1e-50, -1e-50, 1e-40, -1e-40, 0.1, -0.1, 1 / 3.0, -1 / 3.0,
		3.5e38, -3.5e38, math.MaxFloat32, math.Inf(1), math.Inf(-1), math.NaN()}
	for i := range 10000 {
		v := math.Sin(float64(i)) * math.Pow(10, float64(i%80-40))
		vals = append(vals, v, -v)
	}
	inf := float32(math.Inf(1))
	for _, v := range vals {
		if got, want := down32(v), ref(v, -inf); math.Float32bits(got) != math.Float32bits(want) && !(got != got && want != want) {
			t.Errorf("down32(%g) = %g, want %g", v, got, want)
		}
		if got, want := up32(v), ref(v, inf); math.Float32bits(got) != math.Float32bits(want) && !(got != got && want != want) {
			t.Errorf("up32(%g) = %g, want %g", v, got, want)
		}
	}
}
