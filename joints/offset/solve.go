package offset

import (
	"cmp"
	"math"
	"slices"

	"github.com/joinery-cae/joinery/geom"
)

// The vote. Every part gets one of three labels (mid, top, bottom); a
// contact agrees with an assignment when its separation lies within its
// allowance of what the two labels predict (Contact.fit). The assignment
// chosen is the best by, in this order:
//
//  1. the vote: the sum over the contacts that agree of their weight
//     times 1 - (residual/allowance)², so that a contact met exactly
//     counts in full and one met at the edge of its allowance hardly
//     (the assignment that most of the evidence supports, best);
//  2. the number of parts on their mid-surface (where the evidence
//     cannot tell, as for two equal sheets both meshed on their top
//     faces, which look like two mid-surface meshes, mid is preferred);
//  3. the number of parts on the surface the parts table gives (of two
//     readings the evidence cannot tell apart, as for two equal sheets
//     of which one is meshed on its faying face, the table's is taken);
//  4. the least weighted sum of squared residuals.
//
// It is searched per connected group of parts (parts joined through
// contacts) from several starts, all mid and, from the part with the
// most evidence, each label spread along the strongest contacts, each
// improved one part at a time until no single change helps; the best
// end wins. A part's confidence is how much of the vote the best
// assignment loses, as a share of the part's own evidence, when the part
// is forced to another label and the others adapt: 1 when every other
// label costs all its evidence, 0 when another label explains as much.

// labels are the three surfaces, in the order ties prefer them.
var labels = [3]geom.Surface{geom.SurfaceMid, geom.SurfaceTop, geom.SurfaceBottom}

// score is an assignment's standing, compared lexicographically.
type score struct {
	agree float64 // weight of the contacts that agree
	mid   int     // parts on mid
	table int     // parts on the table's surface
	resid float64 // weighted sum of squared residuals
}

// solver holds the contacts' tables for the vote.
type solver struct {
	cs     []Contact
	byPart [][]int32 // contacts of each part index
	// agree, fit and resid are indexed by contact, then 3*labelA +
	// labelB: whether the contact agrees, its share of the vote (its
	// weight times 1 - (residual/allowance)², 0 when it disagrees) and
	// its weighted squared residual.
	agree [][9]bool
	fit   [][9]float64
	resid [][9]float64
	eps   float64 // weights closer than this are equal
	// declared is the label the parts table gives each part index.
	declared []int8
}

func newSolver(declared []geom.Surface, cs []Contact) *solver {
	nparts := len(declared)
	sv := &solver{cs: cs, byPart: make([][]int32, nparts), agree: make([][9]bool, len(cs)), fit: make([][9]float64, len(cs)), resid: make([][9]float64, len(cs)), declared: make([]int8, nparts)}
	for p, s := range declared {
		sv.declared[p] = int8(slices.Index(labels[:], s))
	}
	total := 0.0
	for i := range cs {
		c := &cs[i]
		sv.byPart[c.a] = append(sv.byPart[c.a], int32(i))
		sv.byPart[c.b] = append(sv.byPart[c.b], int32(i))
		for la, sa := range labels {
			for lb, sb := range labels {
				_, _, r := c.fit(sa, sb)
				sv.agree[i][3*la+lb] = r <= c.Allowance
				if r <= c.Allowance {
					q := r / c.Allowance
					sv.fit[i][3*la+lb] = c.Weight * (1 - q*q)
				}
				sv.resid[i][3*la+lb] = c.Weight * r * r
			}
		}
		total += c.Weight
	}
	sv.eps = 1e-9 * total
	return sv
}

// better reports whether x beats y.
func (sv *solver) better(x, y score) bool {
	switch {
	case x.agree > y.agree+sv.eps:
		return true
	case x.agree < y.agree-sv.eps:
		return false
	case x.mid != y.mid:
		return x.mid > y.mid
	case x.table != y.table:
		return x.table > y.table
	}
	return x.resid < y.resid-sv.eps*1e-3
}

