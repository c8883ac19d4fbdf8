package document

import (
	"io"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// Schema name and version of flanges.json (see the package comment for
// the versioning rule).
const (
	FlangesSchema  = "joinery/flanges"
	FlangesVersion = 2
)

// FacingRule states the lateral limit of a facing node pair, for the
// record in flanges.json.
const FacingRule = "a node pair faces when the two nodes are each other's nearest node of the other part, both sheets are in contact there, " +
	"and the second node lies within facing_factor times the local element size of the first node's normal line; the local element size is " +
	"the smaller of the two elements' sizes, the square root of a quad's area or of twice a triangle's"

// FlangesDoc is the flanges.json document (see
// writers/document/schema/flanges.schema.json).
type FlangesDoc struct {
	Schema    string           `json:"schema"`
	Version   int              `json:"version"`
	Generator string           `json:"generator"`
	RunID     string           `json:"run_id"`
	Caution   string           `json:"caution"`
	Units     Units            `json:"units"`
	Inputs    Inputs           `json:"inputs"`
	Options   FlangeOptionsDoc `json:"options"`
	Flanges   []FlangeDoc      `json:"flanges"`
	Fields    FacingFieldsDoc  `json:"facing_fields"`
}

// FacingFieldsDoc names the columns of a flange's facing pairs.
type FacingFieldsDoc []string

// FlangeOptionsDoc records the options of a flanges run, defaults
// resolved.
type FlangeOptionsDoc struct {
	Pairs          [][2]int64 `json:"pairs"` // empty: every pair in contact
	Pitch          *float64   `json:"pitch"` // null: no welds placed, or the table's
	PitchFromTable bool       `json:"pitch_from_table"`
	EndMargin      *float64   `json:"end_margin"`    // null: one nugget diameter
	GapAllowance   *float64   `json:"gap_allowance"` // null: a quarter of the contact gap
	AngleLimit     float64    `json:"angle_limit"`
	EdgeFactor     float64    `json:"edge_factor"`
	Attach         string     `json:"attach"`
	NuggetRule     string     `json:"nugget_rule"`
	FacingFactor   float64    `json:"facing_factor"`
	FacingRule     string     `json:"facing_rule"`
	CongruentShare float64    `json:"congruent_share"`
}

// SpanDoc is a least, mean and largest value.
type SpanDoc struct {
	Min  float64 `json:"min"`
	Mean float64 `json:"mean"`
	Max  float64 `json:"max"`
}

// FlangeDoc is one flange.
type FlangeDoc struct {
	ID              string          `json:"id"`
	Parts           [2]int64        `json:"parts"`
	Host            int64           `json:"host"`
	Thickness       [2]float64      `json:"thickness"`
	Contact         float64         `json:"contact_gap"`
	Match           string          `json:"match"`
	Shape           string          `json:"shape"`
	Area            float64         `json:"area"`
	Length          float64         `json:"length"`
	Width           SpanDoc         `json:"width"`
	Nodes           int             `json:"nodes_in_contact"`
	Centreline      []Vec           `json:"centreline"`
	Normal          *Vec            `json:"normal"`
	FacingTolerance *SpanDoc        `json:"facing_tolerance"`
	Facing          [][4]float64    `json:"facing"`
	Pitch           *float64        `json:"pitch"`
	Welds           []FlangeWeldDoc `json:"welds"`
}

// FlangeWeldDoc is a weld placed on a flange.
type FlangeWeldDoc struct {
	ID       string  `json:"id"`
	Station  int     `json:"station"`
	S        float64 `json:"s"`
	Point    Vec     `json:"point"`
	Parts    []int64 `json:"parts"`
	Diameter float64 `json:"diameter"`
}

// NewFlanges converts found flanges into the flanges document; o and fo
// are the options used, defaults resolved. Lengths are converted from
// the mm the flanges were found in to info.Unit.
func NewFlanges(m *geom.Mesh, fl []joints.Flange, o joints.BuildOptions, fo joints.FlangeOptions, info RunInfo) *FlangesDoc {
	doc := &FlangesDoc{
		Schema: FlangesSchema, Version: FlangesVersion, Generator: info.Generator, RunID: info.RunID, Caution: Caution,
		Units:  Units{Length: "mm", Angle: "degree"},
		Inputs: info.inputs(),
		Options: FlangeOptionsDoc{
			Pairs: [][2]int64{}, PitchFromTable: fo.Pitch.Table, AngleLimit: o.AngleLimit, EdgeFactor: o.EdgeFactor,
			Attach: o.Attach.String(), NuggetRule: o.Rule.String(), FacingFactor: fo.FacingFactor, FacingRule: FacingRule,
			CongruentShare: joints.CongruentShare,
		},
		Flanges: make([]FlangeDoc, 0, len(fl)),
		Fields:  FacingFieldsDoc{"node_a", "node_b", "separation", "lateral"},
	}
	for _, p := range fo.Pairs {
		doc.Options.Pairs = append(doc.Options.Pairs, joints.PairKey(p[0], p[1]))
	}
	if fo.Pitch.MM > 0 {
		v := fo.Pitch.MM
		doc.Options.Pitch = &v
	}
	if fo.EndMargin > 0 {
		v := fo.EndMargin
		doc.Options.EndMargin = &v
	}
	if o.GapAllowance > 0 {
		v := o.GapAllowance
		doc.Options.GapAllowance = &v
	}
	for i := range fl {
		doc.Flanges = append(doc.Flanges, flangeDoc(m, &fl[i]))
	}
	doc.toUnit(info.Unit)
	return doc
}

func flangeDoc(m *geom.Mesh, f *joints.Flange) FlangeDoc {
	d := FlangeDoc{
		ID: f.ID, Parts: f.Parts, Host: f.Host, Thickness: f.Thickness, Contact: f.Contact, Match: f.Match.String(),
		Shape: "open", Area: f.Area, Length: f.Length, Width: SpanDoc{f.Width.Min, f.Width.Mean, f.Width.Max}, Nodes: f.Nodes,
		Centreline: make([]Vec, len(f.Centreline)), Facing: make([][4]float64, len(f.Facing)), Welds: []FlangeWeldDoc{},
	}
	if f.Closed {
		d.Shape = "closed"
	}
	for i, p := range f.Centreline {
		d.Centreline[i] = vecOf(p)
	}
	if f.Normal != (r3.Vec{}) {
		v := vecOf(f.Normal)
		d.Normal = &v
	}
	if len(f.Facing) > 0 {
		t := f.FacingTolerance
		d.FacingTolerance = &SpanDoc{t.Min, t.Mean, t.Max}
	}
	for i, fp := range f.Facing {
		d.Facing[i] = [4]float64{float64(m.NodeIDs[fp.A]), float64(m.NodeIDs[fp.B]), clean(fp.Separation), clean(fp.Lateral)}
	}
	if f.Pitch > 0 {
		v := f.Pitch
		d.Pitch = &v
	}
	for _, w := range f.Welds {
		d.Welds = append(d.Welds, FlangeWeldDoc{ID: w.Joint.ID, Station: w.Station, S: clean(w.S), Point: vecOf(w.Joint.Point),
			Parts: w.Joint.Parts, Diameter: w.Joint.Diameter})
	}
	return d
}

// EncodeFlanges writes the flanges document: its header fields one per
// line, then one flange per line, as EncodeConnectors does.
func EncodeFlanges(w io.Writer, doc *FlangesDoc) error {
	return encodeLines(w, []field{
		{"schema", doc.Schema}, {"version", doc.Version}, {"generator", doc.Generator}, {"run_id", doc.RunID}, {"caution", doc.Caution}, {"units", doc.Units},
		{"inputs", doc.Inputs}, {"options", doc.Options}, {"facing_fields", doc.Fields},
	}, "flanges", doc.Flanges, jsonItems[FlangeDoc]())
}

// DecodeFlanges reads a flanges document; name is the file's name, for
// errors. Unknown fields are ignored (see the versioning rule).
func DecodeFlanges(r io.Reader, name string) (*FlangesDoc, error) {
	var doc FlangesDoc
	if err := decode(r, name, FlangesSchema, FlangesVersion, &doc); err != nil {
		return nil, err
	}
	return &doc, nil
}
