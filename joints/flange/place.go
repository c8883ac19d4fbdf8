package flange

import (
	"cmp"
	"context"
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

// weld is a weld at one station of a flange, with what the placement
// rules need of it.
type weld struct {
	flange    int
	station   int // from 1
	s         float64
	point     r3.Vec
	axis      r3.Vec
	parts     []int64 // the stack along the axis
	thick     []float64
	diameter  float64
	attach    []int32 // attachment nodes of every sheet, sorted
	touched   []int32 // elements using an attachment node, sorted
	outline   float64 // distance to the overlap's outline, mm (chart)
	sheetEdge float64 // least distance to a free edge of a stack sheet, mm
	skip      string  // why the station is left empty; "" when the weld is placed
	dropped   bool    // left empty for a clash with another flange's weld
}

// placer places welds on the flanges of a set.
type placer struct {
	set *Set
	x   *geom.Index
	m   *geom.Mesh
	o   joints.BuildOptions // defaults resolved
}

// Place puts spot welds on every flange of the set at the pitch of the
// set's options (see joints.FlangeOptions), with the build options o
// (defaults resolved against the mesh: the nugget rule, the edge rule,
// the attachment and the contact allowance). x must index the mesh's
// elements. It sets each flange's Welds and Pitch and returns the
// findings, run-level ones about flanges first, then the welds' in id
// order.
//
// Stations lie every pitch along the centreline, the spare length split
// evenly between the two end margins (one nugget diameter unless set);
// a closed flange gets equal spacing all round, the largest number of
// stations at which it is not below the pitch. Each weld lies on the
// faying surface at its station and joins the whole stack of sheets in
// contact there (a third sheet included). The rule that keeps welds from
// acting as a seam: no two welds' attachment nodes share an element
// (interpolated: the host elements' nodes; node-pair: the nodes; patch:
// every node of the patch), and on congruent flanges a facing node pair
// stays unconnected between consecutive welds. Where the mesh is too
// coarse for the pitch, the flange's welds are spaced at the smallest
// pitch that keeps them apart (pitch-too-fine). Welds of different
// flanges that would share attachment elements, or share two sheets
// closer than the pitch (where the stacks of two flanges overlap), are
// resolved in favour of the narrower flange (station-skipped).
func (set *Set) Place(ctx context.Context, x *geom.Index, o joints.BuildOptions) ([]joints.Finding, error) {
	p := &placer{set: set, x: x, m: x.Mesh(), o: o}
	n := len(set.Flanges)
	results := make([][]weld, n)
	pitches := make([]float64, n)
	finds := make([][]joints.Finding, n)
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), max(n, 1)) {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= n || ctx.Err() != nil {
					return
				}
				results[i], pitches[i], finds[i] = p.flange(i)
			}
		})
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("flange: interrupted: %w", err)
	}
	var fs []joints.Finding
	for i := range finds {
		fs = append(fs, finds[i]...)
	}
	fs = append(fs, p.resolve(results, pitches)...)
	for i := range set.Flanges {
		f := &set.Flanges[i]
		f.Pitch = pitches[i]
		f.Welds = f.Welds[:0]
		for _, w := range results[i] {
			if w.skip != "" {
				continue
			}
			f.Welds = append(f.Welds, joints.FlangeWeld{Station: w.station, S: w.s, Joint: joints.Joint{
				ID: joints.WeldID(f.ID, w.station), Kind: joints.Spot, Point: round6(w.point), Parts: slices.Clone(w.parts),
				Diameter: w.diameter, Group: f.ID,
			}})
		}
	}
	return fs, nil
}

// flangeFinding returns a finding about flange f, located at the middle
// of its centreline.
func flangeFinding(f *joints.Flange, sev joints.Severity, code, msg string) joints.Finding {
	mid := f.Centreline[len(f.Centreline)/2]
	return joints.Finding{Severity: sev, Code: code, Parts: []int64{f.Parts[0], f.Parts[1]}, Message: msg, Point: mid, HasPoint: true}
}

