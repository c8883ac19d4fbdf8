package geom

import (
	"math"
	mbits "math/bits"
	"slices"
	"sync"

	"gonum.org/v1/gonum/spatial/r3"
)

// subsetItems presents a subset of items (by index) to the tree builder.
type subsetItems struct {
	all  treeItems
	list []int32
}

func (it subsetItems) Len() int { return len(it.list) }

func (it subsetItems) Box(i int) (lo, hi r3.Vec) { return it.all.Box(int(it.list[i])) }

// remap turns a tree built over a subset into one over the full item
// numbering.
func (t *packedTree) remap(list []int32) {
	for i, k := range t.ids {
		t.ids[i] = list[k]
	}
}

// NewIndexNear builds an index over only the elements whose bounding box
// comes within margin of at least one of the points, and over their
// nodes when withNodes is set (nodes that no element uses are left out;
// without withNodes, node queries find nothing). It answers every query exactly as NewIndex's index would, as
// long as the query's ball (centre q, radius r) lies within margin of one
// of the points (|q - p| + r <= margin); farther queries may miss
// elements. A connector build, whose queries all stay near the joints,
// thus indexes a few per cent of a large body instead of all of it.
//
// Elements are selected in one pass over the mesh: a bitmap of grid
// cells that lie within margin of a point rejects the far ones, and the
// points listed in an element's cells decide exactly (the distance from
// each point to the element's box), so the cost is linear in the mesh
// and the result does not depend on the order of the points. The boxes
// found on the way are those the tree is built from.
func NewIndexNear(m *Mesh, pts []r3.Vec, margin float64, withNodes bool) *Index {
	return NewIndexNearSets(m, []NearPoints{{pts, margin}}, withNodes)
}

// NearPoints is a set of points and the margin round each of them that
// NewIndexNearSets indexes.
type NearPoints struct {
	Pts    []r3.Vec
	Margin float64
}

// NewIndexNearSets is NewIndexNear for several sets of points, each with
// its own margin: an element is indexed when its box comes within a
// set's margin of one of the set's points. Joints of two kinds (spot
// welds, and the few bolts that look farther round them) thus index only
// what each needs, not everything within the larger margin of all.
func NewIndexNearSets(m *Mesh, sets []NearPoints, withNodes bool) *Index {
	sel, elems := nearElements(m, sets...)
	x := &Index{m: m, nodes: packedTree{level: []int{0, 0}}}
	var wg sync.WaitGroup
	if withNodes {
		used := make([]bool, m.NumNodes())
		var nodes []int32
		for _, e := range sel {
			for _, n := range m.ElemNodes(int(e)) {
				if !used[n] {
					used[n] = true
					nodes = append(nodes, n)
				}
			}
		}
		wg.Go(func() {
			x.nodes = newPackedTree(subsetItems{nodeItems{m.Coords}, nodes})
			x.nodes.remap(nodes)
		})
	}
	elems.sortItems()
	elems.remap(sel)
	x.elems = elems
	wg.Wait()
	return x
}

