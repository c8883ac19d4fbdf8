package html

import (
	"cmp"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

// RunCut is how many times the median spacing of a part pair's
// consecutive welds a spacing may reach before the two welds count as
// the ends of two weld runs (our choice: the two flanges of a hat
// section, or two separate flanges of the same pair, lie farther apart
// than two or three pitches).
const RunCut = 2.5

// neighbours is how many nearest welds of its pair each weld is linked
// to before the minimum spanning forest is taken (our choice: a weld's
// consecutive welds are among its two nearest in a line, its four in a
// grid).
const neighbours = 4

// pairAnalysis is what the page shows of the connectors joining one
// pair of parts directly (as consecutive sheets of a stack).
type pairAnalysis struct {
	a, b     int64 // part ids, a < b
	conns    []int // indices into the connectors document, in its order
	welds    []int // the built or flagged spot welds among conns
	findings int   // findings about the pair's joints
	flagged  int
	notBuilt int
	// The chart: origin, u along the welds, v across, n the normal.
	origin, e1, e2, n r3.Vec
	links             []spacing // consecutive welds
	runs              [][]int   // weld runs: indices into welds, in run order
}

// spacing is the distance between two consecutive welds of a pair and
// the minimum the spacing table asks for.
type spacing struct {
	i, j      int // indices into pairAnalysis.welds, i < j
	length    float64
	thickness float64 // governing thickness: the larger of the two welds'
	sheets    int     // stack size: the larger of the two
	min       float64 // joints.MinSpacing(thickness, sheets)
	run       int
}

// buildAnalysis is what the build's plots and pair sections share.
type buildAnalysis struct {
	conn     *document.ConnectorsDoc
	gov      []float64 // governing thickness per connector, 0 when fewer than two sheets
	pairs    []*pairAnalysis
	unpaired []int // connectors in no pair
	// findingsOf lists each joint's findings (indices into the page's
	// findings).
	findingsOf map[string][]int
	// unit names the documents' length unit, mm is its size in mm: the
	// trade rules (nugget sizes, spacings) are written in mm.
	unit string
	mm   float64
}

// analyse groups the connectors by part pair and finds each pair's
// chart and consecutive welds.
func analyse(conn *document.ConnectorsDoc, findings []document.FindingDoc) *buildAnalysis {
	an := &buildAnalysis{conn: conn, gov: make([]float64, len(conn.Connectors)), findingsOf: map[string][]int{}}
	an.unit, an.mm = unitOf(conn.Units.Length)
	for i, f := range findings {
		if f.Joint != nil {
			an.findingsOf[*f.Joint] = append(an.findingsOf[*f.Joint], i)
		}
	}
	type key struct{ a, b int64 }
	byKey := map[key]*pairAnalysis{}
	for i := range conn.Connectors {
		c := &conn.Connectors[i]
		ts := make([]float64, len(c.Sheets))
		for k, s := range c.Sheets {
			ts[k] = s.Thickness
		}
		an.gov[i] = joints.GoverningThickness(ts)
		parts := c.Listed
		if len(c.Sheets) >= 2 {
			parts = make([]int64, len(c.Sheets))
			for k, s := range c.Sheets {
				parts[k] = s.Part
			}
		}
		seen := map[key]bool{}
		for k := 0; k+1 < len(parts); k++ {
			kk := key{min(parts[k], parts[k+1]), max(parts[k], parts[k+1])}
			if kk.a == kk.b || seen[kk] {
				continue
			}
			seen[kk] = true
			pa := byKey[kk]
			if pa == nil {
				pa = &pairAnalysis{a: kk.a, b: kk.b}
				byKey[kk] = pa
				an.pairs = append(an.pairs, pa)
			}
			pa.conns = append(pa.conns, i)
		}
		if len(seen) == 0 {
			an.unpaired = append(an.unpaired, i)
		}
	}
	geom.ParallelEach(len(an.pairs), func(k int) {
		pa := an.pairs[k]
		for _, i := range pa.conns {
			c := &conn.Connectors[i]
			pa.findings += len(an.findingsOf[c.ID])
			switch c.State {
			case "flagged":
				pa.flagged++
			case "not-built":
				pa.notBuilt++
			}
			if c.Kind == "spot" && (c.State == "built" || c.State == "flagged") {
				pa.welds = append(pa.welds, i)
			}
		}
		pa.chart(conn, nil)
		pa.consecutive(conn, an.gov, an.mm)
		if len(pa.links) > 0 {
			// Turn u along the weld runs, which two short parallel runs
			// (a hat section's flanges) need: they may spread as much
			// across as along.
			dirs := make([]r3.Vec, len(pa.links))
			for k, l := range pa.links {
				dirs[k] = r3.Sub(vec(conn.Connectors[pa.welds[l.j]].Point), vec(conn.Connectors[pa.welds[l.i]].Point))
			}
			pa.chart(conn, dirs)
		}
		pa.orderRuns(conn)
	})
	// Pairs with the most findings first, then by part ids.
	slices.SortFunc(an.pairs, func(x, y *pairAnalysis) int {
		return cmp.Or(cmp.Compare(y.findings, x.findings), cmp.Compare(y.notBuilt+y.flagged, x.notBuilt+x.flagged),
			cmp.Compare(x.a, y.a), cmp.Compare(x.b, y.b))
	})
	return an
}

// chart sets the pair's chart: the origin at the centroid of its welds
// (of all its connectors when none was built), u along the direction in
// which they spread most or, given the vectors between consecutive
// welds, along the direction those vectors share most, and the normal from the mean of their stack
// axes, made normal to u; without axes, the normal of the welds'
// best-fit plane (the least principal direction). Directions found up
// to their sign are given with their largest component positive (see
// signed), so that a horizontal flange is seen from above; v completes a
// right-handed frame.
func (pa *pairAnalysis) chart(conn *document.ConnectorsDoc, dirs []r3.Vec) {
	idx := pa.welds
	if len(idx) == 0 {
		idx = pa.conns
	}
	pts := make([]r3.Vec, len(idx))
	var axis r3.Vec
	for k, i := range idx {
		c := &conn.Connectors[i]
		pts[k] = vec(c.Point)
		if c.Axis != nil {
			a := vec(*c.Axis)
			if r3.Dot(a, axis) < 0 {
				a = r3.Scale(-1, a)
			}
			axis = r3.Add(axis, a)
		}
	}
	var c r3.Vec
	for _, p := range pts {
		c = r3.Add(c, p)
	}
	c = r3.Scale(1/float64(len(pts)), c)
	pa.origin = c
	major, minor := principal(pts, c)
	if len(dirs) > 0 {
		major, _ = principal(dirs, r3.Vec{})
	}
	e1, n := geom.SignLargest(major), minor
	if r3.Norm(axis) > 0 {
		a := r3.Unit(axis)
		if o := r3.Sub(a, r3.Scale(r3.Dot(a, e1), e1)); r3.Norm(o) > 0.1 {
			n = o
		}
	}
	if r3.Norm(n) == 0 || math.Abs(r3.Dot(r3.Unit(n), e1)) > 0.9 {
		n = perpendicular(e1)
	}
	n = r3.Unit(r3.Sub(n, r3.Scale(r3.Dot(n, e1), e1)))
	pa.e1, pa.n = e1, geom.SignLargest(n)
	pa.e2 = r3.Cross(pa.n, pa.e1)
}

// principal returns the directions of largest and least spread of pts
// about c (eigenvectors of their scatter matrix); x and z for fewer than
// two distinct points.
func principal(pts []r3.Vec, c r3.Vec) (major, minor r3.Vec) {
	var s [9]float64
	for _, p := range pts {
		d := [3]float64{p.X - c.X, p.Y - c.Y, p.Z - c.Z}
		for i := range 3 {
			for j := range 3 {
				s[3*i+j] += d[i] * d[j]
			}
		}
	}
	if s[0]+s[4]+s[8] == 0 {
		return r3.Vec{X: 1}, r3.Vec{Z: 1}
	}
	var eig mat.EigenSym
	if !eig.Factorize(mat.NewSymDense(3, s[:]), true) {
		return r3.Vec{X: 1}, r3.Vec{Z: 1}
	}
	var v mat.Dense
	eig.VectorsTo(&v)
	// Eigenvalues come in ascending order.
	col := func(k int) r3.Vec { return r3.Unit(r3.Vec{X: v.At(0, k), Y: v.At(1, k), Z: v.At(2, k)}) }
	return col(2), col(0)
}

// perpendicular returns a unit vector normal to unit vector e.
func perpendicular(e r3.Vec) r3.Vec {
	t := r3.Vec{Z: 1}
	if math.Abs(e.Z) > 0.9 {
		t = r3.Vec{X: 1}
	}
	return r3.Unit(r3.Sub(t, r3.Scale(r3.Dot(t, e), e)))
}

// consecutive finds the pair's consecutive welds: the edges of the
// minimum spanning forest of the graph that links each weld to its
// nearest neighbours (distances between weld points), less the edges
// longer than RunCut times the median edge, which separate weld runs.
func (pa *pairAnalysis) consecutive(conn *document.ConnectorsDoc, gov []float64, mm float64) {
	n := len(pa.welds)
	if n < 2 {
		if n == 1 {
			pa.runs = [][]int{{0}}
		}
		return
	}
	pts := make([]r3.Vec, n)
	for k, i := range pa.welds {
		pts[k] = vec(conn.Connectors[i].Point)
	}
	edges := nearestEdges(pts, pa.e1, neighbours) // Kruskal's order: shortest first
	parent := make([]int, n)
	for i := range parent {
		parent[i] = i
	}
	find := func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	var tree []spacing
	for _, e := range edges {
		ri, rj := find(int(e.i)), find(int(e.j))
		if ri == rj {
			continue
		}
		parent[max(ri, rj)] = min(ri, rj)
		tree = append(tree, spacing{i: int(e.i), j: int(e.j), length: e.length})
	}
	if len(tree) == 0 {
		return
	}
	lengths := make([]float64, len(tree))
	for k, e := range tree {
		lengths[k] = e.length
	}
	slices.Sort(lengths)
	median := lengths[len(lengths)/2]
	if len(lengths)%2 == 0 {
		median = (lengths[len(lengths)/2-1] + lengths[len(lengths)/2]) / 2
	}
	// Runs: components of the forest without the long edges.
	for i := range parent {
		parent[i] = i
	}
	var kept []spacing
	for _, e := range tree {
		if e.length > RunCut*median {
			continue
		}
		ri, rj := find(e.i), find(e.j)
		parent[max(ri, rj)] = min(ri, rj)
		kept = append(kept, e)
	}
	runOf := make([]int, n)
	for i := range runOf {
		runOf[i] = -1
	}
	for i := range n {
		r := find(i)
		if runOf[r] < 0 {
			runOf[r] = len(pa.runs)
			pa.runs = append(pa.runs, nil)
		}
		runOf[i] = runOf[r]
		pa.runs[runOf[i]] = append(pa.runs[runOf[i]], i)
	}
	for _, e := range kept {
		ci, cj := &conn.Connectors[pa.welds[e.i]], &conn.Connectors[pa.welds[e.j]]
		e.thickness = math.Max(gov[pa.welds[e.i]], gov[pa.welds[e.j]])
		e.sheets = max(len(ci.Sheets), len(cj.Sheets))
		e.min = joints.MinSpacing(e.thickness*mm, e.sheets) / mm
		e.run = runOf[e.i]
		pa.links = append(pa.links, e)
	}
	slices.SortFunc(pa.links, func(x, y spacing) int { return cmp.Or(cmp.Compare(x.i, y.i), cmp.Compare(x.j, y.j)) })
}

// orderRuns sorts the welds of each run by their chart coordinate u.
func (pa *pairAnalysis) orderRuns(conn *document.ConnectorsDoc) {
	u := func(k int) float64 { return r3.Dot(r3.Sub(vec(conn.Connectors[pa.welds[k]].Point), pa.origin), pa.e1) }
	for _, run := range pa.runs {
		slices.SortStableFunc(run, func(x, y int) int { return cmp.Compare(u(x), u(y)) })
	}
}

// edge joins points i < j, length apart.
type edge struct {
	i, j   int32
	length float64
}

// nearestEdges returns, for every point, the edges to its k nearest
// other points (ties by index), each edge once, sorted by compareEdges.
// Points are swept in order of their coordinate along dir, and a search
// stops where that coordinate alone is farther than the k-th nearest
// found: exact, and about n log n for points spread along dir.
func nearestEdges(pts []r3.Vec, dir r3.Vec, k int) []edge {
	n := len(pts)
	order := make([]int32, n)
	for i := range order {
		order[i] = int32(i)
	}
	u := make([]float64, n)
	for i, p := range pts {
		u[i] = r3.Dot(p, dir)
	}
	slices.SortStableFunc(order, func(a, b int32) int { return cmp.Compare(u[a], u[b]) })
	out := make([]edge, 0, k*n)
	best := make([]edge, 0, k+1) // i: the other point
	for r, i := range order {
		best = best[:0]
		for dirn := -1; dirn <= 1; dirn += 2 {
			for s := r + dirn; s >= 0 && s < n; s += dirn {
				j := order[s]
				if len(best) == k && math.Abs(u[j]-u[i]) > best[k-1].length {
					break
				}
				c := edge{i: j, length: r3.Norm(r3.Sub(pts[j], pts[i]))}
				// Insertion into the k best, by length then index.
				pos := len(best)
				for pos > 0 && (best[pos-1].length > c.length || best[pos-1].length == c.length && best[pos-1].i > c.i) {
					pos--
				}
				if pos < k {
					best = slices.Insert(best, pos, c)
					best = best[:min(len(best), k)]
				}
			}
		}
		for _, c := range best {
			out = append(out, edge{i: min(i, c.i), j: max(i, c.i), length: c.length})
		}
	}
	// Each edge once: sorted as Kruskal takes them, duplicates adjacent.
	slices.SortFunc(out, compareEdges)
	return slices.Compact(out)
}

// compareEdges orders edges shortest first, ties by their points.
func compareEdges(x, y edge) int {
	switch {
	case x.length != y.length:
		return cmp.Compare(x.length, y.length)
	case x.i != y.i:
		return int(x.i - y.i)
	}
	return int(x.j - y.j)
}
