package html

import (
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

// ForCheck returns the page of a check: the connectors it read (conn,
// as a connectors document of the resolved connectors: their states
// and stacks as the check found them), the overview with their marks,
// the findings table, the audit's findings by kind (seams, duplicates,
// pitch, free parts, mechanisms with their motion), the plots and the
// part pairs, as a build's page shows them.
func ForCheck(rep *document.ReportDoc, conn *document.ConnectorsDoc, outline *Outline) *Page {
	p, an, outline := connectorsPage(rep, conn, outline)
	p.Title = "Joinery check report"
	p.Settings = CheckSettings(conn)
	p.Sections = []Section{
		&Overview{Outline: outline},
		FindingsTable{},
		&Audit{Assembly: rep.Summary.Assembly},
		&BuildPlots{an: an},
		&PartPairs{an: an, outline: outline},
	}
	return p
}

// CheckSettings lists the options a check uses: the reach (for the
// sheets of extra joint points), the gap allowance and node factor (for
// node pairs) and the nugget rule.
func CheckSettings(conn *document.ConnectorsDoc) []Setting {
	all := BuildSettings(conn)
	var out []Setting
	for _, s := range all {
		switch s.Name {
		case "reach", "gap allowance", "node factor", "nugget rule":
			out = append(out, s)
		}
	}
	return out
}

const auditAnchor = "audit"

// auditCodes are the findings of the audit (joints/audit), in the order
// the section shows them, with a heading each.
var auditCodes = []struct{ code, title, what string }{
	{joints.CodeMechanism, "Mechanisms", "parts the connectors do not hold against every rigid-body motion; the motion they keep free"},
	{joints.CodeUnrestrained, "Unrestrained nodes", "nodes a connector creates with degrees of freedom nothing holds"},
	{joints.CodeFreePart, "Free parts", "parts or groups of parts joined by no connector to the largest group"},
	{joints.CodeSeam, "Seams", "welds whose attachments on a sheet touch, in a chain: the flange cannot open between them"},
	{joints.CodeDuplicate, "Duplicates", "two welds whose nuggets overlap on a shared sheet, or on the same node pair"},
	{joints.CodePitchShort, "Short pitch", "consecutive welds of a part pair closer than the minimum spacing"},
}

// Audit is the section of the audit's findings: the assembly's counts
// (groups, grounded groups, free motions), then a table per kind of
// finding, with the joints each concerns linked to their marks and the
// free motion of mechanisms and unrestrained nodes.
type Audit struct {
	Assembly *document.AssemblyCounts // nil: the kinematic checks did not run
}

// Anchor returns "audit".
func (a *Audit) Anchor() string { return auditAnchor }

// Heading returns the section's title.
func (a *Audit) Heading() string { return "Audit" }

// auditJointsShown is how many joints of one finding its row links to;
// the rest are counted (a seam may chain hundreds of welds).
const auditJointsShown = 12

// Write writes the section.
func (a *Audit) Write(w *Writer, p *Page) error {
	w.Raw("<section id=\"audit\">\n<h2>Audit</h2>\n")
	if as := a.Assembly; as != nil {
		w.Raw("<table class=\"kv\" id=\"assembly\"><caption>Assembly</caption>\n<tbody>\n")
		for _, r := range []struct {
			k    string
			v    int
			note string
		}{
			{"groups", as.Groups, "groups of parts joined by connectors (a part alone is a group)"},
			{"grounded", as.Grounded, "groups tied to ground"},
			{"rigid-body modes", as.RigidBodyModes, "free motions of the whole assembly: 6 per group not grounded, plus every mechanism and unrestrained motion"},
			{"mechanism motions", as.Mechanisms, "free motions of parts relative to each other"},
			{"unrestrained motions", as.Unrestrained, "free motions of nodes that connectors create"},
		} {
			w.Raw("<tr><th>")
			w.Text(r.k)
			w.Raw("</th><td")
			w.Attr("data-count", r.k)
			w.Raw(">")
			w.Int(int64(r.v))
			w.Raw(" <span class=\"note\">")
			w.Text(r.note)
			w.Raw("</span></td></tr>\n")
		}
		w.Raw("</tbody></table>\n")
	}
	byCode := map[string][]int{}
	for i, f := range p.Findings {
		byCode[f.Code] = append(byCode[f.Code], i)
	}
	unit := p.unit()
	for _, c := range auditCodes {
		idx := byCode[c.code]
		w.Raw("<h3")
		w.Attr("id", "audit-"+c.code)
		w.Raw(">")
		w.Text(c.title + " (" + itoa(len(idx)) + ")")
		w.Raw("</h3>\n<p class=\"note\">")
		w.Text(c.what + ".")
		w.Raw("</p>\n")
		if len(idx) == 0 {
			continue
		}
		motion := c.code == joints.CodeMechanism || c.code == joints.CodeUnrestrained
		w.Raw("<table class=\"audit\"")
		w.Attr("data-code", c.code)
		w.Raw("><thead><tr><th>finding</th><th>joints</th><th>parts</th>")
		if motion {
			w.Raw("<th>motion</th><th>point (" + unit + ")</th><th>direction</th>")
		}
		w.Raw("<th>message</th></tr></thead>\n<tbody>\n")
		for _, i := range idx {
			f := p.Findings[i]
			w.Raw("<tr><td><a")
			w.Attr("href", "#"+FindingRow(i))
			w.Raw(">")
			w.Int(int64(i + 1))
			w.Raw("</a></td><td>")
			js := f.Joints
			if len(js) == 0 && f.Joint != nil {
				js = []string{*f.Joint}
			}
			for k, j := range js[:min(len(js), auditJointsShown)] {
				if k > 0 {
					w.Raw(" ")
				}
				if m, ok := p.MarkOf(j); ok && m.Findings > 0 && p.hasSection(overviewAnchor) {
					w.Raw("<a")
					w.Attr("href", "#axo-"+Anchor(j))
					w.Raw(">")
					w.Text(j)
					w.Raw("</a>")
				} else {
					w.Text(j)
				}
			}
			if len(js) > auditJointsShown {
				w.Text(" and " + itoa(len(js)-auditJointsShown) + " more")
			}
			if len(js) == 0 {
				w.Raw("-")
			}
			w.Raw("</td><td>")
			ps := uniqueParts(f.Parts)
			for k, pt := range ps[:min(len(ps), 3*auditJointsShown)] {
				if k > 0 {
					w.Raw(" ")
				}
				w.Int(pt)
			}
			if len(ps) > 3*auditJointsShown {
				w.Text(" and " + itoa(len(ps)-3*auditJointsShown) + " more")
			}
			w.Raw("</td>")
			if motion {
				writeMotion(w, f.Motion)
			}
			w.Cell(f.Message)
			w.Raw("</tr>\n")
		}
		w.Raw("</tbody></table>\n")
	}
	w.Raw("</section>\n")
	return nil
}

// writeMotion writes the cells of a free motion: its kind (with the
// pitch of a screw and the number of motions it stands for), a point
// of its axis or its centre, its direction.
func writeMotion(w *Writer, m *document.MotionDoc) {
	if m == nil {
		w.Raw("<td>-</td><td>-</td><td>-</td>")
		return
	}
	w.Raw("<td>")
	w.Text(m.Kind)
	if m.Pitch != nil {
		w.Raw(", pitch ")
		w.MM(*m.Pitch)
	}
	if m.Count > 1 {
		w.Text(" (" + itoa(m.Count) + " motions)")
	}
	w.Raw("</td>")
	for _, v := range []*document.Vec{m.Point, m.Direction} {
		w.Raw("<td>")
		if v == nil {
			w.Raw("-")
		} else {
			for k, x := range v {
				if k > 0 {
					w.Raw(" ")
				}
				w.MM(x)
			}
		}
		w.Raw("</td>")
	}
}