// nearElements returns, in increasing order, the elements whose bounding
// box lies within margin of a point, and a tree over them waiting for
// sortItems: its item boxes (box32Of) filled in, in the same order.
func nearElements(m *Mesh, sets ...NearPoints) ([]int32, packedTree) {
	var grids []*pointGrid
	for _, set := range sets {
		var finitePts []r3.Vec
		for _, p := range set.Pts {
			if finite(p.X) && finite(p.Y) && finite(p.Z) {
				finitePts = append(finitePts, p)
			}
		}
		if len(finitePts) > 0 && set.Margin >= 0 && !math.IsInf(set.Margin, 0) {
			grids = append(grids, newPointGrid(finitePts, set.Margin))
		}
	}
	if len(grids) == 0 {
		return nil, packedTree{level: []int{0, 0}}
	}
	g := grids[0]
	near := g.near
	if len(grids) > 1 {
		near = func(lo, hi r3.Vec) bool {
			for _, g := range grids {
				if g.near(lo, hi) {
					return true
				}
			}
			return false
		}
	}
	// Blocks of elements are scanned concurrently, each marking its
	// elements in a bit set (a block covers whole words) and counting
	// them; a second pass computes the chosen elements' boxes again
	// straight into the tree's array (cheaper than growing lists and
	// copying them), so the selection comes out in increasing element
	// order, in arrays of their exact size.
	ne := m.NumElems()
	chosen := MakeLarge[uint64]((ne + 63) / 64)
	counts := make([]int, (ne+parallelBlock-1)/parallelBlock+1)
	parallelBlocks(ne, func(from, to int) {
		n := 0
		for e := from; e < to; e++ {
			if near(elemBox(m, e)) {
				chosen[e/64] |= 1 << (e % 64)
				n++
			}
		}
		counts[from/parallelBlock+1] = n
	})
	for b := 1; b < len(counts); b++ {
		counts[b] += counts[b-1]
	}
	sel := MakeLarge[int32](counts[len(counts)-1])
	if len(sel) == 0 {
		return nil, packedTree{level: []int{0, 0}}
	}
	t := newLevels(len(sel))
	boxes := t.boxes[:len(sel)]
	parallelBlocks(ne, func(from, to int) {
		k := counts[from/parallelBlock]
		for wi := from / 64; wi < (to+63)/64; wi++ {
			for w := chosen[wi]; w != 0; w &= w - 1 {
				e := wi*64 + mbits.TrailingZeros64(w)
				sel[k] = int32(e)
				boxes[k] = box32Of(elemBox(m, e))
				k++
			}
		}
	})
	return sel, t
}

// pointGrid answers "does this box come within margin of one of the
// points" in about constant time: a grid spanning the points' box grown
// by margin, its cells at least half the margin wide (coarser if the grid
// would be too large), a bitmap of the cells that come within margin of
// a point (a ball of cells round each, with a little slack against
// rounding) and, per marked cell, the points whose ball marked it. A box
// within margin of a point has its spot nearest the point in a cell
// that point marked, so testing the points listed in the box's cells
// finds it.
type pointGrid struct {
	pts        []r3.Vec
	lo, hi     r3.Vec
	size       float64
	inv        float64 // 1 / size
	nx, ny, nz int
	lim2       float64 // margin squared, with slack against rounding
	marked     []uint64
	wordRank   []int32 // marked cells before each word of marked
	start      []int32 // points of marked cell r: list[start[r]:start[r+1]]
	list       []int32
}

