package geom

import (
	"math"
	"math/bits"
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
// Elements are selected in one pass through a bitmap of grid cells that
// lie within margin of a point, so the cost is linear in the mesh and the
// result does not depend on the order of the points.
func NewIndexNear(m *Mesh, pts []r3.Vec, margin float64, withNodes bool) *Index {
	sel := nearElements(m, pts, margin)
	x := &Index{m: m, nodes: packedTree{level: []int{0, 0}}}
	if !withNodes {
		x.elems = newPackedTree(subsetItems{elemItems{m}, sel})
		x.elems.remap(sel)
		return x
	}
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
	var wg sync.WaitGroup
	wg.Go(func() {
		x.nodes = newPackedTree(subsetItems{nodeItems{m.Coords}, nodes})
		x.nodes.remap(nodes)
	})
	x.elems = newPackedTree(subsetItems{elemItems{m}, sel})
	x.elems.remap(sel)
	wg.Wait()
	return x
}

// nearElements returns, in increasing order, the elements whose bounding
// box lies within margin of a point (and possibly a few more).
func nearElements(m *Mesh, pts []r3.Vec, margin float64) []int32 {
	var finitePts []r3.Vec
	for _, p := range pts {
		if finite(p.X) && finite(p.Y) && finite(p.Z) {
			finitePts = append(finitePts, p)
		}
	}
	if len(finitePts) == 0 || !(margin >= 0) || math.IsInf(margin, 0) {
		return nil
	}
	// The grid spans the points' box grown by margin; its cells are at
	// least half the margin wide, coarser if the grid would be too large.
	// Around each point it marks the cells that come within margin of it
	// (with a little slack against rounding), a ball of cells rather than
	// a cube: the fewer elements the index holds, the faster it builds.
	// An element within margin of a point has a spot of its box within
	// margin, in a cell that is marked.
	lo, hi := finitePts[0], finitePts[0]
	for _, p := range finitePts {
		lo = r3.Vec{X: math.Min(lo.X, p.X), Y: math.Min(lo.Y, p.Y), Z: math.Min(lo.Z, p.Z)}
		hi = r3.Vec{X: math.Max(hi.X, p.X), Y: math.Max(hi.Y, p.Y), Z: math.Max(hi.Z, p.Z)}
	}
	lo = r3.Sub(lo, r3.Vec{X: margin, Y: margin, Z: margin})
	hi = r3.Add(hi, r3.Vec{X: margin, Y: margin, Z: margin})
	ext := r3.Sub(hi, lo)
	size := math.Max(margin/2, 1e-9*math.Max(ext.X, math.Max(ext.Y, ext.Z)))
	const maxCells = 1 << 27
	var nx, ny, nz int
	for {
		nx, ny, nz = int(ext.X/size)+1, int(ext.Y/size)+1, int(ext.Z/size)+1
		if float64(nx)*float64(ny)*float64(nz) <= maxCells {
			break
		}
		size *= 2
	}
	cell := func(v, o float64, n int) int { return min(n-1, max(0, int((v-o)/size))) }
	// gap is the distance along an axis from v to cell i of the axis
	// starting at o.
	gap := func(v, o float64, i int) float64 {
		a := o + float64(i)*size
		return math.Max(0, math.Max(a-v, v-(a+size)))
	}
	marked := make([]uint64, (nx*ny*nz+63)/64)
	reach := int(math.Ceil(margin/size)) + 1
	limit := margin + 1e-6*size
	for _, p := range finitePts {
		cx, cy, cz := cell(p.X, lo.X, nx), cell(p.Y, lo.Y, ny), cell(p.Z, lo.Z, nz)
		for i := max(0, cx-reach); i <= min(nx-1, cx+reach); i++ {
			dx := gap(p.X, lo.X, i)
			for j := max(0, cy-reach); j <= min(ny-1, cy+reach); j++ {
				dy := gap(p.Y, lo.Y, j)
				for k := max(0, cz-reach); k <= min(nz-1, cz+reach); k++ {
					if dz := gap(p.Z, lo.Z, k); dx*dx+dy*dy+dz*dz > limit*limit {
						continue
					}
					c := (i*ny+j)*nz + k
					marked[c/64] |= 1 << (c % 64)
				}
			}
		}
	}
	// Blocks of elements are scanned concurrently, each marking its
	// elements in a bit set (a block covers whole words), which is then
	// read in element order: the selection comes out in increasing
	// element order, in an array of its exact size.
	ne := m.NumElems()
	chosen := make([]uint64, (ne+63)/64)
	parallelBlocks(ne, func(from, to int) {
		for e := from; e < to; e++ {
			blo, bhi := elemBox(m, e)
			if bhi.X < lo.X || blo.X > hi.X || bhi.Y < lo.Y || blo.Y > hi.Y || bhi.Z < lo.Z || blo.Z > hi.Z {
				continue
			}
			i0, i1 := cell(blo.X, lo.X, nx), cell(bhi.X, lo.X, nx)
			j0, j1 := cell(blo.Y, lo.Y, ny), cell(bhi.Y, lo.Y, ny)
			k0, k1 := cell(blo.Z, lo.Z, nz), cell(bhi.Z, lo.Z, nz)
		scan:
			for i := i0; i <= i1; i++ {
				for j := j0; j <= j1; j++ {
					for k := k0; k <= k1; k++ {
						c := (i*ny+j)*nz + k
						if marked[c/64]&(1<<(c%64)) != 0 {
							chosen[e/64] |= 1 << (e % 64)
							break scan
						}
					}
				}
			}
		}
	})
	count := 0
	for _, w := range chosen {
		count += bits.OnesCount64(w)
	}
	sel := make([]int32, 0, count)
	for wi, w := range chosen {
		for w != 0 {
			sel = append(sel, int32(wi*64+bits.TrailingZeros64(w)))
			w &= w - 1
		}
	}
	return sel
}
