package geom

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/kdtree"
	"gonum.org/v1/gonum/spatial/r3"
)

// Benchmarks of the index against two alternatives for "elements within
// r": gonum's k-d tree over element centres (radius widened by the
// largest centre-to-corner distance) and a hashed uniform grid with cells
// the size of the largest element. Both alternatives apply the same exact
// box test as Index.ElemsNear and are checked against it below.

// kdElem is an element centre stored in gonum's k-d tree; the tree
// reorders its input, so the element index travels with the point.
type kdElem struct {
	c  [3]float64
	id int32
}

func (p *kdElem) Compare(c kdtree.Comparable, d kdtree.Dim) float64 {
	return p.c[d] - c.(*kdElem).c[d]
}
func (p *kdElem) Dims() int { return 3 }
func (p *kdElem) Distance(c kdtree.Comparable) float64 {
	q := c.(*kdElem)
	dx, dy, dz := p.c[0]-q.c[0], p.c[1]-q.c[1], p.c[2]-q.c[2]
	return dx*dx + dy*dy + dz*dz // squared, as kdtree.Comparable requires
}

type kdElems []kdElem

func (p kdElems) Index(i int) kdtree.Comparable         { return &p[i] }
func (p kdElems) Len() int                              { return len(p) }
func (p kdElems) Slice(start, end int) kdtree.Interface { return p[start:end] }
func (p kdElems) Pivot(d kdtree.Dim) int {
	pl := kdPlane{d, p}
	return kdtree.Partition(pl, kdtree.MedianOfRandoms(pl, 100))
}

type kdPlane struct {
	kdtree.Dim
	kdElems
}

func (p kdPlane) Less(i, j int) bool { return p.kdElems[i].c[p.Dim] < p.kdElems[j].c[p.Dim] }
func (p kdPlane) Swap(i, j int)      { p.kdElems[i], p.kdElems[j] = p.kdElems[j], p.kdElems[i] }
func (p kdPlane) Slice(start, end int) kdtree.SortSlicer {
	return kdPlane{p.Dim, p.kdElems[start:end]}
}

// kdIndex answers ElemsNear with gonum's k-d tree.
type kdIndex struct {
	m     *Mesh
	t     *kdtree.Tree
	reach float64 // largest centre-to-corner distance
}

func newKDIndex(m *Mesh) *kdIndex {
	pts := make(kdElems, m.NumElems())
	var reach float64
	for e := range pts {
		lo, hi := elemBox(m, e)
		c := r3.Scale(0.5, r3.Add(lo, hi))
		pts[e] = kdElem{[3]float64{c.X, c.Y, c.Z}, int32(e)}
		reach = max(reach, r3.Norm(r3.Sub(hi, c)))
	}
	return &kdIndex{m: m, t: kdtree.New(pts, false), reach: reach}
}

func (x *kdIndex) ElemsNear(p r3.Vec, r float64, dst []int32) []int32 {
	reach := r + x.reach
	k := kdtree.NewDistKeeper(reach * reach) // a fresh keeper per query
	x.t.NearestSet(k, &kdElem{c: [3]float64{p.X, p.Y, p.Z}})
	start := len(dst)
	for _, c := range k.Heap {
		e := c.Comparable.(*kdElem).id
		if lo, hi := elemBox(x.m, int(e)); boxDist2(lo, hi, p) <= r*r {
			dst = append(dst, e)
		}
	}
	slices.Sort(dst[start:])
	return dst
}

// gridIndex answers ElemsNear with a hashed uniform grid: each element
// sits in the cell of its box centre; cells are as large as the largest
// element box.
type gridIndex struct {
	m     *Mesh
	cell  float64
	reach float64
	cells map[[3]int32][]int32
}

func newGridIndex(m *Mesh) *gridIndex {
	x := &gridIndex{m: m, cells: map[[3]int32][]int32{}}
	for e := range m.NumElems() {
		lo, hi := elemBox(m, e)
		d := r3.Sub(hi, lo)
		x.cell = max(x.cell, d.X, d.Y, d.Z)
	}
	x.reach = x.cell / 2
	for e := range m.NumElems() {
		lo, hi := elemBox(m, e)
		k := x.key(r3.Scale(0.5, r3.Add(lo, hi)))
		x.cells[k] = append(x.cells[k], int32(e))
	}
	return x
}

func (x *gridIndex) key(p r3.Vec) [3]int32 {
	return [3]int32{int32(math.Floor(p.X / x.cell)), int32(math.Floor(p.Y / x.cell)), int32(math.Floor(p.Z / x.cell))}
}

