package document

import (
	"fmt"
	"strconv"

	"github.com/joinery-cae/joinery/joints"
)

// Joinery builds in millimetres; the documents give lengths in the unit
// of the inputs (RunInfo.Unit), so that points overlay the meshes, and
// record it in units.length. Finding messages keep the millimetres they
// were written in (they say "mm"); finding locations are converted.

// lengthIn converts a length from mm to the unit whose size is mm,
// rounded to 15 significant digits: a length read in that unit and
// scaled to mm comes back as it was given (1.1 in is 27.94 mm, and
// 27.94 / 25.4 is 1.1000000000000001 in binary), and computed lengths
// move by at most half a unit in their 15th digit, 5e-15 of their size.
func lengthIn(v, mm float64) float64 {
	if mm == 1 {
		return v
	}
	r, err := strconv.ParseFloat(strconv.FormatFloat(v/mm, 'g', 15, 64), 64)
	if err != nil { // Inf or NaN: as it is
		r = v / mm
	}
	return clean(r)
}

func vecIn(v Vec, mm float64) Vec {
	return Vec{lengthIn(v[0], mm), lengthIn(v[1], mm), lengthIn(v[2], mm)}
}

func ptrIn(p *float64, mm float64) {
	if p != nil {
		*p = lengthIn(*p, mm)
	}
}

// toUnit converts every length of the connectors document from mm to u
// and records u.
func (d *ConnectorsDoc) toUnit(u joints.Unit) {
	d.Units.Length = u.String()
	if mm := u.MM(); mm != 1 {
		d.scaleLengths(func(v float64) float64 { return lengthIn(v, mm) })
	}
}

// ToMillimetres converts every length of a decoded connectors document
// from its units.length to mm, in place, and records mm, so that its
// connectors can be resolved against a mesh read in mm. A document
// without units.length is in mm.
func (d *ConnectorsDoc) ToMillimetres() error {
	u, err := joints.ParseUnit(d.Units.Length)
	if err != nil {
		return fmt.Errorf("units.length: %w", err)
	}
	d.Units.Length = joints.Millimetre.String()
	if mm := u.MM(); mm != 1 {
		d.scaleLengths(func(v float64) float64 { return v * mm })
	}
	return nil
}

// scaleLengths applies f to every length of the document.
func (d *ConnectorsDoc) scaleLengths(f func(float64) float64) {
	vec := func(v Vec) Vec { return Vec{f(v[0]), f(v[1]), f(v[2])} }
	ptr := func(p *float64) {
		if p != nil {
			*p = f(*p)
		}
	}
	o := &d.Options
	o.Reach = f(o.Reach)
	ptr(o.GapAllowance)
	if o.Bolts != nil {
		o.Bolts.HoleTolerance = f(o.Bolts.HoleTolerance)
	}
	for i := range d.Connectors {
		c := &d.Connectors[i]
		c.Point = vec(c.Point)
		ptr(c.Diameter)
		for k := range c.Sheets {
			s := &c.Sheets[k]
			s.Point = vec(s.Point)
			s.Distance = f(s.Distance)
			s.Thickness = f(s.Thickness)
			s.Position = f(s.Position)
			s.Lateral = f(s.Lateral)
			ptr(s.EdgeDistance)
			if s.EndPoint != nil {
				p := vec(*s.EndPoint)
				s.EndPoint = &p
			}
			ptr(s.HoleDiameter)
			for n := range s.NodePoints {
				s.NodePoints[n] = vec(s.NodePoints[n])
			}
		}
		if b := c.Bolt; b != nil {
			b.Washer, b.Hole = f(b.Washer), f(b.Hole)
			if bm := b.Beam; bm != nil {
				// Powers of the length scale: f(1) is the factor.
				k := f(1)
				bm.Diameter, bm.Area, bm.Inertia, bm.Torsion = f(bm.Diameter), bm.Area*k*k, bm.Inertia*k*k*k*k, bm.Torsion*k*k*k*k
			}
		}
		for k := range c.Links {
			l := &c.Links[k]
			l.Start, l.End = vec(l.Start), vec(l.End)
			l.Length = f(l.Length)
			l.ContactGap = f(l.ContactGap)
			l.MidGap = f(l.MidGap)
			ptr(l.SquareGap)
			ptr(l.Mismatch)
		}
	}
}

