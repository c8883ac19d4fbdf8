package document

import (
	"cmp"
	"io"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// ReportDoc is the report.json document (see
// writers/document/schema/report.schema.json).
type ReportDoc struct {
	Schema    string `json:"schema"`
	Version   int    `json:"version"`
	Generator string `json:"generator"`
	RunID     string `json:"run_id"`
	// Command is the run that wrote the report: "build" (also each
	// variant of a sweep), "check", "flanges" or "offsets".
	Command  string       `json:"command"`
	Caution  string       `json:"caution"`
	Units    Units        `json:"units"`
	Inputs   Inputs       `json:"inputs"`
	Summary  Summary      `json:"summary"`
	Findings []FindingDoc `json:"findings"`
	// PartNames gives the names of the parts the findings and the part
	// pairs mention, by id (parts without a name are left out).
	PartNames []PartName `json:"part_names"`
}

// PartName is a part's id and name.
type PartName struct {
	ID   int64  `json:"id"`
	Name string `json:"name"`
}

// FindingDoc is one finding.
type FindingDoc struct {
	Severity string  `json:"severity"`
	Code     string  `json:"code"`
	Joint    *string `json:"joint"`
	Parts    []int64 `json:"parts"`
	Message  string  `json:"message"`
	Location *Vec    `json:"location"`
	// Joints lists every joint the finding concerns, Joint first (a seam
	// chain, both welds of a duplicate, the welds of a hinge); empty for
	// run-level findings.
	Joints []string `json:"joints"`
	// Motion is the free motion of a mechanism or unrestrained finding.
	Motion *MotionDoc `json:"motion,omitempty"`
}

// MotionDoc is a free motion: its kind (rotation, translation, screw,
// pivot, several), a point of its axis or its centre, its direction,
// the pitch of a screw and the number of free motions it stands for.
type MotionDoc struct {
	Kind      string   `json:"kind"`
	Point     *Vec     `json:"point"`
	Direction *Vec     `json:"direction"`
	Pitch     *float64 `json:"pitch,omitempty"`
	Count     int      `json:"count"`
}

// NewReport converts a build result, in mm, into the report document,
// with finding locations in info.Unit.
func NewReport(r *joints.Result, info RunInfo) *ReportDoc {
	doc := &ReportDoc{
		Schema: ReportSchema, Version: ReportVersion, Generator: info.Generator, RunID: info.RunID, Command: "build", Caution: Caution,
		Inputs:   info.inputs(),
		Summary:  Summarize(r),
		Findings: make([]FindingDoc, 0, len(r.Findings)),
	}
	mentioned := map[int64]bool{}
	for _, f := range r.Findings {
		doc.Findings = append(doc.Findings, findingDoc(f))
		for _, p := range f.Parts {
			mentioned[p] = true
		}
	}
	doc.toUnit(info.Unit)
	for _, pp := range doc.Summary.PartPairs {
		mentioned[pp.A], mentioned[pp.B] = true, true
	}
	doc.PartNames = []PartName{}
	for id := range mentioned {
		if name := info.PartNames[id]; name != "" {
			doc.PartNames = append(doc.PartNames, PartName{ID: id, Name: name})
		}
	}
	slices.SortFunc(doc.PartNames, func(a, b PartName) int { return cmp.Compare(a.ID, b.ID) })
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
	fd.Joints = slices.Clone(f.AllJoints())
	if fd.Joints == nil {
		fd.Joints = []string{}
	}
	if m := f.Motion; m != nil {
		md := &MotionDoc{Kind: m.Kind, Count: m.Count}
		if m.HasPoint {
			p := vecOf(m.Point)
			md.Point = &p
		}
		if m.Direction != (r3.Vec{}) {
			d := vecOf(m.Direction)
			md.Direction = &d
		}
		if m.Kind == joints.MotionScrew {
			pitch := clean(m.Pitch)
			md.Pitch = &pitch
		}
		fd.Motion = md
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
