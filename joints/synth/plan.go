package synth

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// kind is the kind of an assembly; see the package documentation.
type kind int8

const (
	kindRail kind = iota
	kindBox
	kindLap
	kindAngle
)

// Layout constants, mm.
const (
	endMargin  = 12.0 // weld station to the end of any sheet of its stack
	doublerGap = 4.0  // doubler end to the end of the flange it sits on
	elemsPerAs = 10_000
	// stripNeed is the flat width the link plate to the next assembly
	// needs at each side of an assembly (linkReach, plus 5 mm to the
	// nearest other sheet); where the outermost sheet has less bare
	// width, a strip continues it in its plane.
	stripNeed = linkReach + 5
)

// strip returns the width of the strip that must continue a sheet whose
// bare flat width at the side is bare.
func strip(bare float64) float64 { return math.Max(0, stripNeed-bare) }

// pt is a point of a cross-section: y across, z normal to the flanges.
type pt struct{ y, z float64 }

// partPlan is one sheet: a cross-section polyline extruded along x.
type partPlan struct {
	id       int64
	name     string
	material string
	t        float64 // thickness, mm
	prof     []pt
	x0, x1   float64
	h        float64 // element size, mm
	tri      float64 // share of quads split into two triangles
	flip     bool    // reverse the element normals
}

// segPlan is a stretch of weld line with one stack of sheets.
type segPlan struct {
	y, z   float64 // local position of the line (z: mid-way between the outer sheets)
	x0, x1 float64 // first and last possible station along x
	stack  []int   // indices into the assembly's parts, in +z order
	flange float64 // width of the faying flange, mm
	group  string
}

// doubler is a flat doubler on top of one flange of a rail or box.
type doubler struct {
	line    int     // 0 left, 1 right
	frac    float64 // share of the flange length it covers
	atStart bool
	t, h    float64
	flip    bool
}

// spec holds the random draws of one assembly; layout turns them into
// sheets and weld lines for a width scale and a length.
type spec struct {
	kind  kind
	name  string
	base  int64   // part ids are base+1, base+2, ...
	r     float64 // length factor
	f     float64 // flange width, mm (not scaled)
	b0    float64 // rail/box: width between the flanges (scaled)
	h0    float64 // rail/box: height (scaled); angle: leg height
	h1    float64 // box: height of the lower hat (scaled)
	slope float64 // rail/box: web offset per unit height
	e0    float64 // floor/panel overhang beyond the flange (scaled)
	w1    float64 // lap: panel widths (scaled)
	w2    float64
	ext   [4]float64 // x overhang of the base sheet at each end, as a share of L
	t     [2]float64 // thicknesses of the two main sheets
	h     [2]float64 // element sizes of the two main sheets
	tri   [2]float64
	flip  [2]bool
	mat   [2]string
	dbl   []doubler
	lines int
}

// edge is the outer end of the strip on one side of an assembly, in
// its local frame: the sheet it ends (index into parts), where.
type edge struct {
	sheet int
	y, z  float64
}

// asmPlan is a sized assembly with its placement.
type asmPlan struct {
	spec  *spec
	parts []partPlan
	segs  []segPlan
	edges [2]edge       // left (outward -y) and right (outward +y)
	tilt  float64       // rotation about the local x axis, radians
	rot   [3][3]float64 // local to global rotation
	ctr   [3]float64    // local point placed at pos
	pos   [3]float64
}

func pick[T any](rng *rand.Rand, xs ...T) T { return xs[rng.IntN(len(xs))] }

func uniform(rng *rand.Rand, lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }

func material(t float64) string {
	switch {
	case t <= 1.0:
		return "DC04"
	case t <= 1.5:
		return "HC340LA"
	}
	return "DP600"
}

