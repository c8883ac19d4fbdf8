package document

import (
	"bytes"
	"fmt"
	"io"

	"github.com/joinery-cae/joinery/geom"
)

// DecodeConnectors reads a connectors document written by
// EncodeConnectors (or anything of the same schema and version); name is
// the file's name, for errors. Unknown fields are ignored (see the
// versioning rule).
func DecodeConnectors(r io.Reader, name string) (*ConnectorsDoc, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, geom.FileError(name, "reading: %w", err)
	}
	return ParseConnectors(data, name)
}

// ParseConnectors decodes the connectors document data (the bytes of
// file name, kept by the document for ConnectorLine), as
// DecodeConnectors does.
//
// It reads the document in one pass with a decoder written for its
// types (a body's connectors.json is megabytes, and encoding/json's
// reflection took most of the time of reading it back), which gives
// every value as encoding/json would (TestParseConnectorsAsEncodingJSON,
// FuzzParseConnectors) but where the schema is stricter (see scanner):
// a key in other case is an unknown field, a vector has 3 numbers, an
// integer may be written 12.0, and a key appears once per object. Errors
// are input errors at the line of the offending value.
func ParseConnectors(data []byte, name string) (*ConnectorsDoc, error) {
	h, ok := quickHeader(data)
	if !ok {
		// Not where Joinery writes it: read it from the whole document,
		// whose syntax errors come first.
		var err error
		if h, err = connectorsHeader(data, name); err != nil {
			return nil, err
		}
	}
	if err := checkHeader(name, h, ConnectorsSchema, ConnectorsVersion); err != nil {
		return nil, err
	}
	d := connDecoder{scanner: scanner{data: data}}
	d.scanner.where = d.where
	doc := &ConnectorsDoc{raw: data}
	d.doc(doc)
	d.end()
	if d.err != nil {
		return nil, d.error(name)
	}
	doc.starts = d.starts
	return doc, nil
}

// error turns the scanner's error into an input error at its line.
func (s *scanner) error(name string) error {
	off := min(max(s.err.off, 0), len(s.data))
	line := 1 + bytes.Count(s.data[:off], []byte("\n"))
	return geom.LineError(name, line, "byte %d: %s", off, s.err.msg)
}

// connectorsHeader reads the schema and version of a connectors
// document from its top-level object, wherever they are, checking the
// syntax of the whole document.
func connectorsHeader(data []byte, name string) (header, error) {
	s := scanner{data: data}
	var h header
	var seen uint64
	s.object(func(key []byte) {
		switch string(key) {
		case "schema":
			if s.once(&seen, 0, key) {
				s.str(&h.Schema)
			}
		case "version":
			if s.once(&seen, 1, key) {
				s.int(&h.Version)
			}
		default:
			s.skip()
		}
	})
	s.end()
	if s.err != nil {
		return h, s.error(name)
	}
	return h, nil
}

// connDecoder decodes a connectors document. Its scratch slices collect
// the items of the array being read before they are copied into the
// arenas, which hold the many short arrays of the document in a few
// allocations.
type connDecoder struct {
	scanner
	starts []int // byte offset of each connector

	// The connector being read, and its sheet or link, for messages.
	cur     *ConnectorDoc
	curIdx  int
	part    string
	partIdx int

	intsA   arena[int64]
	floatsA arena[float64]
	sheetA  arena[SheetDoc]
	linkA   arena[LinkDoc]
}

func (d *connDecoder) doc(doc *ConnectorsDoc) {
	var seen uint64
	d.object(func(key []byte) {
		switch string(key) {
		case "schema":
			if d.once(&seen, 0, key) {
				d.str(&doc.Schema)
			}
		case "version":
			if d.once(&seen, 1, key) {
				d.int(&doc.Version)
			}
		case "generator":
			if d.once(&seen, 2, key) {
				d.str(&doc.Generator)
			}
		case "run_id":
			if d.once(&seen, 3, key) {
				d.str(&doc.RunID)
			}
		case "caution":
			if d.once(&seen, 4, key) {
				d.str(&doc.Caution)
			}
		case "units":
			if d.once(&seen, 5, key) {
				d.units(&doc.Units)
			}
		case "inputs":
			if d.once(&seen, 6, key) {
				d.inputs(&doc.Inputs)
			}
		case "options":
			if d.once(&seen, 7, key) {
				d.options(&doc.Options)
			}
		case "new_ids":
			if d.once(&seen, 8, key) {
				d.idRange(&doc.IDs)
			}
		case "connectors":
			if d.once(&seen, 9, key) {
				d.connectors(doc)
			}
		default:
			d.skip()
		}
	})
}

