package audit

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// Report is what an audit finds.
type Report struct {
	// Findings in the order of the checks (seam, duplicate, pitch-short,
	// free-part, mechanism, unrestrained), each check's sorted by its
	// first joint, then by parts.
	Findings   []joints.Finding
	Kinematics joints.Kinematics
}

// Severities of the audit's findings (documented in the README).
const (
	SeamSeverity         = joints.Warning
	DuplicateSeverity    = joints.Error
	PitchSeverity        = joints.Warning
	FreePartSeverity     = joints.Warning // analysts often load a sub-assembly on purpose
	MechanismSeverity    = joints.Error
	UnrestrainedSeverity = joints.Error // solvers stop on these
)

// weld is one weld as the set checks see it: a built connector, or an
// extra joint point given to check against.
type weld struct {
	id       string
	conn     *joints.Connector // nil for an extra joint point
	point    r3.Vec
	diameter float64    // nugget diameter, mm
	parts    []int64    // sheets: the stack's parts, or the parts near an extra point
	pairs    [][2]int64 // part pairs the weld joins (PairKey), unique
	spacing  float64    // minimum spacing for its stack, mm
	gov      float64    // governing thickness, mm
	// on holds the weld point's nearest point on each of its sheets
	// (where one was found), by part: distances between welds are
	// measured there, on the sheet they share.
	on []sheetPoint
	// off is the largest distance from point to a point of on, mm.
	off float64
}

// sheetPoint is a weld point's nearest point on one of its sheets.
type sheetPoint struct {
	part int64
	p    r3.Vec
}

// sheetDist returns the distance between welds a and b measured on the
// sheets of parts that both join: between their nearest points on the
// sheet, the least over those sheets, and the part it was measured on.
// Welds given at different heights through the stack (one on the
// faying surface, one at a mid-surface) are so judged by their spacing
// along the sheet. Without a nearest point on a common sheet it is the
// distance between the weld points (part 0).
func sheetDist(a, b *weld, parts []int64) (float64, int64) {
	best, on := math.Inf(1), int64(0)
	for _, part := range parts {
		pa, okA := pointOn(a, part)
		pb, okB := pointOn(b, part)
		if okA && okB {
			if d := r3.Norm(r3.Sub(pa, pb)); d < best {
				best, on = d, part
			}
		}
	}
	if on == 0 {
		return r3.Norm(r3.Sub(a.point, b.point)), 0
	}
	return best, on
}

func pointOn(w *weld, part int64) (r3.Vec, bool) {
	for _, s := range w.on {
		if s.part == part {
			return s.p, true
		}
	}
	return r3.Vec{}, false
}

// maxOff returns twice the largest weld's off: two welds at most d apart
// on a sheet they share lie at most d plus that apart.
func maxOff(ws []weld) float64 {
	off := 0.0
	for i := range ws {
		off = math.Max(off, ws[i].off)
	}
	return 2 * off
}