// newSpecs draws the assemblies of a model.
func newSpecs(cfg Config, rng *rand.Rand) []*spec {
	n := max(1, (cfg.Elements+elemsPerAs/2)/elemsPerAs)
	specs := make([]*spec, n)
	h := cfg.ElementSize
	for a := range specs {
		s := &spec{base: int64(100 * (a + 1)), r: uniform(rng, 0.7, 1.3)}
		switch u := rng.Float64(); {
		case u < 0.35:
			s.kind, s.name, s.lines = kindRail, fmt.Sprintf("rail-%03d", a+1), 2
		case u < 0.6:
			s.kind, s.name, s.lines = kindBox, fmt.Sprintf("sill-%03d", a+1), 2
		case u < 0.8:
			s.kind, s.name, s.lines = kindLap, fmt.Sprintf("lap-%03d", a+1), 1
		default:
			s.kind, s.name, s.lines = kindAngle, fmt.Sprintf("angle-%03d", a+1), 1
		}
		if n == 1 {
			// A lone assembly is a rail on a floor: it has every feature.
			s.kind, s.name, s.lines = kindRail, "rail-001", 2
		}
		s.f = uniform(rng, 20, 26)
		s.b0 = uniform(rng, 60, 120)
		s.h0 = uniform(rng, 40, 90)
		s.h1 = uniform(rng, 30, 70)
		s.slope = uniform(rng, 0.1, 0.3)
		s.e0 = uniform(rng, 40, 120)
		s.w1 = uniform(rng, 100, 300)
		s.w2 = uniform(rng, 100, 300)
		for i := range s.ext {
			s.ext[i] = uniform(rng, 0.01, 0.08)
		}
		switch s.kind {
		case kindRail:
			s.t = [2]float64{pick(rng, 0.7, 0.8, 1.0), pick(rng, 1.0, 1.2, 1.5, 2.0)}
		case kindBox:
			s.t = [2]float64{pick(rng, 1.0, 1.2, 1.5, 2.0), pick(rng, 0.8, 1.0, 1.2, 1.5)}
		case kindLap:
			s.t = [2]float64{pick(rng, 0.7, 0.8, 1.0, 1.2, 1.5, 2.0), pick(rng, 0.7, 0.8, 1.0, 1.2, 1.5, 2.0)}
		case kindAngle:
			s.f = uniform(rng, 28, 40)
			s.h0 = uniform(rng, 30, 80)
			s.t = [2]float64{pick(rng, 0.7, 0.8, 1.0, 1.2), pick(rng, 1.5, 2.0)}
		}
		for j := range 2 {
			s.h[j] = h * uniform(rng, 0.85, 1.15)
			if rng.Float64() < 0.4 {
				s.tri[j] = uniform(rng, 0.01, 0.04)
			}
			s.flip[j] = rng.Float64() < 0.3
			s.mat[j] = material(s.t[j])
		}
		specs[a] = s
	}
	addDoublers(specs, rng, h)
	return specs
}

// addDoublers puts doublers on rail and box flanges, in random order, until
// about a tenth of the weld line length (weighted by the length factors)
// runs through three sheets.
func addDoublers(specs []*spec, rng *rand.Rand, h float64) {
	type cand struct {
		s    *spec
		line int
	}
	var (
		cands []cand
		total float64
	)
	for _, s := range specs {
		total += float64(s.lines) * s.r
		if s.kind == kindRail || s.kind == kindBox {
			cands = append(cands, cand{s, 0}, cand{s, 1})
		}
	}
	rng.Shuffle(len(cands), func(i, j int) { cands[i], cands[j] = cands[j], cands[i] })
	var three float64
	for _, c := range cands {
		if three >= 0.1*total {
			break
		}
		d := doubler{
			line:    c.line,
			frac:    uniform(rng, 0.25, 0.5),
			atStart: rng.IntN(2) == 0,
			t:       pick(rng, 1.2, 1.5, 2.0),
			h:       h * uniform(rng, 0.85, 1.15),
			flip:    rng.Float64() < 0.3,
		}
		c.s.dbl = append(c.s.dbl, d)
		three += d.frac * c.s.r
	}
}