func (d *connDecoder) units(u *Units) {
	var seen uint64
	d.object(func(key []byte) {
		switch string(key) {
		case "length":
			if d.once(&seen, 0, key) {
				d.str(&u.Length)
			}
		case "angle":
			if d.once(&seen, 1, key) {
				d.str(&u.Angle)
			}
		default:
			d.skip()
		}
	})
}

func (d *connDecoder) inputs(in *Inputs) {
	var seen uint64
	d.object(func(key []byte) {
		switch string(key) {
		case "meshes":
			if d.once(&seen, 0, key) {
				d.strings(&in.Meshes)
			}
		case "parts":
			if d.once(&seen, 1, key) {
				d.str(&in.Parts)
			}
		case "parts_overlays":
			if d.once(&seen, 2, key) {
				d.strings(&in.PartsOverlays)
			}
		case "joints":
			if d.once(&seen, 3, key) {
				d.strings(&in.Joints)
			}
		case "renumbered":
			if d.once(&seen, 4, key) {
				d.shifts(&in.Renumbered)
			}
		case "tag_columns":
			if d.once(&seen, 5, key) {
				d.tagColumns(&in.TagColumns)
			}
		case "connectors":
			if d.once(&seen, 6, key) {
				d.strings(&in.Connectors)
			}
		default:
			d.skip()
		}
	})
}

func (d *connDecoder) shifts(v *[]Shift) {
	out := []Shift{}
	if !d.array(func() {
		out = append(out, Shift{})
		sh := &out[len(out)-1]
		var seen uint64
		d.object(func(key []byte) {
			switch string(key) {
			case "file":
				if d.once(&seen, 0, key) {
					d.str(&sh.File)
				}
			case "node_offset":
				if d.once(&seen, 1, key) {
					d.int64(&sh.NodeOffset)
				}
			case "element_offset":
				if d.once(&seen, 2, key) {
					d.int64(&sh.ElemOffset)
				}
			default:
				d.skip()
			}
		})
	}) {
		if d.ok() {
			*v = nil
		}
		return
	}
	*v = out
}

func (d *connDecoder) tagColumns(v *[]TagColumns) {
	out := []TagColumns{}
	if !d.array(func() {
		out = append(out, TagColumns{})
		tc := &out[len(out)-1]
		var seen uint64
		d.object(func(key []byte) {
			switch string(key) {
			case "file":
				if d.once(&seen, 0, key) {
					d.str(&tc.File)
				}
			case "columns":
				if d.once(&seen, 1, key) {
					d.strings(&tc.Columns)
				}
			default:
				d.skip()
			}
		})
	}) {
		if d.ok() {
			*v = nil
		}
		return
	}
	*v = out
}

func (d *connDecoder) options(o *OptionsDoc) {
	var seen uint64
	d.object(func(key []byte) {
		switch string(key) {
		case "reach":
			if d.once(&seen, 0, key) {
				d.float(&o.Reach)
			}
		case "gap_allowance":
			if d.once(&seen, 1, key) {
				d.floatPtr(&o.GapAllowance)
			}
		case "angle_limit":
			if d.once(&seen, 2, key) {
				d.float(&o.AngleLimit)
			}
		case "lateral_factor":
			if d.once(&seen, 3, key) {
				d.float(&o.LateralFactor)
			}
		case "edge_factor":
			if d.once(&seen, 4, key) {
				d.float(&o.EdgeFactor)
			}
		case "node_factor":
			if d.once(&seen, 5, key) {
				d.float(&o.NodeFactor)
			}
		case "attach":
			if d.once(&seen, 6, key) {
				d.str(&o.Attach)
			}
		case "group_attach":
			if d.once(&seen, 7, key) {
				d.stringMap(&o.GroupAttach)
			}
		case "spot_dofs":
			if d.once(&seen, 8, key) {
				d.strings(&o.SpotDOFs)
			}
		case "nugget_rule":
			if d.once(&seen, 9, key) {
				d.str(&o.NuggetRule)
			}
		case "links":
			if d.once(&seen, 10, key) {
				d.str(&o.Links)
			}
		case "bolts":
			if d.once(&seen, 11, key) {
				d.boltOptions(&o.Bolts)
			}
		default:
			d.skip()
		}
	})
}