// Run audits the built connectors of conns (others are left out) and
// extra joint points (spot welds of joint lists, not built) against
// mesh m with options o (defaults resolved against m): seams, duplicates
// and short pitch among the welds and the extra points, free parts and
// the kinematic checks (mechanism, unrestrained) on the connectors. An
// extra point with the id of a connector is the same weld and is left
// out. The connectors' own findings are not repeated.
func Run(ctx context.Context, m *geom.Mesh, conns []joints.Connector, extra []joints.Joint, o joints.BuildOptions, prog geom.Progress) (*Report, error) {
	if prog == nil {
		prog = geom.NoProgress{}
	}
	if o.Reach <= 0 {
		o = o.Defaults(joints.MaxThickness(m)) // a pass over every element: only when needed
	}
	o = o.Defaults(0)
	prog.Start("checking the welds", 0)
	defer prog.Done()
	// The set checks and the assembly checks are independent: run them
	// side by side, and join their findings in a fixed order.
	type assembly struct {
		fs  []joints.Finding
		kin joints.Kinematics
	}
	ch := make(chan assembly, 1)
	go func() {
		// A part without elements (a mesh file may declare one) is not a
		// body: nothing of it can move, so it is never free nor a group
		// of its own.
		parts := make([]int64, 0, len(m.Parts))
		inUse := m.PartsInUse()
		for i, p := range m.Parts {
			if inUse[i] {
				parts = append(parts, p.ID)
			}
		}
		slices.Sort(parts)
		k := joints.NewConstraints(parts)
		for i := range conns {
			k.AddConnector(m, &conns[i])
		}
		area := partAreas(m)
		groups := Groups(k)
		byArea(groups, area)
		fs := freeParts(m, k, groups)
		kin, kinFs := kinematicSized(k, groups, area)
		ch <- assembly{append(fs, kinFs...), kin}
	}()
	welds, planFs := collectWelds(m, conns, extra, &o)
	rep := &Report{}
	dups, dupFs := duplicates(m, welds)
	seams, seamFs := findSeams(m, welds, dups)
	rep.Findings = append(rep.Findings, seamFs...)
	rep.Findings = append(rep.Findings, dupFs...)
	rep.Findings = append(rep.Findings, pitchShort(welds, dups, seams)...)
	rep.Findings = append(rep.Findings, planFs...)
	asm := <-ch
	rep.Findings = append(rep.Findings, asm.fs...)
	rep.Kinematics = asm.kin
	return rep, ctx.Err()
}

// partAreas returns the area of every part of m, mm², by part id.
func partAreas(m *geom.Mesh) map[int64]float64 {
	sum := make([]float64, len(m.Parts))
	for e := range m.NumElems() {
		sum[m.ElemPart[e]] += m.Area(e)
	}
	out := make(map[int64]float64, len(m.Parts))
	for i, p := range m.Parts {
		out[p.ID] = sum[i]
	}
	return out
}

// byArea orders groups of as many parts by their area, largest first
// (rounded, areaKey; ties keep Groups' order, by smallest part id), so
// that of two groups of two parts the larger is the main one whatever
// the ids.
func byArea(groups []Group, area map[int64]float64) {
	total := func(g *Group) float64 {
		a := 0.0
		for _, p := range g.Parts {
			a += area[p]
		}
		return areaKey(a)
	}
	slices.SortStableFunc(groups, func(a, b Group) int {
		if len(a.Parts) != len(b.Parts) {
			return cmp.Compare(len(b.Parts), len(a.Parts))
		}
		return cmp.Compare(total(&b), total(&a))
	})
}

// collectWelds returns the welds to check, sorted by id: the built spot
// connectors and the extra points whose ids no connector has, with the
// findings of extra points that lie on fewer than two sheets.
func collectWelds(m *geom.Mesh, conns []joints.Connector, extra []joints.Joint, o *joints.BuildOptions) ([]weld, []joints.Finding) {
	ws := make([]weld, 0, len(conns)+len(extra))
	ids := make(map[string]bool, len(conns))
	for i := range conns {
		c := &conns[i]
		ids[c.Joint.ID] = true
		if c.Status == joints.NotBuilt || c.Joint.Kind != joints.Spot || len(c.Stack.Sheets) < 2 {
			continue
		}
		w := weld{id: c.Joint.ID, conn: c, point: c.Joint.Point, diameter: c.Diameter, parts: c.Stack.Parts()}
		for _, s := range c.Stack.Sheets {
			w.on = append(w.on, sheetPoint{s.Part, s.Proj.Point})
			w.off = math.Max(w.off, r3.Norm(r3.Sub(s.Proj.Point, w.point)))
		}
		for _, l := range c.Links {
			w.pairs = appendPair(w.pairs, joints.PairKey(c.Stack.Sheets[l.From].Part, c.Stack.Sheets[l.To].Part))
		}
		w.gov = joints.GoverningThickness(c.Stack.Thicknesses())
		w.spacing = joints.MinSpacing(w.gov, len(c.Stack.Sheets))
		if !(w.diameter > 0) {
			w.diameter = o.Rule.Diameter(w.gov)
		}
		ws = append(ws, w)
	}
	var pts []*joints.Joint
	for i := range extra {
		if j := &extra[i]; j.Kind == joints.Spot && !ids[j.ID] {
			pts = append(pts, j)
		}
	}
	var fs []joints.Finding
	if len(pts) > 0 {
		var more []weld
		more, fs = extraWelds(m, pts, o)
		ws = append(ws, more...)
	}
	slices.SortStableFunc(ws, func(a, b weld) int { return joints.CompareIDs(a.id, b.id) })
	return ws, fs
}