// layout returns the sheets and weld segments of s for width scale c and
// length L (the length of the flanges carrying the welds), in the
// assembly's local frame, and the outer ends of its two side strips
// (each outermost sheet continued by stripWidth mm in its plane).
func (s *spec) layout(c, L float64) ([]partPlan, []segPlan, [2]edge) {
	F := s.f
	sheet := func(j int, suffix string, prof []pt, x0, x1 float64) partPlan {
		return partPlan{
			id: s.base + int64(j) + 1, name: s.name + suffix, material: s.mat[j], t: s.t[j],
			prof: prof, x0: x0, x1: x1, h: s.h[j], tri: s.tri[j], flip: s.flip[j],
		}
	}
	long0, long1 := -s.ext[0]*L, L*(1+s.ext[1])
	var (
		parts []partPlan
		segs  []segPlan
		edges [2]edge
	)
	// Hat flanges for rails and boxes; lines at y = -/+(B/2 + F/2).
	hat := func(z, height float64) []pt {
		B := c * s.b0
		off := s.slope * height
		if height < 0 {
			off = -off
		}
		return []pt{{-B/2 - F, z}, {-B / 2, z}, {-B/2 + off, z + height}, {B/2 - off, z + height}, {B / 2, z}, {B/2 + F, z}}
	}
	switch s.kind {
	case kindRail, kindBox:
		B := c * s.b0
		zf := (s.t[0] + s.t[1]) / 2
		if s.kind == kindRail {
			E := c * s.e0
			S := strip(E)
			parts = append(parts,
				sheet(0, "-floor", []pt{{-B/2 - F - E - S, 0}, {B/2 + F + E + S, 0}}, long0, long1),
				sheet(1, "-rail", hat(zf, c*s.h0), 0, L))
			edges = [2]edge{{0, -B/2 - F - E - S, 0}, {0, B/2 + F + E + S, 0}}
		} else {
			// The inner hat's flanges run on beyond the outer's as the strips.
			S := strip(0)
			inner := hat(0, -c*s.h1)
			inner[0].y -= S
			inner[len(inner)-1].y += S
			parts = append(parts,
				sheet(0, "-inner", inner, long0, long1),
				sheet(1, "-outer", hat(zf, c*s.h0), -s.ext[2]*L, L*(1+s.ext[3])))
			edges = [2]edge{{0, -B/2 - F - S, 0}, {0, B/2 + F + S, 0}}
		}
		side := [2]string{"-left", "-right"}
		for line := range 2 {
			y := (B/2 + F/2) * float64(2*line-1)
			two := segPlan{y: y, z: zf / 2, stack: []int{0, 1}, flange: F, group: s.name + side[line]}
			var d *doubler
			for i := range s.dbl {
				if s.dbl[i].line == line {
					d = &s.dbl[i]
				}
			}
			if d == nil {
				two.x0, two.x1 = endMargin, L-endMargin
				segs = append(segs, two)
				continue
			}
			xa, xb := doublerGap, doublerGap+d.frac*L
			if !d.atStart {
				xa, xb = L-doublerGap-d.frac*L, L-doublerGap
			}
			zd := zf + (s.t[1]+d.t)/2
			w := F - 2
			parts = append(parts, partPlan{
				id: s.base + int64(len(parts)) + 1, name: s.name + side[line] + "-doubler", material: material(d.t), t: d.t,
				prof: []pt{{y - w/2, zd}, {y + w/2, zd}}, x0: xa, x1: xb, h: d.h, flip: d.flip,
			})
			three := segPlan{y: y, z: zd / 2, stack: []int{0, 1, len(parts) - 1}, flange: w, group: two.group,
				x0: xa + endMargin, x1: xb - endMargin}
			before, after := two, two
			before.x0, before.x1 = endMargin, xa-endMargin
			after.x0, after.x1 = xb+endMargin, L-endMargin
			segs = append(segs, before, three, after)
		}
	case kindLap:
		zf := (s.t[0] + s.t[1]) / 2
		S1, S2 := strip(c*s.w1-F/2), strip(c*s.w2-F/2)
		parts = append(parts,
			sheet(0, "-a", []pt{{-c*s.w1 - S1, 0}, {F / 2, 0}}, long0, long1),
			sheet(1, "-b", []pt{{-F / 2, zf}, {c*s.w2 + S2, zf}}, 0, L))
		segs = append(segs, segPlan{z: zf / 2, x0: endMargin, x1: L - endMargin, stack: []int{0, 1}, flange: F, group: s.name})
		edges = [2]edge{{0, -c*s.w1 - S1, 0}, {1, c*s.w2 + S2, zf}}
	case kindAngle:
		zf := (s.t[0] + s.t[1]) / 2
		W := F/2 + c*s.e0
		S := strip(c * s.e0)
		parts = append(parts,
			sheet(0, "-panel", []pt{{-W - S, 0}, {W + S, 0}}, long0, long1),
			sheet(1, "-angle", []pt{{-F / 2, zf + c*s.h0}, {-F / 2, zf}, {F / 2, zf}}, 0, L))
		segs = append(segs, segPlan{z: zf / 2, x0: endMargin, x1: L - endMargin, stack: []int{0, 1}, flange: F, group: s.name})
		edges = [2]edge{{0, -W - S, 0}, {0, W + S, 0}}
	}
	return parts, segs, edges
}

