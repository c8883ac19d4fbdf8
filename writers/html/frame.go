package html

import (
	"math"
	"strconv"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/simplify"
	"gonum.org/v1/gonum/spatial/r3"
)

// frame maps model points (mm) to picture units: an orthographic
// projection on the plane of right and up through origin, scaled and
// placed in a picture w by h units with the y axis down.
type frame struct {
	origin, right, up r3.Vec
	scale             float64 // units per mm
	u0, v1            float64 // chart coordinates at the picture's left and top edge
	w, h              int
}

// chart returns the chart coordinates of p, mm.
func (f *frame) chart(p r3.Vec) (u, v float64) {
	d := r3.Sub(p, f.origin)
	return r3.Dot(d, f.right), r3.Dot(d, f.up)
}

// at returns the picture coordinates of chart point (u, v).
func (f *frame) at(u, v float64) (x, y float64) {
	return (u - f.u0) * f.scale, (f.v1 - v) * f.scale
}

// pt returns the picture coordinates of p, rounded to whole units.
func (f *frame) pt(p r3.Vec) (int, int) {
	x, y := f.at(f.chart(p))
	return round(x), round(y)
}

func round(v float64) int { return int(math.Round(v)) }

// box is a bounding box in chart coordinates.
type box struct{ u0, v0, u1, v1 float64 }

func emptyBox() box { return box{math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)} }

func (b *box) add(u, v float64) {
	b.u0, b.u1 = math.Min(b.u0, u), math.Max(b.u1, u)
	b.v0, b.v1 = math.Min(b.v0, v), math.Max(b.v1, v)
}

func (b box) empty() bool { return !(b.u0 <= b.u1) }

// fit returns the frame that shows box b (chart coordinates of the
// projection right, up through origin) in a picture width units wide,
// at most maxH units high, with margin units around it and a strip
// below for the axes and the scale bar; a box smaller than minSize mm is
// shown as if it were minSize mm wide.
func fit(origin, right, up r3.Vec, b box, width, maxH, margin int, minSize float64) *frame {
	if b.empty() {
		b = box{0, 0, 0, 0}
	}
	bw, bh := b.u1-b.u0, b.v1-b.v0
	if bw < minSize {
		c := (b.u0 + b.u1) / 2
		b.u0, b.u1, bw = c-minSize/2, c+minSize/2, minSize
	}
	if bh < minSize/8 {
		c := (b.v0 + b.v1) / 2
		b.v0, b.v1, bh = c-minSize/16, c+minSize/16, minSize/8
	}
	inner := float64(width - 2*margin)
	scale := inner / bw
	if bh*scale > float64(maxH-2*margin) {
		scale = float64(maxH-2*margin) / bh
	}
	h := int(math.Ceil(bh*scale)) + 2*margin + strip
	// Centre the box across the width.
	extra := (inner - bw*scale) / 2
	f := &frame{origin: origin, right: right, up: up, scale: scale, w: width, h: h}
	f.u0 = b.u0 - (float64(margin)+extra)/scale
	f.v1 = b.v1 + float64(margin)/scale
	return f
}

// strip is the height of the strip below a picture's content, units.
const strip = 30 * unitsPerPx

// pathWriter writes SVG path data with whole-unit coordinates: an
// absolute move, then relative lines (the command letter given once).
type pathWriter struct {
	b          []byte
	x, y       int
	inLine     bool
	simplifier *simplify.DouglasPeuckerSimplifier
	ls         orb.LineString // scratch
}

func (p *pathWriter) num(v int) {
	if v >= 0 && len(p.b) > 0 {
		c := p.b[len(p.b)-1]
		if c >= '0' && c <= '9' {
			p.b = append(p.b, ' ')
		}
	}
	p.b = strconv.AppendInt(p.b, int64(v), 10)
}

func (p *pathWriter) move(x, y int) {
	p.b = append(p.b, 'M')
	p.num(x)
	p.num(y)
	p.x, p.y, p.inLine = x, y, false
}

// moveRel moves to (x, y) by a relative move from the current point,
// or an absolute one at the start of the path.
func (p *pathWriter) moveRel(x, y int) {
	if len(p.b) == 0 {
		p.move(x, y)
		return
	}
	p.b = append(p.b, 'm')
	p.num(x - p.x)
	p.num(y - p.y)
	p.x, p.y, p.inLine = x, y, false
}

func (p *pathWriter) line(x, y int) {
	if x == p.x && y == p.y {
		return
	}
	if !p.inLine {
		p.b = append(p.b, 'l')
		p.inLine = true
	}
	p.num(x - p.x)
	p.num(y - p.y)
	p.x, p.y = x, y
}

func (p *pathWriter) close() {
	p.b = append(p.b, 'z')
	p.inLine = false
}

// raw appends path commands as they are (after a move).
func (p *pathWriter) raw(s string) {
	p.b = append(p.b, s...)
	p.inLine = false
}

// polyline writes a polyline of picture points (units, not rounded),
// simplified to within tol units (Douglas-Peucker) and left out when
// it spans less than minSpan units; closed polylines (first point equal
// to the last) end with a close command. It reuses ls's storage.
func (p *pathWriter) polyline(ls orb.LineString, tol, minSpan float64) {
	if len(ls) < 2 {
		return
	}
	b := ls.Bound()
	if math.Max(b.Max[0]-b.Min[0], b.Max[1]-b.Min[1]) < minSpan {
		return
	}
	closed := ls[0] == ls[len(ls)-1]
	if p.simplifier == nil {
		p.simplifier = simplify.DouglasPeucker(tol)
	}
	p.simplifier.Threshold = tol
	ls = p.simplifier.LineString(ls)
	p.move(round(ls[0][0]), round(ls[0][1]))
	end := len(ls)
	if closed {
		end--
	}
	for _, q := range ls[1:end] {
		p.line(round(q[0]), round(q[1]))
	}
	if closed {
		p.close()
	}
}

func (p *pathWriter) String() string { return string(p.b) }
func (p *pathWriter) reset()         { p.b = p.b[:0]; p.inLine = false }