// stations returns the stations of a flange of length l at pitch p with
// end margin e: every p from the first, the spare length split evenly
// between the ends; a closed flange gets n = floor(l/p) stations at
// equal spacing l/n. It returns the spacing used.
func stations(l, p, e float64, closed bool) ([]float64, float64) {
	if closed {
		n := int(math.Floor(l/p + 1e-9))
		if n < 1 {
			return nil, 0
		}
		sp := l / float64(n)
		out := make([]float64, n)
		for k := range out {
			out[k] = (float64(k) + 0.5) * sp
		}
		return out, sp
	}
	free := l - 2*e
	if free < -1e-9 {
		return nil, 0
	}
	free = math.Max(free, 0)
	n := int(math.Floor(free/p+1e-9)) + 1
	start := e + (free-float64(n-1)*p)/2
	out := make([]float64, n)
	for k := range out {
		out[k] = start + float64(k)*p
	}
	return out, p
}

// flange places the welds of flange i: it returns the stations' welds
// (those left empty with their reason), the spacing used and the
// flange's findings.
func (p *placer) flange(i int) ([]weld, float64, []joints.Finding) {
	f := &p.set.Flanges[i]
	fo := p.set.opts
	rule := p.o.Rule
	gov2 := joints.GoverningThickness(f.Thickness[:])
	d := rule.Diameter(gov2)
	pitch := fo.Pitch.MM
	if fo.Pitch.Table {
		pitch = joints.MinSpacing(gov2, 2)
	}
	margin := fo.EndMargin
	if margin <= 0 {
		margin = d
	}
	var fs []joints.Finding
	if mo := joints.MinOverlap(gov2); f.Width.Mean < mo {
		fs = append(fs, flangeFinding(f, joints.Warning, joints.CodeFlangeNarrow,
			fmt.Sprintf("flange %s is %s mm wide on average, less than the minimum overlap of %s mm for %s mm sheets (resistance welding manufacturers' table, interpolated linearly)",
				f.ID, joints.MM(f.Width.Mean), joints.MM(mo), joints.MM(gov2))))
	}
	eval := func(pitch, margin float64) ([]weld, float64) {
		ss, used := stations(f.Length, pitch, margin, f.Closed)
		ws := make([]weld, len(ss))
		for k, s := range ss {
			ws[k] = p.station(i, k+1, s)
		}
		return ws, used
	}
	ws, used := eval(pitch, margin)
	// A three-sheet stack has a larger nugget and spacing: redo the
	// stations with them when the defaults depend on them.
	dmax, need := d, joints.MinSpacing(gov2, 2)
	for _, w := range ws {
		if w.skip == "" {
			dmax = math.Max(dmax, w.diameter)
			need = math.Max(need, joints.MinSpacing(joints.GoverningThickness(w.thick), len(w.parts)))
		}
	}
	redo := false
	if fo.EndMargin <= 0 && dmax > margin {
		margin, redo = dmax, true
	}
	if fo.Pitch.Table && need > pitch {
		pitch, redo = need, true
	}
	if redo {
		ws, used = eval(pitch, margin)
	}
	// The table's spacing holds between the welds themselves, in a
	// straight line, as build and check measure it: on a curved flange
	// the chord between stations is shorter than their spacing along the
	// centreline, so widen the spacing by the ratio until the chord
	// meets it (a few rounds: a ring's spacing changes by whole stations).
	for k := 0; fo.Pitch.Table && k < 8; k++ {
		c := chordMin(ws)
		if c >= need-joints.LengthRoundoff || c <= 0 {
			break
		}
		pitch = used * need / c * (1 + 1e-9)
		ws, used = eval(pitch, margin)
	}
	if len(ws) == 0 {
		what := fmt.Sprintf("shorter (%s mm) than its two end margins of %s mm", joints.MM(f.Length), joints.MM(margin))
		if f.Closed {
			what = fmt.Sprintf("%s mm round, shorter than the pitch of %s mm", joints.MM(f.Length), joints.MM(pitch))
		}
		return nil, 0, append(fs, flangeFinding(f, joints.Warning, joints.CodeFlangeShort,
			fmt.Sprintf("flange %s is %s: no weld placed", f.ID, what)))
	}
	// The mesh may be too coarse for the pitch: space the welds wider,
	// at the smallest pitch that keeps them apart.
	if !p.apart(i, ws) {
		good, goodUsed := p.widen(i, pitch, margin)
		if good == nil {
			good, goodUsed = ws, used
		}
		fs = append(fs, flangeFinding(f, joints.Warning, joints.CodePitchTooFine,
			fmt.Sprintf("flange %s: at %s mm pitch neighbouring welds would share attachment elements%s (mesh about %s mm); welds spaced at %s mm instead, the smallest pitch that keeps them apart",
				f.ID, joints.MM(pitch), when(f.Match == joints.Congruent, " or leave no facing node pair free between them"),
				joints.MM(p.meshSize(ws)), joints.MM(goodUsed))))
		ws, used = good, goodUsed
	}
	// The spacing table.
	need = 0
	var worst *weld
	for k := range ws {
		w := &ws[k]
		if w.skip != "" {
			continue
		}
		if v := joints.MinSpacing(joints.GoverningThickness(w.thick), len(w.parts)); v > need {
			need, worst = v, w
		}
	}
	placed := 0
	for _, w := range ws {
		if w.skip == "" {
			placed++
		}
	}
	if apart := math.Min(used, chordMin(ws)); worst != nil && placed > 1 && apart < need-joints.LengthRoundoff {
		fs = append(fs, flangeFinding(f, joints.Warning, joints.CodePitchShort,
			fmt.Sprintf("flange %s: welds %s mm apart, below the minimum spacing of %s mm for %d sheets of governing thickness %s mm (resistance welding manufacturers' table, interpolated linearly%s)",
				f.ID, joints.MM(apart), joints.MM(need), len(worst.parts), joints.MM(joints.GoverningThickness(worst.thick)),
				when(len(worst.parts) >= 3, ", +30 per cent for three sheets"))))
	}
	// Edges.
	narrow, least := 0, math.Inf(1)
	for _, w := range ws {
		if w.skip != "" {
			continue
		}
		if lim := p.o.EdgeFactor * w.diameter; math.Min(w.outline, w.sheetEdge) < lim-joints.LengthRoundoff {
			narrow++
			least = math.Min(least, math.Min(w.outline, w.sheetEdge))
		}
	}
	if narrow > 0 {
		fs = append(fs, flangeFinding(f, joints.Warning, joints.CodeFlangeNarrow,
			fmt.Sprintf("flange %s is too narrow for the edge rule: %d weld(s) lie as little as %s mm from the overlap's edge, less than %g nugget diameter(s) (%s mm)",
				f.ID, narrow, joints.MM(least), p.o.EdgeFactor, joints.MM(p.o.EdgeFactor*d))))
	}
	for _, w := range ws {
		if w.skip != "" {
			fs = append(fs, joints.Finding{Severity: joints.Info, Code: joints.CodeStationSkipped, Parts: []int64{f.Parts[0], f.Parts[1]},
				Message: fmt.Sprintf("station %d of flange %s left empty: %s", w.station, f.ID, w.skip), Point: w.point, HasPoint: true})
		}
	}
	return ws, used, fs
}

