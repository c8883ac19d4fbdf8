package writers

import (
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/joinery-cae/joinery/writers/document"
)

// WriteReportText writes the report for a person: a one-screen summary,
// the findings grouped by code, the part-pair table, and the caution.
func WriteReportText(w io.Writer, doc *document.ReportDoc) error {
	ew := &errWriter{w: w}
	s := doc.Summary
	ew.printf("joinery connector report (%s; run %s)\n\n", doc.Generator, doc.RunID)
	summaryLines(ew, doc)
	ew.printf("inputs      %s", strings.Join(doc.Inputs.Meshes, " "))
	if doc.Inputs.Parts != "" {
		ew.printf(" | parts %s", doc.Inputs.Parts)
	}
	if len(doc.Inputs.Joints) > 0 {
		ew.printf(" | joints %s", strings.Join(doc.Inputs.Joints, " "))
	}
	ew.printf("\n")
	inputLines(ew, doc.Inputs)

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
	for _, code := range codes {
		ew.printf("\n%s (%d)\n", code, s.ByCode[code])
		for _, f := range doc.Findings {
			if f.Code != code {
				continue
			}
			joint := "-"
			if f.Joint != nil {
				joint = *f.Joint
			}
			ew.printf("  %-7s %-12s %s\n", f.Severity, joint, f.Message)
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

// WriteBuildSummary writes the few lines a build prints on stdout.
func WriteBuildSummary(w io.Writer, doc *document.ReportDoc, outDir string, files []string) error {
	ew := &errWriter{w: w}
	summaryLines(ew, doc)
	inputLines(ew, doc.Inputs)
	ew.printf("written     %s/{%s}\n", outDir, strings.Join(files, ","))
	ew.printf("run id      %s\n", doc.RunID)
	ew.printf("CAUTION: %s\n", doc.Caution)
	return ew.err
}

func summaryLines(ew *errWriter, doc *document.ReportDoc) {
	s := doc.Summary
	ew.printf("joints      %d (%s)\n", s.Joints, countList(s.ByKind))
	ew.printf("built       %d (%d flagged)\n", s.ByState["built"]+s.ByState["flagged"], s.ByState["flagged"])
	ew.printf("not built   %d\n", s.ByState["not-built"])
	ew.printf("stacks      %s\n", stackList(s.ByStack))
	ew.printf("findings    %d error, %d warning, %d info\n", s.BySev["error"], s.BySev["warning"], s.BySev["info"])
	if len(s.ByCode) > 0 {
		ew.printf("by code     %s\n", countList(s.ByCode))
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