func (d *connDecoder) boltOptions(v **BoltOptionsDoc) {
	b := new(BoltOptionsDoc)
	var seen uint64
	if !d.object(func(key []byte) {
		switch string(key) {
		case "dofs":
			if d.once(&seen, 0, key) {
				d.strings(&b.DOFs)
			}
		case "coupling":
			if d.once(&seen, 1, key) {
				d.str(&b.Coupling)
			}
		case "shank":
			if d.once(&seen, 2, key) {
				d.str(&b.Shank)
			}
		case "ring":
			if d.once(&seen, 3, key) {
				d.str(&b.Ring)
			}
		case "shank_modulus":
			if d.once(&seen, 4, key) {
				d.float(&b.ShankModulus)
			}
		case "hole_tolerance":
			if d.once(&seen, 5, key) {
				d.float(&b.HoleTolerance)
			}
		default:
			d.skip()
		}
	}) {
		if d.ok() {
			*v = nil
		}
		return
	}
	*v = b
}

func (d *connDecoder) idRange(r *IDRange) {
	var seen uint64
	d.object(func(key []byte) {
		switch string(key) {
		case "first":
			if d.once(&seen, 0, key) {
				d.int64(&r.First)
			}
		case "next":
			if d.once(&seen, 1, key) {
				d.int64(&r.Next)
			}
		default:
			d.skip()
		}
	})
}

func (d *connDecoder) connectors(doc *ConnectorsDoc) {
	// Connectors are decoded into blocks of growing size, then copied
	// once into one slice (a slice grown by append copies its large
	// items several times over).
	var blocks [][]ConnectorDoc
	block := make([]ConnectorDoc, 0, 64)
	n := 0
	if !d.array(func() {
		d.ws()
		d.starts = append(d.starts, d.pos)
		if len(block) == cap(block) {
			blocks = append(blocks, block)
			block = make([]ConnectorDoc, 0, 2*cap(block))
		}
		block = block[:len(block)+1]
		d.cur, d.curIdx = &block[len(block)-1], n
		d.connector(d.cur)
		d.cur = nil
		n++
	}) {
		if d.ok() {
			doc.Connectors = nil
		}
		return
	}
	out := make([]ConnectorDoc, 0, n)
	for _, b := range append(blocks, block) {
		out = append(out, b...)
	}
	doc.Connectors = out
}

// where names the place of an error for its message: the connector, its
// sheet or link, and the key being read.
func (d *connDecoder) where() string {
	var w string
	if d.cur != nil {
		w = fmt.Sprintf("connector %d", d.curIdx)
		if d.cur.ID != "" {
			w += fmt.Sprintf(" (%q)", geom.Excerpt(d.cur.ID))
		}
		if d.part != "" {
			w += fmt.Sprintf(", %s %d", d.part, d.partIdx)
		}
	}
	if d.key != nil {
		if w != "" {
			w += ", "
		}
		w += fmt.Sprintf("%q", excerptBytes(d.key))
	}
	return w
}

func (d *connDecoder) connector(c *ConnectorDoc) {
	var seen uint64
	d.object(func(key []byte) {
		switch string(key) {
		case "id":
			if d.once(&seen, 0, key) {
				d.str(&c.ID)
			}
		case "kind":
			if d.once(&seen, 1, key) {
				d.str(&c.Kind)
			}
		case "state":
			if d.once(&seen, 2, key) {
				d.str(&c.State)
			}
		case "group":
			if d.once(&seen, 3, key) {
				d.str(&c.Group)
			}
		case "point":
			if d.once(&seen, 4, key) {
				d.vec(&c.Point)
			}
		case "axis":
			if d.once(&seen, 5, key) {
				d.vecPtr(&c.Axis)
			}
		case "diameter":
			if d.once(&seen, 6, key) {
				d.floatPtr(&c.Diameter)
			}
		case "diameter_source":
			if d.once(&seen, 7, key) {
				d.str(&c.DiameterSource)
			}
		case "attach":
			if d.once(&seen, 8, key) {
				d.str(&c.Attach)
			}
		case "dofs":
			if d.once(&seen, 9, key) {
				d.strings(&c.DOFs)
			}
		case "sheets":
			if d.once(&seen, 10, key) {
				d.sheets(c)
			}
		case "links":
			if d.once(&seen, 11, key) {
				d.links(c)
			}
		case "findings":
			if d.once(&seen, 12, key) {
				d.strings(&c.Findings)
			}
		case "listed_parts":
			if d.once(&seen, 13, key) {
				d.int64s(&c.Listed)
			}
		case "tags":
			if d.once(&seen, 14, key) {
				d.stringMap(&c.Tags)
			}
		case "bolt":
			if d.once(&seen, 15, key) {
				d.bolt(&c.Bolt)
			}
		default:
			d.skip()
		}
	})
}

