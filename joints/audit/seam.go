package audit

import (
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// attachment is one weld's attachment on one sheet, in a per-node list.
type attachment struct {
	weld int32
	part int32 // part index
	next int32 // next attachment of the same node, -1 at the end
}

// touch is two welds whose attachments on a part touch.
type touch struct {
	a, b int32 // weld indices, a < b
	part int32 // part index
}

// tiedWeight is the weight, in magnitude, above which a node of an
// attachment counts as tied (our choice: a weld on a node or an edge of
// its host element gives the element's other nodes weights of 0, or of
// rounding noise near 1e-16 of either sign; they tie nothing, so they
// cannot close the flange). A patch node of negative weight (near an
// edge, joints.EvenWeights) is tied as much as one of positive weight.
const tiedWeight = 1e-9

// findSeams finds the chains of welds whose attachments on a sheet
// touch: they share a tied node (weight above tiedWeight in magnitude), or one element
// of that sheet's part holds a tied node of each (the smallest case: node-pair welds on mesh-adjacent
// nodes; interpolated welds in neighbouring elements). Within a chain the
// flange cannot open between its welds: the model welds it shut. Pairs
// of duplicates join chains too (a row of overlapping nuggets is a
// seam), but a group held by duplicates alone and no longer than a
// nugget is one spot defined several times, left to the duplicates. One pass over the
// elements finds every touch, so the cost is linear in the mesh.
//
// It returns, per weld, the index of its chain (-1 for none) and one
// finding per chain: every weld of it, the parts its welds join (those
// on which the attachments touch first), its length (the distance
// between its two farthest welds) and its location (the weld nearest the
// middle of those two).
func findSeams(m *geom.Mesh, ws []weld, dups map[[2]int32]bool) ([]int32, []joints.Finding) {
	chain := make([]int32, len(ws))
	for i := range chain {
		chain[i] = -1
	}
	if len(ws) < 2 {
		return chain, nil
	}
	// head[n] is 1 + the first attachment of node n, 0 for none.
	head := make([]int32, m.NumNodes())
	var att []attachment
	for i := range ws {
		c := ws[i].conn
		if c == nil {
			continue
		}
		for s, e := range c.Ends {
			if s >= len(c.Stack.Sheets) {
				break
			}
			pi, ok := m.PartIndex(c.Stack.Sheets[s].Part)
			if !ok {
				continue
			}
			for k, n := range e.Nodes {
				if k < len(e.Weights) && !(math.Abs(e.Weights[k]) > tiedWeight) {
					continue // listed with the host element but not tied
				}
				att = append(att, attachment{weld: int32(i), part: pi, next: head[n] - 1})
				head[n] = int32(len(att))
			}
		}
	}
	// The elements are scanned in blocks side by side; the touches are
	// sorted afterwards, so the result does not depend on the blocks.
	const block = 1 << 16
	ne := m.NumElems()
	nb := (ne + block - 1) / block
	found := make([][]touch, nb)
	workers := min(runtime.GOMAXPROCS(0), nb)
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			var here []int32
			for {
				bi := int(next.Add(1) - 1)
				if bi >= nb {
					return
				}
				var ts []touch
				for e := bi * block; e < min(ne, (bi+1)*block); e++ {
					pe := m.ElemPart[e]
					here = here[:0]
					for _, n := range m.ElemNodes(e) {
						for a := head[n] - 1; a >= 0; a = att[a].next {
							if att[a].part == pe && !slices.Contains(here, att[a].weld) {
								here = append(here, att[a].weld)
							}
						}
					}
					for x := 0; x < len(here); x++ {
						for y := x + 1; y < len(here); y++ {
							p := pairOf(here[x], here[y])
							ts = append(ts, touch{a: p[0], b: p[1], part: pe})
						}
					}
				}
				found[bi] = ts
			}
		})
	}
	wg.Wait()
	var touches []touch
	for _, ts := range found {
		touches = append(touches, ts...)
	}
	if len(touches) == 0 {
		return chain, nil
	}
	slices.SortFunc(touches, func(x, y touch) int {
		if x.a != y.a {
			return int(x.a - y.a)
		}
		if x.b != y.b {
			return int(x.b - y.b)
		}
		return int(x.part - y.part)
	})
	touches = slices.Compact(touches)
	// Chains: connected groups of welds through touches, duplicates
	// included: a row of welds whose nuggets overlap one by one is a seam
	// too. A group joined by duplicates alone is one seam only when it
	// reaches farther than a nugget; shorter, it is one spot defined
	// several times (reported as duplicates).
	uf := newUnionFind(len(ws))
	for _, t := range touches {
		uf.union(int(t.a), int(t.b))
	}
	members := map[int][]int32{}
	var roots []int
	for i := range ws {
		if r := uf.find(i); uf.size[r] > 1 {
			if _, ok := members[r]; !ok {
				roots = append(roots, r)
			}
			members[r] = append(members[r], int32(i))
		}
	}
	touched := map[int][]int64{}
	plain := map[int]bool{} // the group has a touch that is no duplicate
	for _, t := range touches {
		r := uf.find(int(t.a))
		if !dups[[2]int32{t.a, t.b}] {
			plain[r] = true
		}
		if p := m.Parts[t.part].ID; !slices.Contains(touched[r], p) {
			touched[r] = append(touched[r], p)
		}
	}
	var fs []joints.Finding
	ci := int32(0)
	for _, r := range roots {
		list := members[r] // in weld (id) order
		// The two farthest welds, and their distance measured on the
		// sheet, as pitch and duplicates are: welds given at different
		// heights through the stack are no farther apart for it.
		a, b := farthest(ws, list)
		reach, _ := sheetDist(&ws[a], &ws[b], ws[a].parts)
		if !plain[r] {
			widest := 0.0
			for _, i := range list {
				widest = math.Max(widest, ws[i].diameter)
			}
			if !(reach >= widest) {
				continue
			}
		}
		for _, i := range list {
			chain[i] = ci
		}
		ci++
		fs = append(fs, seamFinding(ws, list, touched[r], a, b, reach))
	}
	sortFindings(fs)
	return chain, fs
}

