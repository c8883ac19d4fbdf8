package document

import (
	"encoding/json"
	"math"
	"reflect"
	"slices"
	"strconv"
	"unicode/utf8"
)

// The functions below append the compact JSON of a connector exactly as
// encoding/json's Encoder with SetEscapeHTML(false) writes it (the
// differential tests in connectors_encode_test.go hold them to it):
// fields in declaration order, omitempty fields left out when empty,
// nil slices, maps and pointers as null, map keys sorted, floats and
// strings as appendFloat and appendString say. A field added to one of
// these types must be added here too: TestAppendConnectorFields fails
// until it is.

// appendConnector appends connector c.
func appendConnector(b []byte, c *ConnectorDoc) ([]byte, error) {
	var err error
	b = appendKey(b, "{", "id")
	b = appendString(b, c.ID)
	b = appendKey(b, ",", "kind")
	b = appendString(b, c.Kind)
	b = appendKey(b, ",", "state")
	b = appendString(b, c.State)
	if c.Group != "" {
		b = appendKey(b, ",", "group")
		b = appendString(b, c.Group)
	}
	b = appendKey(b, ",", "point")
	if b, err = appendVec(b, &c.Point); err != nil {
		return b, err
	}
	b = appendKey(b, ",", "axis")
	if b, err = appendVecPtr(b, c.Axis); err != nil {
		return b, err
	}
	b = appendKey(b, ",", "diameter")
	if b, err = appendFloatPtr(b, c.Diameter); err != nil {
		return b, err
	}
	if c.DiameterSource != "" {
		b = appendKey(b, ",", "diameter_source")
		b = appendString(b, c.DiameterSource)
	}
	b = appendKey(b, ",", "attach")
	b = appendString(b, c.Attach)
	b = appendKey(b, ",", "dofs")
	b = appendStrings(b, c.DOFs)
	b = appendKey(b, ",", "sheets")
	if b, err = appendSlice(b, c.Sheets, appendSheet); err != nil {
		return b, err
	}
	b = appendKey(b, ",", "links")
	if b, err = appendSlice(b, c.Links, appendLink); err != nil {
		return b, err
	}
	b = appendKey(b, ",", "findings")
	b = appendStrings(b, c.Findings)
	if len(c.Listed) > 0 {
		b = appendKey(b, ",", "listed_parts")
		b = appendInts(b, c.Listed)
	}
	if len(c.Tags) > 0 {
		b = appendKey(b, ",", "tags")
		b = appendStringMap(b, c.Tags)
	}
	if c.Bolt != nil {
		b = appendKey(b, ",", "bolt")
		if b, err = appendBolt(b, c.Bolt); err != nil {
			return b, err
		}
	}
	return append(b, '}'), nil
}

// appendSheet appends sheet s.
func appendSheet(b []byte, s *SheetDoc) ([]byte, error) {
	var err error
	b = appendKey(b, "{", "part")
	b = strconv.AppendInt(b, s.Part, 10)
	b = appendKey(b, ",", "element")
	b = strconv.AppendInt(b, s.Element, 10)
	b = appendKey(b, ",", "point")
	if b, err = appendVec(b, &s.Point); err != nil {
		return b, err
	}
	if b, err = appendFloatField(b, "distance", s.Distance); err != nil {
		return b, err
	}
	if b, err = appendFloatField(b, "thickness", s.Thickness); err != nil {
		return b, err
	}
	if b, err = appendFloatField(b, "position", s.Position); err != nil {
		return b, err
	}
	if b, err = appendFloatField(b, "lateral", s.Lateral); err != nil {
		return b, err
	}
	b = appendKey(b, ",", "edge_distance")
	if b, err = appendFloatPtr(b, s.EdgeDistance); err != nil {
		return b, err
	}
	b = appendKey(b, ",", "end_node")
	if s.EndNode == nil {
		b = append(b, "null"...)
	} else {
		b = strconv.AppendInt(b, *s.EndNode, 10)
	}
	b = appendKey(b, ",", "end_point")
	if b, err = appendVecPtr(b, s.EndPoint); err != nil {
		return b, err
	}
	b = appendKey(b, ",", "nodes")
	b = appendInts(b, s.Nodes)
	b = appendKey(b, ",", "weights")
	if b, err = appendFloats(b, s.Weights); err != nil {
		return b, err
	}
	if s.HoleDiameter != nil {
		if b, err = appendFloatField(b, "hole_diameter", *s.HoleDiameter); err != nil {
			return b, err
		}
	}
	if s.Ring != "" {
		b = appendKey(b, ",", "ring")
		b = appendString(b, s.Ring)
	}
	if len(s.NodePoints) > 0 {
		b = appendKey(b, ",", "node_points")
		if b, err = appendSlice(b, s.NodePoints, appendVec); err != nil {
			return b, err
		}
	}
	return append(b, '}'), nil
}