// chordMin returns the least straight-line distance between placed
// welds of ws next to each other along the flange, and between the last
// and the first (a ring's seam; an open flange's ends are farther apart
// unless it nearly closes, where build measures them too), +Inf when
// fewer than two are placed.
func chordMin(ws []weld) float64 {
	least := math.Inf(1)
	var first, prev *weld
	n := 0
	for k := range ws {
		w := &ws[k]
		if w.skip != "" {
			continue
		}
		if prev != nil {
			least = math.Min(least, r3.Norm(r3.Sub(w.point, prev.point)))
		} else {
			first = w
		}
		prev = w
		n++
	}
	if n > 2 && first != nil {
		least = math.Min(least, r3.Norm(r3.Sub(prev.point, first.point)))
	}
	return least
}

// nStations returns how many stations stations(l, p, e, closed) gives.
func nStations(l, p, e float64, closed bool) int {
	if closed {
		return max(int(math.Floor(l/p+1e-9)), 0)
	}
	free := l - 2*e
	if free < -1e-9 {
		return 0
	}
	return int(math.Floor(math.Max(free, 0)/p+1e-9)) + 1
}

// widen returns the welds of flange i, whose stations at pitch (end
// margin margin) break the rule of apart, spaced at the smallest pitch
// above that keeps them apart, and the spacing used; nil if none does.
//
// Whether welds stay apart is not monotonic in the pitch (the stations
// move against the mesh as the pitch changes: 16.5 mm may keep them
// apart where 17.5 does not), so the pitches are tried in rising order,
// not bisected: on a closed flange every count of stations below the
// one asked (each has a single layout); on an open one every pitch
// 1 per cent above the last and, for every count of stations, the
// pitch that spreads them over the whole length between the margins.
// The first that keeps them apart is refined by bisection against the
// last that did not. Since fewer stations come with every larger pitch,
// the smallest pitch found places the most welds (stations left empty
// counted out: a larger pitch is still tried while it could place more).
func (p *placer) widen(i int, pitch, margin float64) ([]weld, float64) {
	f := &p.set.Flanges[i]
	var free []facingAt
	if f.Match == joints.Congruent {
		free = p.facingAlong(i)
	}
	// try places the stations at pitch q, stopping at the first pair of
	// consecutive welds that is not apart.
	try := func(q float64) (ws []weld, used float64, live int, ok bool) {
		ss, used := stations(f.Length, q, margin, f.Closed)
		// No room for every station up front: most tries stop at the
		// first pair that is not apart, and a fine pitch asks for
		// thousands of stations per try.
		ws = make([]weld, 0, min(len(ss), 8))
		first, last := -1, -1
		for k, s := range ss {
			ws = append(ws, p.station(i, k+1, s))
			if ws[k].skip != "" {
				continue
			}
			if last >= 0 && !p.pairApart(f, free, &ws[last], &ws[k]) {
				return nil, used, 0, false
			}
			if first < 0 {
				first = k
			}
			last = k
			live++
		}
		if f.Closed && live > 2 && !p.pairApart(f, free, &ws[last], &ws[first]) {
			return nil, used, 0, false
		}
		return ws, used, live, true
	}
	var best []weld
	bestUsed, bestLive := 0.0, -1
	if f.Closed {
		for n := nStations(f.Length, pitch, margin, true) - 1; n >= 1 && n > bestLive; n-- {
			if ws, used, live, ok := try(f.Length / float64(n)); ok && live > bestLive {
				best, bestUsed, bestLive = ws, used, live
			}
		}
		return best, bestUsed
	}
	span := math.Max(f.Length-2*margin, 0)
	next := func(c float64) float64 {
		g := c * 1.01
		for k := nStations(f.Length, c, margin, false) - 1; k >= 1; k-- {
			if top := span / float64(k); top > c*(1+1e-9) {
				return math.Min(g, top) // k+1 stations over the whole span
			}
		}
		return math.Max(g, span*(1+1e-6)+1e-9) // a single station
	}
	prev, lo, hi := pitch, pitch, pitch
	for c := next(pitch); ; c = next(c) {
		n := nStations(f.Length, c, margin, false)
		if n <= bestLive {
			break
		}
		if ws, used, live, ok := try(c); ok && live > bestLive {
			best, bestUsed, bestLive = ws, used, live
			lo, hi = prev, c
		}
		prev = c
		if n <= 1 {
			break
		}
	}
	if best == nil {
		return nil, 0
	}
	for range 8 {
		mid := (lo + hi) / 2
		if ws, used, live, ok := try(mid); ok && live >= bestLive {
			hi, best, bestUsed, bestLive = mid, ws, used, live
		} else {
			lo = mid
		}
	}
	return best, bestUsed
}

