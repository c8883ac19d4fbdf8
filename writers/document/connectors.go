package document

import (
	"bytes"
	"encoding/json"
	"io"
	"math"
	"sort"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// Schema names and versions of Joinery's documents (see the package
// comment for the versioning rule).
const (
	ConnectorsSchema  = "joinery/connectors"
	ConnectorsVersion = 2
	ReportSchema      = "joinery/report"
	ReportVersion     = 2
)

// ConnectorsDoc is the connectors.json document (see
// writers/schema/connectors.schema.json).
type ConnectorsDoc struct {
	Schema     string         `json:"schema"`
	Version    int            `json:"version"`
	Generator  string         `json:"generator"`
	RunID      string         `json:"run_id"`
	Caution    string         `json:"caution"`
	Units      Units          `json:"units"`
	Inputs     Inputs         `json:"inputs"`
	Options    OptionsDoc     `json:"options"`
	IDs        IDRange        `json:"new_ids"`
	Connectors []ConnectorDoc `json:"connectors"`

	raw    []byte // the file ParseConnectors read, for ConnectorLine
	starts []int  // byte offset of each connector in raw
	lines  []int  // line of each connector, found on first use
}

// Units names the units of every number: lengths in the unit of the
// inputs ("mm", "m" or "in"), angles in degrees.
type Units struct {
	Length string `json:"length"`
	Angle  string `json:"angle"`
}

// OptionsDoc records the options of a build, defaults resolved.
type OptionsDoc struct {
	Reach         float64           `json:"reach"`
	GapAllowance  *float64          `json:"gap_allowance"` // null: a quarter of the contact gap (t1+t2)/2 of each pair
	AngleLimit    float64           `json:"angle_limit"`
	LateralFactor float64           `json:"lateral_factor"`
	EdgeFactor    float64           `json:"edge_factor"`
	NodeFactor    float64           `json:"node_factor"`
	Attach        string            `json:"attach"`
	GroupAttach   map[string]string `json:"group_attach"`
	SpotDOFs      []string          `json:"spot_dofs"`
	NuggetRule    string            `json:"nugget_rule"`
	Links         string            `json:"links"` // gap or offset
	// Bolts holds the bolt options, defaults resolved, when the build has
	// bolts; absent otherwise.
	Bolts *BoltOptionsDoc `json:"bolts,omitempty"`
}

// BoltOptionsDoc records the bolt options of a build.
type BoltOptionsDoc struct {
	DOFs          []string `json:"dofs"`
	Coupling      string   `json:"coupling"`
	Shank         string   `json:"shank"`
	Ring          string   `json:"ring"`
	ShankModulus  float64  `json:"shank_modulus"`  // N/mm^2 whatever units.length
	HoleTolerance float64  `json:"hole_tolerance"` // in units.length
}

// IDRange gives the new node and element ids a build used: First up to,
// not including, Next.
type IDRange struct {
	First int64 `json:"first"`
	Next  int64 `json:"next"`
}

// ConnectorDoc is one connector.
type ConnectorDoc struct {
	ID             string            `json:"id"`
	Kind           string            `json:"kind"`
	State          string            `json:"state"`
	Group          string            `json:"group,omitempty"`
	Point          Vec               `json:"point"`
	Axis           *Vec              `json:"axis"`
	Diameter       *float64          `json:"diameter"`
	DiameterSource string            `json:"diameter_source,omitempty"`
	Attach         string            `json:"attach"`
	DOFs           []string          `json:"dofs"`
	Sheets         []SheetDoc        `json:"sheets"`
	Links          []LinkDoc         `json:"links"`
	Findings       []string          `json:"findings"`
	Listed         []int64           `json:"listed_parts,omitempty"`
	Tags           map[string]string `json:"tags,omitempty"`
	// Bolt holds a bolt's own fields; absent for spot welds.
	Bolt *BoltDoc `json:"bolt,omitempty"`
}

// BoltDoc holds the fields of a bolt connector beside the shared ones:
// its sizes as listed, its coupling choices and its support to ground.
type BoltDoc struct {
	Washer   float64 `json:"washer"` // washer or head outer diameter as listed, in units.length
	Hole     float64 `json:"hole"`   // declared hole diameter, in units.length
	Ground   bool    `json:"ground"`
	Coupling string  `json:"coupling"` // rigid or averaging
	Shank    string  `json:"shank"`    // rigid or beam
	Ring     string  `json:"ring"`     // the --bolt-ring choice: hole or washer
	// Beam holds a beam shank's section and material; absent for a rigid
	// shank.
	Beam *BeamDoc `json:"beam,omitempty"`
	// Support is the support to ground of a grounded bolt; absent
	// otherwise.
	Support *SupportDoc `json:"support,omitempty"`
}

// BeamDoc is a beam shank: a circular section of the bolt's nominal
// diameter, A = pi d^2/4, I = pi d^4/64, J = pi d^4/32.
type BeamDoc struct {
	Diameter float64 `json:"diameter"` // in units.length
	Area     float64 `json:"area"`     // in units.length^2
	Inertia  float64 `json:"inertia"`  // second moment of area about a diameter, in units.length^4
	Torsion  float64 `json:"torsion"`  // polar moment, in units.length^4
	Modulus  float64 `json:"modulus"`  // Young's modulus, N/mm^2 whatever units.length
	Poisson  float64 `json:"poisson"`
}

// SupportDoc is a bolt's support to ground.
type SupportDoc struct {
	Sheet int      `json:"sheet"` // index of the supported centre's sheet
	Node  int64    `json:"node"`  // the centre's node id
	DOFs  []string `json:"dofs"`  // degrees of freedom held
}

// SheetDoc is one sheet of a connector's stack and the connector's end on it.
type SheetDoc struct {
	Part         int64     `json:"part"`
	Element      int64     `json:"element"`
	Point        Vec       `json:"point"`
	Distance     float64   `json:"distance"`
	Thickness    float64   `json:"thickness"`
	Position     float64   `json:"position"`
	Lateral      float64   `json:"lateral"`
	EdgeDistance *float64  `json:"edge_distance"`
	EndNode      *int64    `json:"end_node"`
	EndPoint     *Vec      `json:"end_point"`
	Nodes        []int64   `json:"nodes"`
	Weights      []float64 `json:"weights"`
	// Bolts only: the hole measured in the mesh (null: none meshed), the
	// kind of ring the centre couples (hole, washer or patch), and the
	// ring nodes' coordinates, in the order of nodes, for viewing.
	HoleDiameter *float64 `json:"hole_diameter,omitempty"`
	Ring         string   `json:"ring,omitempty"`
	NodePoints   []Vec    `json:"node_points,omitempty"`
}

// LinkDoc is one link of a connector: across the gap between
// consecutive sheets (kind gap), from a sheet's end to its faying point
// (offset) or between two faying points (faying).
type LinkDoc struct {
	ID         int64    `json:"id"`
	Kind       string   `json:"kind"`
	From       int      `json:"from"`
	To         int      `json:"to"`
	Start      Vec      `json:"start"`
	End        Vec      `json:"end"`
	StartNode  int64    `json:"start_node"`
	EndNode    int64    `json:"end_node"`
	NewNode    bool     `json:"new_node,omitempty"` // end_node is a new node the link brings, at end
	Length     float64  `json:"length"`
	Direction  Vec      `json:"direction"`
	DOFs       []string `json:"dofs"`
	ContactGap float64  `json:"contact_gap"`
	MidGap     float64  `json:"mid_gap"`
	// SquareGap is the gap between the same mid-surfaces square to the
	// sheets, in units.length: the figure gap-open and gap-closed judge
	// against contact_gap (joints.SquareGap). Always written; nil when
	// read from a file written before the field (see Gap).
	SquareGap *float64 `json:"square_gap,omitempty"`
	Mismatch  *float64 `json:"mismatch,omitempty"` // faying joints: faying points apart across the axis, in units.length
}

// Gap returns the link's gap between mid-surfaces that the gap findings
// judge against contact_gap: square_gap, or mid_gap for a file written
// before square_gap (on sheets square to the axis the two are equal).
// ToConnectors, which has the mesh's normals, works square_gap out for
// such a file instead.
func (l *LinkDoc) Gap() float64 {
	if l.SquareGap != nil {
		return *l.SquareGap
	}
	return l.MidGap
}

// Vec is a point or direction, [x, y, z].
type Vec [3]float64

func vecOf(v r3.Vec) Vec { return Vec{clean(v.X), clean(v.Y), clean(v.Z)} }

// clean turns -0 into 0 so equal values print alike.
func clean(v float64) float64 {
	if v == 0 {
		return 0
	}
	return v
}

// NewConnectors converts a build result, in mm, into the connectors
// document, with lengths in info.Unit.
func NewConnectors(m *geom.Mesh, r *joints.Result, info RunInfo) *ConnectorsDoc {
	o := r.Options
	doc := &ConnectorsDoc{
		Schema: ConnectorsSchema, Version: ConnectorsVersion, Generator: info.Generator, RunID: info.RunID, Caution: Caution,
		Units:  Units{Length: "mm", Angle: "degree"},
		Inputs: info.inputs(),
		Options: OptionsDoc{
			Reach: o.Reach, AngleLimit: o.AngleLimit, LateralFactor: o.LateralFactor,
			EdgeFactor: o.EdgeFactor, NodeFactor: o.NodeFactor, Attach: o.Attach.String(),
			GroupAttach: map[string]string{}, SpotDOFs: o.SpotDOFs.Names(), NuggetRule: o.Rule.String(),
			Links: o.Links.String(),
		},
		IDs:        IDRange{First: r.IDStart, Next: r.NextID},
		Connectors: make([]ConnectorDoc, 0, len(r.Connectors)),
	}
	if o.GapAllowance > 0 {
		g := o.GapAllowance
		doc.Options.GapAllowance = &g
	}
	for g, a := range o.GroupAttach {
		doc.Options.GroupAttach[g] = a.String()
	}
	for i := range r.Connectors {
		doc.Connectors = append(doc.Connectors, connectorDoc(m, &r.Connectors[i]))
		if r.Connectors[i].Joint.Kind == joints.Bolt && doc.Options.Bolts == nil {
			doc.Options.Bolts = &BoltOptionsDoc{DOFs: o.BoltDOFsOrDefault().Names(), Coupling: o.BoltCoupling.String(),
				Shank: o.Shank.String(), Ring: o.BoltRing.String(), ShankModulus: o.ShankModulusOrDefault(), HoleTolerance: o.HoleToleranceOrDefault()}
		}
	}
	doc.toUnit(info.Unit)
	return doc
}

func connectorDoc(m *geom.Mesh, c *joints.Connector) ConnectorDoc {
	d := ConnectorDoc{
		ID: c.Joint.ID, Kind: c.Joint.Kind.String(), State: c.Status.String(), Group: c.Joint.Group,
		Point: vecOf(c.Joint.Point), Attach: c.Attach.String(), DOFs: c.DOFs.Names(),
		Sheets: []SheetDoc{}, Links: []LinkDoc{}, Findings: []string{}, Listed: c.Joint.Parts, Tags: c.Joint.Tags,
	}
	if len(c.Stack.Sheets) > 0 && r3.Norm2(c.Stack.Axis) > 0 {
		a := vecOf(c.Stack.Axis)
		d.Axis = &a
	}
	if c.Diameter > 0 {
		dia := c.Diameter
		d.Diameter = &dia
		d.DiameterSource = c.DiameterSource
	}
	for i, s := range c.Stack.Sheets {
		sd := SheetDoc{
			Part: s.Part, Element: m.ElemIDs[s.Proj.Elem], Point: vecOf(s.Proj.Point), Distance: s.Proj.Dist,
			Thickness: s.Thickness, Position: clean(s.Position), Lateral: s.Lateral, Nodes: []int64{}, Weights: []float64{},
		}
		if !math.IsInf(s.EdgeDistance, 1) {
			ed := s.EdgeDistance
			sd.EdgeDistance = &ed
		}
		if i < len(c.Ends) {
			e := c.Ends[i]
			ep := vecOf(e.Point)
			sd.EndPoint = &ep
			if i < len(c.EndIDs) && c.EndIDs[i] != 0 {
				id := c.EndIDs[i]
				sd.EndNode = &id
			}
			for k, n := range e.Nodes {
				sd.Nodes = append(sd.Nodes, m.NodeIDs[n])
				sd.Weights = append(sd.Weights, clean(e.Weights[k]))
			}
		}
		if c.Bolt != nil && i < len(c.Bolt.Holes) {
			h := c.Bolt.Holes[i]
			if h.Diameter > 0 {
				hd := h.Diameter
				sd.HoleDiameter = &hd
			}
			sd.Ring = h.Ring
			for _, n := range c.Ends[i].Nodes {
				sd.NodePoints = append(sd.NodePoints, vecOf(m.Coords[n]))
			}
		}
		d.Sheets = append(d.Sheets, sd)
	}
	if c.Bolt != nil {
		d.Attach = BoltAttach
		d.Bolt = boltDoc(c)
	}
	for _, l := range c.Links {
		dofs := l.DOFs
		if dofs == 0 {
			dofs = c.DOFs
		}
		ld := LinkDoc{ID: l.ID, Kind: l.Kind.String(), From: l.From, To: l.To, Start: vecOf(l.Start), End: vecOf(l.End),
			StartNode: l.StartNode, EndNode: l.EndNode, NewNode: l.NewEnd,
			Length: l.Length, Direction: vecOf(l.Direction), DOFs: dofs.Names(), ContactGap: l.Contact, MidGap: clean(l.MidGap)}
		sq := clean(l.SquareGap)
		ld.SquareGap = &sq
		if l.Kind == joints.FayingJoint || l.Kind == joints.ShankLink && c.Bolt != nil && c.Links[0].Kind == joints.OffsetLink {
			mm := clean(l.Mismatch)
			ld.Mismatch = &mm
		}
		d.Links = append(d.Links, ld)
	}
	seen := map[string]bool{}
	for _, f := range c.Findings {
		if !seen[f.Code] {
			seen[f.Code] = true
			d.Findings = append(d.Findings, f.Code)
		}
	}
	sort.Strings(d.Findings)
	return d
}

// BoltAttach is the attach of a bolt connector: its centres are coupled
// to rings (see the bolt's coupling).
const BoltAttach = "ring"

// boltDoc returns the bolt fields of bolt connector c.
func boltDoc(c *joints.Connector) *BoltDoc {
	b := c.Bolt
	d := &BoltDoc{Washer: c.Joint.Washer, Hole: c.Joint.Hole, Ground: c.Joint.Ground,
		Coupling: b.Coupling.String(), Shank: b.Shank.String(), Ring: b.Ring.String()}
	if b.Shank == joints.BeamShank {
		dia := c.Joint.Diameter
		d.Beam = &BeamDoc{Diameter: dia, Area: math.Pi * dia * dia / 4, Inertia: math.Pi * math.Pow(dia, 4) / 64,
			Torsion: math.Pi * math.Pow(dia, 4) / 32, Modulus: b.ShankModulus, Poisson: b.ShankPoisson}
	}
	if b.Support >= 0 && b.Support < len(c.EndIDs) {
		d.Support = &SupportDoc{Sheet: b.Support, Node: c.EndIDs[b.Support], DOFs: b.SupportDOFs.Names()}
	}
	return d
}

// EncodeConnectors writes the connectors document: its header fields
// one per line, then one connector per line, so that a diff between two
// builds shows one line per changed connector and the file stays a
// third of its fully indented size. The connectors are written by
// appendConnector (connectors_encode.go), byte for byte as encoding/json
// would write them, without its reflection; the header, written once,
// goes through encoding/json.
func EncodeConnectors(w io.Writer, doc *ConnectorsDoc) error {
	return encodeLines(w, connectorsHead(doc), "connectors", doc.Connectors, appendConnector)
}

// connectorsHead returns the header fields of doc, in their order.
func connectorsHead(doc *ConnectorsDoc) []field {
	return []field{
		{"schema", doc.Schema}, {"version", doc.Version}, {"generator", doc.Generator}, {"run_id", doc.RunID}, {"caution", doc.Caution}, {"units", doc.Units},
		{"inputs", doc.Inputs}, {"options", doc.Options}, {"new_ids", doc.IDs},
	}
}

// field is one header field of a document written by encodeLines.
type field struct {
	key string
	v   any
}

// appendFunc appends the compact JSON of one item to dst.
type appendFunc[T any] func(dst []byte, item *T) ([]byte, error)

// flushAt is the size at which encodeLines hands its buffer to the
// writer: large enough that writes are few, small enough that the
// buffer stays small beside the document.
const flushAt = 64 << 10

// encodeLines writes a JSON object of the header fields, one per line,
// then the array listKey of items, one compact item per line, each
// appended by appendItem. On an error, what precedes the failing item
// has been written.
func encodeLines[T any](w io.Writer, head []field, listKey string, items []T, appendItem appendFunc[T]) error {
	ew := &errWriter{w: w}
	ew.printf("{\n")
	for _, h := range head {
		b, err := compactJSON(h.v)
		if err != nil {
			return err
		}
		ew.printf("  %q: %s,\n", h.key, b)
	}
	ew.printf("  %q: [", listKey)
	// One buffer serves every item and goes to w whenever it is full;
	// when it is full the first time, a writer that can grow (the
	// bytes.Buffer a set renders into) is grown to about the whole
	// list's size, judged from the items so far, at once instead of
	// doubling its way there.
	buf := make([]byte, 0, flushAt+flushAt/4)
	grown := false
	for i := range items {
		start := len(buf)
		buf = append(buf, "\n    "...)
		var err error
		if buf, err = appendItem(buf, &items[i]); err != nil {
			ew.Write(buf[:start])
			return err
		}
		if i < len(items)-1 {
			buf = append(buf, ',')
		}
		if len(buf) >= flushAt {
			if g, ok := w.(interface{ Grow(int) }); ok && !grown {
				g.Grow(len(buf) / (i + 1) * len(items) * 9 / 8)
				grown = true
			}
			ew.Write(buf)
			buf = buf[:0]
		}
	}
	if len(items) > 0 {
		buf = append(buf, "\n  "...)
	}
	buf = append(buf, "]\n}\n"...)
	ew.Write(buf)
	return ew.err
}

// jsonItems returns an appendFunc that writes items with encoding/json
// (HTML characters not escaped), for the documents without a writer of
// their own.
func jsonItems[T any]() appendFunc[T] {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	return func(dst []byte, item *T) ([]byte, error) {
		buf.Reset()
		if err := enc.Encode(item); err != nil {
			return dst, err
		}
		return append(dst, bytes.TrimRight(buf.Bytes(), "\n")...), nil
	}
}

// compactJSON marshals v on one line, without HTML escaping.
func compactJSON(v any) ([]byte, error) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return nil, err
	}
	return bytes.TrimRight(buf.Bytes(), "\n"), nil
}
