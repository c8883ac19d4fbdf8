package writers

import (
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/joinery-cae/joinery/joints"
)

// ReportDoc is the report.json document (see
// writers/schema/report.schema.json).
type ReportDoc struct {
	Schema    string         `json:"schema"`
	Version   int            `json:"version"`
	Generator string         `json:"generator"`
	Caution   string         `json:"caution"`
	Inputs    Inputs         `json:"inputs"`
	Summary   joints.Summary `json:"summary"`
	Findings  []FindingDoc   `json:"findings"`
}

// FindingDoc is one finding.
type FindingDoc struct {
	Severity string  `json:"severity"`
	Code     string  `json:"code"`
	Joint    *string `json:"joint"`
	Parts    []int64 `json:"parts"`
	Message  string  `json:"message"`
	Location *Vec    `json:"location"`
}

// NewReportDoc converts a build result into the report document.
func NewReportDoc(r *joints.Result, info RunInfo) *ReportDoc {
	doc := &ReportDoc{
		Schema: ReportSchema, Version: ReportVersion, Generator: info.Generator, Caution: Caution,
		Inputs:   Inputs{Meshes: nonNil(info.Meshes), Parts: info.Parts, Joints: nonNil(info.Joints)},
		Summary:  joints.Summarize(r),
		Findings: make([]FindingDoc, 0, len(r.Findings)),
	}
	for _, f := range r.Findings {
		fd := FindingDoc{Severity: f.Severity.String(), Code: f.Code, Parts: f.Parts, Message: f.Message}
		if fd.Parts == nil {
			fd.Parts = []int64{}
		}
		if f.Joint != "" {
			id := f.Joint
			fd.Joint = &id
		}
		if f.HasPoint {
			v := vecOf(f.Point)
			fd.Location = &v
		}
		doc.Findings = append(doc.Findings, fd)
	}
	return doc
}

// WriteReportJSON writes the report document.
func WriteReportJSON(w io.Writer, doc *ReportDoc) error { return WriteJSON(w, doc) }

// WriteReportText writes the report for a person: a one-screen summary,
// the findings grouped by code, the part-pair table, and the caution.
func WriteReportText(w io.Writer, doc *ReportDoc) error {
	ew := &errWriter{w: w}
	s := doc.Summary
	ew.printf("joinery connector report (%s)\n\n", doc.Generator)
	summaryLines(ew, doc)
	ew.printf("inputs      %s", strings.Join(doc.Inputs.Meshes, " "))
	if doc.Inputs.Parts != "" {
		ew.printf(" | parts %s", doc.Inputs.Parts)
	}
	if len(doc.Inputs.Joints) > 0 {
		ew.printf(" | joints %s", strings.Join(doc.Inputs.Joints, " "))
	}
	ew.printf("\n")

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
	fmt.Fprintf(tw, "part\tpart\tconnectors\twith warnings\t\n")
	for _, p := range s.PartPairs {
		fmt.Fprintf(tw, "%d\t%d\t%d\t%d\t\n", p.A, p.B, p.Count, p.Warnings)
	}
	tw.Flush()
	ew.printf("\nCAUTION: %s\n", doc.Caution)
	return ew.err
}

// WriteBuildSummary writes the few lines a build prints on stdout.
func WriteBuildSummary(w io.Writer, doc *ReportDoc, outDir string) error {
	ew := &errWriter{w: w}
	summaryLines(ew, doc)
	ew.printf("written     %s/{connectors.json,connectors.csv,connectors.vtk,report.json,report.txt}\n", outDir)
	ew.printf("CAUTION: %s\n", doc.Caution)
	return ew.err
}

func summaryLines(ew *errWriter, doc *ReportDoc) {
	s := doc.Summary
	ew.printf("joints      %d (%s)\n", s.Joints, countList(s.ByKind))
	ew.printf("built       %d ok, %d with warnings\n", s.ByStatus["ok"], s.ByStatus["warning"])
	ew.printf("not built   %d\n", s.ByStatus["failed"])
	ew.printf("stacks      %s\n", stackList(s.ByStack))
	ew.printf("findings    %d error, %d warning, %d info\n", s.BySev["error"], s.BySev["warning"], s.BySev["info"])
	if len(s.ByCode) > 0 {
		ew.printf("by code     %s\n", countList(s.ByCode))
	}
}

func severityRank(doc *ReportDoc, code string) int {
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