func (x *gridIndex) ElemsNear(p r3.Vec, r float64, dst []int32) []int32 {
	w := r + x.reach
	lo := x.key(r3.Sub(p, r3.Vec{X: w, Y: w, Z: w}))
	hi := x.key(r3.Add(p, r3.Vec{X: w, Y: w, Z: w}))
	start := len(dst)
	for i := lo[0]; i <= hi[0]; i++ {
		for j := lo[1]; j <= hi[1]; j++ {
			for k := lo[2]; k <= hi[2]; k++ {
				for _, e := range x.cells[[3]int32{i, j, k}] {
					if blo, bhi := elemBox(x.m, int(e)); boxDist2(blo, bhi, p) <= r*r {
						dst = append(dst, e)
					}
				}
			}
		}
	}
	slices.Sort(dst[start:])
	return dst
}

func TestAlternativeIndexes(t *testing.T) {
	m := soupMesh(rand.New(rand.NewPCG(4, 4)), 2000)
	x, kd, grid := NewIndex(m), newKDIndex(m), newGridIndex(m)
	rng := rand.New(rand.NewPCG(5, 5))
	for range 200 {
		p := queryPoint(rng, m, 10)
		want := x.ElemsNear(p, 10, nil)
		if got := kd.ElemsNear(p, 10, nil); !slices.Equal(got, want) {
			t.Fatalf("k-d tree: %v, index %v", got, want)
		}
		if got := grid.ElemsNear(p, 10, nil); !slices.Equal(got, want) {
			t.Fatalf("grid: %v, index %v", got, want)
		}
	}
}

// benchSize is a grid size (elements) of the benchmarks.
type benchSize struct {
	name   string
	nx, ny int
}

// benchSizes returns the grid sizes of the benchmarks, 200k and 2M
// elements; 2M is skipped with -short.
func benchSizes() []benchSize {
	return []benchSize{{"200k", 500, 400}, {"2M", 1600, 1250}}
}

// benchQueries returns query points within 3 mm of the 5 mm grid, the
// situation of joints placed on or between sheets.
func benchQueries(m *Mesh, n int) []r3.Vec {
	rng := rand.New(rand.NewPCG(1, 1))
	q := make([]r3.Vec, n)
	for i := range q {
		q[i] = r3.Add(m.Coords[rng.IntN(len(m.Coords))], randVec(rng, 3))
	}
	return q
}

func BenchmarkIndexBuild(b *testing.B) {
	for _, s := range benchSizes() {
		b.Run(s.name, func(b *testing.B) {
			if s.name == "2M" && testing.Short() {
				b.Skip("2M elements skipped with -short")
			}
			m := gridMesh(s.nx, s.ny, 5, 20)
			b.ResetTimer()
			defer cpuMetric(b)()
			for b.Loop() {
				NewIndex(m)
			}
		})
	}
}

// BenchmarkBuildAlternatives builds the k-d tree and the grid at 200k.
func BenchmarkBuildAlternatives(b *testing.B) {
	m := gridMesh(500, 400, 5, 20)
	b.Run("kdtree", func(b *testing.B) {
		defer cpuMetric(b)()
		for b.Loop() {
			newKDIndex(m)
		}
	})
	b.Run("grid", func(b *testing.B) {
		defer cpuMetric(b)()
		for b.Loop() {
			newGridIndex(m)
		}
	})
}

type elemsNearer interface {
	ElemsNear(p r3.Vec, r float64, dst []int32) []int32
}

// BenchmarkElemsNear compares the three structures for elements within
// r = 8 mm of points near a 5 mm grid (about 12 answers per query).
func BenchmarkElemsNear(b *testing.B) {
	for _, s := range benchSizes() {
		if s.name == "2M" && testing.Short() {
			continue
		}
		m := gridMesh(s.nx, s.ny, 5, 20)
		q := benchQueries(m, 4096)
		for _, alt := range []struct {
			name string
			new  func(*Mesh) elemsNearer
		}{
			{"packed", func(m *Mesh) elemsNearer { return NewIndex(m) }},
			{"kdtree", func(m *Mesh) elemsNearer { return newKDIndex(m) }},
			{"grid", func(m *Mesh) elemsNearer { return newGridIndex(m) }},
		} {
			if s.name == "2M" && alt.name != "packed" {
				continue // the alternatives are compared at 200k
			}
			b.Run(s.name+"/"+alt.name, func(b *testing.B) {
				x := alt.new(m)
				var dst []int32
				i := 0
				b.ResetTimer()
				defer cpuMetric(b)()
				for b.Loop() {
					dst = x.ElemsNear(q[i%len(q)], 8, dst[:0])
					i++
				}
			})
		}
	}
}

