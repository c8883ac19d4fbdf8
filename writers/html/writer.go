package html

import (
	"math"
	"strconv"

	"github.com/joinery-cae/joinery/joints"
)

// Writer collects a page in memory. Its methods escape what they are
// given as text or attribute values; Raw writes markup as it is. The
// page it writes is well-formed XML outside its style and script
// elements (void elements are closed, attributes quoted, only the
// entities &amp; &lt; &gt; &quot; and numeric references), so that tests
// can read it with encoding/xml.
type Writer struct {
	b []byte
}

// Raw writes markup as it is.
func (w *Writer) Raw(s string) { w.b = append(w.b, s...) }

// Text writes s as element text, escaped.
func (w *Writer) Text(s string) { w.b = appendEscaped(w.b, s) }

// Attr writes ` name="value"`, the value escaped.
func (w *Writer) Attr(name, value string) {
	w.b = append(w.b, ' ')
	w.b = append(w.b, name...)
	w.b = append(w.b, '=', '"')
	w.b = appendEscaped(w.b, value)
	w.b = append(w.b, '"')
}

// Int writes an integer.
func (w *Writer) Int(v int64) { w.b = strconv.AppendInt(w.b, v, 10) }

// MM writes a length in mm as messages do (joints.MM: at most three
// decimals, no trailing zeros); "-" for NaN.
func (w *Writer) MM(v float64) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		w.Raw("-")
		return
	}
	w.Raw(joints.MM(v))
}

// Cell writes one table cell holding escaped text.
func (w *Writer) Cell(s string) {
	w.Raw("<td>")
	w.Text(s)
	w.Raw("</td>")
}

// NumCell writes one right-aligned table cell holding a length in mm.
func (w *Writer) NumCell(v float64) {
	w.Raw(`<td class="n">`)
	w.MM(v)
	w.Raw("</td>")
}

// IntCell writes one right-aligned table cell holding an integer.
func (w *Writer) IntCell(v int) {
	w.Raw(`<td class="n">`)
	w.Int(int64(v))
	w.Raw("</td>")
}

// Bytes returns what was written. The slice aliases the writer.
func (w *Writer) Bytes() []byte { return w.b }

func appendEscaped(b []byte, s string) []byte {
	last := 0
	for i := 0; i < len(s); i++ {
		var esc string
		switch s[i] {
		case '&':
			esc = "&amp;"
		case '<':
			esc = "&lt;"
		case '>':
			esc = "&gt;"
		case '"':
			esc = "&quot;"
		case '\'':
			esc = "&#39;"
		default:
			if s[i] < 0x20 && s[i] != '\t' && s[i] != '\n' {
				esc = " " // control characters are not allowed in XML text
			} else {
				continue
			}
		}
		b = append(b, s[last:i]...)
		b = append(b, esc...)
		last = i + 1
	}
	return append(b, s[last:]...)
}

// Anchor turns a joint id (any string) into the part of an HTML id that
// names it: ASCII letters, digits and '-' are kept, every other byte
// becomes '_' and two lower-case hex digits, so that different ids give
// different anchors and the same id always the same.
func Anchor(id string) string {
	plain := true
	for i := 0; i < len(id); i++ {
		if !anchorByte(id[i]) {
			plain = false
			break
		}
	}
	if plain && id != "" {
		return id
	}
	const hex = "0123456789abcdef"
	b := make([]byte, 0, len(id)+8)
	for i := 0; i < len(id); i++ {
		c := id[i]
		if anchorByte(c) {
			b = append(b, c)
			continue
		}
		b = append(b, '_', hex[c>>4], hex[c&15])
	}
	if len(b) == 0 {
		return "_"
	}
	return string(b)
}

func anchorByte(c byte) bool {
	return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '-'
}