// local returns part p's share of the score with label l, the others as
// in lab.
func (sv *solver) local(p int32, l int8, lab []int8) score {
	var s score
	if l == 0 {
		s.mid = 1
	}
	if l == sv.declared[p] {
		s.table = 1
	}
	for _, ci := range sv.byPart[p] {
		c := &sv.cs[ci]
		k := 3*int(l) + int(lab[c.b])
		if c.b == p {
			k = 3*int(lab[c.a]) + int(l)
		}
		s.agree += sv.fit[ci][k]
		s.resid += sv.resid[ci][k]
	}
	return s
}

// total returns the score of a group of parts.
func (sv *solver) total(group []int32, lab []int8) score {
	var s score
	for _, p := range group {
		if lab[p] == 0 {
			s.mid++
		}
		if lab[p] == sv.declared[p] {
			s.table++
		}
		for _, ci := range sv.byPart[p] {
			c := &sv.cs[ci]
			if c.a != p {
				continue
			}
			k := 3*int(lab[c.a]) + int(lab[c.b])
			s.agree += sv.fit[ci][k]
			s.resid += sv.resid[ci][k]
		}
	}
	return s
}

// improve changes one part at a time to its best label while that helps,
// visiting first the parts in queue (in order), then the neighbours of
// every part that changed. Part frozen (-1: none) keeps its label. Each
// change raises the score, so the walk ends.
func (sv *solver) improve(queue []int32, lab []int8, frozen int32, queued []bool) {
	for _, p := range queue {
		queued[p] = true
	}
	for len(queue) > 0 {
		p := queue[0]
		queue = queue[1:]
		queued[p] = false
		if p == frozen {
			continue
		}
		cur := sv.local(p, lab[p], lab)
		best, bl := cur, lab[p]
		for l := range int8(3) {
			if l == lab[p] {
				continue
			}
			if s := sv.local(p, l, lab); sv.better(s, best) {
				best, bl = s, l
			}
		}
		if bl == lab[p] {
			continue
		}
		lab[p] = bl
		for _, ci := range sv.byPart[p] {
			c := &sv.cs[ci]
			q := c.a
			if q == p {
				q = c.b
			}
			if !queued[q] {
				queued[q] = true
				queue = append(queue, q)
			}
		}
	}
}

// spread labels a group from part seed with label l: parts are reached
// along the strongest contacts first, and each takes the label that
// agrees with the most weight of its labelled neighbours (ties: mid, top,
// bottom).
func (sv *solver) spread(group []int32, seed int32, l int8, lab []int8, done []bool) {
	for _, p := range group {
		done[p] = false
	}
	lab[seed], done[seed] = l, true
	type edge struct {
		w    float64
		c, q int32
	}
	var frontier []edge
	push := func(p int32) {
		for _, ci := range sv.byPart[p] {
			c := &sv.cs[ci]
			q := c.a
			if q == p {
				q = c.b
			}
			if !done[q] {
				frontier = append(frontier, edge{c.Weight, ci, q})
			}
		}
	}
	push(seed)
	for len(frontier) > 0 {
		// The strongest contact to a part not yet labelled (ties: lower
		// contact index).
		bi := 0
		for i, e := range frontier {
			if e.w > frontier[bi].w || e.w == frontier[bi].w && e.c < frontier[bi].c {
				bi = i
			}
		}
		q := frontier[bi].q
		frontier = slices.Delete(frontier, bi, bi+1)
		if done[q] {
			continue
		}
		bestL, bestW := int8(0), -1.0
		for l := range int8(3) {
			w := 0.0
			for _, ci := range sv.byPart[q] {
				c := &sv.cs[ci]
				o := c.a
				k := 3*int(lab[c.a]) + int(l)
				if o == q {
					o = c.b
					k = 3*int(l) + int(lab[c.b])
				}
				if done[o] {
					w += sv.fit[ci][k]
				}
			}
			if w > bestW+sv.eps {
				bestL, bestW = l, w
			}
		}
		lab[q], done[q] = bestL, true
		push(q)
	}
}