// toUnit converts the finding locations of the report from mm to u and
// records u.
func (d *ReportDoc) toUnit(u joints.Unit) {
	d.Units = Units{Length: u.String(), Angle: "degree"}
	mm := u.MM()
	for i := range d.Findings {
		if l := d.Findings[i].Location; l != nil && mm != 1 {
			v := vecIn(*l, mm)
			d.Findings[i].Location = &v
		}
		if m := d.Findings[i].Motion; m != nil && mm != 1 {
			if m.Point != nil {
				v := vecIn(*m.Point, mm)
				m.Point = &v
			}
			ptrIn(m.Pitch, mm)
		}
	}
}

// VecInUnit converts a point from mm to unit u, as the documents give
// their points (for files rendered from a document and the mesh, such
// as flanges.vtk's facing pairs).
func VecInUnit(v [3]float64, u joints.Unit) Vec { return vecIn(Vec(v), u.MM()) }

// areaIn converts an area from mm² to the square of the unit whose size
// is mm.
func areaIn(v, mm float64) float64 {
	if mm == 1 {
		return v
	}
	return clean(v / (mm * mm))
}

// toUnit converts every length (and area) of the flanges document from
// mm to u and records u.
func (d *FlangesDoc) toUnit(u joints.Unit) {
	d.Units.Length = u.String()
	mm := u.MM()
	if mm == 1 {
		return
	}
	o := &d.Options
	ptrIn(o.Pitch, mm)
	ptrIn(o.EndMargin, mm)
	ptrIn(o.GapAllowance, mm)
	span := func(s *SpanDoc) {
		s.Min, s.Mean, s.Max = lengthIn(s.Min, mm), lengthIn(s.Mean, mm), lengthIn(s.Max, mm)
	}
	for i := range d.Flanges {
		f := &d.Flanges[i]
		f.Thickness = [2]float64{lengthIn(f.Thickness[0], mm), lengthIn(f.Thickness[1], mm)}
		f.Contact = lengthIn(f.Contact, mm)
		f.Area = areaIn(f.Area, mm)
		f.Length = lengthIn(f.Length, mm)
		span(&f.Width)
		for k := range f.Centreline {
			f.Centreline[k] = vecIn(f.Centreline[k], mm)
		}
		if f.FacingTolerance != nil {
			span(f.FacingTolerance)
		}
		for k := range f.Facing {
			f.Facing[k][2] = lengthIn(f.Facing[k][2], mm)
			f.Facing[k][3] = lengthIn(f.Facing[k][3], mm)
		}
		ptrIn(f.Pitch, mm)
		for k := range f.Welds {
			w := &f.Welds[k]
			w.S = lengthIn(w.S, mm)
			w.Point = vecIn(w.Point, mm)
			w.Diameter = lengthIn(w.Diameter, mm)
		}
	}
}

// toUnit converts every length (and area) of the surfaces document from
// mm to u and records u.
func (d *SurfacesDoc) toUnit(u joints.Unit) {
	d.Units.Length = u.String()
	mm := u.MM()
	if mm == 1 {
		return
	}
	o := &d.Options
	o.Window = lengthIn(o.Window, mm)
	ptrIn(o.GapAllowance, mm)
	o.Reach = lengthIn(o.Reach, mm)
	o.JointSiteWeight = areaIn(o.JointSiteWeight, mm)
	for i := range d.Parts {
		p := &d.Parts[i]
		p.Thickness = lengthIn(p.Thickness, mm)
		p.Offset = lengthIn(p.Offset, mm)
		p.Evidence = areaIn(p.Evidence, mm)
		p.Agreeing = areaIn(p.Agreeing, mm)
	}
	for i := range d.Contacts {
		c := &d.Contacts[i]
		c.Separation = lengthIn(c.Separation, mm)
		c.Min, c.Max = lengthIn(c.Min, mm), lengthIn(c.Max, mm)
		c.ThicknessA, c.ThicknessB = lengthIn(c.ThicknessA, mm), lengthIn(c.ThicknessB, mm)
		c.Area = areaIn(c.Area, mm)
		c.Weight = areaIn(c.Weight, mm)
		c.Point = vecIn(c.Point, mm)
		c.Expected = lengthIn(c.Expected, mm)
		c.Allowance = lengthIn(c.Allowance, mm)
	}
}