// meshSize returns the median size of the host elements under the welds.
func (p *placer) meshSize(ws []weld) float64 {
	var xs []float64
	for _, w := range ws {
		for _, e := range w.touched {
			xs = append(xs, p.m.ElemSize(int(e)))
		}
	}
	return median(xs)
}

// apart reports whether consecutive welds of flange i keep the rule:
// no shared attachment element, and on a congruent flange a facing pair
// left free between them.
func (p *placer) apart(i int, ws []weld) bool {
	f := &p.set.Flanges[i]
	var live []*weld
	for k := range ws {
		if ws[k].skip == "" {
			live = append(live, &ws[k])
		}
	}
	if len(live) < 2 {
		return true
	}
	var free []facingAt
	if f.Match == joints.Congruent {
		free = p.facingAlong(i)
	}
	pairs := len(live) - 1
	if f.Closed && len(live) > 2 {
		pairs = len(live)
	}
	for k := range pairs {
		if !p.pairApart(f, free, live[k], live[(k+1)%len(live)]) {
			return false
		}
	}
	return true
}

// pairApart reports whether consecutive welds a and b of flange f keep
// the rule of apart; free are the flange's facing pairs along its
// centreline (congruent flanges).
func (p *placer) pairApart(f *joints.Flange, free []facingAt, a, b *weld) bool {
	if shareAny(a.touched, b.touched) {
		return false
	}
	return f.Match != joints.Congruent || freeBetween(free, a, b, f.Length, f.Closed)
}