// int64s reads an array of integers into *v, in the arena (null sets
// nil).
func (d *connDecoder) int64s(v *[]int64) {
	d.intsA.begin()
	if !d.array(func() { d.int64(d.intsA.next()) }) {
		if d.ok() {
			*v = nil
		}
		return
	}
	*v = d.intsA.end()
}

// float64s reads an array of numbers into *v, in the arena (null sets
// nil).
func (d *connDecoder) float64s(v *[]float64) {
	d.floatsA.begin()
	if !d.array(func() { d.float(d.floatsA.next()) }) {
		if d.ok() {
			*v = nil
		}
		return
	}
	*v = d.floatsA.end()
}

func (d *connDecoder) sheets(c *ConnectorDoc) {
	d.part, d.partIdx = "sheet", 0
	defer func() { d.part = "" }()
	d.sheetA.begin()
	if !d.array(func() {
		d.sheet(d.sheetA.next())
		d.partIdx++
	}) {
		if d.ok() {
			c.Sheets = nil
		}
		return
	}
	c.Sheets = d.sheetA.end()
}

func (d *connDecoder) sheet(sh *SheetDoc) {
	var seen uint64
	d.object(func(key []byte) {
		switch string(key) {
		case "part":
			if d.once(&seen, 0, key) {
				d.int64(&sh.Part)
			}
		case "element":
			if d.once(&seen, 1, key) {
				d.int64(&sh.Element)
			}
		case "point":
			if d.once(&seen, 2, key) {
				d.vec(&sh.Point)
			}
		case "distance":
			if d.once(&seen, 3, key) {
				d.float(&sh.Distance)
			}
		case "thickness":
			if d.once(&seen, 4, key) {
				d.float(&sh.Thickness)
			}
		case "position":
			if d.once(&seen, 5, key) {
				d.float(&sh.Position)
			}
		case "lateral":
			if d.once(&seen, 6, key) {
				d.float(&sh.Lateral)
			}
		case "edge_distance":
			if d.once(&seen, 7, key) {
				d.floatPtr(&sh.EdgeDistance)
			}
		case "end_node":
			if d.once(&seen, 8, key) {
				d.int64Ptr(&sh.EndNode)
			}
		case "end_point":
			if d.once(&seen, 9, key) {
				d.vecPtr(&sh.EndPoint)
			}
		case "nodes":
			if d.once(&seen, 10, key) {
				d.int64s(&sh.Nodes)
			}
		case "weights":
			if d.once(&seen, 11, key) {
				d.float64s(&sh.Weights)
			}
		case "hole_diameter":
			if d.once(&seen, 12, key) {
				d.floatPtr(&sh.HoleDiameter)
			}
		case "ring":
			if d.once(&seen, 13, key) {
				d.str(&sh.Ring)
			}
		case "node_points":
			if d.once(&seen, 14, key) {
				d.vecs(&sh.NodePoints)
			}
		default:
			d.skip()
		}
	})
}

// vecs reads an array of vectors into *v (null sets nil).
func (d *connDecoder) vecs(v *[]Vec) {
	out := []Vec{}
	if !d.array(func() {
		out = append(out, Vec{})
		d.vec(&out[len(out)-1])
	}) {
		if d.ok() {
			*v = nil
		}
		return
	}
	*v = out
}

func (d *connDecoder) links(c *ConnectorDoc) {
	d.part, d.partIdx = "link", 0
	defer func() { d.part = "" }()
	d.linkA.begin()
	if !d.array(func() {
		d.link(d.linkA.next())
		d.partIdx++
	}) {
		if d.ok() {
			c.Links = nil
		}
		return
	}
	c.Links = d.linkA.end()
}

