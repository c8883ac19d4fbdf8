package html

import (
	"cmp"
	_ "embed"
	"io"
	"slices"
	"strconv"
	"strings"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

// Page is the content of one report.html. Every field but Title and
// Caution is optional: a command fills what it has.
type Page struct {
	Title     string // "Joinery build report"
	Generator string // "joinery <version>"
	// RunID is the run id every file of the output set carries; the page
	// writes it near its start as "run <id>" (document.FindRunID).
	RunID    string
	Caution  string // document.Caution
	Inputs   document.Inputs
	Settings []Setting // the run's options, in the order shown
	Counts   []Count   // joints by kind and state
	// Marks are the joints the pictures draw, sorted by joint id (see
	// SortMarks).
	Marks []Mark
	// PartNames names parts in tables and titles (may be nil).
	PartNames map[int64]string
	// Findings are every finding of the run, in report.json's order;
	// finding i is the table row "f-(i+1)".
	Findings []document.FindingDoc
	// Sections follow the header, in this order.
	Sections []Section
	// Unit is the unit of the lengths the documents give ("mm", "m",
	// "in"; "" is mm): the page shows them in it and labels them with
	// it. Finding messages keep the millimetres they were written in.
	Unit string
	// CompactMarks and CompactFindings, when above 0, replace
	// CompactAbove and CompactFindingsAbove (for tests).
	CompactMarks, CompactFindings int

	markIndex map[string]int // joint id -> index in Marks
}

// Setting is one option of a run as the header shows it.
type Setting struct {
	Name  string
	Value string
	Note  string // what it means, its unit or its default
}

// Count is the number of joints of one kind in one state.
type Count struct {
	Kind  string
	State string
	N     int
}

// Mark is one joint as the pictures draw it.
type Mark struct {
	Joint string // joint id
	Kind  string // "spot", "bolt", ...
	State string // "built", "flagged", "not-built"
	Point [3]float64
	// Findings counts the findings about the joint; a joint with
	// findings is drawn as its own element, with an id the findings
	// table links to.
	Findings int
}

// Section is one part of the page after its header: it writes the
// section's content (its <section> element with the Anchor as id, its
// heading and body). Sections read the page (marks, findings) for their
// links; they must write the same bytes for the same page, and must not
// change the page: Render writes them concurrently.
type Section interface {
	// Anchor is the section's id in the page: unique, lower-case
	// letters, digits and '-'.
	Anchor() string
	// Heading is the section's title in the page's contents.
	Heading() string
	// Write writes the section.
	Write(w *Writer, p *Page) error
}

// unit returns the name of the page's length unit.
func (p *Page) unit() string {
	if p.Unit == "" {
		return "mm"
	}
	return p.Unit
}

// unitOf returns the name of a documents' length unit ("" is mm) and
// its size in mm.
func unitOf(name string) (string, float64) {
	u, err := joints.ParseUnit(name)
	if err != nil || name == "" {
		return "mm", 1
	}
	return u.String(), u.MM()
}

func (p *Page) compactMarks() int {
	if p.CompactMarks > 0 {
		return p.CompactMarks
	}
	return CompactAbove
}

func (p *Page) compactFindings() int {
	if p.CompactFindings > 0 {
		return p.CompactFindings
	}
	return CompactFindingsAbove
}

// SortMarks sorts marks by joint id, in the natural order of
// joints.CompareIDs (the order of connectors.json).
func SortMarks(ms []Mark) {
	slices.SortStableFunc(ms, func(a, b Mark) int {
		return cmp.Or(joints.CompareIDs(a.Joint, b.Joint), strings.Compare(a.Joint, b.Joint))
	})
}

// MarkOf returns the mark of a joint. The first call indexes the marks:
// do not call it from several goroutines at once, nor change Marks after.
func (p *Page) MarkOf(joint string) (Mark, bool) {
	if p.markIndex == nil {
		p.markIndex = make(map[string]int, len(p.Marks))
		for i, m := range p.Marks {
			p.markIndex[m.Joint] = i
		}
	}
	i, ok := p.markIndex[joint]
	if !ok {
		return Mark{}, false
	}
	return p.Marks[i], true
}

// FindingTarget returns the id of the mark finding i (from 0) links to
// in the overview's axonometric view: its joint's mark, else the mark of
// its location, else "" for a finding that has neither or a page without
// an overview.
func (p *Page) FindingTarget(i int) string {
	if !p.hasSection(overviewAnchor) {
		return ""
	}
	f := p.Findings[i]
	if f.Joint != nil {
		if _, ok := p.MarkOf(*f.Joint); ok {
			return "axo-" + Anchor(*f.Joint)
		}
	}
	if f.Location != nil {
		return "axo-" + locationAnchor(i)
	}
	return ""
}

// locationAnchor names the mark of finding i's location, for findings
// that concern no joint with a mark.
func locationAnchor(i int) string { return "at-f" + itoa(i+1) }

// FindingRow returns the id of finding i's row (from 0) in the findings
// table.
func FindingRow(i int) string { return "f-" + itoa(i+1) }

// hasSection reports whether the page holds a section with the anchor.
func (p *Page) hasSection(anchor string) bool {
	for _, s := range p.Sections {
		if s.Anchor() == anchor {
			return true
		}
	}
	return false
}

//go:embed page.css
var pageCSS string

//go:embed page.js
var pageJS string

// Render writes the page as one self-contained HTML document.
func Render(out io.Writer, p *Page) error {
	w := &Writer{b: make([]byte, 0, 1<<16)}
	w.Raw("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n")
	w.Raw(`<meta name="viewport" content="width=device-width, initial-scale=1"/>` + "\n")
	if p.Generator != "" || p.RunID != "" {
		gen := p.Generator
		if p.RunID != "" {
			gen += "; run " + p.RunID
		}
		w.Raw("<meta name=\"generator\"")
		w.Attr("content", gen)
		w.Raw("/>\n")
	}
	w.Raw("<title>")
	w.Text(p.Title)
	w.Raw("</title>\n<style>\n")
	w.Raw(pageCSS)
	w.Raw("</style>\n</head>\n<body>\n")
	writeGlyphDefs(w)
	w.Raw("<header id=\"top\">\n<h1>")
	w.Text(p.Title)
	w.Raw("</h1>\n<p class=\"caution\" id=\"caution\"><strong>Caution.</strong> ")
	w.Text(p.Caution)
	w.Raw("</p>\n<nav><ol>\n<li><a href=\"#run\">Run</a></li>\n")
	for _, s := range p.Sections {
		w.Raw("<li><a")
		w.Attr("href", "#"+s.Anchor())
		w.Raw(">")
		w.Text(s.Heading())
		w.Raw("</a></li>\n")
	}
	w.Raw("</ol></nav>\n</header>\n<main>\n")
	writeRun(w, p)
	// Sections are written concurrently, each into its own writer; they
	// only read the page, whose marks are indexed first.
	p.MarkOf("")
	errs := make([]error, len(p.Sections))
	writeAll(w, len(p.Sections), func(sw *Writer, i int) { errs[i] = p.Sections[i].Write(sw, p) })
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	w.Raw("</main>\n<footer><p>")
	if p.Generator != "" {
		w.Text("Written by " + p.Generator + ". ")
	}
	w.Text(p.Caution)
	w.Raw("</p></footer>\n<script>\n")
	w.Raw(pageJS)
	w.Raw("</script>\n</body>\n</html>\n")
	_, err := out.Write(w.Bytes())
	return err
}

// writeRun writes the header's tables: inputs, settings, counts.
func writeRun(w *Writer, p *Page) {
	w.Raw("<section id=\"run\">\n<h2>Run</h2>\n<div class=\"cols\">\n")
	w.Raw("<table class=\"kv\" id=\"inputs\"><caption>Inputs</caption>\n<tbody>\n")
	kv := func(k string, vs ...string) {
		w.Raw("<tr><th>")
		w.Text(k)
		w.Raw("</th><td>")
		for i, v := range vs {
			if i > 0 {
				w.Raw("<br/>")
			}
			w.Text(v)
		}
		w.Raw("</td></tr>\n")
	}
	in := p.Inputs
	kv("meshes", in.Meshes...)
	if in.Parts != "" {
		kv("parts", in.Parts)
	}
	if len(in.PartsOverlays) > 0 {
		kv("parts overlays", in.PartsOverlays...)
	}
	if len(in.Joints) > 0 {
		kv("joints", in.Joints...)
	}
	if len(in.Connectors) > 0 {
		kv("connectors", in.Connectors...)
	}
	for _, r := range in.Renumbered {
		kv("renumbered", r.File+": node ids +"+itoa64(r.NodeOffset)+", element ids +"+itoa64(r.ElemOffset))
	}
	for _, t := range in.TagColumns {
		kv("tag columns", t.File+": "+strings.Join(t.Columns, ", "))
	}
	kv("length unit", p.unit())
	if p.RunID != "" {
		kv("run id", p.RunID)
	}
	w.Raw("</tbody></table>\n")
	if len(p.Settings) > 0 {
		w.Raw("<table class=\"kv\" id=\"settings\"><caption>Settings</caption>\n<tbody>\n")
		for _, s := range p.Settings {
			w.Raw("<tr><th>")
			w.Text(s.Name)
			w.Raw("</th><td>")
			w.Text(s.Value)
			if s.Note != "" {
				w.Raw(" <span class=\"note\">")
				w.Text(s.Note)
				w.Raw("</span>")
			}
			w.Raw("</td></tr>\n")
		}
		w.Raw("</tbody></table>\n")
	}
	if len(p.Counts) > 0 {
		writeCounts(w, p.Counts)
	}
	w.Raw("</div>\n")
	writeSeverities(w, p.Findings)
	w.Raw("</section>\n")
}

// writeCounts writes the joints by kind (rows) and state (columns).
func writeCounts(w *Writer, counts []Count) {
	var kinds, states []string
	n := map[[2]string]int{}
	for _, c := range counts {
		if !slices.Contains(kinds, c.Kind) {
			kinds = append(kinds, c.Kind)
		}
		if !slices.Contains(states, c.State) {
			states = append(states, c.State)
		}
		n[[2]string{c.Kind, c.State}] += c.N
	}
	slices.Sort(kinds)
	states = orderStates(states)
	w.Raw("<table id=\"counts\"><caption>Joints by kind and state</caption>\n<thead><tr><th>kind</th>")
	for _, s := range states {
		w.Raw("<th class=\"n\">")
		writeStateLabel(w, s)
		w.Raw("</th>")
	}
	w.Raw("<th class=\"n\">total</th></tr></thead>\n<tbody>\n")
	col := make([]int, len(states))
	total := 0
	for _, k := range kinds {
		w.Raw("<tr>")
		w.Cell(k)
		row := 0
		for i, s := range states {
			v := n[[2]string{k, s}]
			w.Raw("<td class=\"n\"")
			w.Attr("data-count", k+" "+s)
			w.Raw(">")
			w.Int(int64(v))
			w.Raw("</td>")
			row += v
			col[i] += v
		}
		w.IntCell(row)
		total += row
		w.Raw("</tr>\n")
	}
	w.Raw("</tbody>\n<tfoot><tr><th>all</th>")
	for _, v := range col {
		w.IntCell(v)
	}
	w.IntCell(total)
	w.Raw("</tr></tfoot></table>\n")
}

// writeSeverities writes one line counting the findings by severity.
func writeSeverities(w *Writer, fs []document.FindingDoc) {
	n := map[string]int{}
	for _, f := range fs {
		n[f.Severity]++
	}
	w.Raw("<p id=\"severities\">Findings: ")
	for i, s := range []string{"error", "warning", "info"} {
		if i > 0 {
			w.Raw(", ")
		}
		w.Raw("<span class=\"sev-" + s + "\">")
		w.Int(int64(n[s]))
		w.Raw(" " + s + "</span>")
	}
	if len(fs) > 0 {
		w.Raw(" (<a href=\"#findings\">table</a>)")
	}
	w.Raw(".</p>\n")
}

func itoa(v int) string { return strconv.Itoa(v) }

func itoa64(v int64) string { return strconv.FormatInt(v, 10) }