// divisions returns the number of elements of p along x and along each
// segment of its cross-section.
func (p *partPlan) divisions(ns []int) (int, []int) {
	ns = ns[:0]
	for k := 1; k < len(p.prof); k++ {
		ns = append(ns, divs(math.Hypot(p.prof[k].y-p.prof[k-1].y, p.prof[k].z-p.prof[k-1].z), p.h))
	}
	return divs(p.x1-p.x0, p.h), ns
}

func divs(length, h float64) int {
	n := math.Round(length / h)
	if !(n >= 1) {
		return 1
	}
	if n > 1e7 {
		return 1e7
	}
	return int(n)
}

// estimate returns the expected element count of parts and the length of
// weld line in segs usable at the given pitch.
func estimate(parts []partPlan, segs []segPlan, pitch float64) (elems, stations float64) {
	var ns []int
	for i := range parts {
		nx, n := parts[i].divisions(ns)
		ns = n
		tot := 0
		for _, k := range n {
			tot += k
		}
		elems += float64(nx*tot) * (1 + parts[i].tri)
	}
	for _, sg := range segs {
		if l := sg.x1 - sg.x0; l >= 0 {
			stations += l/pitch + 1
		}
	}
	return elems, stations
}

// sizeModel finds the width scale c and the length unit lambda (assembly a
// has length lambda*r_a) so that the element count hits cfg.Elements and
// the weld lines hold the joints at a pitch near 32.5 mm, and lays out
// every assembly.
func sizeModel(cfg Config, specs []*spec) []*asmPlan {
	const (
		cmin, cmax  = 0.3, 4.0
		targetPitch = 32.5
	)
	target := float64(cfg.Elements)
	links := float64(linkCount(cfg, len(specs)))
	total := func(c, lambda float64) (elems, stations float64) {
		for _, s := range specs {
			p, g, _ := s.layout(c, lambda*s.r)
			e, st := estimate(p, g, targetPitch)
			elems += e
			stations += st
		}
		return elems + links*linkElements(cfg.ElementSize), stations
	}
	// lambdaFor solves total(c, lambda) = target for lambda, refining on
	// the rounded element counts.
	lambdaFor := func(c float64) (float64, float64) {
		lambda := 500.0
		var st float64
		for range 6 {
			e, s := total(c, lambda)
			st = s
			if e <= 0 {
				break
			}
			lambda *= target / e
		}
		return lambda, st
	}
	c := 1.0
	if need := float64(cfg.Welds - linkWelds*linkCount(cfg, len(specs)) + 3*cfg.Bolts); need > 0 {
		// Stations fall as c grows: bisect for the c that gives need.
		lo, hi := cmin, cmax
		if _, st := lambdaFor(lo); st <= need {
			c = lo
		} else if _, st := lambdaFor(hi); st >= need {
			c = hi
		} else {
			for range 30 {
				mid := (lo + hi) / 2
				if _, st := lambdaFor(mid); st >= need {
					lo = mid
				} else {
					hi = mid
				}
			}
			c = lo
		}
	}
	lambda, _ := lambdaFor(c)
	asms := make([]*asmPlan, len(specs))
	for i, s := range specs {
		parts, segs, edges := s.layout(c, lambda*s.r)
		asms[i] = &asmPlan{spec: s, parts: parts, segs: segs, edges: edges}
	}
	return asms
}