// facingAt is a facing pair with its place along the centreline.
type facingAt struct {
	s    float64
	a, b int32
}

// facingAlong returns the facing pairs of flange i sorted by their s.
func (p *placer) facingAlong(i int) []facingAt {
	f := &p.set.Flanges[i]
	o := p.set.charts[i]
	out := make([]facingAt, len(f.Facing))
	for k, fp := range f.Facing {
		mid := r3.Scale(0.5, r3.Add(p.m.Coords[fp.A], p.m.Coords[fp.B]))
		s, _ := o.toCentre(mid)
		out[k] = facingAt{s, fp.A, fp.B}
	}
	slices.SortFunc(out, func(x, y facingAt) int { return cmp.Compare(x.s, y.s) })
	return out
}

// freeBetween reports whether a facing pair whose nodes neither weld
// uses lies between welds a and b along the centreline.
func freeBetween(free []facingAt, a, b *weld, length float64, closed bool) bool {
	lo, hi := a.s, b.s
	check := func(lo, hi float64) bool {
		i, _ := slices.BinarySearchFunc(free, lo, func(f facingAt, s float64) int { return cmp.Compare(f.s, s) })
		for ; i < len(free) && free[i].s < hi; i++ {
			fa := free[i]
			if fa.s <= lo {
				continue
			}
			if !has(a.attach, fa.a) && !has(a.attach, fa.b) && !has(b.attach, fa.a) && !has(b.attach, fa.b) {
				return true
			}
		}
		return false
	}
	if hi >= lo || !closed {
		return check(min(lo, hi), max(lo, hi))
	}
	return check(lo, length) || check(-1, hi) // round the seam of a ring
}

func has(xs []int32, v int32) bool {
	_, ok := slices.BinarySearch(xs, v)
	return ok
}

// shareAny reports whether two sorted lists have an element in common.
func shareAny(a, b []int32) bool {
	i, j := 0, 0
	for i < len(a) && j < len(b) {
		switch {
		case a[i] == b[j]:
			return true
		case a[i] < b[j]:
			i++
		default:
			j++
		}
	}
	return false
}

// sheetAt is one sheet of a stack at a weld point.
type sheetAt struct {
	part  int32
	proj  geom.Projection
	pos   float64 // where the axis meets the mid-surface (joints.AxisCrossing), as build's sheet Position
	thick float64
}

