package document

import (
	"io"

	"github.com/joinery-cae/joinery/joints"
)

// ReportDoc is the report.json document (see
// writers/document/schema/report.schema.json).
type ReportDoc struct {
	Schema    string       `json:"schema"`
	Version   int          `json:"version"`
	Generator string       `json:"generator"`
	RunID     string       `json:"run_id"`
	Caution   string       `json:"caution"`
	Units     Units        `json:"units"`
	Inputs    Inputs       `json:"inputs"`
	Summary   Summary      `json:"summary"`
	Findings  []FindingDoc `json:"findings"`
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

// NewReport converts a build result, in mm, into the report document,
// with finding locations in info.Unit.
func NewReport(r *joints.Result, info RunInfo) *ReportDoc {
	doc := &ReportDoc{
		Schema: ReportSchema, Version: ReportVersion, Generator: info.Generator, RunID: info.RunID, Caution: Caution,
		Inputs:   info.inputs(),
		Summary:  Summarize(r),
		Findings: make([]FindingDoc, 0, len(r.Findings)),
	}
	for _, f := range r.Findings {
		doc.Findings = append(doc.Findings, findingDoc(f))
	}
	doc.toUnit(info.Unit)
	return doc
}

func findingDoc(f joints.Finding) FindingDoc {
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
	return fd
}

// EncodeReport writes the report document as indented JSON.
func EncodeReport(w io.Writer, doc *ReportDoc) error { return EncodeJSON(w, doc) }

// DecodeReport reads a report document; name is the file's name, for
// errors.
func DecodeReport(r io.Reader, name string) (*ReportDoc, error) {
	var doc ReportDoc
	if err := decode(r, name, ReportSchema, ReportVersion, &doc); err != nil {
		return nil, err
	}
	return &doc, nil
}
