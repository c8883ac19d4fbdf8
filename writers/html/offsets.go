package html

import (
	"cmp"
	"math"
	"slices"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

// ForOffsets returns the page of a surface inference (joinery offsets):
// the overview of the model with the findings' locations and the
// contacts' points, the findings table, each part's verdict (its
// reference surface as the parts table declares it and as found, with
// the confidence and the evidence) and the contacts the verdicts rest
// on.
func ForOffsets(rep *document.ReportDoc, surf *document.SurfacesDoc, outline *Outline) *Page {
	unit, mm := unitOf(surf.Units.Length)
	outline = outline.In(mm)
	p := &Page{
		Title:     "Joinery surface report",
		Generator: rep.Generator,
		RunID:     rep.RunID,
		Caution:   rep.Caution,
		Inputs:    rep.Inputs,
		Settings:  SurfaceSettings(surf),
		PartNames: PartNames(outline),
		Findings:  rep.Findings,
		Unit:      unit,
	}
	p.Sections = []Section{
		&Overview{Outline: outline},
		FindingsTable{},
		&Surfaces{doc: surf},
		&Contacts{doc: surf},
	}
	return p
}

// SurfaceSettings lists the options recorded in a surfaces document.
func SurfaceSettings(s *document.SurfacesDoc) []Setting {
	o := s.Options
	u, _ := unitOf(s.Units.Length)
	gap := "the build's default"
	if o.GapAllowance != nil {
		gap = joints.MM(*o.GapAllowance) + " " + u
	}
	return []Setting{
		{"window", joints.MM(o.Window) + " " + u, "facing elements were sought this far apart"},
		{"reach", joints.MM(o.Reach) + " " + u, "around joint sites"},
		{"angle limit", joints.MM(o.AngleLimit) + "°", "facing elements' normals at most this far from parallel"},
		{"gap allowance", gap, "deviation of a gap from contact"},
		{"joint-site weight", joints.MM(o.JointSiteWeight), "weight of a contact at a joint site against one found by the window alone"},
		{"unsure below", joints.MM(o.UnsureConfidence), "confidence under which a verdict is reported unsure"},
	}
}

// Surfaces is the section of the per-part verdicts: parts whose found
// surface differs from the table's, with disagreeing contacts or with
// elements to flip first.
type Surfaces struct {
	doc *document.SurfacesDoc
}

// Anchor returns "surfaces".
func (s *Surfaces) Anchor() string { return "surfaces" }

// Heading returns the section's title.
func (s *Surfaces) Heading() string { return "Surfaces" }

// PartAnchor is the id of a part's row in the surfaces table.
func PartAnchor(id int64) string { return "part-" + itoa64(id) }

// Write writes the section.
func (s *Surfaces) Write(w *Writer, p *Page) error {
	u := p.unit()
	w.Raw("<section id=\"surfaces\">\n<h2>Surfaces</h2>\n")
	ps := s.doc.Parts
	if len(ps) == 0 {
		w.Raw("<p class=\"none\">No parts.</p>\n</section>\n")
		return nil
	}
	order := make([]int, len(ps))
	differ := 0
	for i := range order {
		order[i] = i
		if ps[i].Surface != ps[i].Declared {
			differ++
		}
	}
	trouble := func(q *document.PartSurfaceDoc) int {
		n := 0
		if q.Surface != q.Declared {
			n += 4
		}
		if q.Disagreeing > 0 {
			n += 2
		}
		if q.FlipCount > 0 || q.Conflicts > 0 {
			n++
		}
		return n
	}
	slices.SortStableFunc(order, func(a, b int) int {
		return cmp.Or(cmp.Compare(trouble(&ps[b]), trouble(&ps[a])), cmp.Compare(ps[a].Confidence, ps[b].Confidence), cmp.Compare(ps[a].ID, ps[b].ID))
	})
	w.Raw("<p>")
	w.Int(int64(len(ps)))
	w.Raw(" parts, ")
	w.Int(int64(differ))
	w.Raw(" of them on another surface than the parts table says; parts that differ, with contacts that disagree or with elements to flip come first, then the least sure. The confidence bar runs from 0 to 1; the evidence is the contact area behind the verdict, agreeing the share of it the verdict explains.</p>\n")
	w.Raw("<table id=\"surfaces-table\"><thead><tr><th>part</th><th>name</th><th class=\"n\">t (" + u + ")</th><th class=\"n\">elements</th><th>table</th><th>found</th><th class=\"n\">offset (" + u + ")</th><th>confidence</th><th class=\"n\">evidence (" + u + "²)</th><th class=\"n\">agreeing</th><th class=\"n\">contacts</th><th class=\"n\">disagree</th><th class=\"n\">pieces</th><th class=\"n\">flip</th><th class=\"n\">unorientable edges</th></tr></thead>\n<tbody>\n")
	for _, i := range order {
		q := &ps[i]
		w.Raw("<tr")
		w.Attr("id", PartAnchor(q.ID))
		if q.Surface != q.Declared {
			w.Raw(" class=\"e\"")
		}
		w.Raw("><td>")
		w.Int(q.ID)
		w.Raw("</td>")
		w.Cell(p.PartNames[q.ID])
		w.NumCell(q.Thickness)
		w.IntCell(q.Elements)
		w.Cell(q.Declared)
		if q.Surface != q.Declared {
			w.Raw("<td class=\"bad\">")
			w.Text(q.Surface)
			w.Raw("</td>")
		} else {
			w.Cell(q.Surface)
		}
		w.NumCell(q.Offset)
		c := math.Max(0, math.Min(1, q.Confidence))
		w.Raw("<td><svg class=\"bar\" viewBox=\"0 0 100 10\" width=\"60\" height=\"8\" aria-hidden=\"true\"><rect width=\"100\" height=\"10\" fill=\"#eee\"/><rect")
		w.Attr("width", itoa(round(100*c)))
		w.Raw(" height=\"10\"")
		col := colBuilt
		if q.Confidence < s.doc.Options.UnsureConfidence {
			col = colFlagged
		}
		w.Attr("fill", col)
		w.Raw("/></svg> ")
		w.Raw(fixed(q.Confidence, 2))
		w.Raw("</td>")
		w.Raw("<td class=\"n\">")
		w.Raw(fixed(q.Evidence, 0))
		w.Raw("</td><td class=\"n\">")
		if q.Evidence > 0 {
			w.Raw(fixed(100*q.Agreeing/q.Evidence, 0) + " %")
		} else {
			w.Raw("-")
		}
		w.Raw("</td>")
		w.IntCell(q.Contacts)
		if q.Disagreeing > 0 {
			w.Raw("<td class=\"n bad\">")
			w.Int(int64(q.Disagreeing))
			w.Raw("</td>")
		} else {
			w.IntCell(0)
		}
		w.IntCell(q.Pieces)
		w.IntCell(q.FlipCount)
		w.IntCell(q.Conflicts)
		w.Raw("</tr>\n")
	}
	w.Raw("</tbody></table>\n</section>\n")
	return nil
}

// Contacts is the section of the contacts between parts that the
// verdicts rest on, those that disagree with the surfaces found first.
type Contacts struct {
	doc *document.SurfacesDoc
}

// Anchor returns "contacts".
func (s *Contacts) Anchor() string { return "contacts" }

// Heading returns the section's title.
func (s *Contacts) Heading() string { return "Contacts" }

// Write writes the section.
func (s *Contacts) Write(w *Writer, p *Page) error {
	u := p.unit()
	cs := s.doc.Contacts
	w.Raw("<section id=\"contacts\">\n<h2>Contacts</h2>\n")
	if len(cs) == 0 {
		w.Raw("<p class=\"none\">No two parts face each other within the window.</p>\n</section>\n")
		return nil
	}
	order := make([]int, len(cs))
	for i := range order {
		order[i] = i
	}
	agrees := func(b bool) int {
		if b {
			return 1
		}
		return 0
	}
	slices.SortStableFunc(order, func(a, b int) int {
		return cmp.Or(cmp.Compare(agrees(cs[a].Agrees), agrees(cs[b].Agrees)), cmp.Compare(cs[a].A, cs[b].A), cmp.Compare(cs[a].B, cs[b].B))
	})
	w.Raw("<p>Pairs of parts whose elements face each other: the separation of their mid-surfaces (least, weighted mean, largest), what it would be in contact with the surfaces found (expected), and whether the two agree within the allowance.</p>\n")
	w.Raw("<table id=\"contacts-table\"><thead><tr><th>parts</th><th>normals</th><th class=\"n\">separation (" + u + ")</th><th class=\"n\">least / largest (" + u + ")</th><th class=\"n\">expected (" + u + ")</th><th class=\"n\">allowance (" + u + ")</th><th>agrees</th><th class=\"n\">area (" + u + "²)</th><th class=\"n\">joint sites</th><th class=\"n\">samples</th><th>point (" + u + ")</th></tr></thead>\n<tbody>\n")
	for _, i := range order {
		c := &cs[i]
		w.Raw("<tr")
		if !c.Agrees {
			w.Raw(" class=\"e\"")
		}
		w.Raw("><td><a")
		w.Attr("href", "#"+PartAnchor(c.A))
		w.Raw(">")
		w.Int(c.A)
		w.Raw("</a>–<a")
		w.Attr("href", "#"+PartAnchor(c.B))
		w.Raw(">")
		w.Int(c.B)
		w.Raw("</a></td>")
		w.Cell(c.Normals)
		w.NumCell(c.Separation)
		w.Raw("<td class=\"n\">")
		w.MM(c.Min)
		w.Raw(" / ")
		w.MM(c.Max)
		w.Raw("</td>")
		w.NumCell(c.Expected)
		w.NumCell(c.Allowance)
		if c.Agrees {
			w.Cell("yes")
		} else {
			w.Raw("<td class=\"bad\">no</td>")
		}
		w.Raw("<td class=\"n\">")
		w.Raw(fixed(c.Area, 0))
		w.Raw("</td>")
		w.IntCell(c.Sites)
		w.IntCell(c.Samples)
		w.Raw("<td>")
		for k, v := range c.Point {
			if k > 0 {
				w.Raw(" ")
			}
			w.MM(v)
		}
		w.Raw("</td></tr>\n")
	}
	w.Raw("</tbody></table>\n</section>\n")
	return nil
}
