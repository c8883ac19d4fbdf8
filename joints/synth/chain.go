package synth

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Chain constants, mm and radians.
const (
	// linkWelds is the number of spot welds of one link: three on each
	// side, in a triangle, so that even welds that couple translations
	// only hold the link plate rigidly to each assembly.
	linkWelds = 6
	// foldOffset is the distance from each side strip's end to the fold
	// of the link plate between them.
	foldOffset = 20.0
	// linkSide, linkInner: the welds of a side lie linkSide mm inside the
	// strip's end (two of them, 2*linkHalf apart along x) and linkInner
	// mm inside it (the third, 25 mm from the other two: car-body pitch,
	// common practice); the plate reaches linkReach mm inside.
	linkSide  = 9.0
	linkInner = 24.0
	linkHalf  = 20.0
	linkReach = linkInner + 9
	// linkEdge is the least distance from a link weld to the x ends of the
	// sheets of its stack, and linkPlateEnd that to the plate's x ends.
	linkEdge     = endMargin
	linkPlateEnd = 9.0
	// maxTilt bounds an assembly's tilt about the chain axis; maxTiltStep
	// the tilt between neighbours.
	maxTilt     = 25 * math.Pi / 180
	maxTiltStep = 10 * math.Pi / 180
)

// linkCount returns the number of links between the n assemblies of
// cfg: every consecutive pair, as long as the links take at most half of
// the spot welds.
func linkCount(cfg Config, n int) int {
	return max(0, min(n-1, cfg.Welds/(2*linkWelds)))
}

// linkElements estimates the elements of one link plate for a nominal
// element size h.
func linkElements(h float64) float64 {
	if h == 0 {
		h = DefaultElementSize
	}
	x := 2 * (linkHalf + linkPlateEnd)
	y := 2 * (linkReach + foldOffset)
	return math.Round(x/h) * math.Round(y/h)
}

// linkPlan is one link: a bent plate under the right strip of assembly
// a and the left strip of assembly b, welded to each.
type linkPlan struct {
	a, b  *asmPlan
	plate int     // index of the plate in a.parts
	xm    float64 // middle of the welds along x
}

// place sets every assembly in the chain and adds the link plates: the
// assemblies lie side by side along the chain's y axis, each tilted
// about its own x axis (a bounded random walk, so that the chain never
// curls back on itself), each one's left strip facing the previous
// one's right strip with 2*foldOffset mm between them, and the whole
// chain is turned by one random rotation. It returns the links.
func place(cfg Config, asms []*asmPlan, rng *rand.Rand) []linkPlan {
	global := randomRotation(rng)
	tilt := uniform(rng, -maxTilt, maxTilt)
	for i, a := range asms {
		if i > 0 {
			tilt = math.Max(-maxTilt, math.Min(maxTilt, tilt+uniform(rng, -maxTiltStep, maxTiltStep)))
		}
		a.tilt = tilt
	}
	nLinks := linkCount(cfg, len(asms))
	var links []linkPlan
	// ty, tz: the translation of each assembly's local origin in the
	// chain frame.
	ty, tz := 0.0, 0.0
	for i, a := range asms {
		if i > 0 {
			prev := asms[i-1]
			// At most 1.2 mm: the governing thickness of a link weld then
			// asks for at most 21.4 mm of spacing (resistance welding
			// manufacturers' table), under the welds' 25 mm.
			tp := pick(rng, 0.8, 1.0, 1.2)
			h := cfg.ElementSize * uniform(rng, 0.85, 1.15)
			flip := rng.Float64() < 0.3
			re, le := prev.edges[1], a.edges[0]
			da := (prev.parts[re.sheet].t + tp) / 2
			db := (a.parts[le.sheet].t + tp) / 2
			// The fold, in the chain frame: beyond prev's right strip, on
			// the plate's offset line below it.
			fy, fz := prev.chain(re.y+foldOffset, re.z-da)
			// a's left strip end lies foldOffset beyond the fold along a's
			// own +y, db above the plate's line along a's normal.
			c, s := math.Cos(a.tilt), math.Sin(a.tilt)
			ey := fy + foldOffset*c - db*s
			ez := fz + foldOffset*s + db*c
			ly, lz := c*le.y-s*le.z, s*le.y+c*le.z
			ty, tz = ey-ly, ez-lz
			a.pos = [3]float64{0, ty, tz}
			if len(links) < nLinks {
				if l, ok := addLink(prev, a, tp, h, flip); ok {
					links = append(links, l)
				}
			}
		}
		a.pos = [3]float64{0, ty, tz}
	}
	for _, a := range asms {
		c, s := math.Cos(a.tilt), math.Sin(a.tilt)
		tiltM := [3][3]float64{{1, 0, 0}, {0, c, -s}, {0, s, c}}
		a.rot = mul3(global, tiltM)
		a.pos = apply3(global, a.pos)
		a.ctr = [3]float64{}
	}
	return links
}

