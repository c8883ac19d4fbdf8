package geom

import (
	"cmp"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"
)

// Orientation says which elements have their normal the other way round
// from the rest of their part.
type Orientation struct {
	// Flip is set for the elements whose node order, and so whose normal,
	// is opposite to that of the piece they belong to: reversing their
	// node order makes the normals agree across every shared edge.
	Flip []bool
	// Conflicts counts, per part index, the shared edges whose two
	// elements disagree whichever way their piece is turned: the piece
	// cannot be oriented (a strip with a half twist, or elements joined
	// in a way no surface allows). Each such edge is counted once.
	Conflicts []int
	// Pieces counts, per part index, its pieces: the sets of its elements
	// joined through edges shared by exactly two of its elements.
	Pieces []int
}

// Flipped returns, per part index, the indices of its elements with Flip
// set, in increasing order.
func (o *Orientation) Flipped(m *Mesh) [][]int32 {
	out := make([][]int32, len(m.Parts))
	for e, f := range o.Flip {
		if f {
			p := m.ElemPart[e]
			out[p] = append(out[p], int32(e))
		}
	}
	return out
}

// Sign returns -1 for an element whose normal is to be reversed, else 1.
func (o *Orientation) Sign(e int) float64 {
	if o.Flip[e] {
		return -1
	}
	return 1
}

// OrientNormals finds, part by part, the elements whose normals disagree
// with their neighbours'. Two elements of one part that share an edge
// have agreeing normals when they run along the edge in opposite
// directions. The elements of a part joined through edges that exactly
// two of its elements share (edges of other parts, and edges three or
// more of its elements share, join nothing here) form its pieces; a
// breadth-first walk through each piece, from its lowest element index,
// gives every element the orientation that agrees with the element it
// was reached from. Of a piece's two orientations the one covering the
// smaller area is reported as flipped (ties: the one with fewer elements,
// then the one without the piece's lowest element id), so a part that is
// right but for a few elements gets those few. Parts are independent and
// run concurrently; the result does not depend on the number of
// goroutines. Time is linear in the number of elements times the node
// valence.
func OrientNormals(m *Mesh, adj Adjacency) Orientation {
	ne := m.NumElems()
	o := Orientation{Flip: make([]bool, ne), Conflicts: make([]int, len(m.Parts)), Pieces: make([]int, len(m.Parts))}
	// Elements by part, in increasing index order (a counting sort).
	start := make([]int32, len(m.Parts)+1)
	for _, p := range m.ElemPart {
		start[p+1]++
	}
	for i := 1; i < len(start); i++ {
		start[i] += start[i-1]
	}
	byPart := make([]int32, ne)
	fill := make([]int32, len(m.Parts))
	for e, p := range m.ElemPart {
		byPart[start[p]+fill[p]] = int32(e)
		fill[p]++
	}
	parity := make([]int8, ne) // 0 unvisited, 1 or 2 the two orientations
	// from is the edge of each element through which the walk reached
	// it (-1 for a piece's first element): already known to agree.
	from := make([]int8, ne)
	// Parts are handed out largest first, so that no large part is left
	// running alone at the end; each writes only its own elements and
	// counts.
	order := make([]int, len(m.Parts))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int { return cmp.Compare(start[b+1]-start[b], start[a+1]-start[a]) })
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), max(1, len(m.Parts))) {
		wg.Go(func() {
			var queue, piece []int32
			for {
				k := int(next.Add(1) - 1)
				if k >= len(m.Parts) {
					return
				}
				p := order[k]
				for _, root := range byPart[start[p]:start[p+1]] {
					if parity[root] != 0 {
						continue
					}
					o.Pieces[p]++
					parity[root], from[root] = 1, -1
					queue = append(queue[:0], root)
					piece = piece[:0]
					for len(queue) > 0 {
						e := queue[0]
						queue = queue[1:]
						piece = append(piece, e)
						nc := cornerCount(m.ElemStart[e+1] - m.ElemStart[e])
						for k := 0; k < nc; k++ {
							if int8(k) == from[e] {
								continue
							}
							f, fk, same, ok := edgeMate(m, adj, int(e), k)
							if !ok {
								continue
							}
							want := parity[e]
							if same {
								want = 3 - want
							}
							switch {
							case parity[f] == 0:
								parity[f], from[f] = want, fk
								queue = append(queue, f)
							case parity[f] != want && e < f:
								o.Conflicts[p]++
							}
						}
					}
					flipPiece(m, piece, parity, o.Flip)
				}
			}
		})
	}
	wg.Wait()
	return o
}

// edgeMate returns the one other element of e's part that shares edge k
// of e, which edge of it that is (mk), and whether it runs along the edge in
// the same direction as e (so that their normals disagree). ok is false for a
// collapsed edge, a free edge, or an edge more than two elements of the part share.
func edgeMate(m *Mesh, adj Adjacency, e, k int) (mate int32, mk int8, same, ok bool) {
	s0 := m.ElemStart[e]
	nc := cornerCount(m.ElemStart[e+1] - s0)
	a, b := m.Conn[s0+int32(k)], m.Conn[s0+int32((k+1)%nc)]
	if a == b {
		return 0, 0, false, false
	}
	part := m.ElemPart[e]
	found := 0
	for _, f := range adj.Of(a) {
		if int(f) == e || m.ElemPart[f] != part {
			continue
		}
		fs := m.ElemStart[f]
		fc := cornerCount(m.ElemStart[f+1] - fs)
		fn := m.Conn[fs : fs+int32(fc)]
		for i, n := range fn {
			if n != a {
				continue
			}
			switch b {
			case fn[(i+1)%fc]:
				found++
				mate, mk, same = f, int8(i), true
			case fn[(i+fc-1)%fc]:
				found++
				mate, mk, same = f, int8((i+fc-1)%fc), false
			}
			break
		}
	}
	return mate, mk, same, found == 1
}

// cornerCount returns the corners of an element of n nodes: 3 for
// triangles (3 or 6 nodes), else 4.
func cornerCount(n int32) int {
	if n == 3 || n == 6 {
		return 3
	}
	return 4
}

// flipPiece marks as flipped the elements of one piece in the orientation
// class that covers the smaller area (ties, within a relative 1e-9:
// fewer elements, then the class without the lowest element id).
func flipPiece(m *Mesh, piece []int32, parity []int8, flip []bool) {
	var area [3]float64
	var count [3]int
	lowest := [3]int64{}
	has := [3]bool{}
	for _, e := range piece {
		c := parity[e]
		area[c] += m.Area(int(e))
		count[c]++
		if id := m.ElemIDs[e]; !has[c] || id < lowest[c] {
			lowest[c], has[c] = id, true
		}
	}
	if count[2] == 0 {
		return
	}
	// Areas within a relative 1e-9 are equal: sums of equal element
	// areas in another order may differ in the last bits.
	bad := int8(2)
	switch tie := 1e-9 * (area[1] + area[2]); {
	case area[1] < area[2]-tie:
		bad = 1
	case area[1] > area[2]+tie:
	case count[1] < count[2]:
		bad = 1
	case count[1] > count[2]:
	case lowest[2] < lowest[1]:
		bad = 1
	}
	for _, e := range piece {
		if parity[e] == bad {
			flip[e] = true
		}
	}
}