// station evaluates the weld at arc length s of flange i.
func (p *placer) station(i, k int, s float64) weld {
	f := &p.set.Flanges[i]
	o := p.set.charts[i]
	m := p.m
	c := p.set.Contacts
	w := weld{flange: i, station: k, s: s}
	q := o.point(s)
	w.point = q
	host, _ := m.PartIndex(f.Host)
	otherID := f.Parts[0]
	if otherID == f.Host {
		otherID = f.Parts[1]
	}
	other, _ := m.PartIndex(otherID)
	if !o.inside(s) {
		w.skip = "the centreline leaves the overlap here (a hole)"
		return w
	}
	pr, ok := p.x.ProjectNearest(q, 2*f.Contact+p.o.GapAllowanceFor(f.Thickness[0], f.Thickness[1]), func(e int) bool { return m.ElemPart[e] == host })
	if !ok {
		w.skip = fmt.Sprintf("part %d does not lie under the centreline here", f.Host)
		return w
	}
	rec, in := c.Probe(pr.Point, int32(pr.Elem), other)
	if !in {
		w.skip = fmt.Sprintf("parts %d and %d are not in contact at the centreline here", f.Parts[0], f.Parts[1])
		return w
	}
	w.point, w.axis = rec.Faying, rec.Axis
	// The stack: every sheet near-parallel to the axis over the point,
	// chained from the flange's two sheets while consecutive sheets are
	// in contact.
	// At the weld point as the joint list gives it to build (rounded), so
	// that the stack and its attachments are those build will find.
	sheets := p.sheetsAt(round6(w.point), w.axis)
	hi := slices.IndexFunc(sheets, func(x sheetAt) bool { return x.part == host })
	oi := slices.IndexFunc(sheets, func(x sheetAt) bool { return x.part == other })
	if hi < 0 || oi < 0 || hi-oi != 1 && oi-hi != 1 {
		w.skip = fmt.Sprintf("parts %d and %d do not lie next to each other in the stack here", f.Parts[0], f.Parts[1])
		return w
	}
	lo, up := min(hi, oi), max(hi, oi)
	// Consecutive sheets in contact: their gap square to the sheets
	// (joints.SquareGap, as build's gap-open and gap-closed judge it)
	// within the allowance of contact.
	inContact := func(a, b sheetAt) bool {
		gap := joints.SquareGap(b.pos-a.pos, a.thick, b.thick, a.proj.Normal, b.proj.Normal, w.axis)
		return math.Abs(gap-(a.thick+b.thick)/2) <= p.o.GapAllowanceFor(a.thick, b.thick)+joints.LengthRoundoff
	}
	for lo > 0 && inContact(sheets[lo-1], sheets[lo]) {
		lo--
	}
	for up+1 < len(sheets) && inContact(sheets[up], sheets[up+1]) {
		up++
	}
	stack := sheets[lo : up+1]
	for _, sh := range stack {
		w.parts = append(w.parts, m.Parts[sh.part].ID)
		w.thick = append(w.thick, sh.thick)
	}
	w.diameter = p.o.Rule.Diameter(joints.GoverningThickness(w.thick))
	edgeLimit := p.o.EdgeFactor * w.diameter
	w.outline = o.edgeDistance(s)
	w.sheetEdge = math.Inf(1)
	near := p.x.ElemsNear(w.point, 2*(f.Contact+float64(len(stack))*2)+2*edgeLimit, nil)
	for _, sh := range stack {
		ed := geom.FreeEdgeDistance(m, near, sh.proj.Point, sh.part, 2*edgeLimit)
		if sh.part != host && sh.part != other {
			if ed < edgeLimit-joints.LengthRoundoff {
				w.skip = fmt.Sprintf("a free edge of part %d, which also lies in the stack here, is %s mm from the weld (less than %s mm)",
					m.Parts[sh.part].ID, joints.MM(ed), joints.MM(edgeLimit))
				return w
			}
			continue
		}
		w.sheetEdge = math.Min(w.sheetEdge, ed)
	}
	// Attachments.
	att := p.o.AttachFor(f.ID)
	for _, sh := range stack {
		w.attach = append(w.attach, p.attachNodes(sh, att, w.diameter)...)
	}
	slices.Sort(w.attach)
	w.attach = slices.Compact(w.attach)
	for _, n := range w.attach {
		for _, e := range p.x.ElemsNear(m.Coords[n], 0, nil) {
			if slices.Contains(m.ElemNodes(int(e)), n) {
				w.touched = append(w.touched, e)
			}
		}
	}
	slices.Sort(w.touched)
	w.touched = slices.Compact(w.touched)
	return w
}

