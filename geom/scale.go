package geom

import "gonum.org/v1/gonum/spatial/r3"

// Scale multiplies every length of m by f: node coordinates, element
// thicknesses and part thicknesses. Commands use it to bring a model
// drawn in metres or inches to millimetres once it is read, so that
// rules and tolerances apply in one unit. f must be positive and finite.
func (m *Mesh) Scale(f float64) {
	if f == 1 {
		return
	}
	for i, p := range m.Coords {
		m.Coords[i] = r3.Scale(f, p)
	}
	for i, t := range m.ElemThickness {
		m.ElemThickness[i] = t * f // NaN stays NaN: the part's applies
	}
	for i := range m.Parts {
		m.Parts[i].Thickness *= f
	}
}