func (d *connDecoder) link(l *LinkDoc) {
	var seen uint64
	d.object(func(key []byte) {
		switch string(key) {
		case "id":
			if d.once(&seen, 0, key) {
				d.int64(&l.ID)
			}
		case "kind":
			if d.once(&seen, 1, key) {
				d.str(&l.Kind)
			}
		case "from":
			if d.once(&seen, 2, key) {
				d.int(&l.From)
			}
		case "to":
			if d.once(&seen, 3, key) {
				d.int(&l.To)
			}
		case "start":
			if d.once(&seen, 4, key) {
				d.vec(&l.Start)
			}
		case "end":
			if d.once(&seen, 5, key) {
				d.vec(&l.End)
			}
		case "start_node":
			if d.once(&seen, 6, key) {
				d.int64(&l.StartNode)
			}
		case "end_node":
			if d.once(&seen, 7, key) {
				d.int64(&l.EndNode)
			}
		case "new_node":
			if d.once(&seen, 8, key) {
				d.bool(&l.NewNode)
			}
		case "length":
			if d.once(&seen, 9, key) {
				d.float(&l.Length)
			}
		case "direction":
			if d.once(&seen, 10, key) {
				d.vec(&l.Direction)
			}
		case "dofs":
			if d.once(&seen, 11, key) {
				d.strings(&l.DOFs)
			}
		case "contact_gap":
			if d.once(&seen, 12, key) {
				d.float(&l.ContactGap)
			}
		case "mid_gap":
			if d.once(&seen, 13, key) {
				d.float(&l.MidGap)
			}
		case "mismatch":
			if d.once(&seen, 14, key) {
				d.floatPtr(&l.Mismatch)
			}
		case "square_gap":
			if d.once(&seen, 15, key) {
				d.floatPtr(&l.SquareGap)
			}
		default:
			d.skip()
		}
	})
}

func (d *connDecoder) bolt(v **BoltDoc) {
	b := new(BoltDoc)
	var seen uint64
	if !d.object(func(key []byte) {
		switch string(key) {
		case "washer":
			if d.once(&seen, 0, key) {
				d.float(&b.Washer)
			}
		case "hole":
			if d.once(&seen, 1, key) {
				d.float(&b.Hole)
			}
		case "ground":
			if d.once(&seen, 2, key) {
				d.bool(&b.Ground)
			}
		case "coupling":
			if d.once(&seen, 3, key) {
				d.str(&b.Coupling)
			}
		case "shank":
			if d.once(&seen, 4, key) {
				d.str(&b.Shank)
			}
		case "ring":
			if d.once(&seen, 5, key) {
				d.str(&b.Ring)
			}
		case "beam":
			if d.once(&seen, 6, key) {
				d.beam(&b.Beam)
			}
		case "support":
			if d.once(&seen, 7, key) {
				d.support(&b.Support)
			}
		default:
			d.skip()
		}
	}) {
		if d.ok() {
			*v = nil
		}
		return
	}
	*v = b
}

func (d *connDecoder) beam(v **BeamDoc) {
	b := new(BeamDoc)
	var seen uint64
	if !d.object(func(key []byte) {
		switch string(key) {
		case "diameter":
			if d.once(&seen, 0, key) {
				d.float(&b.Diameter)
			}
		case "area":
			if d.once(&seen, 1, key) {
				d.float(&b.Area)
			}
		case "inertia":
			if d.once(&seen, 2, key) {
				d.float(&b.Inertia)
			}
		case "torsion":
			if d.once(&seen, 3, key) {
				d.float(&b.Torsion)
			}
		case "modulus":
			if d.once(&seen, 4, key) {
				d.float(&b.Modulus)
			}
		case "poisson":
			if d.once(&seen, 5, key) {
				d.float(&b.Poisson)
			}
		default:
			d.skip()
		}
	}) {
		if d.ok() {
			*v = nil
		}
		return
	}
	*v = b
}

func (d *connDecoder) support(v **SupportDoc) {
	sp := new(SupportDoc)
	var seen uint64
	if !d.object(func(key []byte) {
		switch string(key) {
		case "sheet":
			if d.once(&seen, 0, key) {
				d.int(&sp.Sheet)
			}
		case "node":
			if d.once(&seen, 1, key) {
				d.int64(&sp.Node)
			}
		case "dofs":
			if d.once(&seen, 2, key) {
				d.strings(&sp.DOFs)
			}
		default:
			d.skip()
		}
	}) {
		if d.ok() {
			*v = nil
		}
		return
	}
	*v = sp
}
