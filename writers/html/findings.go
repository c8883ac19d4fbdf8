package html

import (
	"slices"
)

const findingsAnchor = "findings"

// FindingsTable is the section with every finding of the page, in
// report.json's order, filterable by code and by part; each finding's
// joint links to its mark in the overview.
type FindingsTable struct{}

// Anchor returns "findings".
func (FindingsTable) Anchor() string { return findingsAnchor }

// Heading returns the section's title.
func (FindingsTable) Heading() string { return "Findings" }

// Write writes the section.
func (FindingsTable) Write(w *Writer, p *Page) error {
	w.Raw("<section id=\"findings\">\n<h2>Findings</h2>\n")
	if len(p.Findings) == 0 {
		w.Raw("<p class=\"none\">No findings.</p>\n</section>\n")
		return nil
	}
	codes := map[string]int{}
	parts := map[int64]int{}
	for _, f := range p.Findings {
		codes[f.Code]++
		for _, pt := range uniqueParts(f.Parts) {
			parts[pt]++
		}
	}
	w.Raw("<form class=\"filters\" id=\"f-filters\"><label>code <select id=\"f-code\"><option value=\"\">all (")
	w.Int(int64(len(p.Findings)))
	w.Raw(")</option>")
	for _, c := range sortedKeys(codes) {
		w.Raw("<option")
		w.Attr("value", c)
		w.Raw(">")
		w.Text(c + " (" + itoa(codes[c]) + ")")
		w.Raw("</option>")
	}
	w.Raw("</select></label> <label>part <select id=\"f-part\"><option value=\"\">all</option>")
	ids := make([]int64, 0, len(parts))
	for id := range parts {
		ids = append(ids, id)
	}
	slices.Sort(ids)
	for _, id := range ids {
		w.Raw("<option")
		w.Attr("value", itoa64(id))
		w.Raw(">")
		w.Text(partLabel(id, p.PartNames[id]) + " (" + itoa(parts[id]) + ")")
		w.Raw("</option>")
	}
	w.Raw("</select></label> <output id=\"f-shown\"></output> <button type=\"button\" id=\"f-more\" hidden=\"hidden\">show all</button></form>\n")
	// Rows are kept lean, as a run may have tens of thousands: the
	// script filters on the code and parts cells, and finds a link's
	// joint from its target's id.
	w.Raw("<table id=\"findings-table\" class=\"findings\"><thead><tr><th>severity</th><th>code</th><th>joint</th><th>parts</th><th>message</th><th>location (mm)</th></tr></thead>\n<tbody>\n")
	for i, f := range p.Findings {
		w.Raw("<tr")
		w.Attr("id", FindingRow(i))
		if f.Severity == "error" {
			w.Raw(" class=\"e\"")
		}
		w.Raw(">")
		w.Cell(f.Severity)
		w.Cell(f.Code)
		w.Raw("<td>")
		joint := ""
		if f.Joint != nil {
			joint = *f.Joint
		}
		label := joint
		if label == "" {
			label = "location"
		}
		if target := p.FindingTarget(i); target != "" {
			w.Raw("<a")
			w.Attr("href", "#"+target)
			w.Raw(">")
			w.Text(label)
			w.Raw("</a>")
		} else if joint != "" {
			w.Text(joint)
		} else {
			w.Raw("-")
		}
		w.Raw("</td><td>")
		for k, pt := range f.Parts {
			if k > 0 {
				w.Raw(" ")
			}
			w.Int(pt)
		}
		w.Raw("</td>")
		w.Cell(f.Message)
		w.Raw("<td>")
		if f.Location != nil {
			for k, v := range f.Location {
				if k > 0 {
					w.Raw(" ")
				}
				w.MM(v)
			}
		} else {
			w.Raw("-")
		}
		w.Raw("</td></tr>\n")
	}
	w.Raw("</tbody></table>\n</section>\n")
	return nil
}

func uniqueParts(ps []int64) []int64 {
	out := slices.Clone(ps)
	slices.Sort(out)
	return slices.Compact(out)
}

func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}