// appendLink appends link l.
func appendLink(b []byte, l *LinkDoc) ([]byte, error) {
	var err error
	b = appendKey(b, "{", "id")
	b = strconv.AppendInt(b, l.ID, 10)
	b = appendKey(b, ",", "kind")
	b = appendString(b, l.Kind)
	b = appendKey(b, ",", "from")
	b = strconv.AppendInt(b, int64(l.From), 10)
	b = appendKey(b, ",", "to")
	b = strconv.AppendInt(b, int64(l.To), 10)
	b = appendKey(b, ",", "start")
	if b, err = appendVec(b, &l.Start); err != nil {
		return b, err
	}
	b = appendKey(b, ",", "end")
	if b, err = appendVec(b, &l.End); err != nil {
		return b, err
	}
	b = appendKey(b, ",", "start_node")
	b = strconv.AppendInt(b, l.StartNode, 10)
	b = appendKey(b, ",", "end_node")
	b = strconv.AppendInt(b, l.EndNode, 10)
	if l.NewNode {
		b = appendKey(b, ",", "new_node")
		b = append(b, "true"...)
	}
	if b, err = appendFloatField(b, "length", l.Length); err != nil {
		return b, err
	}
	b = appendKey(b, ",", "direction")
	if b, err = appendVec(b, &l.Direction); err != nil {
		return b, err
	}
	b = appendKey(b, ",", "dofs")
	b = appendStrings(b, l.DOFs)
	if b, err = appendFloatField(b, "contact_gap", l.ContactGap); err != nil {
		return b, err
	}
	if b, err = appendFloatField(b, "mid_gap", l.MidGap); err != nil {
		return b, err
	}
	if l.SquareGap != nil {
		if b, err = appendFloatField(b, "square_gap", *l.SquareGap); err != nil {
			return b, err
		}
	}
	if l.Mismatch != nil {
		if b, err = appendFloatField(b, "mismatch", *l.Mismatch); err != nil {
			return b, err
		}
	}
	return append(b, '}'), nil
}

// appendBolt appends a bolt's own fields d.
func appendBolt(b []byte, d *BoltDoc) ([]byte, error) {
	var err error
	b = appendKey(b, "{", "washer")
	if b, err = appendFloat(b, d.Washer); err != nil {
		return b, err
	}
	if b, err = appendFloatField(b, "hole", d.Hole); err != nil {
		return b, err
	}
	b = appendKey(b, ",", "ground")
	b = strconv.AppendBool(b, d.Ground)
	b = appendKey(b, ",", "coupling")
	b = appendString(b, d.Coupling)
	b = appendKey(b, ",", "shank")
	b = appendString(b, d.Shank)
	b = appendKey(b, ",", "ring")
	b = appendString(b, d.Ring)
	if d.Beam != nil {
		b = appendKey(b, ",", "beam")
		if b, err = appendBeam(b, d.Beam); err != nil {
			return b, err
		}
	}
	if d.Support != nil {
		s := d.Support
		b = appendKey(b, ",", "support")
		b = appendKey(b, "{", "sheet")
		b = strconv.AppendInt(b, int64(s.Sheet), 10)
		b = appendKey(b, ",", "node")
		b = strconv.AppendInt(b, s.Node, 10)
		b = appendKey(b, ",", "dofs")
		b = appendStrings(b, s.DOFs)
		b = append(b, '}')
	}
	return append(b, '}'), nil
}

// appendBeam appends a beam shank d.
func appendBeam(b []byte, d *BeamDoc) ([]byte, error) {
	var err error
	b = appendKey(b, "{", "diameter")
	if b, err = appendFloat(b, d.Diameter); err != nil {
		return b, err
	}
	for _, f := range [...]struct {
		key string
		v   float64
	}{{"area", d.Area}, {"inertia", d.Inertia}, {"torsion", d.Torsion}, {"modulus", d.Modulus}, {"poisson", d.Poisson}} {
		if b, err = appendFloatField(b, f.key, f.v); err != nil {
			return b, err
		}
	}
	return append(b, '}'), nil
}

// appendKey appends sep (the "{" or "," before the key) and "key":.
// Keys are the types' own tags: plain ASCII, nothing to escape.
func appendKey(b []byte, sep, key string) []byte {
	b = append(b, sep...)
	b = append(b, '"')
	b = append(b, key...)
	return append(b, '"', ':')
}

// appendFloatField appends ,"key":v.
func appendFloatField(b []byte, key string, v float64) ([]byte, error) {
	return appendFloat(appendKey(b, ",", key), v)
}

// appendSlice appends items as a JSON array, null when nil.
func appendSlice[T any](b []byte, items []T, appendItem func([]byte, *T) ([]byte, error)) ([]byte, error) {
	if items == nil {
		return append(b, "null"...), nil
	}
	b = append(b, '[')
	for i := range items {
		if i > 0 {
			b = append(b, ',')
		}
		var err error
		if b, err = appendItem(b, &items[i]); err != nil {
			return b, err
		}
	}
	return append(b, ']'), nil
}

