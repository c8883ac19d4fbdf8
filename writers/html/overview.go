package html

import (
	"math"

	"github.com/paulmach/orb"
	"gonum.org/v1/gonum/spatial/r3"
)

const overviewAnchor = "overview"

// CompactAbove is the number of marks above which the overview draws the
// marks of joints without findings compactly, as one path per state;
// joints with findings are always drawn as elements of their own, with
// ids.
const CompactAbove = 2000

// Overview is the section with the pictures of the whole model: the
// part outlines in a fixed axonometric view and in three orthographic
// views, the page's marks on them by state, and the locations of
// findings that concern no joint.
type Overview struct {
	Outline *Outline // nil: marks only
	// Lines are polylines drawn over the outline in blue (a flanges
	// run's centrelines), in the page's unit.
	Lines [][]r3.Vec
}

// Anchor returns "overview".
func (o *Overview) Anchor() string { return overviewAnchor }

// Heading returns the section's title.
func (o *Overview) Heading() string { return "Overview" }

// view is one picture of the overview.
type view struct {
	id, title string
	right, up r3.Vec
	width     int // nominal width, units
	maxH      int // largest height, units
	titles    bool
	markScale float64 // size of the marks, 1 for full size
}

// overviewViews returns the four views. The axonometric view is
// isometric, seen from (-1, -1, 1): the x axis runs to the upper right,
// y to the upper left, z up. The orthographic views look from +z (x
// right, y up), from -y (x right, z up) and from +x (y right, z up).
func overviewViews() []view {
	s2, s6 := math.Sqrt(2), math.Sqrt(6)
	return []view{
		{id: "axo", title: "axonometric (isometric, seen from -x -y +z)", right: r3.Vec{X: 1 / s2, Y: -1 / s2},
			up: r3.Vec{X: 1 / s6, Y: 1 / s6, Z: 2 / s6}, width: 11600, maxH: 8000, titles: true, markScale: 1},
		{id: "xy", title: "top, seen from +z", right: r3.Vec{X: 1}, up: r3.Vec{Y: 1}, width: 3800, maxH: 3800, markScale: 0.6},
		{id: "xz", title: "side, seen from -y", right: r3.Vec{X: 1}, up: r3.Vec{Z: 1}, width: 3800, maxH: 3800, markScale: 0.6},
		{id: "yz", title: "end, seen from +x", right: r3.Vec{Y: 1}, up: r3.Vec{Z: 1}, width: 3800, maxH: 3800, markScale: 0.6},
	}
}

// Outline drawing: simplified to half a pixel, chains under 1.5 pixels
// left out.
const (
	outlineTol  = 0.5 * unitsPerPx
	outlineSpan = 1.5 * unitsPerPx
	margin      = 16 * unitsPerPx
)

// Write writes the section.
func (o *Overview) Write(w *Writer, p *Page) error {
	w.Raw("<section id=\"overview\">\n<h2>Overview</h2>\n")
	writeLegend(w)
	w.Raw("<div class=\"views\">\n")
	locs := p.locationMarks()
	views := overviewViews()
	writeAll(w, len(views), func(w *Writer, i int) { o.writeView(w, p, views[i], locs) })
	w.Raw("</div>\n<p class=\"note\">Click a view to enlarge it. Marks of joints with findings are drawn on top; a finding's joint link rings its marks in every picture.</p>\n</section>\n")
	return nil
}

// locationMark is a finding that concerns no joint with a mark but has
// a location.
type locationMark struct {
	finding int
	point   r3.Vec
}

func (p *Page) locationMarks() []locationMark {
	var out []locationMark
	for i, f := range p.Findings {
		if f.Location == nil {
			continue
		}
		if f.Joint != nil {
			if _, ok := p.MarkOf(*f.Joint); ok {
				continue
			}
		}
		out = append(out, locationMark{i, vec(*f.Location)})
	}
	return out
}

func vec(v [3]float64) r3.Vec { return r3.Vec{X: v[0], Y: v[1], Z: v[2]} }