func BenchmarkProjectNear(b *testing.B) {
	for _, s := range benchSizes() {
		b.Run(s.name, func(b *testing.B) {
			if s.name == "2M" && testing.Short() {
				b.Skip("2M elements skipped with -short")
			}
			m := gridMesh(s.nx, s.ny, 5, 20)
			x := NewIndex(m)
			q := benchQueries(m, 4096)
			i := 0
			b.ResetTimer()
			defer cpuMetric(b)()
			for b.Loop() {
				x.ProjectNear(q[i%len(q)], 8, nil)
				i++
			}
		})
	}
}

func BenchmarkProjectNearest(b *testing.B) {
	m := gridMesh(500, 400, 5, 20)
	x := NewIndex(m)
	q := benchQueries(m, 4096)
	i := 0
	defer cpuMetric(b)()
	for b.Loop() {
		x.ProjectNearest(q[i%len(q)], math.Inf(1), nil)
		i++
	}
}

func BenchmarkNearestNodes(b *testing.B) {
	for _, s := range benchSizes() {
		if s.name == "2M" && testing.Short() {
			continue
		}
		m := gridMesh(s.nx, s.ny, 5, 20)
		x := NewIndex(m)
		q := benchQueries(m, 4096)
		for _, k := range []int{1, 8} {
			b.Run(fmt.Sprintf("%s/k=%d", s.name, k), func(b *testing.B) {
				i := 0
				defer cpuMetric(b)()
				for b.Loop() {
					x.NearestNodes(q[i%len(q)], k, nil)
					i++
				}
			})
		}
	}
}

// BenchmarkScaling compares ProjectNear with a brute-force scan (box test
// then projection) as the mesh grows tenfold: the index's time per query
// stays nearly flat, the scan's grows linearly.
func BenchmarkScaling(b *testing.B) {
	for _, n := range []int{32, 100, 316} { // 1k, 10k, 100k elements
		m := gridMesh(n, n, 5, 20)
		q := benchQueries(m, 1024)
		x := NewIndex(m)
		b.Run(fmt.Sprintf("index/%d", n*n), func(b *testing.B) {
			i := 0
			defer cpuMetric(b)()
			for b.Loop() {
				x.ProjectNear(q[i%len(q)], 8, nil)
				i++
			}
		})
		b.Run(fmt.Sprintf("brute/%d", n*n), func(b *testing.B) {
			i := 0
			defer cpuMetric(b)()
			for b.Loop() {
				p := q[i%len(q)]
				for e := range m.NumElems() {
					if lo, hi := elemBox(m, e); boxDist2(lo, hi, p) <= 64 {
						m.Project(e, p)
					}
				}
				i++
			}
		})
	}
}

func BenchmarkClosestOnTriangle(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 1))
	a, c, d := randVec(rng, 5), randVec(rng, 5), randVec(rng, 5)
	q := make([]r3.Vec, 1024)
	for i := range q {
		q[i] = randVec(rng, 8)
	}
	i := 0
	defer cpuMetric(b)()
	for b.Loop() {
		ClosestOnTriangle(q[i%len(q)], a, c, d)
		i++
	}
}

func BenchmarkClosestOnQuad(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 1))
	for _, lift := range []float64{0, 0.5} {
		x := [4]r3.Vec{v3(0, 0, 0), v3(5, 0, 0), v3(5, 5, lift), v3(0, 5, 0)}
		q := make([]r3.Vec, 1024)
		for i := range q {
			q[i] = r3.Add(v3(2.5, 2.5, 0), randVec(rng, 5))
		}
		b.Run(fmt.Sprintf("lift=%g", lift), func(b *testing.B) {
			i := 0
			defer cpuMetric(b)()
			for b.Loop() {
				ClosestOnQuad(q[i%len(q)], x)
				i++
			}
		})
	}
}

// BenchmarkClosestPerPart compares the pruned per-part search with
// projecting onto every element within reach (ProjectNear) and keeping
// the first per part, for r = 8 mm around points near a 5 mm grid of
// four parts.
func BenchmarkClosestPerPart(b *testing.B) {
	for _, s := range benchSizes() {
		if s.name == "2M" && testing.Short() {
			continue
		}
		m := gridMesh(s.nx, s.ny, 5, 20)
		x := NewIndex(m)
		q := benchQueries(m, 4096)
		b.Run(s.name+"/pruned", func(b *testing.B) {
			i := 0
			defer cpuMetric(b)()
			for b.Loop() {
				x.ClosestPerPart(q[i%len(q)], 8)
				i++
			}
		})
		b.Run(s.name+"/project-all", func(b *testing.B) {
			i := 0
			defer cpuMetric(b)()
			for b.Loop() {
				var seen [8]bool
				for _, pr := range x.ProjectNear(q[i%len(q)], 8, nil) {
					seen[m.ElemPart[pr.Elem]] = true
				}
				i++
			}
		})
	}
}