// appendVec appends v as [x,y,z].
func appendVec(b []byte, v *Vec) ([]byte, error) {
	var err error
	b = append(b, '[')
	for i, x := range v {
		if i > 0 {
			b = append(b, ',')
		}
		if b, err = appendFloat(b, x); err != nil {
			return b, err
		}
	}
	return append(b, ']'), nil
}

// appendVecPtr appends *v, or null.
func appendVecPtr(b []byte, v *Vec) ([]byte, error) {
	if v == nil {
		return append(b, "null"...), nil
	}
	return appendVec(b, v)
}

// appendFloatPtr appends *v, or null.
func appendFloatPtr(b []byte, v *float64) ([]byte, error) {
	if v == nil {
		return append(b, "null"...), nil
	}
	return appendFloat(b, *v)
}

// appendFloats appends vs as an array, null when nil.
func appendFloats(b []byte, vs []float64) ([]byte, error) {
	return appendSlice(b, vs, func(b []byte, v *float64) ([]byte, error) { return appendFloat(b, *v) })
}

// appendInts appends vs as an array, null when nil.
func appendInts(b []byte, vs []int64) []byte {
	if vs == nil {
		return append(b, "null"...)
	}
	b = append(b, '[')
	for i, v := range vs {
		if i > 0 {
			b = append(b, ',')
		}
		b = strconv.AppendInt(b, v, 10)
	}
	return append(b, ']')
}

// appendStrings appends ss as an array, null when nil.
func appendStrings(b []byte, ss []string) []byte {
	if ss == nil {
		return append(b, "null"...)
	}
	b = append(b, '[')
	for i, s := range ss {
		if i > 0 {
			b = append(b, ',')
		}
		b = appendString(b, s)
	}
	return append(b, ']')
}

// appendStringMap appends m as an object, keys sorted, null when nil.
func appendStringMap(b []byte, m map[string]string) []byte {
	if m == nil {
		return append(b, "null"...)
	}
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	b = append(b, '{')
	for i, k := range keys {
		if i > 0 {
			b = append(b, ',')
		}
		b = appendString(b, k)
		b = append(b, ':')
		b = appendString(b, m[k])
	}
	return append(b, '}')
}

// appendFloat appends v as encoding/json writes a float64: like
// ECMAScript, the shortest decimal that reads back as v, in 'f' form
// unless |v| < 1e-6 or |v| >= 1e21, then in 'e' form with the
// exponent's leading zero dropped (e-07 -> e-7). NaN and infinities
// are an error, the one encoding/json gives.
func appendFloat(b []byte, v float64) ([]byte, error) {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return b, &json.UnsupportedValueError{Value: reflect.ValueOf(v), Str: strconv.FormatFloat(v, 'g', -1, 64)}
	}
	format := byte('f')
	if abs := math.Abs(v); abs != 0 && (abs < 1e-6 || abs >= 1e21) {
		format = 'e'
	}
	b = strconv.AppendFloat(b, v, format, -1, 64)
	if format == 'e' {
		if n := len(b); n >= 4 && b[n-4] == 'e' && b[n-3] == '-' && b[n-2] == '0' {
			b[n-2] = b[n-1]
			b = b[:n-1]
		}
	}
	return b, nil
}

// appendString appends s quoted as encoding/json quotes it without HTML
// escaping: '"' and '\\' escaped, \b \f \n \r \t short, other bytes
// below 0x20 as \u00XX, invalid UTF-8 bytes as \ufffd, and U+2028 and
// U+2029 as \u2028 and \u2029; everything else as it is.
func appendString(b []byte, s string) []byte {
	const hex = "0123456789abcdef"
	b = append(b, '"')
	start := 0
	for i := 0; i < len(s); {
		if c := s[i]; c < utf8.RuneSelf {
			if c >= 0x20 && c != '"' && c != '\\' {
				i++
				continue
			}
			b = append(b, s[start:i]...)
			switch c {
			case '\\', '"':
				b = append(b, '\\', c)
			case '\b':
				b = append(b, '\\', 'b')
			case '\f':
				b = append(b, '\\', 'f')
			case '\n':
				b = append(b, '\\', 'n')
			case '\r':
				b = append(b, '\\', 'r')
			case '\t':
				b = append(b, '\\', 't')
			default:
				b = append(b, '\\', 'u', '0', '0', hex[c>>4], hex[c&0xF])
			}
			i++
			start = i
			continue
		}
		r, size := utf8.DecodeRuneInString(s[i:])
		if r == utf8.RuneError && size == 1 {
			b = append(b, s[start:i]...)
			b = append(b, `\ufffd`...)
			i += size
			start = i
			continue
		}
		if r == '\u2028' || r == '\u2029' {
			b = append(b, s[start:i]...)
			b = append(b, '\\', 'u', '2', '0', '2', hex[r&0xF])
			i += size
			start = i
			continue
		}
		i += size
	}
	b = append(b, s[start:]...)
	return append(b, '"')
}
