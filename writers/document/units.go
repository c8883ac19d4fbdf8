package document

import "github.com/joinery-cae/joinery/joints"

// Joinery builds in millimetres; the documents give lengths in the unit
// of the inputs (RunInfo.Unit), so that points overlay the meshes, and
// record it in units.length. Finding messages keep the millimetres they
// were written in (they say "mm"); finding locations are converted.

// lengthIn converts a length from mm to the unit whose size is mm.
func lengthIn(v, mm float64) float64 {
	if mm == 1 {
		return v
	}
	return clean(v / mm)
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
	mm := u.MM()
	if mm == 1 {
		return
	}
	o := &d.Options
	o.Reach = lengthIn(o.Reach, mm)
	ptrIn(o.GapAllowance, mm)
	for i := range d.Connectors {
		c := &d.Connectors[i]
		c.Point = vecIn(c.Point, mm)
		ptrIn(c.Diameter, mm)
		for k := range c.Sheets {
			s := &c.Sheets[k]
			s.Point = vecIn(s.Point, mm)
			s.Distance = lengthIn(s.Distance, mm)
			s.Thickness = lengthIn(s.Thickness, mm)
			s.Position = lengthIn(s.Position, mm)
			s.Lateral = lengthIn(s.Lateral, mm)
			ptrIn(s.EdgeDistance, mm)
			if s.EndPoint != nil {
				p := vecIn(*s.EndPoint, mm)
				s.EndPoint = &p
			}
		}
		for k := range c.Links {
			l := &c.Links[k]
			l.Start, l.End = vecIn(l.Start, mm), vecIn(l.End, mm)
			l.Length = lengthIn(l.Length, mm)
			l.ContactGap = lengthIn(l.ContactGap, mm)
			l.MidGap = lengthIn(l.MidGap, mm)
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
	}
}