// groups returns the connected groups of parts joined through contacts,
// each sorted by ids (Infer gives the sampling order, sampleOrder, so that
// no search below follows the parts' ids), in order of their lowest.
func (sv *solver) groups(ids func(int32) int64) [][]int32 {
	seen := make([]bool, len(sv.byPart))
	var out [][]int32
	var order []int32
	for p := range sv.byPart {
		if len(sv.byPart[p]) > 0 {
			order = append(order, int32(p))
		}
	}
	slices.SortFunc(order, func(a, b int32) int { return cmp.Compare(ids(a), ids(b)) })
	for _, root := range order {
		if seen[root] {
			continue
		}
		seen[root] = true
		g := []int32{root}
		for i := 0; i < len(g); i++ {
			for _, ci := range sv.byPart[g[i]] {
				c := &sv.cs[ci]
				for _, q := range []int32{c.a, c.b} {
					if !seen[q] {
						seen[q] = true
						g = append(g, q)
					}
				}
			}
		}
		slices.SortFunc(g, func(a, b int32) int { return cmp.Compare(ids(a), ids(b)) })
		out = append(out, g)
	}
	return out
}

// solve returns the label of every part index (0 for parts without
// contacts) and every part's confidence (0 without contacts). ids orders
// the parts where the search must pick one first (see groups).
func (sv *solver) solve(ids func(int32) int64) (lab []int8, conf []float64) {
	n := len(sv.byPart)
	lab = make([]int8, n)
	conf = make([]float64, n)
	work := make([]int8, n)
	queued := make([]bool, n)
	done := make([]bool, n)
	for _, g := range sv.groups(ids) {
		// Starts: all mid, then each label spread from the part with
		// the most evidence.
		seed := g[0]
		for _, p := range g {
			if sv.evidence(p) > sv.evidence(seed)+sv.eps {
				seed = p
			}
		}
		for _, p := range g {
			lab[p] = 0
		}
		sv.improve(slices.Clone(g), lab, -1, queued)
		best := sv.total(g, lab)
		for l := range int8(3) {
			sv.spread(g, seed, l, work, done)
			sv.improve(slices.Clone(g), work, -1, queued)
			if s := sv.total(g, work); sv.better(s, best) {
				best = s
				for _, p := range g {
					lab[p] = work[p]
				}
			}
		}
		// Confidence, part by part; a forced label that leads to a
		// better assignment replaces the best and the round restarts.
		for round := 0; round < 10; round++ {
			restart := false
			for _, p := range g {
				w := sv.evidence(p)
				if !(w > 0) {
					continue
				}
				alt := -1.0
				for l := range int8(3) {
					if l == lab[p] {
						continue
					}
					for _, q := range g {
						work[q] = lab[q]
					}
					work[p] = l
					sv.improve(sv.neighbours(p), work, p, queued)
					s := sv.total(g, work)
					if sv.better(s, best) {
						best, restart = s, true
						for _, q := range g {
							lab[q] = work[q]
						}
						sv.improve(slices.Clone(g), lab, -1, queued)
						best = sv.total(g, lab)
						break
					}
					alt = math.Max(alt, s.agree)
				}
				if restart {
					break
				}
				conf[p] = math.Min(1, math.Max(0, (best.agree-alt)/w))
			}
			if !restart {
				break
			}
		}
	}
	return lab, conf
}

// evidence returns the total weight of part p's contacts.
func (sv *solver) evidence(p int32) float64 {
	w := 0.0
	for _, ci := range sv.byPart[p] {
		w += sv.cs[ci].Weight
	}
	return w
}

// neighbours returns the parts that share a contact with p, in contact
// order.
func (sv *solver) neighbours(p int32) []int32 {
	var out []int32
	for _, ci := range sv.byPart[p] {
		c := &sv.cs[ci]
		q := c.a
		if q == p {
			q = c.b
		}
		if !slices.Contains(out, q) {
			out = append(out, q)
		}
	}
	return out
}
