package writers

import (
	"fmt"
	"io"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/joinery-cae/joinery/writers/document"
)

// fullCodes are the codes whose findings report.txt always lists in
// full, however many: every seam chain, loose group and free motion.
var fullCodes = []string{"seam", "mechanism", "unrestrained", "free-part"}

// groupAbove is the number of findings of one code above which
// report.txt groups them by the parts they concern, with counts.
const groupAbove = 20

// idsPerLine is the number of joint ids per line in report.txt.
const idsPerLine = 12

// WriteReportText writes the report for a person: a one-screen summary,
// the findings by code (each with its joints, parts with their names,
// location and message; codes with many findings grouped by the parts
// they concern, with counts, except seams, mechanisms, unrestrained
// nodes and free parts, always in full), the part-pair table, and the
// caution.
func WriteReportText(w io.Writer, doc *document.ReportDoc) error {
	ew := &errWriter{w: w}
	s := doc.Summary
	what := "connector report"
	if doc.Command == "check" {
		what = "check report"
	}
	ew.printf("joinery %s (%s; run %s)\n\n", what, doc.Generator, doc.RunID)
	summaryLines(ew, doc)
	ew.printf("inputs      %s", strings.Join(doc.Inputs.Meshes, " "))
	if doc.Inputs.Parts != "" {
		ew.printf(" | parts %s", doc.Inputs.Parts)
	}
	if len(doc.Inputs.Joints) > 0 {
		ew.printf(" | joints %s", strings.Join(doc.Inputs.Joints, " "))
	}
	if len(doc.Inputs.Connectors) > 0 {
		ew.printf(" | connectors %s", strings.Join(doc.Inputs.Connectors, " "))
	}
	ew.printf("\n")
	inputLines(ew, doc.Inputs)

	names := map[int64]string{}
	for _, p := range doc.PartNames {
		names[p.ID] = p.Name
	}
	codes := make([]string, 0, len(s.ByCode))
	for c := range s.ByCode {
		codes = append(codes, c)
	}
	slices.SortFunc(codes, func(a, b string) int {
		if ra, rb := severityRank(doc, a), severityRank(doc, b); ra != rb {
			return rb - ra
		}
		return strings.Compare(a, b)
	})
	lu := unitOf(doc.Units.Length)
	byCode := map[string][]*document.FindingDoc{}
	for i := range doc.Findings {
		f := &doc.Findings[i]
		byCode[f.Code] = append(byCode[f.Code], f)
	}
	for _, code := range codes {
		fs := byCode[code]
		ew.printf("\n%s (%s)\n", code, severityCounts(fs))
		if len(fs) > groupAbove && !slices.Contains(fullCodes, code) {
			groupedFindings(ew, fs, names, lu)
			continue
		}
		for _, f := range fs {
			fullFinding(ew, f, names, lu)
		}
	}

	ew.printf("\npart pairs joined\n")
	tw := tabwriter.NewWriter(ew, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "part\tpart\tconnectors\tflagged\t\n")
	for _, p := range s.PartPairs {
		fmt.Fprintf(tw, "%d\t%d\t%d\t%d\t\n", p.A, p.B, p.Count, p.Flagged)
	}
	tw.Flush()
	ew.printf("\nCAUTION: %s\n", doc.Caution)
	return ew.err
}