// seamFinding describes one chain, whose farthest welds are a and b,
// length apart.
func seamFinding(ws []weld, list []int32, touched []int64, a, b int32, length float64) joints.Finding {
	slices.Sort(touched)
	parts := slices.Clone(touched)
	var rest []int64
	for _, i := range list {
		for _, p := range ws[i].parts {
			if !slices.Contains(parts, p) && !slices.Contains(rest, p) {
				rest = append(rest, p)
			}
		}
	}
	slices.Sort(rest)
	parts = append(parts, rest...)
	ids := make([]string, len(list))
	for k, i := range list {
		ids[k] = ws[i].id
	}
	mid := r3.Scale(0.5, r3.Add(ws[a].point, ws[b].point))
	loc, best := list[0], math.Inf(1)
	for _, i := range list {
		if d := r3.Norm(r3.Sub(ws[i].point, mid)); d < best {
			loc, best = i, d
		}
	}
	msg := fmt.Sprintf("%d welds (%s) form a seam %s mm long from %s to %s: their attachments on %s share nodes or elements, so the flange joining %s cannot open between them; the model welds it shut",
		len(list), idList(ids, 12), joints.MM(length), vec(ws[a].point), vec(ws[b].point), partsWord(touched), partsWord(sortedParts(parts)))
	return joints.Finding{Severity: SeamSeverity, Code: joints.CodeSeam, Joint: ids[0], Joints: ids, Parts: parts,
		Message: msg, Point: ws[loc].point, HasPoint: true}
}

func sortedParts(ps []int64) []int64 {
	s := slices.Clone(ps)
	slices.Sort(s)
	return s
}

// exactFarthest is the chain size up to which the two farthest welds are
// found by comparing every pair; above it, by two sweeps (farthest from
// the first weld, then farthest from that one), exact for a straight
// chain and within a few per cent for a curved one.
const exactFarthest = 4096

// farthest returns the two welds of list farthest apart.
func farthest(ws []weld, list []int32) (int32, int32) {
	a, b, best := list[0], list[0], -1.0
	if len(list) <= exactFarthest {
		for x, i := range list {
			for _, j := range list[x+1:] {
				if d := r3.Norm2(r3.Sub(ws[i].point, ws[j].point)); d > best {
					a, b, best = i, j, d
				}
			}
		}
		return a, b
	}
	sweep := func(from int32) int32 {
		far, fd := from, -1.0
		for _, i := range list {
			if d := r3.Norm2(r3.Sub(ws[i].point, ws[from].point)); d > fd {
				far, fd = i, d
			}
		}
		return far
	}
	a = sweep(list[0])
	return a, sweep(a)
}

// unionFind is a disjoint-set forest with union by size.
type unionFind struct {
	parent []int
	size   []int
}

func newUnionFind(n int) *unionFind {
	u := &unionFind{parent: make([]int, n), size: make([]int, n)}
	for i := range u.parent {
		u.parent[i] = i
		u.size[i] = 1
	}
	return u
}

func (u *unionFind) find(i int) int {
	for u.parent[i] != i {
		u.parent[i] = u.parent[u.parent[i]]
		i = u.parent[i]
	}
	return i
}

// union joins the sets of a and b and returns the new root.
func (u *unionFind) union(a, b int) int {
	a, b = u.find(a), u.find(b)
	if a == b {
		return a
	}
	if u.size[a] < u.size[b] {
		a, b = b, a
	}
	u.parent[b] = a
	u.size[a] += u.size[b]
	return a
}