// sheetsAt returns, for every part with an element within reach of q
// whose normal lies within the angle limit of the axis and whose closest
// point lies near the axis line through q, that closest point, ordered
// along the axis by where the axis meets the sheet's mid-surface (the
// plane tangent at the closest point, as build places its sheets). The closest point is build's (geom.Index.ClosestPerPart:
// ties within geom.TieDistance to the lowest element id), so that a weld
// on an element edge has the host element, and the attachments, build
// will give it.
func (p *placer) sheetsAt(q, axis r3.Vec) []sheetAt {
	m := p.m
	cosLim := math.Cos(p.o.AngleLimit * math.Pi / 180)
	var out []sheetAt
	for _, pr := range p.x.ClosestPerPart(q, p.o.Reach) {
		pi := m.ElemPart[pr.Elem]
		if math.Abs(r3.Dot(pr.Normal, axis)) < cosLim {
			continue
		}
		v := r3.Sub(pr.Point, q)
		along := r3.Dot(v, axis)
		t := m.Thickness(pr.Elem)
		// Near the axis: within half the nugget radius of the thinnest
		// rule, as build holds its stacks.
		lat := r3.Norm(r3.Sub(v, r3.Scale(along, axis)))
		if lat > p.o.LateralFactor*p.o.Rule.Diameter(t)/2 {
			continue
		}
		off := m.Parts[pi].Surface.MidOffset(t)
		out = append(out, sheetAt{part: pi, proj: pr, pos: joints.AxisCrossing(v, pr.Normal, axis, off), thick: t})
	}
	slices.SortFunc(out, func(a, b sheetAt) int {
		return cmp.Or(cmp.Compare(a.pos, b.pos), cmp.Compare(m.Parts[a.part].ID, m.Parts[b.part].ID))
	})
	return out
}

// attachNodes returns the nodes a connector end on sheet sh is tied to
// with attachment a and nugget diameter d.
func (p *placer) attachNodes(sh sheetAt, a joints.Attach, d float64) []int32 {
	m := p.m
	switch a {
	case joints.NodePair:
		return []int32{joints.NearestNode(p.x, sh.proj.Point, sh.part, sh.proj.Elem)}
	case joints.Patch:
		return joints.PatchNodes(p.x, sh.proj.Point, sh.proj.Normal, sh.part, sh.proj.Elem, d/2)
	}
	return slices.Clone(m.ElemNodes(sh.proj.Elem))
}