// chain maps a local (y, z) of a to the chain frame, before the global
// rotation.
func (a *asmPlan) chain(y, z float64) (float64, float64) {
	c, s := math.Cos(a.tilt), math.Sin(a.tilt)
	return c*y - s*z + a.pos[1], s*y + c*z + a.pos[2]
}

// addLink adds the plate linking a's right strip to b's left strip to
// a's parts, when both strips run along enough common length for the
// welds.
func addLink(a, b *asmPlan, tp, h float64, flip bool) (linkPlan, bool) {
	re, le := a.edges[1], b.edges[0]
	sa, sb := &a.parts[re.sheet], &b.parts[le.sheet]
	x0, x1 := math.Max(sa.x0, sb.x0), math.Min(sa.x1, sb.x1)
	if x1-x0 < 2*(linkHalf+linkEdge)+10 {
		return linkPlan{}, false
	}
	xm := (x0 + x1) / 2
	da := (sa.t + tp) / 2
	// b's +y in a's frame.
	phi := b.tilt - a.tilt
	fy, fz := re.y+foldOffset, re.z-da
	prof := []pt{
		{re.y - linkReach, re.z - da},
		{fy, fz},
		{fy + (foldOffset+linkReach)*math.Cos(phi), fz + (foldOffset+linkReach)*math.Sin(phi)},
	}
	id := a.spec.base + int64(len(a.parts)) + 1
	a.parts = append(a.parts, partPlan{
		id: id, name: fmt.Sprintf("%s-link", a.spec.name), material: material(tp), t: tp, prof: prof,
		x0: xm - linkHalf - linkPlateEnd, x1: xm + linkHalf + linkPlateEnd, h: h, flip: flip,
	})
	return linkPlan{a: a, b: b, plate: len(a.parts) - 1, xm: xm}, true
}

// sides returns a link's welds: per side, the assembly, the local
// points and the stack (plate first: it lies below the strip).
func (l *linkPlan) sides() [2]struct {
	asm    *asmPlan
	points [3][3]float64
	stack  []int64
	ts     []float64
} {
	var out [2]struct {
		asm    *asmPlan
		points [3][3]float64
		stack  []int64
		ts     []float64
	}
	plate := &l.a.parts[l.plate]
	for k, side := range [2]struct {
		asm  *asmPlan
		e    edge
		sign float64 // inward direction along local y
	}{{l.a, l.a.edges[1], -1}, {l.b, l.b.edges[0], 1}} {
		sheet := &side.asm.parts[side.e.sheet]
		z := side.e.z - (sheet.t+plate.t)/4
		y1, y2 := side.e.y+side.sign*linkSide, side.e.y+side.sign*linkInner
		out[k].asm = side.asm
		out[k].points = [3][3]float64{{l.xm - linkHalf, y1, z}, {l.xm + linkHalf, y1, z}, {l.xm, y2, z}}
		out[k].stack = []int64{plate.id, sheet.id}
		out[k].ts = []float64{plate.t, sheet.t}
	}
	return out
}

// mul3 returns a*b.
func mul3(a, b [3][3]float64) [3][3]float64 {
	var c [3][3]float64
	for i := range 3 {
		for j := range 3 {
			for k := range 3 {
				c[i][j] += a[i][k] * b[k][j]
			}
		}
	}
	return c
}

// apply3 returns a*v.
func apply3(a [3][3]float64, v [3]float64) [3]float64 {
	var out [3]float64
	for i := range 3 {
		for k := range 3 {
			out[i] += a[i][k] * v[k]
		}
	}
	return out
}