// extraWelds makes the welds of extra joint points: the parts they list,
// else the parts with an element within reach of the point; with the
// point's nearest point on each of those parts within reach. A point
// with fewer than two of them would join nothing: a no-sheet or
// single-sheet error, as its build would give.
func extraWelds(m *geom.Mesh, js []*joints.Joint, o *joints.BuildOptions) ([]weld, []joints.Finding) {
	pts := make([]r3.Vec, len(js))
	for i, j := range js {
		pts[i] = j.Point
	}
	x := geom.NewIndexNear(m, pts, 1.01*o.Reach, false)
	out := make([]weld, 0, len(js))
	var fs []joints.Finding
	var buf []int32
	for _, j := range js {
		w := weld{id: j.ID, point: j.Point, parts: slices.Clone(j.Parts)}
		listed := len(w.parts) > 0
		var near []geom.Projection // the nearest point of each part, in the order first met
		buf = x.ElemsNear(j.Point, o.Reach, buf[:0])
		for _, e := range buf {
			p := m.Parts[m.ElemPart[e]].ID
			if listed && !slices.Contains(w.parts, p) {
				continue
			}
			pr := m.Project(int(e), j.Point)
			if pr.Dist > o.Reach {
				continue
			}
			k := slices.IndexFunc(w.on, func(s sheetPoint) bool { return s.part == p })
			switch {
			case k < 0:
				w.on = append(w.on, sheetPoint{p, pr.Point})
				near = append(near, pr)
				if !listed {
					w.parts = append(w.parts, p)
				}
			case pr.Dist < near[k].Dist || pr.Dist == near[k].Dist && pr.Elem < near[k].Elem:
				w.on[k].p, near[k] = pr.Point, pr
			}
		}
		for _, pr := range near {
			w.off = math.Max(w.off, pr.Dist)
		}
		if n := len(w.on); n < 2 {
			fs = append(fs, planFinding(j, w.on, o.Reach))
		}
		slices.Sort(w.parts)
		var ts []float64
		for _, p := range w.parts {
			if pi, ok := m.PartIndex(p); ok {
				ts = append(ts, m.Parts[pi].Thickness)
			}
		}
		for a := range w.parts {
			for b := a + 1; b < len(w.parts); b++ {
				w.pairs = appendPair(w.pairs, joints.PairKey(w.parts[a], w.parts[b]))
			}
		}
		w.gov = joints.GoverningThickness(ts)
		w.spacing = joints.MinSpacing(w.gov, len(ts))
		w.diameter = j.Diameter
		if !(w.diameter > 0) && w.gov > 0 {
			w.diameter = o.Rule.Diameter(w.gov)
		}
		if len(ts) < 2 {
			w.spacing = 0 // no stack: nothing to say about its pitch
		}
		out = append(out, w)
	}
	return out, fs
}

// planFinding is the error of a planned point that lies on fewer than
// two sheets (those it lists, else any) within reach.
func planFinding(j *joints.Joint, on []sheetPoint, reach float64) joints.Finding {
	which := "sheet"
	if len(j.Parts) > 0 {
		which = "listed part"
	}
	if len(on) == 0 {
		return j.Finding(joints.Error, joints.CodeNoSheet, slices.Clone(j.Parts),
			fmt.Sprintf("planned point %s: no %s within %s mm: it would join nothing, and its spacing is judged against no sheet", j.ID, which, joints.MM(reach)))
	}
	return j.Finding(joints.Error, joints.CodeSingleSheet, []int64{on[0].part},
		fmt.Sprintf("planned point %s: only part %d among the %ss within %s mm: nothing to join", j.ID, on[0].part, which, joints.MM(reach)))
}

func appendPair(ps [][2]int64, p [2]int64) [][2]int64 {
	if slices.Contains(ps, p) {
		return ps
	}
	return append(ps, p)
}