func (o *Overview) writeView(w *Writer, p *Page, v view, locs []locationMark) {
	b := emptyBox()
	f0 := &frame{right: v.right, up: v.up}
	if o.Outline != nil {
		for _, po := range o.Outline.Parts {
			for _, c := range po.Chains {
				for _, q := range c {
					b.add(f0.chart(q))
				}
			}
		}
	}
	for _, m := range p.Marks {
		b.add(f0.chart(vec(m.Point)))
	}
	for _, l := range o.Lines {
		for _, q := range l {
			b.add(f0.chart(q))
		}
	}
	for _, l := range locs {
		b.add(f0.chart(l.point))
	}
	f := fit(r3.Vec{}, v.right, v.up, b, v.width, v.maxH, margin, 1)
	cls := "view"
	if v.id == "axo" {
		cls += " axo"
	}
	w.Raw("<figure")
	w.Attr("class", cls)
	w.Raw("><svg")
	w.Attr("id", "view-"+v.id)
	w.Raw(" class=\"pic\"")
	w.Attr("viewBox", "0 0 "+itoa(f.w)+" "+itoa(f.h))
	w.Attr("width", itoa(f.w/unitsPerPx))
	w.Attr("height", itoa(f.h/unitsPerPx))
	w.Raw(" role=\"img\"")
	w.Attr("aria-label", "model, "+v.title)
	w.Raw(">\n")
	var pw pathWriter
	if o.Outline != nil {
		w.Raw("<g class=\"ol\">\n")
		for _, po := range o.Outline.Parts {
			pw.reset()
			for _, c := range po.Chains {
				pw.ls = pw.ls[:0]
				for _, q := range c {
					x, y := f.at(f.chart(q))
					pw.ls = append(pw.ls, orb.Point{x, y})
				}
				pw.polyline(pw.ls, outlineTol, outlineSpan)
			}
			if len(pw.b) == 0 {
				continue
			}
			w.Raw("<path")
			w.Attr("data-p", itoa64(po.ID))
			w.Raw(" d=\"")
			w.Raw(pw.String())
			if v.titles {
				w.Raw("\"><title>")
				w.Text(partLabel(po.ID, po.Name))
				w.Raw("</title></path>\n")
			} else {
				w.Raw("\"/>\n")
			}
		}
		w.Raw("</g>\n")
	}
	if len(o.Lines) > 0 {
		pw.reset()
		for _, l := range o.Lines {
			pw.ls = pw.ls[:0]
			for _, q := range l {
				x, y := f.at(f.chart(q))
				pw.ls = append(pw.ls, orb.Point{x, y})
			}
			pw.polyline(pw.ls, outlineTol, 0)
		}
		w.Raw("<path class=\"cl\" d=\"")
		w.Raw(pw.String())
		w.Raw("\"/>\n")
	}
	writeMarks(w, p, f, v, locs)
	writeTriad(w, f, v)
	writeScaleBar(w, f, p.unit())
	w.Raw("</svg><figcaption>")
	w.Text(v.title)
	w.Raw("</figcaption></figure>\n")
}

// partLabel names a part for titles: "part 100 rear floor panel".
func partLabel(id int64, name string) string {
	s := "part " + itoa64(id)
	if name != "" {
		s += " " + name
	}
	return s
}

// writeMarks writes the marks of a view: those without findings first,
// then those with findings (on top), then the locations of findings.
// Up to CompactAbove marks, every mark is an element of its own (with
// the joint's id in data-j, and its mark id when it has findings). Above
// that, the marks are drawn compactly as one path per state, but for the
// marks of joints with findings in the axonometric view: those stay
// elements with their ids, the targets of the findings table's links.
func writeMarks(w *Writer, p *Page, f *frame, v view, locs []locationMark) {
	compact := len(p.Marks) > p.compactMarks()
	// Marks are drawn smaller in the small views and where they are
	// many: the group is scaled, positions divided by the scale.
	k := v.markScale
	if compact {
		k *= 0.75
	}
	pt := func(q r3.Vec) (int, int) {
		x, y := f.at(f.chart(q))
		return round(x / k), round(y / k)
	}
	w.Raw("<g class=\"mk\"")
	if k != 1 {
		w.Attr("transform", "scale("+fixed(k, 3)+")")
	}
	w.Raw(">\n")
	own := func(m Mark) bool { return !compact || v.id == "axo" && m.Findings > 0 }
	if compact {
		var states []string
		for _, m := range p.Marks {
			states = append(states, m.State)
		}
		var pw pathWriter
		for _, st := range orderStates(states) {
			d, style, end := compactMark(st)
			pw.reset()
			n := 0
			for _, m := range p.Marks {
				if m.State != st || own(m) {
					continue
				}
				x, y := pt(vec(m.Point))
				pw.moveRel(x, y)
				pw.raw(d)
				pw.x, pw.y = x+end[0], y+end[1]
				n++
			}
			if n == 0 {
				continue
			}
			w.Raw("<path")
			w.Attr("data-s", st)
			w.Attr("data-n", itoa(n))
			w.Raw(" " + style + " d=\"")
			w.Raw(pw.String())
			w.Raw("\"/>\n")
		}
	}
	for pass := 0; pass < 2; pass++ {
		for _, m := range p.Marks {
			if (m.Findings > 0) != (pass == 1) || !own(m) {
				continue
			}
			x, y := pt(vec(m.Point))
			w.Raw("<use")
			w.Attr("href", "#"+glyph(m.State))
			w.Attr("x", itoa(x))
			w.Attr("y", itoa(y))
			if m.Findings > 0 {
				w.Attr("id", v.id+"-"+Anchor(m.Joint))
			} else {
				w.Attr("data-j", m.Joint)
			}
			if glyph(m.State) == "g-other" {
				w.Attr("data-s", m.State)
			}
			w.Raw("/>")
		}
	}
	w.Raw("\n")
	for _, l := range locs {
		x, y := pt(l.point)
		w.Raw("<use href=\"#g-at\"")
		w.Attr("x", itoa(x))
		w.Attr("y", itoa(y))
		w.Attr("id", v.id+"-"+locationAnchor(l.finding))
		w.Raw("><title>")
		w.Text("finding " + itoa(l.finding+1) + ": " + p.Findings[l.finding].Code)
		w.Raw("</title></use>\n")
	}
	w.Raw("</g>\n")
}

