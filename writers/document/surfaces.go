package document

import (
	"io"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/offset"
)

// Schema name and version of surfaces.json (see the package comment for
// the versioning rule).
const (
	SurfacesSchema  = "joinery/surfaces"
	SurfacesVersion = 1
)

// SurfacesDoc is the surfaces.json document of joinery offsets (see
// writers/document/schema/surfaces.schema.json): per part the surface
// its mesh was drawn on, with the evidence, and every contact between
// two parts the evidence came from.
type SurfacesDoc struct {
	Schema    string           `json:"schema"`
	Version   int              `json:"version"`
	Generator string           `json:"generator"`
	RunID     string           `json:"run_id"`
	Caution   string           `json:"caution"`
	Units     Units            `json:"units"`
	Inputs    Inputs           `json:"inputs"`
	Options   SurfacesOptions  `json:"options"`
	Parts     []PartSurfaceDoc `json:"parts"`
	Contacts  []SurfaceContact `json:"contacts"`
}

// SurfacesOptions records the settings of an inference.
type SurfacesOptions struct {
	Window           float64  `json:"window"` // mm: facing elements were sought this far apart
	AngleLimit       float64  `json:"angle_limit"`
	GapAllowance     *float64 `json:"gap_allowance"` // null: the build default
	Reach            float64  `json:"reach"`         // mm, around joint sites
	JointSiteWeight  float64  `json:"joint_site_weight"`
	UnsureConfidence float64  `json:"unsure_confidence"`
}

// PartSurfaceDoc is what the inference found for one part.
type PartSurfaceDoc struct {
	ID          int64   `json:"id"`
	Thickness   float64 `json:"thickness"`
	Elements    int     `json:"elements"`
	Declared    string  `json:"declared"`
	Surface     string  `json:"surface"`
	Offset      float64 `json:"offset"`
	Confidence  float64 `json:"confidence"`
	Evidence    float64 `json:"evidence"`
	Agreeing    float64 `json:"agreeing"`
	Contacts    int     `json:"contacts"`
	Disagreeing int     `json:"disagreeing"`
	Pieces      int     `json:"pieces"`
	FlipCount   int     `json:"flip_count"`
	Flip        []int64 `json:"flip_elements"`
	Conflicts   int     `json:"unorientable_edges"`
}

// SurfaceContact is one place where two parts face each other.
type SurfaceContact struct {
	A          int64   `json:"a"`
	B          int64   `json:"b"`
	Normals    string  `json:"normals"` // "same" or "opposed"
	Separation float64 `json:"separation"`
	Min        float64 `json:"min"`
	Max        float64 `json:"max"`
	ThicknessA float64 `json:"thickness_a"`
	ThicknessB float64 `json:"thickness_b"`
	Area       float64 `json:"area"`
	Sites      int     `json:"joint_sites"`
	Samples    int     `json:"samples"`
	Weight     float64 `json:"weight"`
	Point      Vec     `json:"point"`
	Expected   float64 `json:"expected"`
	Side       int     `json:"side"`
	Allowance  float64 `json:"allowance"`
	Agrees     bool    `json:"agrees"`
}

// NewSurfaces converts an inference into the surfaces document, with
// lengths (and areas) in info.Unit.
func NewSurfaces(r *offset.Result, info RunInfo) *SurfacesDoc {
	o := r.Options
	doc := &SurfacesDoc{
		Schema: SurfacesSchema, Version: SurfacesVersion, Generator: info.Generator, RunID: info.RunID, Caution: Caution,
		Units: Units{Length: "mm", Angle: "degree"}, Inputs: info.inputs(),
		Options: SurfacesOptions{Window: r.Reach, AngleLimit: o.AngleLimit, Reach: o.Reach,
			JointSiteWeight: offset.JointSiteWeight, UnsureConfidence: offset.UnsureConfidence},
		Parts: make([]PartSurfaceDoc, 0, len(r.Parts)), Contacts: make([]SurfaceContact, 0, len(r.Contacts)),
	}
	if o.GapAllowance > 0 {
		g := o.GapAllowance
		doc.Options.GapAllowance = &g
	}
	for _, p := range r.Parts {
		doc.Parts = append(doc.Parts, PartSurfaceDoc{ID: p.Part, Thickness: p.Thickness, Elements: p.Elements,
			Declared: p.Declared.String(), Surface: p.Surface.String(), Offset: clean(p.Offset), Confidence: p.Confidence,
			Evidence: p.Evidence, Agreeing: p.Agreeing, Contacts: p.Contacts, Disagreeing: p.Disagreeing, Pieces: p.Pieces,
			FlipCount: len(p.Flip), Flip: nonNil(p.Flip), Conflicts: p.Conflicts})
	}
	for _, c := range r.Contacts {
		n := "same"
		if c.Opposed {
			n = "opposed"
		}
		doc.Contacts = append(doc.Contacts, SurfaceContact{A: c.A, B: c.B, Normals: n, Separation: clean(c.Separation),
			Min: clean(c.Min), Max: clean(c.Max), ThicknessA: c.TA, ThicknessB: c.TB, Area: c.Area, Sites: c.Sites,
			Samples: c.Samples, Weight: c.Weight, Point: vecOf(c.Point), Expected: clean(c.Expected), Side: c.Side,
			Allowance: c.Allowance, Agrees: c.Agrees})
	}
	doc.toUnit(info.Unit)
	return doc
}

// NewSurfacesReport converts an inference into a report document of the
// same shape as a build's: its findings, counted in the summary.
func NewSurfacesReport(r *offset.Result, info RunInfo) *ReportDoc {
	doc := NewReport(&joints.Result{Findings: r.Findings, Options: r.Options}, info)
	doc.Command = "offsets"
	return doc
}

// EncodeSurfaces writes the surfaces document as indented JSON.
func EncodeSurfaces(w io.Writer, doc *SurfacesDoc) error { return EncodeJSON(w, doc) }

// DecodeSurfaces reads a surfaces document; name is the file's name,
// for errors.
func DecodeSurfaces(r io.Reader, name string) (*SurfacesDoc, error) {
	var doc SurfacesDoc
	if err := decode(r, name, SurfacesSchema, SurfacesVersion, &doc); err != nil {
		return nil, err
	}
	return &doc, nil
}