// counted returns "1 group" or "n groups".
func counted(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

// severityCounts says how many findings there are of each severity:
// "3 warning", "1 error, 2 warning".
func severityCounts(fs []*document.FindingDoc) string {
	n := map[string]int{}
	for _, f := range fs {
		n[f.Severity]++
	}
	var parts []string
	for _, sev := range []string{"error", "warning", "info"} {
		if n[sev] > 0 {
			parts = append(parts, fmt.Sprintf("%d %s", n[sev], sev))
		}
	}
	return strings.Join(parts, ", ")
}

// fullFinding writes one finding: its joints, then its parts with their
// names and its location, then its motion, then its message.
func fullFinding(ew *errWriter, f *document.FindingDoc, names map[int64]string, lu lengthUnit) {
	ids := f.Joints
	if len(ids) == 0 && f.Joint != nil {
		ids = []string{*f.Joint}
	}
	head := "-"
	if len(ids) > 0 {
		head = strings.Join(ids[:min(len(ids), idsPerLine)], " ")
	}
	ew.printf("  %-7s %s\n", f.Severity, head)
	for k := idsPerLine; k < len(ids); k += idsPerLine {
		ew.printf("          %s\n", strings.Join(ids[k:min(len(ids), k+idsPerLine)], " "))
	}
	var where []string
	if len(f.Parts) > 0 {
		where = append(where, partsText(f.Parts, names))
	}
	if f.Location != nil {
		where = append(where, "at "+lu.point(*f.Location))
	}
	if len(where) > 0 {
		ew.printf("          %s\n", strings.Join(where, "; "))
	}
	if m := f.Motion; m != nil {
		ew.printf("          motion: %s\n", motionText(m, lu))
	}
	ew.printf("          %s\n", f.Message)
}

// groupedFindings writes the findings of one code grouped by the parts
// they concern: per group the count, the joints (the first few) and the
// first finding's location and message.
func groupedFindings(ew *errWriter, fs []*document.FindingDoc, names map[int64]string, lu lengthUnit) {
	type group struct {
		parts []int64
		fs    []*document.FindingDoc
	}
	var gs []*group
	at := map[string]*group{}
	for _, f := range fs {
		ps := slices.Clone(f.Parts)
		slices.Sort(ps)
		key := fmt.Sprint(ps)
		g := at[key]
		if g == nil {
			g = &group{parts: ps}
			at[key] = g
			gs = append(gs, g)
		}
		g.fs = append(g.fs, f)
	}
	slices.SortStableFunc(gs, func(a, b *group) int { return slices.Compare(a.parts, b.parts) })
	ew.printf("  grouped by the parts they concern (every finding is in report.json)\n")
	for _, g := range gs {
		what := "no part"
		if len(g.parts) > 0 {
			what = partsText(g.parts, names)
		}
		ew.printf("  %s: %d\n", what, len(g.fs))
		var ids []string
		for _, f := range g.fs {
			switch {
			case len(f.Joints) > 0:
				ids = append(ids, strings.Join(f.Joints, "+"))
			case f.Joint != nil:
				ids = append(ids, *f.Joint)
			}
		}
		if len(ids) > 0 {
			line := strings.Join(ids[:min(len(ids), idsPerLine)], " ")
			if len(ids) > idsPerLine {
				line += fmt.Sprintf(" ... (%d more)", len(ids)-idsPerLine)
			}
			ew.printf("          %s\n", line)
		}
		first := g.fs[0]
		loc := ""
		if first.Location != nil {
			loc = "at " + lu.point(*first.Location) + ": "
		}
		ew.printf("          first: %s%s\n", loc, first.Message)
	}
}

// partsText lists parts with their names: "parts 100 rear floor panel,
// 200 rear cross-member".
func partsText(ps []int64, names map[int64]string) string {
	items := make([]string, len(ps))
	for i, p := range ps {
		items[i] = strconv.FormatInt(p, 10)
		if n := names[p]; n != "" {
			items[i] += " " + n
		}
	}
	if len(ps) == 1 {
		return "part " + items[0]
	}
	return "parts " + strings.Join(items, ", ")
}

// lengthUnit formats lengths in the unit of the documents (the
// meshes'): to the micrometre whatever the unit, trailing zeros cut.
type lengthUnit struct {
	name     string
	decimals int
}

// unitOf returns the format of lengths in unit ("mm", "m" or "in"; any
// other is taken as mm): 3 decimals in mm, 6 in m, 5 in inches (0.25
// micrometre).
func unitOf(unit string) lengthUnit {
	switch unit {
	case "m":
		return lengthUnit{"m", 6}
	case "in":
		return lengthUnit{"in", 5}
	}
	return lengthUnit{"mm", 3}
}

// point formats a location.
func (lu lengthUnit) point(v document.Vec) string {
	return "(" + lu.num(v[0]) + ", " + lu.num(v[1]) + ", " + lu.num(v[2]) + ")"
}

func (lu lengthUnit) num(v float64) string {
	s := strconv.FormatFloat(v, 'f', lu.decimals, 64)
	s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	if s == "-0" || s == "" {
		return "0"
	}
	return s
}

// motionText describes a free motion on one line.
func motionText(m *document.MotionDoc, lu lengthUnit) string {
	s := fmt.Sprintf("%s x %d", m.Kind, m.Count)
	if m.Point != nil {
		s += ", point " + lu.point(*m.Point)
	}
	if m.Direction != nil {
		d := *m.Direction
		s += fmt.Sprintf(", direction (%s, %s, %s)", unitText(d[0]), unitText(d[1]), unitText(d[2]))
	}
	if m.Pitch != nil {
		s += ", pitch " + lu.num(*m.Pitch) + " " + lu.name + "/rad"
	}
	return s
}

func unitText(v float64) string {
	s := strconv.FormatFloat(v, 'f', 4, 64)
	s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	if s == "-0" || s == "" {
		return "0"
	}
	return s
}

// WriteBuildSummary writes the few lines a build prints on stdout.
func WriteBuildSummary(w io.Writer, doc *document.ReportDoc, outDir string, files []string) error {
	ew := &errWriter{w: w}
	summaryLines(ew, doc)
	inputLines(ew, doc.Inputs)
	ew.printf("written     %s/{%s}\n", filepath.ToSlash(filepath.Clean(outDir)), strings.Join(files, ","))
	ew.printf("run id      %s\n", doc.RunID)
	ew.printf("CAUTION: %s\n", doc.Caution)
	return ew.err
}

func summaryLines(ew *errWriter, doc *document.ReportDoc) {
	s := doc.Summary
	if doc.Command == "check" {
		// A check keeps the states its connectors were written with,
		// flagging those it finds at fault itself: a connector flagged
		// by its build may have no finding here.
		ew.printf("connectors  %d (%s)\n", s.Joints, countList(s.ByKind))
		ew.printf("states      %d built (%d flagged, by their build or this check), %d not built\n",
			s.ByState["built"]+s.ByState["flagged"], s.ByState["flagged"], s.ByState["not-built"])
	} else {
		ew.printf("joints      %d (%s)\n", s.Joints, countList(s.ByKind))
		ew.printf("built       %d (%d flagged)\n", s.ByState["built"]+s.ByState["flagged"], s.ByState["flagged"])
		ew.printf("not built   %d\n", s.ByState["not-built"])
	}
	ew.printf("stacks      %s\n", stackList(s.ByStack))
	ew.printf("findings    %d error, %d warning, %d info\n", s.BySev["error"], s.BySev["warning"], s.BySev["info"])
	if len(s.ByCode) > 0 {
		ew.printf("by code     %s\n", countList(s.ByCode))
	}
	if a := s.Assembly; a != nil {
		ew.printf("assembly    %s of parts (%d grounded), %s, %s, %d unrestrained\n",
			counted(a.Groups, "group"), a.Grounded, counted(a.RigidBodyModes, "rigid-body mode"), counted(a.Mechanisms, "mechanism motion"), a.Unrestrained)
	}
}

// inputLines says what was done to the inputs: the id offsets of
// renumbered mesh files (file id + offset = id in every output) and the
// joint-list columns kept as free tags. It prints nothing when neither
// applies.
func inputLines(ew *errWriter, in document.Inputs) {
	for _, r := range in.Renumbered {
		ew.printf("renumbered  %s: node ids %+d, element ids %+d\n", r.File, r.NodeOffset, r.ElemOffset)
	}
	for _, t := range in.TagColumns {
		ew.printf("free tags   %s: %s\n", t.File, strings.Join(t.Columns, ", "))
	}
}

func severityRank(doc *document.ReportDoc, code string) int {
	r := 0
	for _, f := range doc.Findings {
		if f.Code == code {
			switch f.Severity {
			case "error":
				r = max(r, 2)
			case "warning":
				r = max(r, 1)
			}
		}
	}
	return r
}

func countList(m map[string]int) string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	parts := make([]string, 0, len(keys))
	for _, k := range keys {
		parts = append(parts, fmt.Sprintf("%s %d", k, m[k]))
	}
	if len(parts) == 0 {
		return "none"
	}
	return strings.Join(parts, ", ")
}

func stackList(m map[string]int) string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.SortFunc(keys, func(a, b string) int {
		x, _ := strconv.Atoi(a)
		y, _ := strconv.Atoi(b)
		return x - y
	})
	parts := make([]string, 0, len(keys))
	for _, k := range keys {
		parts = append(parts, fmt.Sprintf("%d of %s sheets", m[k], k))
	}
	if len(parts) == 0 {
		return "none built"
	}
	return strings.Join(parts, ", ")
}