// writeTriad draws the model axes as seen in the view, at the lower left.
func writeTriad(w *Writer, f *frame, v view) {
	const l = 20 * unitsPerPx // axis length
	ox, oy := 36*unitsPerPx, f.h-10*unitsPerPx
	w.Raw("<g class=\"triad\">")
	axes := []struct {
		name string
		dir  r3.Vec
	}{{"x", r3.Vec{X: 1}}, {"y", r3.Vec{Y: 1}}, {"z", r3.Vec{Z: 1}}}
	for _, a := range axes {
		dx, dy := r3.Dot(a.dir, v.right), -r3.Dot(a.dir, v.up)
		if math.Hypot(dx, dy) < 0.05 {
			// The axis points at the viewer (a dot) or away (a cross).
			if r3.Dot(a.dir, r3.Cross(v.right, v.up)) > 0 {
				w.Raw("<circle")
				w.Attr("cx", itoa(ox))
				w.Attr("cy", itoa(oy))
				w.Raw(" r=\"14\"/>")
			} else {
				w.Raw("<path")
				w.Attr("d", "M"+itoa(ox-14)+" "+itoa(oy-14)+"l28 28m0-28l-28 28")
				w.Raw("/>")
			}
			w.Raw("<text")
			w.Attr("x", itoa(ox-110))
			w.Attr("y", itoa(oy+35))
			w.Raw(">")
			w.Text(a.name)
			w.Raw("</text>")
			continue
		}
		x, y := ox+round(dx*l), oy+round(dy*l)
		w.Raw("<path")
		w.Attr("d", "M"+itoa(ox)+" "+itoa(oy)+"L"+itoa(x)+" "+itoa(y))
		w.Raw("/><text")
		w.Attr("x", itoa(x+round(dx*90)))
		w.Attr("y", itoa(y+round(dy*90)+35))
		w.Raw(">")
		w.Text(a.name)
		w.Raw("</text>")
	}
	w.Raw("</g>\n")
}

// writeScaleBar draws a bar of a round length, about a sixth of the
// picture's width, at the lower right.
func writeScaleBar(w *Writer, f *frame, unit string) {
	target := float64(f.w) / 6 / f.scale // in the page's unit
	if !(target > 0) || math.IsInf(target, 0) {
		return
	}
	l := roundLength(target)
	px := round(l * f.scale)
	x1, y := f.w-14*unitsPerPx, f.h-8*unitsPerPx
	x0 := x1 - px
	w.Raw("<g class=\"scale\"><path")
	w.Attr("d", "M"+itoa(x0)+" "+itoa(y-40)+"v40h"+itoa(px)+"v-40")
	w.Raw("/><text")
	w.Attr("x", itoa(x0-40))
	w.Attr("y", itoa(y))
	w.Raw(">")
	w.MM(l)
	w.Raw(" ")
	w.Text(unit)
	w.Raw("</text></g>\n")
}

// roundLength returns the largest of 1, 2 and 5 times a power of ten
// that is at most v (v > 0).
func roundLength(v float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(v)))
	for _, k := range []float64{5, 2, 1} {
		if k*p <= v {
			return k * p
		}
	}
	return p
}

// writeLegend writes the key of the marks.
func writeLegend(w *Writer) {
	w.Raw("<ul class=\"legend\">")
	for _, it := range []struct{ g, text string }{
		{"g-built", "built"},
		{"g-flagged", "flagged (built, with warnings)"},
		{"g-not-built", "not-built (an error or an unsupported kind)"},
		{"g-at", "location of a finding about no joint"},
	} {
		w.Raw("<li><svg class=\"key\" viewBox=\"-60 -60 120 120\" width=\"12\" height=\"12\"><use")
		w.Attr("href", "#"+it.g)
		w.Raw("/></svg> ")
		w.Text(it.text)
		w.Raw("</li>")
	}
	w.Raw("<li><svg class=\"key\" viewBox=\"0 -60 240 120\" width=\"24\" height=\"12\"><path class=\"olkey\" d=\"M0 0H240\"/></svg> part outline (free edges)</li>")
	w.Raw("</ul>\n")
}