// sharedParts returns the parts a and b have in common, sorted.
func sharedParts(a, b *weld) []int64 {
	var out []int64
	for _, p := range a.parts {
		if slices.Contains(b.parts, p) {
			out = append(out, p)
		}
	}
	slices.Sort(out)
	return out
}

// grid is a hash of points by cells of a given size, for neighbour
// queries among welds.
type grid struct {
	size  float64
	cells map[[3]int64][]int32
}

func newGrid(size float64, n int) *grid {
	if !(size > 0) || math.IsInf(size, 0) {
		size = 1
	}
	return &grid{size: size, cells: make(map[[3]int64][]int32, n)}
}

func (g *grid) key(p r3.Vec) [3]int64 {
	f := func(v float64) int64 { return int64(math.Floor(v / g.size)) }
	return [3]int64{f(p.X), f(p.Y), f(p.Z)}
}

func (g *grid) add(i int32, p r3.Vec) {
	k := g.key(p)
	g.cells[k] = append(g.cells[k], i)
}

// near appends to dst the items in the 27 cells around p (every item
// within g.size of p is among them), in increasing order.
func (g *grid) near(p r3.Vec, dst []int32) []int32 {
	k := g.key(p)
	for dx := int64(-1); dx <= 1; dx++ {
		for dy := int64(-1); dy <= 1; dy++ {
			for dz := int64(-1); dz <= 1; dz++ {
				dst = append(dst, g.cells[[3]int64{k[0] + dx, k[1] + dy, k[2] + dz}]...)
			}
		}
	}
	slices.Sort(dst)
	return dst
}

// pairOf orders two weld indices.
func pairOf(a, b int32) [2]int32 {
	if a > b {
		a, b = b, a
	}
	return [2]int32{a, b}
}

// sortFindings orders one check's findings by first joint, then parts.
func sortFindings(fs []joints.Finding) {
	slices.SortStableFunc(fs, func(a, b joints.Finding) int {
		ja, jb := a.AllJoints(), b.AllJoints()
		switch {
		case len(ja) > 0 && len(jb) > 0:
			if c := joints.CompareIDs(ja[0], jb[0]); c != 0 {
				return c
			}
		case len(ja) > 0:
			return -1
		case len(jb) > 0:
			return 1
		}
		return slices.Compare(a.Parts, b.Parts)
	})
}

// vec formats a point for messages.
func vec(p r3.Vec) string {
	return fmt.Sprintf("(%s, %s, %s)", joints.MM(p.X), joints.MM(p.Y), joints.MM(p.Z))
}

// partList formats part ids for messages: "100", "100 and 200", "100,
// 200 and 300".
func partList(ps []int64) string {
	s := make([]string, len(ps))
	for i, p := range ps {
		s[i] = fmt.Sprint(p)
	}
	return wordList(s)
}

// partsWord formats part ids with their noun: "part 100", "parts 100
// and 200".
func partsWord(ps []int64) string {
	if len(ps) == 1 {
		return "part " + partList(ps)
	}
	return "parts " + partList(ps)
}

// plural returns "1 connector" or "n connectors".
func plural(n int, word string) string {
	if n == 1 {
		return "1 " + word
	}
	return fmt.Sprintf("%d %ss", n, word)
}

// wordList joins words with commas and a final "and".
func wordList(s []string) string {
	switch len(s) {
	case 0:
		return ""
	case 1:
		return s[0]
	}
	out := ""
	for i, w := range s {
		switch {
		case i == 0:
		case i == len(s)-1:
			out += " and "
		default:
			out += ", "
		}
		out += w
	}
	return out
}

// idList formats joint ids for messages, cut after limit with a count.
func idList(ids []string, limit int) string {
	if len(ids) <= limit {
		return wordList(ids)
	}
	return wordList(append(slices.Clone(ids[:limit]), fmt.Sprintf("%d more", len(ids)-limit)))
}

// sortIDs sorts joint ids in natural order and drops repeats.
func sortIDs(ids []string) []string {
	slices.SortFunc(ids, joints.CompareIDs)
	return slices.Compact(ids)
}