func newPointGrid(pts []r3.Vec, margin float64) *pointGrid {
	g := &pointGrid{pts: pts}
	lo, hi := pts[0], pts[0]
	for _, p := range pts {
		lo = r3.Vec{X: math.Min(lo.X, p.X), Y: math.Min(lo.Y, p.Y), Z: math.Min(lo.Z, p.Z)}
		hi = r3.Vec{X: math.Max(hi.X, p.X), Y: math.Max(hi.Y, p.Y), Z: math.Max(hi.Z, p.Z)}
	}
	g.lo = r3.Sub(lo, r3.Vec{X: margin, Y: margin, Z: margin})
	g.hi = r3.Add(hi, r3.Vec{X: margin, Y: margin, Z: margin})
	ext := r3.Sub(g.hi, g.lo)
	g.size = math.Max(margin/2, 1e-9*math.Max(ext.X, math.Max(ext.Y, ext.Z)))
	const maxCells = 1 << 27
	for {
		g.nx, g.ny, g.nz = int(ext.X/g.size)+1, int(ext.Y/g.size)+1, int(ext.Z/g.size)+1
		if float64(g.nx)*float64(g.ny)*float64(g.nz) <= maxCells {
			break
		}
		g.size *= 2
	}
	g.inv = 1 / g.size
	limit := margin * (1 + 1e-9)
	g.lim2 = limit * limit
	cellLimit := margin + 1e-6*g.size
	g.marked = make([]uint64, (g.nx*g.ny*g.nz+63)/64)
	reach := int(math.Ceil(margin/g.size)) + 1
	// ball calls fn on every cell that comes within margin of p.
	ball := func(p r3.Vec, fn func(c int)) {
		cx, cy, cz := g.cell(p.X, g.lo.X, g.nx), g.cell(p.Y, g.lo.Y, g.ny), g.cell(p.Z, g.lo.Z, g.nz)
		for i := max(0, cx-reach); i <= min(g.nx-1, cx+reach); i++ {
			dx := g.gap(p.X, g.lo.X, i)
			for j := max(0, cy-reach); j <= min(g.ny-1, cy+reach); j++ {
				dy := g.gap(p.Y, g.lo.Y, j)
				for k := max(0, cz-reach); k <= min(g.nz-1, cz+reach); k++ {
					if dz := g.gap(p.Z, g.lo.Z, k); dx*dx+dy*dy+dz*dz <= cellLimit*cellLimit {
						fn((i*g.ny+j)*g.nz + k)
					}
				}
			}
		}
	}
	// Each point's ball is walked once: its cells, point after point,
	// are kept (cells[ends[i-1]:ends[i]] for point i) to mark them, then
	// to count and list the points of each marked cell.
	var cells []int32
	ends := make([]int, len(pts))
	for i, p := range pts {
		ball(p, func(c int) {
			g.marked[c/64] |= 1 << (c % 64)
			cells = append(cells, int32(c))
		})
		ends[i] = len(cells)
	}
	g.wordRank = make([]int32, len(g.marked)+1)
	for w, bits := range g.marked {
		g.wordRank[w+1] = g.wordRank[w] + int32(mbits.OnesCount64(bits))
	}
	g.start = make([]int32, g.wordRank[len(g.marked)]+1)
	ranks := cells // each cell's rank in place of the cell
	for k, c := range cells {
		r := int32(g.rank(int(c)))
		ranks[k] = r
		g.start[r+1]++
	}
	for r := 1; r < len(g.start); r++ {
		g.start[r] += g.start[r-1]
	}
	g.list = make([]int32, g.start[len(g.start)-1])
	fill := slices.Clone(g.start[:len(g.start)-1])
	from := 0
	for i := range pts {
		for _, r := range ranks[from:ends[i]] {
			g.list[fill[r]] = int32(i)
			fill[r]++
		}
		from = ends[i]
	}
	return g
}

// cell returns the cell along an axis starting at o with n cells that
// holds v (the end cells for values beyond).
func (g *pointGrid) cell(v, o float64, n int) int { return min(n-1, max(0, int((v-o)*g.inv))) }

// gap is the distance along an axis from v to cell i of the axis
// starting at o.
func (g *pointGrid) gap(v, o float64, i int) float64 {
	a := o + float64(i)*g.size
	return math.Max(0, math.Max(a-v, v-(a+g.size)))
}

// rank returns the index of marked cell c among the marked cells.
func (g *pointGrid) rank(c int) int {
	w := c / 64
	return int(g.wordRank[w]) + mbits.OnesCount64(g.marked[w]&(1<<(c%64)-1))
}

// near reports whether the box [blo, bhi] comes within margin of a point
// (false for an empty box).
func (g *pointGrid) near(blo, bhi r3.Vec) bool {
	if bhi.X < g.lo.X || blo.X > g.hi.X || bhi.Y < g.lo.Y || blo.Y > g.hi.Y || bhi.Z < g.lo.Z || blo.Z > g.hi.Z {
		return false
	}
	i0, i1 := g.cell(blo.X, g.lo.X, g.nx), g.cell(bhi.X, g.lo.X, g.nx)
	j0, j1 := g.cell(blo.Y, g.lo.Y, g.ny), g.cell(bhi.Y, g.lo.Y, g.ny)
	k0, k1 := g.cell(blo.Z, g.lo.Z, g.nz), g.cell(bhi.Z, g.lo.Z, g.nz)
	for i := i0; i <= i1; i++ {
		for j := j0; j <= j1; j++ {
			for k := k0; k <= k1; k++ {
				c := (i*g.ny+j)*g.nz + k
				if g.marked[c/64]&(1<<(c%64)) == 0 {
					continue
				}
				r := g.rank(c)
				for _, pi := range g.list[g.start[r]:g.start[r+1]] {
					if boxDist2(blo, bhi, g.pts[pi]) <= g.lim2 {
						return true
					}
				}
			}
		}
	}
	return false
}
