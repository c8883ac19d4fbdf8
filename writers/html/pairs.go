package html

import (
	"math"
	"slices"
	"strings"

	"github.com/paulmach/orb"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

const pairsAnchor = "pairs"

// PartPairs is the section of a build's part pairs, sorted by findings:
// an index, then per pair a plan view in the pair's own chart (its
// welds to scale, the part outlines near them, the consecutive welds and
// their pitch) and a table of its connectors; then the joints in no
// pair.
type PartPairs struct {
	an      *buildAnalysis
	outline *Outline
}

// Anchor returns "pairs".
func (s *PartPairs) Anchor() string { return pairsAnchor }

// Heading returns the section's title.
func (s *PartPairs) Heading() string { return "Part pairs" }

// PairAnchor is the id of a part pair's section.
func PairAnchor(a, b int64) string { return "pair-" + itoa64(a) + "-" + itoa64(b) }

// Plan views: 800 px wide at most 320 px high; the welds' box is padded
// by pad mm and shown at least minChart mm wide.
const (
	planWidth  = 800 * unitsPerPx
	planHeight = 320 * unitsPerPx
	planMargin = 10 * unitsPerPx
	pad        = 15.0
	minChart   = 80.0
)

// Write writes the section.
func (s *PartPairs) Write(w *Writer, p *Page) error {
	an := s.an
	w.Raw("<section id=\"pairs\">\n<h2>Part pairs</h2>\n")
	if len(an.pairs) == 0 && len(an.unpaired) == 0 {
		w.Raw("<p class=\"none\">No connectors.</p>\n</section>\n")
		return nil
	}
	w.Raw("<p>")
	w.Int(int64(len(an.pairs)))
	w.Raw(" part pairs joined directly (as consecutive sheets of a stack; a joint not built counts for the parts it lists), the pairs with most findings first. In the tables, t is the governing thickness, d the nugget diameter (bold where the joint list gives it, else from the nugget rule), the gap offset the links' mid-surface gap square to the sheets less contact, the edge distance the least to a free edge of the pair's sheets (- where none lies within twice the edge limit), the spacing the distance to the closest consecutive weld. Each plan view is drawn in the pair's own chart: u along the welds, v across, seen along the normal (the mean stack axis); the first part's free edges within reach of the chart's plane are solid, the second's dashed; pale blue dots are the nuggets to scale, blue dashes the weld line (centreline) through consecutive welds, vermillion a spacing below the minimum.</p>\n")
	s.writeIndex(w, p)
	outlines := map[int64]*PartOutline{}
	if s.outline != nil {
		for i := range s.outline.Parts {
			outlines[s.outline.Parts[i].ID] = &s.outline.Parts[i]
		}
	}
	writeAll(w, len(an.pairs), func(w *Writer, i int) {
		pa := an.pairs[i]
		w.Raw("<section class=\"pair\"")
		w.Attr("id", PairAnchor(pa.a, pa.b))
		w.Raw("><h3>")
		w.Text(partLabel(pa.a, p.PartNames[pa.a]) + " and " + partLabel(pa.b, p.PartNames[pa.b]))
		w.Raw("</h3>\n")
		s.writePlan(w, p, pa, outlines[pa.a], outlines[pa.b])
		s.writeConnectors(w, p, pa.conns, pa)
		w.Raw("</section>\n")
	})
	if len(an.unpaired) > 0 {
		w.Raw("<section class=\"pair\" id=\"unpaired\"><h3>Joints in no part pair</h3>\n")
		s.writeConnectors(w, p, an.unpaired, nil)
		w.Raw("</section>\n")
	}
	w.Raw("</section>\n")
	return nil
}

// pitch returns the median spacing of a run's consecutive welds, NaN
// for a run of one weld.
func (pa *pairAnalysis) pitch(run int) float64 {
	var ls []float64
	for _, l := range pa.links {
		if l.run == run {
			ls = append(ls, l.length)
		}
	}
	if len(ls) == 0 {
		return math.NaN()
	}
	slices.Sort(ls)
	if len(ls)%2 == 1 {
		return ls[len(ls)/2]
	}
	return (ls[len(ls)/2-1] + ls[len(ls)/2]) / 2
}

func (s *PartPairs) writeIndex(w *Writer, p *Page) {
	w.Raw("<table id=\"pairs-index\"><thead><tr><th>pair</th><th>parts</th><th class=\"n\">connectors</th><th class=\"n\">flagged</th><th class=\"n\">not built</th><th class=\"n\">findings</th><th class=\"n\">runs</th><th class=\"n\">pitch (" + s.an.unit + ")</th><th class=\"n\">closest (" + s.an.unit + ")</th><th class=\"n\">below minimum</th></tr></thead>\n<tbody>\n")
	for _, pa := range s.an.pairs {
		w.Raw("<tr><td><a")
		w.Attr("href", "#"+PairAnchor(pa.a, pa.b))
		w.Raw(">")
		w.Int(pa.a)
		w.Raw("–")
		w.Int(pa.b)
		w.Raw("</a></td>")
		w.Cell(p.PartNames[pa.a] + " / " + p.PartNames[pa.b])
		w.IntCell(len(pa.conns))
		w.IntCell(pa.flagged)
		w.IntCell(pa.notBuilt)
		w.IntCell(pa.findings)
		w.IntCell(len(pa.runs))
		var pitches []string
		for r := range pa.runs {
			if v := pa.pitch(r); !math.IsNaN(v) {
				pitches = append(pitches, joints.MM(v))
			}
		}
		w.Raw("<td class=\"n\">")
		w.Text(strings.Join(pitches, ", "))
		w.Raw("</td>")
		closest, below := math.NaN(), 0
		for _, l := range pa.links {
			if math.IsNaN(closest) || l.length < closest {
				closest = l.length
			}
			if l.length < l.min {
				below++
			}
		}
		w.NumCell(closest)
		if below > 0 {
			w.Raw("<td class=\"n bad\">")
			w.Int(int64(below))
			w.Raw("</td>")
		} else {
			w.IntCell(0)
		}
		w.Raw("</tr>\n")
	}
	w.Raw("</tbody></table>\n")
}

// writePlan draws the pair's plan view.
func (s *PartPairs) writePlan(w *Writer, p *Page, pa *pairAnalysis, oa, ob *PartOutline) {
	conn := s.an.conn
	unit, mm := s.an.unit, s.an.mm
	f0 := &frame{origin: pa.origin, right: pa.e1, up: pa.e2}
	b := emptyBox()
	dmax := 0.0
	for _, i := range pa.conns {
		c := &conn.Connectors[i]
		b.add(f0.chart(vec(c.Point)))
		if c.Diameter != nil {
			dmax = math.Max(dmax, *c.Diameter)
		}
	}
	pd := math.Max(pad/mm, 1.5*dmax)
	b = box{b.u0 - pd, b.v0 - pd, b.u1 + pd, b.v1 + pd}
	f := fit(pa.origin, pa.e1, pa.e2, b, planWidth, planHeight, planMargin, minChart/mm)
	w.Raw("<figure class=\"plan\"><svg class=\"pic\"")
	w.Attr("viewBox", "0 0 "+itoa(f.w)+" "+itoa(f.h))
	w.Attr("width", itoa(f.w/unitsPerPx))
	w.Attr("height", itoa(f.h/unitsPerPx))
	w.Raw(" role=\"img\"")
	w.Attr("aria-label", "plan view of the welds of parts "+itoa64(pa.a)+" and "+itoa64(pa.b))
	w.Raw(">\n")
	slab := conn.Options.Reach
	if !(slab > 0) {
		slab = 10 / mm
	}
	var pw pathWriter
	for k, po := range []*PartOutline{oa, ob} {
		if po == nil {
			continue
		}
		pw.reset()
		planOutline(&pw, f, po, slab)
		if len(pw.b) == 0 {
			continue
		}
		w.Raw("<path")
		w.Attr("class", []string{"pa", "pb"}[k])
		w.Attr("data-p", itoa64(po.ID))
		w.Raw(" d=\"")
		w.Raw(pw.String())
		w.Raw("\"/>\n")
	}
	// Nuggets to scale, under the marks: a dot of the nugget's diameter
	// (a round-capped stroke of no length), one path per diameter.
	byR := map[int]*pathWriter{}
	var radii []int
	for _, i := range pa.welds {
		c := &conn.Connectors[i]
		if c.Diameter == nil {
			continue
		}
		r := max(1, round(*c.Diameter/2*f.scale))
		pr := byR[r]
		if pr == nil {
			pr = &pathWriter{}
			byR[r] = pr
			radii = append(radii, r)
		}
		x, y := f.pt(vec(c.Point))
		pr.moveRel(x, y)
		pr.raw("h0")
	}
	slices.Sort(radii)
	for _, r := range radii {
		w.Raw("<path class=\"ng\"")
		w.Attr("stroke-width", itoa(2*r))
		w.Raw(" d=\"")
		w.Raw(byR[r].String())
		w.Raw("\"/>")
	}
	w.Raw("\n")
	// Consecutive welds: one path for those far enough apart, one for
	// those closer than the minimum.
	var ok, short pathWriter
	for _, l := range pa.links {
		x0, y0 := f.pt(vec(conn.Connectors[pa.welds[l.i]].Point))
		x1, y1 := f.pt(vec(conn.Connectors[pa.welds[l.j]].Point))
		pw := &ok
		if l.length < l.min {
			pw = &short
		}
		pw.move(x0, y0)
		pw.line(x1, y1)
	}
	for _, c := range []struct {
		cls string
		pw  *pathWriter
	}{{"wl", &ok}, {"short", &short}} {
		if len(c.pw.b) > 0 {
			w.Raw("<path")
			w.Attr("class", c.cls)
			w.Raw(" d=\"")
			w.Raw(c.pw.String())
			w.Raw("\"/>\n")
		}
	}
	for _, i := range pa.conns {
		c := &conn.Connectors[i]
		x, y := f.pt(vec(c.Point))
		w.Raw("<use")
		w.Attr("href", "#"+glyph(c.State))
		w.Attr("x", itoa(x))
		w.Attr("y", itoa(y))
		w.Attr("data-j", c.ID)
		if glyph(c.State) == "g-other" {
			w.Attr("data-s", c.State)
		}
		w.Raw("/>")
	}
	w.Raw("\n<g class=\"lab\">")
	for r, run := range pa.runs {
		v := pa.pitch(r)
		if math.IsNaN(v) {
			continue
		}
		mid := conn.Connectors[pa.welds[run[len(run)/2]]].Point
		x, y := f.pt(vec(mid))
		w.Raw("<text")
		w.Attr("x", itoa(x))
		w.Attr("y", itoa(y-110))
		w.Raw(">pitch ")
		w.MM(v)
		w.Raw(" " + unit + "</text>")
	}
	for _, l := range pa.links {
		if l.length >= l.min {
			continue
		}
		p0, p1 := conn.Connectors[pa.welds[l.i]].Point, conn.Connectors[pa.welds[l.j]].Point
		x, y := f.pt(r3.Scale(0.5, r3.Add(vec(p0), vec(p1))))
		w.Raw("<text class=\"bad\"")
		w.Attr("x", itoa(x))
		w.Attr("y", itoa(y+150))
		w.Raw(">")
		w.MM(l.length)
		w.Raw(" &lt; ")
		w.MM(l.min)
		w.Raw("</text>")
	}
	w.Raw("</g>\n")
	writeScaleBar(w, f, unit)
	w.Raw("</svg><figcaption>")
	w.Text("u along " + dir(pa.e1) + ", v along " + dir(pa.e2) + ", seen from " + dir(pa.n) +
		", origin " + point(pa.origin) + " " + unit + "; part " + itoa64(pa.a) + " solid, part " + itoa64(pa.b) + " dashed.")
	w.Raw("</figcaption></figure>\n")
}

// planOutline writes the parts of po's chains that lie within slab mm of
// the chart's plane and inside the picture.
func planOutline(pw *pathWriter, f *frame, po *PartOutline, slab float64) {
	w, h := float64(f.w), float64(f.h)
	normal := r3.Cross(f.right, f.up)
	var ls orb.LineString
	flush := func() {
		if len(ls) >= 2 {
			pw.polyline(ls, outlineTol, 0)
		}
		ls = ls[:0]
	}
	for _, c := range po.Chains {
		for _, q := range c {
			d := r3.Sub(q, f.origin)
			if math.Abs(r3.Dot(d, normal)) > slab {
				flush()
				continue
			}
			x, y := f.at(r3.Dot(d, f.right), r3.Dot(d, f.up))
			if x < -w/20 || x > w*1.05 || y < -h/20 || y > h*1.05 {
				flush()
				continue
			}
			ls = append(ls, orb.Point{x, y})
		}
		flush()
	}
}

func dir(v r3.Vec) string {
	return "(" + fixed(v.X, 3) + ", " + fixed(v.Y, 3) + ", " + fixed(v.Z, 3) + ")"
}

func point(v r3.Vec) string {
	return "(" + joints.MM(v.X) + ", " + joints.MM(v.Y) + ", " + joints.MM(v.Z) + ")"
}

func fixed(v float64, dec int) string {
	s := joints.MM(math.Round(v*math.Pow(10, float64(dec))) / math.Pow(10, float64(dec)))
	return s
}

// writeConnectors writes the table of connectors conns (indices into the
// connectors document) for pair pa (nil: joints in no pair).
func (s *PartPairs) writeConnectors(w *Writer, p *Page, conns []int, pa *pairAnalysis) {
	conn := s.an.conn
	u := s.an.unit
	type near struct {
		length, min float64
	}
	closest := map[int]near{} // weld index in conn -> closest consecutive weld
	if pa != nil {
		for _, l := range pa.links {
			for _, k := range []int{l.i, l.j} {
				ci := pa.welds[k]
				if c, ok := closest[ci]; !ok || l.length < c.length {
					closest[ci] = near{l.length, l.min}
				}
			}
		}
	}
	// Rows are lean (a body has thousands): numbers are right-aligned by
	// the style sheet, the state's mark comes from its class.
	w.Raw("<table class=\"conns\"><thead><tr><th>joint</th><th>kind</th><th>state</th><th>stack</th><th>t (" + u + ")</th><th>d (" + u + ")</th><th>gap offset (" + u + ")</th><th>edge (" + u + ")</th><th>spacing (" + u + ")</th><th>findings</th></tr></thead>\n<tbody>\n")
	for _, i := range conns {
		c := &conn.Connectors[i]
		w.Raw("<tr><td>")
		if m, ok := p.MarkOf(c.ID); ok && m.Findings > 0 && p.hasSection(overviewAnchor) {
			w.Raw("<a")
			w.Attr("href", "#axo-"+Anchor(c.ID))
			w.Raw(">")
			w.Text(c.ID)
			w.Raw("</a>")
		} else {
			w.Text(c.ID)
		}
		w.Raw("</td>")
		w.Cell(c.Kind)
		w.Raw("<td")
		w.Attr("class", "st "+glyph(c.State))
		w.Raw(">")
		w.Text(c.State)
		w.Raw("</td><td>")
		if len(c.Sheets) > 0 {
			for k, sh := range c.Sheets {
				if k > 0 {
					w.Raw(" / ")
				}
				w.Int(sh.Part)
			}
		} else if len(c.Listed) > 0 {
			w.Raw("listed ")
			for k, pt := range c.Listed {
				if k > 0 {
					w.Raw(" / ")
				}
				w.Int(pt)
			}
		}
		w.Raw("</td><td>")
		if s.an.gov[i] > 0 {
			w.MM(s.an.gov[i])
		} else {
			w.Raw("-")
		}
		w.Raw("</td><td>")
		if c.Diameter != nil {
			if c.DiameterSource == "list" {
				w.Raw("<b>")
				w.MM(*c.Diameter)
				w.Raw("</b>")
			} else {
				w.MM(*c.Diameter)
			}
		} else {
			w.Raw("-")
		}
		w.Raw("</td><td>")
		n := 0
		for _, l := range c.Links {
			if pa == nil || l.From < len(c.Sheets) && l.To < len(c.Sheets) && pairOf(c.Sheets[l.From].Part, c.Sheets[l.To].Part, pa) {
				if n > 0 {
					w.Raw(" ")
				}
				w.MM(l.Gap() - l.ContactGap)
				n++
			}
		}
		if n == 0 {
			w.Raw("-")
		}
		edge := math.Inf(1)
		for _, sh := range c.Sheets {
			if sh.EdgeDistance != nil && (pa == nil || sh.Part == pa.a || sh.Part == pa.b) {
				edge = math.Min(edge, *sh.EdgeDistance)
			}
		}
		w.Raw("</td><td>")
		w.MM(edge)
		if nr, ok := closest[i]; ok && nr.length < nr.min {
			w.Raw("</td><td class=\"bad\">")
			w.MM(nr.length)
		} else if ok {
			w.Raw("</td><td>")
			w.MM(nr.length)
		} else {
			w.Raw("</td><td>-")
		}
		w.Raw("</td><td>")
		writeFindingLinks(w, s.an.findingsOf[c.ID], p.Findings)
		w.Raw("</td></tr>\n")
	}
	w.Raw("</tbody></table>\n")
}

func pairOf(x, y int64, pa *pairAnalysis) bool {
	return min(x, y) == pa.a && max(x, y) == pa.b
}

// writeFindingLinks writes a joint's finding codes, each once with the
// number of its findings when more than one, linking to the first of
// them in the findings table.
func writeFindingLinks(w *Writer, idx []int, fs []document.FindingDoc) {
	var codes []string
	first := map[string]int{}
	n := map[string]int{}
	for _, i := range idx {
		c := fs[i].Code
		if n[c] == 0 {
			codes = append(codes, c)
			first[c] = i
		}
		n[c]++
	}
	for k, c := range codes {
		if k > 0 {
			w.Raw(" ")
		}
		w.Raw("<a")
		w.Attr("href", "#"+FindingRow(first[c]))
		w.Raw(">")
		w.Text(c)
		w.Raw("</a>")
		if n[c] > 1 {
			w.Raw(" ×")
			w.Int(int64(n[c]))
		}
	}
}