// resolve drops welds of different flanges that clash: attachments
// sharing an element, or two sheets in common closer than the pitch or
// the minimum spacing. Flanges are taken narrowest first (a weld line
// on a strip before a station on a wide overlap), then the smaller
// area (both at 1e-6 mm, far below what tells two flanges apart and
// above the rounding of a model scaled to mm), then by the start of the
// centreline (cmpVec), and by part pair only between
// flanges alike in all of these: which of two flanges of one width
// through the same stack keeps the welds follows geometry, not the
// parts' ids (cmd/joinery TestFlangesRenumbered, "stack"). Welds go in
// station order. It marks the dropped welds and returns their findings.
func (p *placer) resolve(results [][]weld, pitches []float64) []joints.Finding {
	flanges := p.set.Flanges
	order := make([]int, len(flanges))
	for i := range order {
		order[i] = i
	}
	g := func(v float64) float64 { return math.Round(v / 1e-6) }
	slices.SortStableFunc(order, func(a, b int) int {
		fa, fb := &flanges[a], &flanges[b]
		return cmp.Or(cmp.Compare(g(fa.Width.Mean), g(fb.Width.Mean)), cmp.Compare(g(fa.Area), g(fb.Area)),
			cmpVec(fa.Centreline[0], fb.Centreline[0]))
	})
	reach := 0.0
	for i, ws := range results {
		reach = math.Max(reach, pitches[i])
		for _, w := range ws {
			if w.skip == "" {
				reach = math.Max(reach, math.Max(joints.MinSpacing(joints.GoverningThickness(w.thick), len(w.parts)), 4*w.diameter))
			}
		}
	}
	cell := math.Max(reach, 1)
	key := func(v r3.Vec) [3]int64 {
		return [3]int64{int64(math.Floor(v.X / cell)), int64(math.Floor(v.Y / cell)), int64(math.Floor(v.Z / cell))}
	}
	grid := map[[3]int64][]*weld{}
	var fs []joints.Finding
	for _, i := range order {
		for k := range results[i] {
			w := &results[i][k]
			if w.skip != "" {
				continue
			}
			c := key(w.point)
			var clash *weld
			why := ""
		search:
			for dx := int64(-1); dx <= 1; dx++ {
				for dy := int64(-1); dy <= 1; dy++ {
					for dz := int64(-1); dz <= 1; dz++ {
						for _, a := range grid[[3]int64{c[0] + dx, c[1] + dy, c[2] + dz}] {
							if shareAny(a.touched, w.touched) {
								clash, why = a, "its attachments would share an element with"
								break search
							}
							if a.flange == w.flange || commonSheets(a.parts, w.parts) < 2 {
								continue
							}
							lim := math.Max(math.Max(pitches[a.flange], pitches[w.flange]), math.Max(
								joints.MinSpacing(joints.GoverningThickness(a.thick), len(a.parts)),
								joints.MinSpacing(joints.GoverningThickness(w.thick), len(w.parts))))
							if d := r3.Norm(r3.Sub(a.point, w.point)); d < lim*(1-1e-9) {
								clash, why = a, fmt.Sprintf("it would lie %s mm (less than %s mm) from", joints.MM(d), joints.MM(lim))
								break search
							}
						}
					}
				}
			}
			if clash != nil {
				w.skip = fmt.Sprintf("%s weld %s, which joins the same sheets", why, joints.WeldID(flanges[clash.flange].ID, clash.station))
				w.dropped = true
				continue
			}
			grid[c] = append(grid[c], w)
		}
	}
	// Findings in flange order.
	for i := range results {
		f := &flanges[i]
		for _, w := range results[i] {
			if w.dropped {
				fs = append(fs, joints.Finding{Severity: joints.Info, Code: joints.CodeStationSkipped, Parts: []int64{f.Parts[0], f.Parts[1]},
					Message: fmt.Sprintf("station %d of flange %s left empty: %s", w.station, f.ID, w.skip), Point: w.point, HasPoint: true})
			}
		}
	}
	return fs
}

// commonSheets counts the parts two stacks share.
func commonSheets(a, b []int64) int {
	n := 0
	for _, x := range a {
		if slices.Contains(b, x) {
			n++
		}
	}
	return n
}

// when returns s if cond holds, else "".
func when(cond bool, s string) string {
	if cond {
		return s
	}
	return ""
}

// round6 rounds a point to 1e-6 mm, so that joint lists read cleanly
// (0.4, not 0.39999999999999997); the weld moves by less than a
// nanometre.
func round6(p r3.Vec) r3.Vec {
	r := func(v float64) float64 { return math.Round(v*1e6) / 1e6 }
	return r3.Vec{X: r(p.X), Y: r(p.Y), Z: r(p.Z)}
}
