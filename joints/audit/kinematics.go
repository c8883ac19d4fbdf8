package audit

import (
	"cmp"
	"container/heap"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// MotionTolerance is the relative tolerance of the rank tests of the
// kinematic checks: a motion is free when the ties resist it by less
// than MotionTolerance of their largest resistance, lengths measured in
// units of the size of the ties concerned (the largest distance of a tie
// point from their centroid, at least 1 mm). Our choice: above the
// rounding of coordinates written with 6 to 8 significant digits (1e-6
// to 1e-8 of a model's size), below any deliberate offset of a weld from
// a line (1e-5 is 0.005 mm on a 500 mm flange).
const MotionTolerance = 1e-5

// Kinematic runs the mechanism and unrestrained checks on k, whose
// connected groups are groups (see Groups). Every body moves rigidly and
// every tie adds one row per degree of freedom (see joints.Tie); the
// free motions are the null space of those rows. The rank is found from
// the structure, so that a body of hundreds of parts stays fast:
//
//  1. bodies tied on all six degrees of freedom are merged (union-find);
//  2. the ties between two merged bodies are compressed to their few
//     independent rows (an SVD in a frame of their own, rotations scaled
//     by their size); when those alone hold the pair rigidly (rank 6) the
//     two are merged, until no pair is;
//  3. bodies are eliminated one at a time, the nodes connectors made
//     first, then parts with one or two neighbours (a loose end, a link in
//     a chain), the group's largest body (or the ground) never: the free
//     motions of the eliminated body with its neighbours held are found
//     (an SVD of its rows) and the rest of its rows become rows between
//     its neighbours (the left null space of its own columns);
//  4. what remains (bodies in loops with three or more neighbours) gets
//     one SVD of its scaled rows.
//
// Each step is exact: the sum of the free motions found is the null
// space of the whole. Free motions of connector nodes with every part
// held are unrestrained findings; free motions of parts relative to each
// other are mechanism findings, with the parts, the connectors between
// them and the motion. The counts cover the whole assembly: 6
// rigid-body modes per group not tied to ground, plus every free motion.
func Kinematic(k *joints.Constraints, groups []Group) (joints.Kinematics, []joints.Finding) {
	return kinematicSized(k, groups, nil)
}

// kinematicSized is Kinematic with the parts' areas (mm², by part id;
// nil or missing: 0), which decide, before the part ids, which part of
// a group is held and which moves: the largest part is held, and of
// two parts that move against each other the smaller is reported as
// moving, so that renumbering the parts does not change the findings.
func kinematicSized(k *joints.Constraints, groups []Group, area map[int64]float64) (joints.Kinematics, []joints.Finding) {
	s := newSolver(k, groups, area)
	s.mergeRigidTies()
	s.buildEdges()
	s.chooseRoots()
	s.eliminate()
	s.cores()
	kin := joints.Kinematics{}
	for gi, g := range groups {
		if len(g.Parts) > 0 {
			kin.Groups++
			if g.Ground {
				kin.Grounded++
			}
		}
		kin.RigidBodyModes += s.nullity[gi]
		kin.Mechanisms += s.mech[gi]
		kin.Unrestrained += s.unres[gi]
	}
	sortFindings(s.mechFs)
	sortFindings(s.unresFs)
	return kin, append(s.mechFs, s.unresFs...)
}

// areaKey rounds an area to 6 significant digits, so that parts alike
// but for the rounding of their coordinates tie (and the part ids
// decide).
func areaKey(a float64) float64 {
	if !(a > 0) {
		return 0
	}
	r, err := strconv.ParseFloat(strconv.FormatFloat(a, 'g', 6, 64), 64)
	if err != nil {
		return 0
	}
	return r
}

// solver holds the state of the reduction.
type solver struct {
	k       *joints.Constraints
	groups  []Group
	groupOf []int // body -> group
	host    []int64
	uf      *unionFind
	cl      []kcluster // by body index; alive at cluster roots
	edges   []kedge
	pairs   map[[2]int32]int32 // alive pair edges by members
	merges  [][2]int32         // pending merges
	root    []int32            // per group: a body of its root cluster
	nullity []int              // per group: free motions, rigid-body modes included
	mech    []int
	unres   []int
	mechFs  []joints.Finding
	unresFs []joints.Finding
}

// kcluster is a set of bodies that move as one.
type kcluster struct {
	alive   bool
	bodies  []int32
	nparts  int
	area    float64 // of its parts, mm², rounded (areaKey)
	minPart int64   // math.MaxInt64 without parts
	ground  bool
	edges   []int32 // incident edges (dead ones are skipped)
}

// kedge is a set of rows between clusters: each row has 6 coefficients
// per member (of the member's translation at the origin, mm, and its
// rotation, radians), and the rows are invariant to a common rigid
// motion of the members.
type kedge struct {
	alive   bool
	members []int32 // cluster ids, increasing
	rows    [][]float64
	ties    []int32 // the ties the rows come from, increasing
	rank    int
}

func newSolver(k *joints.Constraints, groups []Group, area map[int64]float64) *solver {
	n := len(k.Bodies)
	s := &solver{k: k, groups: groups, groupOf: make([]int, n), host: make([]int64, n), uf: newUnionFind(n),
		cl: make([]kcluster, n), pairs: map[[2]int32]int32{}, root: make([]int32, len(groups)),
		nullity: make([]int, len(groups)), mech: make([]int, len(groups)), unres: make([]int, len(groups))}
	for gi, g := range groups {
		for _, b := range g.Bodies {
			s.groupOf[b] = gi
		}
	}
	for b, body := range k.Bodies {
		c := &s.cl[b]
		c.alive, c.bodies, c.minPart = true, []int32{int32(b)}, math.MaxInt64
		switch body.Kind {
		case joints.PartBody:
			c.nparts, c.minPart, s.host[b] = 1, body.Part, body.Part
			c.area = areaKey(area[body.Part])
		case joints.GroundBody:
			c.ground = true
		}
	}
	// A node's host part: the part of its first tie to a part.
	for _, t := range k.Ties {
		for _, pair := range [2][2]int{{t.A, t.B}, {t.B, t.A}} {
			if k.Bodies[pair[0]].Kind == joints.NodeBody && s.host[pair[0]] == 0 && k.Bodies[pair[1]].Kind == joints.PartBody {
				s.host[pair[0]] = k.Bodies[pair[1]].Part
			}
		}
	}
	return s
}

// find returns the cluster of body b.
func (s *solver) find(b int32) int32 { return int32(s.uf.find(int(b))) }

// joinClusters merges the clusters of a and b and returns the one kept.
func (s *solver) joinClusters(a, b int32) (keep, gone int32) {
	a, b = s.find(a), s.find(b)
	r := int32(s.uf.union(int(a), int(b)))
	keep, gone = r, a
	if r == a {
		gone = b
	}
	ck, cg := &s.cl[keep], &s.cl[gone]
	ck.bodies = append(ck.bodies, cg.bodies...)
	ck.nparts += cg.nparts
	ck.area = areaKey(ck.area + cg.area)
	ck.minPart = min(ck.minPart, cg.minPart)
	ck.ground = ck.ground || cg.ground
	ck.edges = append(ck.edges, cg.edges...)
	cg.alive, cg.bodies, cg.edges = false, nil, nil
	return keep, gone
}

// mergeRigidTies merges the bodies of every tie on all six degrees of
// freedom.
func (s *solver) mergeRigidTies() {
	for _, t := range s.k.Ties {
		if t.DOFs&joints.AllDOFs == joints.AllDOFs && s.find(int32(t.A)) != s.find(int32(t.B)) {
			s.joinClusters(int32(t.A), int32(t.B))
		}
	}
}

// tieRows returns the rows of tie t between clusters a < b (A's body in
// cluster ca): per DOF, 12 coefficients (a's block, then b's).
func (s *solver) tieRows(t *joints.Tie, ca, a int32) [][]float64 {
	sign := 1.0 // rows act on x_B - x_A; members are (a, b)
	if ca != a {
		sign = -1
	}
	var rows [][]float64
	for i := range 6 {
		if t.DOFs&(1<<i) == 0 {
			continue
		}
		var blk [6]float64
		if i < 3 {
			e := unit(i)
			c := r3.Cross(t.Point, e)
			blk = [6]float64{e.X, e.Y, e.Z, c.X, c.Y, c.Z}
		} else {
			blk[i] = 1
		}
		row := make([]float64, 12)
		for j := range 6 {
			row[j] = -sign * blk[j]
			row[6+j] = sign * blk[j]
		}
		rows = append(rows, row)
	}
	return rows
}

func unit(i int) r3.Vec {
	switch i {
	case 0:
		return r3.Vec{X: 1}
	case 1:
		return r3.Vec{Y: 1}
	}
	return r3.Vec{Z: 1}
}

// buildEdges turns the ties between different clusters into compressed
// pair edges and merges the pairs held rigidly.
func (s *solver) buildEdges() {
	type group struct {
		key  [2]int32
		ties []int32
	}
	at := map[[2]int32]int{}
	var gs []group
	for ti := range s.k.Ties {
		t := &s.k.Ties[ti]
		ca, cb := s.find(int32(t.A)), s.find(int32(t.B))
		if ca == cb {
			continue
		}
		key := [2]int32{min(ca, cb), max(ca, cb)}
		i, ok := at[key]
		if !ok {
			i = len(gs)
			at[key] = i
			gs = append(gs, group{key: key})
		}
		gs[i].ties = append(gs[i].ties, int32(ti))
	}
	for _, g := range gs {
		var rows [][]float64
		for _, ti := range g.ties {
			t := &s.k.Ties[ti]
			rows = append(rows, s.tieRows(t, s.find(int32(t.A)), g.key[0])...)
		}
		s.addRows(g.key[:], rows, g.ties)
	}
	s.runMerges()
}

// addRows adds rows between clusters members (increasing) that come
// from ties: joined to the pair edge of the same members when there is
// one, compressed, and queued for a merge when a pair is held rigidly.
func (s *solver) addRows(members []int32, rows [][]float64, ties []int32) {
	if len(members) < 2 || len(rows) == 0 {
		return
	}
	if len(members) == 2 {
		key := [2]int32{members[0], members[1]}
		if ei, ok := s.pairs[key]; ok {
			e := &s.edges[ei]
			e.rows = append(e.rows, rows...)
			e.ties = mergeTies(e.ties, ties)
			s.compress(ei)
			return
		}
	}
	ei := int32(len(s.edges))
	s.edges = append(s.edges, kedge{alive: true, members: slices.Clone(members), rows: rows, ties: mergeTies(nil, ties)})
	if len(members) == 2 {
		s.pairs[[2]int32{members[0], members[1]}] = ei
	}
	for _, c := range members {
		s.cl[c].edges = append(s.cl[c].edges, ei)
	}
	s.compress(ei)
}

func mergeTies(a, b []int32) []int32 {
	out := append(slices.Clone(a), b...)
	slices.Sort(out)
	return slices.Compact(out)
}

// frame returns the local frame of a set of ties: the centroid of their
// points and their size (largest distance from it, at least 1 mm).
func (s *solver) frame(ties []int32) (r3.Vec, float64) {
	var o r3.Vec
	for _, t := range ties {
		o = r3.Add(o, s.k.Ties[t].Point)
	}
	if len(ties) > 0 {
		o = r3.Scale(1/float64(len(ties)), o)
	}
	size := 1.0
	for _, t := range ties {
		size = math.Max(size, r3.Norm(r3.Sub(s.k.Ties[t].Point, o)))
	}
	return o, size
}

// Rows and motions in a local frame (o, sc): a motion (u at the origin,
// w) is (v, θ) there, with v = u + w × o the translation at o and
// θ = sc·w; a row block (a, c) acting on (u, w) acts on (v, θ) as
// (a, (c − o × a)/sc).
func rowToLocal(blk []float64, o r3.Vec, sc float64) {
	a := r3.Vec{X: blk[0], Y: blk[1], Z: blk[2]}
	c := r3.Sub(r3.Vec{X: blk[3], Y: blk[4], Z: blk[5]}, r3.Cross(o, a))
	blk[3], blk[4], blk[5] = c.X/sc, c.Y/sc, c.Z/sc
}

func rowToGlobal(blk []float64, o r3.Vec, sc float64) {
	a := r3.Vec{X: blk[0], Y: blk[1], Z: blk[2]}
	c := r3.Add(r3.Cross(o, a), r3.Vec{X: sc * blk[3], Y: sc * blk[4], Z: sc * blk[5]})
	blk[3], blk[4], blk[5] = c.X, c.Y, c.Z
}

// motionToGlobal turns a local motion (v, θ) into (u at the origin, w).
func motionToGlobal(x []float64, o r3.Vec, sc float64) [6]float64 {
	w := r3.Vec{X: x[3] / sc, Y: x[4] / sc, Z: x[5] / sc}
	u := r3.Sub(r3.Vec{X: x[0], Y: x[1], Z: x[2]}, r3.Cross(w, o))
	return [6]float64{u.X, u.Y, u.Z, w.X, w.Y, w.Z}
}

// threshold returns the singular value at or below which a motion is
// free, for rows whose largest singular value is s0 (rows from ties have
// s0 of 1 or more; compressed and derived rows at most about 1).
func threshold(s0 float64) float64 { return MotionTolerance * math.Max(s0, 1) }

// compress replaces the rows of edge ei by its independent rows, scaled
// so that the largest singular value is at most 1, and queues a merge
// when a pair edge holds its two clusters rigidly.
func (s *solver) compress(ei int32) {
	e := &s.edges[ei]
	n := 6 * len(e.members)
	o, sc := s.frame(e.ties)
	a := mat.NewDense(len(e.rows), n, nil)
	for r, row := range e.rows {
		loc := slices.Clone(row)
		for b := 0; b < n; b += 6 {
			rowToLocal(loc[b:b+6], o, sc)
		}
		a.SetRow(r, loc)
	}
	var svd mat.SVD
	if !svd.Factorize(a, mat.SVDThinV) {
		return // keep the rows as they are; the SVD of a small matrix does not fail in practice
	}
	sv := svd.Values(nil)
	var v mat.Dense
	svd.VTo(&v)
	tau := threshold(sv[0])
	scale := 1 / math.Max(sv[0], 1)
	e.rows = e.rows[:0]
	e.rank = 0
	for i, x := range sv {
		if x <= tau {
			break
		}
		row := make([]float64, n)
		for j := range n {
			row[j] = x * scale * v.At(j, i)
		}
		for b := 0; b < n; b += 6 {
			rowToGlobal(row[b:b+6], o, sc)
		}
		e.rows = append(e.rows, row)
		e.rank++
	}
	if e.rank == 0 {
		s.kill(ei)
		return
	}
	if len(e.members) == 2 && e.rank >= 6 {
		s.merges = append(s.merges, [2]int32{e.members[0], e.members[1]})
	}
}

func (s *solver) kill(ei int32) {
	e := &s.edges[ei]
	if !e.alive {
		return
	}
	e.alive = false
	if len(e.members) == 2 {
		key := [2]int32{e.members[0], e.members[1]}
		if s.pairs[key] == ei {
			delete(s.pairs, key)
		}
	}
}

// runMerges merges the queued pairs, re-pointing their edges, which may
// queue more.
func (s *solver) runMerges() {
	for len(s.merges) > 0 {
		p := s.merges[0]
		s.merges = s.merges[1:]
		a, b := s.find(p[0]), s.find(p[1])
		if a == b {
			continue
		}
		keep, gone := s.joinClusters(a, b)
		for _, ei := range slices.Clone(s.cl[keep].edges) {
			e := &s.edges[ei]
			if !e.alive || !slices.Contains(e.members, gone) {
				continue
			}
			s.kill(ei)
			members, rows := renameMember(e.members, e.rows, gone, keep)
			s.addRows(members, rows, e.ties)
		}
		s.cl[keep].edges = s.aliveEdges(keep)
	}
}

// renameMember replaces cluster gone by keep in an edge's members,
// adding the two blocks where both are members.
func renameMember(members []int32, rows [][]float64, gone, keep int32) ([]int32, [][]float64) {
	var out []int32
	for _, c := range members {
		if c == gone {
			c = keep
		}
		if !slices.Contains(out, c) {
			out = append(out, c)
		}
	}
	slices.Sort(out)
	nr := make([][]float64, len(rows))
	for r, row := range rows {
		nrow := make([]float64, 6*len(out))
		for k, c := range members {
			if c == gone {
				c = keep
			}
			j := slices.Index(out, c)
			for d := range 6 {
				nrow[6*j+d] += row[6*k+d]
			}
		}
		nr[r] = nrow
	}
	return out, nr
}

// aliveEdges returns the alive edges incident to cluster c, once each.
func (s *solver) aliveEdges(c int32) []int32 {
	var out []int32
	for _, ei := range s.cl[c].edges {
		if s.edges[ei].alive && slices.Contains(s.edges[ei].members, c) && !slices.Contains(out, ei) {
			out = append(out, ei)
		}
	}
	slices.Sort(out)
	return out
}

// neighbours returns the clusters sharing an alive edge with c.
func (s *solver) neighbours(c int32) []int32 {
	var out []int32
	for _, ei := range s.aliveEdges(c) {
		for _, m := range s.edges[ei].members {
			if m != c && !slices.Contains(out, m) {
				out = append(out, m)
			}
		}
	}
	slices.Sort(out)
	return out
}

// chooseRoots picks the cluster of each group never eliminated: the
// ground's, else the one with the most parts (then the smallest part id,
// then the smallest body).
func (s *solver) chooseRoots() {
	for gi, g := range s.groups {
		best := int32(-1)
		for _, b := range g.Bodies {
			c := s.find(int32(b))
			if best < 0 || better(&s.cl[c], &s.cl[best], c, best) {
				best = c
			}
		}
		s.root[gi] = best
	}
}

func better(a, b *kcluster, ia, ib int32) bool {
	switch {
	case a.ground != b.ground:
		return a.ground
	case a.nparts != b.nparts:
		return a.nparts > b.nparts
	case a.area != b.area:
		return a.area > b.area
	case a.minPart != b.minPart:
		return a.minPart < b.minPart
	}
	return ia < ib
}

// candidate is a cluster waiting to be eliminated.
type candidate struct {
	c      int32
	class  int // 0 connector nodes, 1 parts
	degree int
	nparts int
	area   float64
	key    int64
}

type queue []candidate

func (q queue) Len() int { return len(q) }
func (q queue) Less(i, j int) bool {
	a, b := q[i], q[j]
	return cmp.Or(cmp.Compare(a.class, b.class), cmp.Compare(a.degree, b.degree), cmp.Compare(a.nparts, b.nparts),
		cmp.Compare(a.area, b.area), cmp.Compare(a.key, b.key), cmp.Compare(a.c, b.c)) < 0
}
func (q queue) Swap(i, j int) { q[i], q[j] = q[j], q[i] }
func (q *queue) Push(x any)   { *q = append(*q, x.(candidate)) }
func (q *queue) Pop() any {
	old := *q
	x := old[len(old)-1]
	*q = old[:len(old)-1]
	return x
}

// candidateOf returns c's place in the queue, and whether it may be
// eliminated now.
func (s *solver) candidateOf(c int32) (candidate, bool) {
	cl := &s.cl[c]
	if !cl.alive || cl.ground || s.find(s.root[s.groupOf[c]]) == c {
		return candidate{}, false
	}
	deg := len(s.neighbours(c))
	cand := candidate{c: c, degree: deg, nparts: cl.nparts, area: cl.area, key: cl.minPart}
	if cl.nparts == 0 {
		cand.key = int64(slices.Min(cl.bodies))
		return cand, deg >= 1
	}
	cand.class = 1
	return cand, deg == 1 || deg == 2
}

// eliminate removes clusters in queue order until none may go.
func (s *solver) eliminate() {
	q := &queue{}
	for c := range s.cl {
		if cand, ok := s.candidateOf(int32(c)); ok {
			*q = append(*q, cand)
		}
	}
	heap.Init(q)
	for q.Len() > 0 {
		top := heap.Pop(q).(candidate)
		cand, ok := s.candidateOf(top.c)
		if !ok {
			continue
		}
		if cand != top {
			heap.Push(q, cand) // its place changed since it was queued
			continue
		}
		nbrs := s.eliminateOne(top.c)
		for _, n := range nbrs {
			n = s.find(n)
			if cand, ok := s.candidateOf(n); ok {
				heap.Push(q, cand)
			}
		}
	}
}

// eliminateOne removes cluster c: it records c's free motions with its
// neighbours held, and turns the rest of its rows into rows between the
// neighbours. It returns the neighbours.
func (s *solver) eliminateOne(c int32) []int32 {
	inc := s.aliveEdges(c)
	nbrs := s.neighbours(c)
	var ties []int32
	nrows := 0
	for _, ei := range inc {
		ties = mergeTies(ties, s.edges[ei].ties)
		nrows += len(s.edges[ei].rows)
	}
	o, sc := s.frame(ties)
	S := mat.NewDense(nrows, 6, nil)
	B := mat.NewDense(nrows, 6*len(nbrs), nil)
	r := 0
	for _, ei := range inc {
		e := &s.edges[ei]
		for _, row := range e.rows {
			for k, m := range e.members {
				blk := slices.Clone(row[6*k : 6*k+6])
				rowToLocal(blk, o, sc)
				if m == c {
					for d := range 6 {
						S.Set(r, d, blk[d])
					}
					continue
				}
				j := slices.Index(nbrs, m)
				for d := range 6 {
					B.Set(r, 6*j+d, blk[d])
				}
			}
			r++
		}
	}
	var svd mat.SVD
	if !svd.Factorize(S, mat.SVDFullU|mat.SVDFullV) {
		// Not finite rows (coordinates out of range): nothing can be said.
		for _, ei := range inc {
			s.kill(ei)
		}
		s.cl[c].alive = false
		return nbrs
	}
	sv := svd.Values(nil)
	tau := threshold(sv[0])
	rank := 0
	for _, x := range sv {
		if x > tau {
			rank++
		}
	}
	var u, v mat.Dense
	svd.UTo(&u)
	svd.VTo(&v)
	if free := 6 - rank; free > 0 {
		motions := make([][6]float64, 0, free)
		for i := rank; i < 6; i++ {
			motions = append(motions, motionToGlobal(mat.Col(nil, i, &v), o, sc))
		}
		s.report(c, nbrs, ties, motions, o, sc)
	}
	for _, ei := range inc {
		s.kill(ei)
	}
	s.cl[c].alive = false
	if len(nbrs) >= 2 && nrows > rank {
		uperp := u.Slice(0, nrows, rank, nrows)
		var ind mat.Dense
		ind.Mul(uperp.T(), B)
		rows := make([][]float64, ind.RawMatrix().Rows)
		for i := range rows {
			row := mat.Row(nil, i, &ind)
			for b := 0; b < len(row); b += 6 {
				rowToGlobal(row[b:b+6], o, sc)
			}
			rows[i] = row
		}
		s.addRows(nbrs, rows, ties)
		s.runMerges()
	}
	return nbrs
}

// report records the free motions of eliminated cluster c with its
// neighbours held: unrestrained for connector nodes, a mechanism for
// parts.
func (s *solver) report(c int32, nbrs, ties []int32, motions [][6]float64, o r3.Vec, sc float64) {
	gi := s.groupOf[c]
	s.nullity[gi] += len(motions)
	m := classify(motions, o, sc)
	if s.cl[c].nparts == 0 {
		s.unres[gi] += len(motions)
		s.unresFs = append(s.unresFs, s.unrestrainedFinding(c, nbrs, ties, m))
		return
	}
	s.mech[gi] += len(motions)
	s.mechFs = append(s.mechFs, s.mechanismFinding([]int32{c}, nbrs, ties, m))
}

// partOf returns the part a body stands for or is tied to.
func (s *solver) partOf(b int) int64 {
	if s.k.Bodies[b].Kind == joints.PartBody {
		return s.k.Bodies[b].Part
	}
	return s.host[b]
}

// repPart returns the part that stands for cluster c in a finding about
// ties: the part of c's body in the first of them, else c's smallest.
func (s *solver) repPart(c int32, ties []int32, bodies []int32) int64 {
	for _, ti := range ties {
		t := &s.k.Ties[ti]
		for _, b := range [2]int{t.A, t.B} {
			if slices.Contains(bodies, int32(b)) {
				if p := s.partOf(b); p != 0 {
					return p
				}
			}
		}
	}
	if s.cl[c].minPart != math.MaxInt64 {
		return s.cl[c].minPart
	}
	for _, b := range bodies {
		if p := s.partOf(int(b)); p != 0 {
			return p
		}
	}
	return 0
}

// tieJoints returns the connectors of ties and the degrees of freedom
// they couple.
func (s *solver) tieJoints(ties []int32) ([]string, []string) {
	var ids, dofs []string
	for _, ti := range ties {
		t := &s.k.Ties[ti]
		ids = append(ids, t.Joint)
		if d := t.DOFs.String(); !slices.Contains(dofs, d) {
			dofs = append(dofs, d)
		}
	}
	slices.Sort(dofs)
	return sortIDs(ids), dofs
}

// mechanismFinding describes parts (clusters moving) that can move
// relative to clusters against.
func (s *solver) mechanismFinding(moving, against, ties []int32, m joints.Motion) joints.Finding {
	var parts []int64
	var others []int64
	for _, c := range moving {
		p := s.repPart(c, ties, s.bodiesOf(c))
		parts = appendUnique(parts, p)
		for _, b := range s.bodiesOf(c) {
			if bd := s.k.Bodies[b]; bd.Kind == joints.PartBody && bd.Part != p {
				others = appendUnique(others, bd.Part)
			}
		}
	}
	nmov := len(parts)
	for _, c := range against {
		parts = appendUnique(parts, s.repPart(c, ties, s.bodiesOf(c)))
	}
	ids, dofs := s.tieJoints(ties)
	slices.Sort(others)
	f := joints.Finding{Severity: MechanismSeverity, Code: joints.CodeMechanism, Parts: parts, Joints: ids, Motion: &m}
	if len(ids) > 0 {
		f.Joint = ids[0]
	}
	f.Point, f.HasPoint = m.Point, m.HasPoint
	if !f.HasPoint {
		f.Point, f.HasPoint = s.tieCentroid(ties), len(ties) > 0
	}
	who := partsWord(parts[:nmov])
	if len(others) > 0 {
		who += fmt.Sprintf(" (with part %s held rigidly to it)", partList(others))
	}
	against0 := "the rest"
	if len(parts) > nmov {
		against0 = partsWord(parts[nmov:])
	}
	f.Message = fmt.Sprintf("%s can move relative to %s: %s; the %s between them (%s, coupling %s) do not hold it",
		who, against0, describeMotion(m), plural(len(ids), "connector"), idList(ids, 8), strings.Join(dofs, " / "))
	return f
}

func appendUnique(ps []int64, p int64) []int64 {
	if p == 0 || slices.Contains(ps, p) {
		return ps
	}
	return append(ps, p)
}

// bodiesOf returns the bodies of cluster c (alive or eliminated).
func (s *solver) bodiesOf(c int32) []int32 { return s.cl[c].bodies }

func (s *solver) tieCentroid(ties []int32) r3.Vec {
	o, _ := s.frame(ties)
	return o
}

// unrestrainedFinding describes the connector nodes of cluster c, free
// with every neighbour held.
func (s *solver) unrestrainedFinding(c int32, nbrs, ties []int32, m joints.Motion) joints.Finding {
	var nodes []string
	var ids []string
	var parts []int64
	for _, b := range s.bodiesOf(c) {
		bd := s.k.Bodies[b]
		if bd.Kind != joints.NodeBody {
			continue
		}
		ids = append(ids, bd.Joint)
		parts = appendUnique(parts, s.host[b])
		if bd.Node != 0 {
			nodes = append(nodes, fmt.Sprint(bd.Node))
		} else {
			nodes = append(nodes, fmt.Sprintf("of %s at %s", bd.Joint, vec(bd.Point)))
		}
	}
	for _, n := range nbrs {
		parts = appendUnique(parts, s.repPart(n, ties, s.bodiesOf(n)))
	}
	ids = sortIDs(ids)
	f := joints.Finding{Severity: UnrestrainedSeverity, Code: joints.CodeUnrestrained, Parts: parts, Joints: ids, Motion: &m}
	if len(ids) > 0 {
		f.Joint = ids[0]
	}
	if p := s.k.Bodies[s.bodiesOf(c)[0]]; p.Kind == joints.NodeBody {
		f.Point, f.HasPoint = p.Point, true
	}
	what := "node " + wordList(nodes)
	if len(nodes) > 1 {
		what = "nodes " + wordList(nodes)
	}
	held := "nothing holds"
	if len(nbrs) > 0 {
		held = "no coupling holds"
	}
	f.Message = fmt.Sprintf("%s (made by %s) has %s that %s; a solver stops on such a node", what, idList(ids, 8), describeMotion(m), held)
	return f
}

// cores solves what the elimination left in each group.
func (s *solver) cores() {
	left := make([][]int32, len(s.groups))
	for c := range s.cl {
		if s.cl[c].alive {
			gi := s.groupOf[c]
			left[gi] = append(left[gi], int32(c))
		}
	}
	for gi, cs := range left {
		switch {
		case len(cs) == 0:
		case len(cs) == 1:
			c := cs[0]
			if s.cl[c].ground {
				continue
			}
			s.nullity[gi] += 6
			if s.cl[c].nparts == 0 {
				// Connector nodes tied to no part at all.
				s.unres[gi] += 6
				m := joints.Motion{Kind: joints.MotionSeveral, Count: 6}
				if b := s.k.Bodies[s.bodiesOf(c)[0]]; b.Kind == joints.NodeBody {
					m.Point, m.HasPoint = b.Point, true
				}
				s.unresFs = append(s.unresFs, s.unrestrainedFinding(c, nil, nil, m))
			}
		default:
			s.core(gi, cs)
		}
	}
}

// core finds the free motions of clusters cs, joined in loops, with one
// SVD of all their rows in a frame of their own.
func (s *solver) core(gi int, cs []int32) {
	var edges []int32
	var ties []int32
	for _, c := range cs {
		for _, ei := range s.aliveEdges(c) {
			if !slices.Contains(edges, ei) {
				edges = append(edges, ei)
				ties = mergeTies(ties, s.edges[ei].ties)
			}
		}
	}
	slices.Sort(edges)
	col := map[int32]int{} // cluster -> first column; the ground has none
	n := 0
	grounded := false
	for _, c := range cs {
		if s.cl[c].ground {
			grounded = true
			continue
		}
		col[c] = n
		n += 6
	}
	o, sc := s.frame(ties)
	var rows [][]float64
	for _, ei := range edges {
		e := &s.edges[ei]
		for _, row := range e.rows {
			full := make([]float64, n)
			for k, m := range e.members {
				j, ok := col[m]
				if !ok {
					continue
				}
				blk := slices.Clone(row[6*k : 6*k+6])
				rowToLocal(blk, o, sc)
				copy(full[j:j+6], blk)
			}
			rows = append(rows, full)
		}
	}
	null := nullSpace(rows, n)
	s.nullity[gi] += len(null)
	rigid := 6
	if grounded {
		rigid = 0
	}
	internal := len(null) - rigid
	if internal <= 0 {
		return
	}
	// Connector nodes free with every part held: the null space of the
	// rows restricted to the node clusters' columns.
	var nodeCols []int
	var nodeCl []int32
	for _, c := range cs {
		if j, ok := col[c]; ok && s.cl[c].nparts == 0 {
			nodeCl = append(nodeCl, c)
			for d := range 6 {
				nodeCols = append(nodeCols, j+d)
			}
		}
	}
	unres := 0
	if len(nodeCols) > 0 {
		sub := make([][]float64, len(rows))
		for r, row := range rows {
			sub[r] = make([]float64, len(nodeCols))
			for k, j := range nodeCols {
				sub[r][k] = row[j]
			}
		}
		nn := nullSpace(sub, len(nodeCols))
		unres = len(nn)
		if unres > 0 {
			var motions [][6]float64
			for _, z := range nn {
				motions = append(motions, motionToGlobal(z[0:6], o, sc))
			}
			s.unresFs = append(s.unresFs, s.unrestrainedFinding(nodeCl[0], nil, ties, classify(motions, o, sc)))
		}
	}
	s.unres[gi] += unres
	mech := internal - unres
	if mech <= 0 {
		return
	}
	s.mech[gi] += mech
	// Which parts move relative to the root: the internal motions, with
	// the root's motion taken off each cluster's.
	root := s.find(s.root[gi])
	var moving []int32
	var motions [][6]float64
	for _, z := range null {
		var ref [6]float64
		if j, ok := col[root]; ok {
			copy(ref[:], z[j:j+6])
		}
		big, scale := int32(-1), 0.0
		for _, c := range cs {
			j, ok := col[c]
			if !ok || s.cl[c].nparts == 0 {
				continue
			}
			var d [6]float64
			norm := 0.0
			for k := range 6 {
				d[k] = z[j+k] - ref[k]
				norm += d[k] * d[k]
			}
			if norm > 1e-6 && !slices.Contains(moving, c) {
				moving = append(moving, c)
			}
			if norm > scale {
				big, scale = c, norm
			}
		}
		if big >= 0 && scale > 1e-6 {
			j := col[big]
			d := make([]float64, 6)
			for k := range 6 {
				d[k] = z[j+k] - ref[k]
			}
			motions = append(motions, motionToGlobal(d, o, sc))
		}
	}
	slices.Sort(moving)
	m := classify(motions, o, sc)
	m.Count = mech
	s.mechFs = append(s.mechFs, s.mechanismFinding(moving, []int32{root}, ties, m))
}

// nullSpace returns an orthonormal basis of the null space of the rows
// (each of n columns), by SVD, with the tolerance of threshold.
func nullSpace(rows [][]float64, n int) [][]float64 {
	if n == 0 {
		return nil
	}
	if len(rows) == 0 {
		out := make([][]float64, n)
		for i := range out {
			out[i] = make([]float64, n)
			out[i][i] = 1
		}
		return out
	}
	a := mat.NewDense(len(rows), n, nil)
	for r, row := range rows {
		a.SetRow(r, row)
	}
	var svd mat.SVD
	if !svd.Factorize(a, mat.SVDFullV) {
		return nil
	}
	sv := svd.Values(nil)
	tau := threshold(sv[0])
	rank := 0
	for _, x := range sv {
		if x > tau {
			rank++
		}
	}
	var v mat.Dense
	svd.VTo(&v)
	var out [][]float64
	for i := rank; i < n; i++ {
		out = append(out, mat.Col(nil, i, &v))
	}
	return out
}
