package html

import (
	"encoding/json"
	"slices"
	"strconv"
	"strings"
)

// CompactFindingsAbove is the number of findings above which the
// findings table is written as data that the page's script turns into
// rows: each message is cut into its text, shared by the findings that
// say the same but for their numbers, and its numbers. A run with tens
// of thousands of findings so keeps its page small; below it, the rows
// are plain HTML and read without a script.
const CompactFindingsAbove = 2000

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
	w.Raw("<table id=\"findings-table\" class=\"findings\"><thead><tr><th>severity</th><th>code</th><th>joint</th><th>parts</th><th>message</th><th>location (")
	w.Text(p.unit())
	w.Raw(")</th></tr></thead>\n<tbody>\n")
	if len(p.Findings) > p.compactFindings() {
		w.Raw("</tbody></table>\n<noscript><p>The rows of this table are drawn by the page's script; every finding is also in report.json and report.txt.</p></noscript>\n")
		writeFindingsData(w, p)
		w.Raw("</section>\n")
		return nil
	}
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

// writeFindingsData writes the findings as the data of the table's
// rows (see CompactFindingsAbove), in a script element the page's
// script reads: {"sev": severities, "code": codes, "text": message
// texts with "~" for each number, "rows": [severity, code, joint or
// null, parts, text (-1: the message is in numbers), numbers or the
// whole message, location or "", link target: "" none, "=" the joint's
// own mark, else the target's id]}. Strings are JSON with <, > and &
// escaped, so the element's text is also well-formed XML.
func writeFindingsData(w *Writer, p *Page) {
	idx := func(m map[string]int, list *[]string, s string) int {
		i, ok := m[s]
		if !ok {
			i = len(*list)
			m[s] = i
			*list = append(*list, s)
		}
		return i
	}
	sevs, codes, texts := map[string]int{}, map[string]int{}, map[string]int{}
	var sevList, codeList, textList []string
	var rows []byte
	var loc Writer
	for i, f := range p.Findings {
		if i > 0 {
			rows = append(rows, ',', '\n')
		}
		rows = append(rows, '[')
		rows = strconv.AppendInt(rows, int64(idx(sevs, &sevList, f.Severity)), 10)
		rows = append(rows, ',')
		rows = strconv.AppendInt(rows, int64(idx(codes, &codeList, f.Code)), 10)
		rows = append(rows, ',')
		if f.Joint != nil {
			rows = appendJSON(rows, *f.Joint)
		} else {
			rows = append(rows, "null"...)
		}
		rows = append(rows, ',', '"')
		for k, pt := range f.Parts {
			if k > 0 {
				rows = append(rows, ' ')
			}
			rows = strconv.AppendInt(rows, pt, 10)
		}
		rows = append(rows, '"', ',')
		text, nums, ok := splitNumbers(f.Message)
		if ok {
			rows = strconv.AppendInt(rows, int64(idx(texts, &textList, text)), 10)
			rows = append(rows, ',')
			rows = appendJSON(rows, nums)
		} else {
			rows = append(rows, "-1,"...)
			rows = appendJSON(rows, f.Message)
		}
		rows = append(rows, ',', '"')
		if f.Location != nil {
			loc.b = loc.b[:0]
			for k, v := range f.Location {
				if k > 0 {
					loc.Raw(" ")
				}
				loc.MM(v)
			}
			rows = append(rows, loc.b...)
		}
		rows = append(rows, '"', ',')
		target := p.FindingTarget(i)
		switch {
		case target == "":
			rows = append(rows, `""`...)
		case f.Joint != nil && target == "axo-"+*f.Joint:
			rows = append(rows, `"="`...)
		default:
			rows = appendJSON(rows, target)
		}
		rows = append(rows, ']')
	}
	list := func(name string, l []string) {
		w.Raw("\"" + name + "\":[")
		for i, s := range l {
			if i > 0 {
				w.Raw(",")
			}
			w.b = appendJSON(w.b, s)
		}
		w.Raw("],\n")
	}
	w.Raw("<script type=\"application/json\" id=\"findings-data\">{")
	list("sev", sevList)
	list("code", codeList)
	list("text", textList)
	w.Raw("\"rows\":[\n")
	w.b = append(w.b, rows...)
	w.Raw("]}</script>\n")
}

// splitNumbers cuts a message into its text, with "~" for every run of
// digits (with the decimal points between them), and those runs joined
// by spaces. It fails on a message that holds "~" itself.
func splitNumbers(msg string) (text, nums string, ok bool) {
	if strings.Contains(msg, "~") {
		return "", "", false
	}
	var t, n []byte
	digit := func(c byte) bool { return c >= '0' && c <= '9' }
	for i := 0; i < len(msg); {
		if !digit(msg[i]) {
			t = append(t, msg[i])
			i++
			continue
		}
		j := i
		for j < len(msg) && (digit(msg[j]) || msg[j] == '.' && j+1 < len(msg) && digit(msg[j+1])) {
			j++
		}
		if len(n) > 0 {
			n = append(n, ' ')
		}
		n = append(n, msg[i:j]...)
		t = append(t, '~')
		i = j
	}
	return string(t), string(n), true
}

// appendJSON appends s as a JSON string, with <, > and & escaped (the
// encoder's HTML escaping), so that it may stand in a script element.
func appendJSON(b []byte, s string) []byte {
	q, err := json.Marshal(s)
	if err != nil { // a string always encodes
		return append(b, `""`...)
	}
	return append(b, q...)
}
