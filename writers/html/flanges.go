package html

import (
	"cmp"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

// NodeFunc returns the position of a mesh node by id, in mm (false for
// an id the mesh does not hold).
type NodeFunc func(id int64) ([3]float64, bool)

// ForFlanges returns the page of a flanges run: its flanges (fl), the
// welds it placed as the spot-weld builder checked them (conn, which may
// hold none), the model's outline (in mm, or nil) and its nodes (for
// the facing pairs; nil draws none). The overview shows the flanges'
// centrelines and the placed welds; the flanges section gives each
// flange's plan view with its centreline, facing pairs and welds.
func ForFlanges(rep *document.ReportDoc, fl *document.FlangesDoc, conn *document.ConnectorsDoc, outline *Outline, node NodeFunc) *Page {
	unit, mm := unitOf(fl.Units.Length)
	outline = outline.In(mm)
	p := &Page{
		Title:     "Joinery flanges report",
		Generator: rep.Generator,
		RunID:     rep.RunID,
		Caution:   rep.Caution,
		Inputs:    rep.Inputs,
		Settings:  FlangeSettings(fl),
		Counts:    CountConnectors(conn),
		Marks:     MarksOf(conn, rep.Findings),
		PartNames: PartNames(outline),
		Findings:  rep.Findings,
		Unit:      unit,
	}
	var lines [][]r3.Vec
	for _, f := range fl.Flanges {
		l := make([]r3.Vec, len(f.Centreline))
		for i, q := range f.Centreline {
			l[i] = vec(q)
		}
		lines = append(lines, l)
	}
	p.Sections = []Section{
		&Overview{Outline: outline, Lines: lines},
		FindingsTable{},
		&Flanges{doc: fl, outline: outline, node: node, mm: mm},
	}
	return p
}

// FlangeSettings lists the options recorded in a flanges document.
func FlangeSettings(fl *document.FlangesDoc) []Setting {
	o := fl.Options
	u, _ := unitOf(fl.Units.Length)
	opt := func(v *float64, none string) string {
		if v == nil {
			return none
		}
		return joints.MM(*v) + " " + u
	}
	pairs := "every pair in contact"
	if len(o.Pairs) > 0 {
		var ps []string
		for _, pr := range o.Pairs {
			ps = append(ps, itoa64(pr[0])+"–"+itoa64(pr[1]))
		}
		pairs = strings.Join(ps, ", ")
	}
	pitch := opt(o.Pitch, "no welds placed")
	if o.PitchFromTable {
		pitch = "from the minimum-spacing table"
	}
	return []Setting{
		{"part pairs", pairs, ""},
		{"pitch", pitch, "spacing of the welds placed along each flange"},
		{"end margin", opt(o.EndMargin, "one nugget diameter"), "from each end of a flange to its first weld"},
		{"gap allowance", opt(o.GapAllowance, "a quarter of the contact gap"), "deviation of a gap from contact"},
		{"angle limit", joints.MM(o.AngleLimit) + "°", "sheet normals farther apart are not in contact"},
		{"edge factor", joints.MM(o.EdgeFactor), "nugget diameters: least distance from a weld centre to a free edge"},
		{"facing factor", joints.MM(o.FacingFactor), "times the local element size: a facing node pair's lateral limit"},
		{"attach", o.Attach, ""},
		{"nugget rule", o.NuggetRule, ""},
	}
}

const flangesAnchor = "flanges"

// FlangePlansShown is how many flanges get a plan view of their own,
// those with most findings first; the index lists them all.
const FlangePlansShown = 300

// facingShown is how many facing pairs a flange's plan view draws at
// most, evenly taken along the flange's list.
const facingShown = 400

// Flanges is the section of a flanges run's flanges: an index, then per
// flange a plan view in its own chart with its centreline, facing node
// pairs and placed welds.
type Flanges struct {
	doc     *document.FlangesDoc
	outline *Outline
	node    NodeFunc
	mm      float64 // size of the documents' unit in mm
}

// Anchor returns "flanges".
func (s *Flanges) Anchor() string { return flangesAnchor }

// Heading returns the section's title.
func (s *Flanges) Heading() string { return "Flanges" }

// FlangeAnchor is the id of a flange's part of the page.
func FlangeAnchor(id string) string { return "flange-" + Anchor(id) }

// Write writes the section.
func (s *Flanges) Write(w *Writer, p *Page) error {
	fl := s.doc
	unit := p.unit()
	w.Raw("<section id=\"flanges\">\n<h2>Flanges</h2>\n")
	if len(fl.Flanges) == 0 {
		w.Raw("<p class=\"none\">No flange found.</p>\n</section>\n")
		return nil
	}
	// Findings per flange: those about its welds and those about its
	// part pair.
	byPair := map[[2]int64]int{}
	for _, f := range p.Findings {
		if f.Joint == nil && len(f.Parts) == 2 {
			byPair[joints.PairKey(f.Parts[0], f.Parts[1])]++
		}
	}
	findingsOf := map[string][]int{}
	for i, fd := range p.Findings {
		if fd.Joint != nil {
			findingsOf[*fd.Joint] = append(findingsOf[*fd.Joint], i)
		}
	}
	perJoint := map[string]int{}
	for _, m := range p.Marks {
		perJoint[m.Joint] = m.Findings
	}
	count := make([]int, len(fl.Flanges))
	order := make([]int, len(fl.Flanges))
	for i, f := range fl.Flanges {
		order[i] = i
		count[i] = byPair[joints.PairKey(f.Parts[0], f.Parts[1])]
		for _, wd := range f.Welds {
			count[i] += perJoint[wd.ID]
		}
	}
	slices.SortStableFunc(order, func(a, b int) int {
		return cmp.Or(cmp.Compare(count[b], count[a]), joints.CompareIDs(fl.Flanges[a].ID, fl.Flanges[b].ID))
	})
	w.Raw("<p>")
	w.Int(int64(len(fl.Flanges)))
	w.Raw(" flanges, those with most findings first. Each plan view is drawn in the flange's own chart: u along its centreline, v across, seen along the normal of its best-fit plane; the first part's free edges near the plane are solid, the second's dashed; the blue line is the centreline, grey dots are facing node pairs (the midpoint of each pair), pale blue dots the placed welds' nuggets to scale.</p>\n")
	w.Raw("<table id=\"flanges-index\"><thead><tr><th>flange</th><th>parts</th><th>names</th><th>shape</th><th class=\"n\">length (" + unit + ")</th><th class=\"n\">width (" + unit + ")</th><th class=\"n\">facing pairs</th><th class=\"n\">pitch (" + unit + ")</th><th class=\"n\">welds</th><th class=\"n\">findings</th></tr></thead>\n<tbody>\n")
	for k, i := range order {
		f := &fl.Flanges[i]
		w.Raw("<tr><td>")
		if k < FlangePlansShown {
			w.Raw("<a")
			w.Attr("href", "#"+FlangeAnchor(f.ID))
			w.Raw(">")
			w.Text(f.ID)
			w.Raw("</a>")
		} else {
			w.Text(f.ID)
		}
		w.Raw("</td><td>")
		w.Int(f.Parts[0])
		w.Raw("–")
		w.Int(f.Parts[1])
		w.Raw("</td>")
		w.Cell(p.PartNames[f.Parts[0]] + " / " + p.PartNames[f.Parts[1]])
		w.Cell(f.Shape)
		w.NumCell(f.Length)
		w.Raw("<td class=\"n\">")
		w.MM(f.Width.Min)
		w.Raw(" / ")
		w.MM(f.Width.Mean)
		w.Raw(" / ")
		w.MM(f.Width.Max)
		w.Raw("</td>")
		w.IntCell(len(f.Facing))
		if f.Pitch != nil {
			w.NumCell(*f.Pitch)
		} else {
			w.Raw("<td class=\"n\">-</td>")
		}
		w.IntCell(len(f.Welds))
		w.IntCell(count[i])
		w.Raw("</tr>\n")
	}
	w.Raw("</tbody></table>\n<p class=\"note\">Width: least / mean / largest.")
	if len(order) > FlangePlansShown {
		w.Text(" Plan views of the first " + itoa(FlangePlansShown) + " flanges follow; every flange is in flanges.json and flanges.vtk.")
	}
	w.Raw("</p>\n")
	outlines := map[int64]*PartOutline{}
	if s.outline != nil {
		for i := range s.outline.Parts {
			outlines[s.outline.Parts[i].ID] = &s.outline.Parts[i]
		}
	}
	shown := order[:min(len(order), FlangePlansShown)]
	writeAll(w, len(shown), func(w *Writer, k int) {
		f := &fl.Flanges[shown[k]]
		w.Raw("<section class=\"pair\"")
		w.Attr("id", FlangeAnchor(f.ID))
		w.Raw("><h3>")
		w.Text("flange " + f.ID + ": " + partLabel(f.Parts[0], p.PartNames[f.Parts[0]]) + " and " + partLabel(f.Parts[1], p.PartNames[f.Parts[1]]))
		w.Raw("</h3>\n")
		s.writePlan(w, p, f, outlines[f.Parts[0]], outlines[f.Parts[1]])
		if len(f.Welds) > 0 {
			s.writeWelds(w, p, f, findingsOf)
		}
		w.Raw("</section>\n")
	})
	w.Raw("</section>\n")
	return nil
}

// facingPoints returns the midpoints of (at most facingShown of) the
// flange's facing pairs, in the documents' unit.
func (s *Flanges) facingPoints(f *document.FlangeDoc) []r3.Vec {
	if s.node == nil || len(f.Facing) == 0 {
		return nil
	}
	n := len(f.Facing)
	step := max(1, (n+facingShown-1)/facingShown)
	var out []r3.Vec
	for i := 0; i < n; i += step {
		a, okA := s.node(int64(f.Facing[i][0]))
		b, okB := s.node(int64(f.Facing[i][1]))
		if !okA || !okB {
			continue
		}
		m := r3.Scale(0.5/s.mm, r3.Add(vec(a), vec(b)))
		out = append(out, m)
	}
	return out
}

// writePlan draws a flange's plan view.
func (s *Flanges) writePlan(w *Writer, p *Page, f *document.FlangeDoc, oa, ob *PartOutline) {
	unit, mm := p.unit(), s.mm
	cl := make([]r3.Vec, len(f.Centreline))
	for i, q := range f.Centreline {
		cl[i] = vec(q)
	}
	facing := s.facingPoints(f)
	all := append(slices.Clone(cl), facing...)
	for _, wd := range f.Welds {
		all = append(all, vec(wd.Point))
	}
	if len(all) == 0 {
		return
	}
	var c r3.Vec
	for _, q := range all {
		c = r3.Add(c, q)
	}
	c = r3.Scale(1/float64(len(all)), c)
	major, _ := principal(cl, c)
	if len(cl) < 2 {
		major, _ = principal(all, c)
	}
	var e1, n r3.Vec
	if f.Normal != nil {
		// Seen along the sheets' own mean normal: a straight flange's
		// points lie on a line and leave the plane to rounding.
		n = vec(*f.Normal)
		e1 = r3.Sub(major, r3.Scale(r3.Dot(major, n), n))
		if r3.Norm(e1) < 1e-6 {
			e1 = perpendicular(n)
		}
		e1 = geom.SignLargest(r3.Unit(e1))
	} else {
		_, minor := principal(all, c)
		e1 = geom.SignLargest(major)
		n = r3.Sub(minor, r3.Scale(r3.Dot(minor, e1), e1))
		if r3.Norm(n) < 1e-6 {
			n = perpendicular(e1)
		}
		n = geom.SignLargest(r3.Unit(n))
	}
	e2 := r3.Cross(n, e1)
	f0 := &frame{origin: c, right: e1, up: e2}
	b := emptyBox()
	for _, q := range all {
		b.add(f0.chart(q))
	}
	dmax := 0.0
	for _, wd := range f.Welds {
		dmax = math.Max(dmax, wd.Diameter)
	}
	pd := math.Max(pad/mm, 1.5*dmax)
	b = box{b.u0 - pd, b.v0 - pd, b.u1 + pd, b.v1 + pd}
	fr := fit(c, e1, e2, b, planWidth, planHeight, planMargin, minChart/mm)
	w.Raw("<figure class=\"plan\"><svg class=\"pic\"")
	w.Attr("viewBox", "0 0 "+itoa(fr.w)+" "+itoa(fr.h))
	w.Attr("width", itoa(fr.w/unitsPerPx))
	w.Attr("height", itoa(fr.h/unitsPerPx))
	w.Raw(" role=\"img\"")
	w.Attr("aria-label", "plan view of flange "+f.ID)
	w.Raw(">\n")
	var pw pathWriter
	for k, po := range []*PartOutline{oa, ob} {
		if po == nil {
			continue
		}
		pw.reset()
		planOutline(&pw, fr, po, 10/mm)
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
	if len(facing) > 0 {
		pw.reset()
		for _, q := range facing {
			x, y := fr.pt(q)
			pw.moveRel(x, y)
			pw.raw("h0")
		}
		w.Raw("<path class=\"fc\" d=\"")
		w.Raw(pw.String())
		w.Raw("\"/>\n")
	}
	if len(cl) >= 2 {
		pw.reset()
		x, y := fr.pt(cl[0])
		pw.move(x, y)
		for _, q := range cl[1:] {
			x, y := fr.pt(q)
			pw.line(x, y)
		}
		if f.Shape == "closed" {
			pw.close()
		}
		w.Raw("<path class=\"cl\" d=\"")
		w.Raw(pw.String())
		w.Raw("\"/>\n")
	}
	for _, wd := range f.Welds {
		if wd.Diameter <= 0 {
			continue
		}
		x, y := fr.pt(vec(wd.Point))
		w.Raw("<path class=\"ng\"")
		w.Attr("stroke-width", itoa(max(2, round(wd.Diameter*fr.scale))))
		w.Attr("d", "M"+itoa(x)+" "+itoa(y)+"h0")
		w.Raw("/>")
	}
	for _, wd := range f.Welds {
		x, y := fr.pt(vec(wd.Point))
		st := "built"
		if m, ok := p.MarkOf(wd.ID); ok {
			st = m.State
		}
		w.Raw("<use")
		w.Attr("href", "#"+glyph(st))
		w.Attr("x", itoa(x))
		w.Attr("y", itoa(y))
		w.Attr("data-j", wd.ID)
		if glyph(st) == "g-other" {
			w.Attr("data-s", st)
		}
		w.Raw("/>")
	}
	w.Raw("\n")
	writeScaleBar(w, fr, unit)
	w.Raw("</svg><figcaption>")
	txt := "u along " + dir(e1) + ", v along " + dir(e2) + ", seen from " + dir(n) + ", origin " + point(c) + " " + unit +
		"; length " + joints.MM(f.Length) + " " + unit + ", " + itoa(len(f.Facing)) + " facing pairs"
	if len(facing) < len(f.Facing) {
		txt += " (" + itoa(len(facing)) + " drawn)"
	}
	if f.Pitch != nil {
		txt += ", pitch " + joints.MM(*f.Pitch) + " " + unit
	}
	w.Text(txt + ".")
	w.Raw("</figcaption></figure>\n")
}

// writeWelds writes the table of a flange's placed welds.
func (s *Flanges) writeWelds(w *Writer, p *Page, f *document.FlangeDoc, findingsOf map[string][]int) {
	unit := p.unit()
	w.Raw("<table class=\"conns\"><thead><tr><th>joint</th><th>state</th><th class=\"n\">station</th><th class=\"n\">s (" + unit + ")</th><th>parts</th><th class=\"n\">d (" + unit + ")</th><th>findings</th></tr></thead>\n<tbody>\n")
	for _, wd := range f.Welds {
		m, ok := p.MarkOf(wd.ID)
		w.Raw("<tr><td>")
		if ok && m.Findings > 0 && p.hasSection(overviewAnchor) {
			w.Raw("<a")
			w.Attr("href", "#axo-"+Anchor(wd.ID))
			w.Raw(">")
			w.Text(wd.ID)
			w.Raw("</a>")
		} else {
			w.Text(wd.ID)
		}
		w.Raw("</td>")
		st := "-"
		if ok {
			st = m.State
		}
		w.Raw("<td")
		w.Attr("class", "st "+glyph(st))
		w.Raw(">")
		w.Text(st)
		w.Raw("</td>")
		w.IntCell(wd.Station)
		w.NumCell(wd.S)
		w.Raw("<td>")
		for k, pt := range wd.Parts {
			if k > 0 {
				w.Raw("/")
			}
			w.Int(pt)
		}
		w.Raw("</td>")
		w.NumCell(wd.Diameter)
		w.Raw("<td>")
		writeFindingLinks(w, findingsOf[wd.ID], p.Findings)
		w.Raw("</td></tr>\n")
	}
	w.Raw("</tbody></table>\n")
}
