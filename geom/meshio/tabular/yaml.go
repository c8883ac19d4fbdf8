package tabular

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"gopkg.in/yaml.v3"

	"github.com/joinery-cae/joinery/geom"
)

// YAML reads the nodes of one YAML document, reporting errors against
// File. The zero value reports errors without a file name.
type YAML struct {
	File string
}

// sniffBytes is how much of a file IsMeshStart looks at.
const sniffBytes = 256

// IsMeshStart reports whether data, a file's first bytes, begin with the
// first line of a mesh file Joinery reads: the native format's header,
// a legacy VTK file's or an XML (VTK) file's. A mesh given where a table
// or a job file goes is refused by it before it is parsed as YAML (a
// 230 MB mesh took 12 s and 1 GB to be refused as a job file).
func IsMeshStart(data []byte) bool {
	line, _, _ := bytes.Cut(data[:min(len(data), sniffBytes)], []byte("\n"))
	line = bytes.TrimSpace(line)
	for _, h := range []string{"joinery-mesh ", "# vtk DataFile", "<?xml", "<VTKFile"} {
		if bytes.HasPrefix(line, []byte(h)) {
			return true
		}
	}
	return false
}

// Parse reads one YAML document from r and returns its top-level node
// (aliases resolved), or nil for an empty document. Syntax errors,
// a second document, and failures of the YAML library are all returned
// as input errors at their line.
func (y YAML) Parse(r io.Reader) (root *yaml.Node, err error) {
	br := bufio.NewReader(r)
	if first, _ := br.Peek(sniffBytes); IsMeshStart(first) {
		return nil, geom.FileError(y.File, "this is a mesh file, not YAML: give meshes with --mesh (-m)")
	}
	data, err := io.ReadAll(br)
	if err != nil {
		return nil, fmt.Errorf("reading %s: %w", y.File, err)
	}
	if err := checkUTF8(data, y.File); err != nil {
		return nil, err
	}
	defer func() {
		// yaml.v3 reports syntax errors by panicking internally and
		// recovering; this guards against any panic that escapes it.
		if p := recover(); p != nil {
			root, err = nil, geom.FileError(y.File, "YAML parser failed: %v", p)
		}
	}()
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, nil
		}
		return nil, y.syntax(err)
	}
	var extra yaml.Node
	switch err := dec.Decode(&extra); {
	case err == nil:
		return nil, geom.LineError(y.File, max(extra.Line, 1), "a second YAML document; the file must hold one")
	case !errors.Is(err, io.EOF):
		return nil, y.syntax(err)
	}
	if len(doc.Content) == 0 {
		return nil, nil
	}
	if n, raw := expandedSize(&doc, map[*yaml.Node]int{}), countNodes(&doc); n > maxExpanded && n > 10*raw {
		return nil, geom.FileError(y.File, "YAML aliases expand the document from %d to over %d nodes", raw, maxExpanded)
	}
	return resolve(doc.Content[0]), nil
}

// checkUTF8 refuses a document that is not valid UTF-8, naming the line of
// the first bad byte (yaml.v3 names none). Documents starting with a
// UTF-16 byte-order mark are left to yaml.v3, which reads them.
func checkUTF8(data []byte, file string) error {
	if bytes.HasPrefix(data, []byte{0xfe, 0xff}) || bytes.HasPrefix(data, []byte{0xff, 0xfe}) || utf8.Valid(data) {
		return nil
	}
	for i := 0; i < len(data); {
		r, n := utf8.DecodeRune(data[i:])
		if r == utf8.RuneError && n <= 1 {
			return geom.LineError(file, 1+bytes.Count(data[:i], []byte{'\n'}), "not valid UTF-8 text (byte 0x%02x): save the file as UTF-8", data[i])
		}
		i += n
	}
	return nil
}

// maxExpanded bounds the nodes a document may expand to through aliases
// when that is more than ten times its size, so that a small file cannot
// make the readers walk a huge tree.
const maxExpanded = 1_000_000

// expandedSize returns the number of nodes of n with aliases expanded,
// at most maxExpanded+1; memo holds the sizes already known.
func expandedSize(n *yaml.Node, memo map[*yaml.Node]int) int {
	if n.Kind == yaml.AliasNode {
		if n.Alias == nil {
			return 1
		}
		n = n.Alias
	}
	if s, ok := memo[n]; ok {
		return s
	}
	memo[n] = 1 // cut cycles
	s := 1
	for _, c := range n.Content {
		s = min(s+expandedSize(c, memo), maxExpanded+1)
	}
	memo[n] = s
	return s
}

// countNodes returns the number of nodes written in the document.
func countNodes(n *yaml.Node) int {
	s := 1
	for _, c := range n.Content {
		s += countNodes(c)
	}
	return s
}

// syntax turns a yaml.v3 error ("yaml: line 3: msg") into an input error.
func (y YAML) syntax(err error) error {
	msg := strings.TrimPrefix(err.Error(), "yaml: ")
	if rest, ok := strings.CutPrefix(msg, "line "); ok {
		if num, text, ok := strings.Cut(rest, ": "); ok {
			if line, e := strconv.Atoi(num); e == nil && line > 0 {
				return geom.LineError(y.File, line, "YAML: %s", text)
			}
		}
	}
	return geom.FileError(y.File, "YAML: %s", msg)
}

// resolve follows an alias to the node it names.
func resolve(n *yaml.Node) *yaml.Node {
	if n != nil && n.Kind == yaml.AliasNode && n.Alias != nil {
		return n.Alias
	}
	return n
}

// Errorf returns an input error at the line of n.
func (y YAML) Errorf(n *yaml.Node, format string, args ...any) error {
	line := 1
	if n != nil && n.Line > 0 {
		line = n.Line
	}
	return geom.LineError(y.File, line, format, args...)
}

// IsNull reports whether n is absent or an explicit null ("~", "null" or
// nothing after the colon).
func IsNull(n *yaml.Node) bool {
	n = resolve(n)
	return n == nil || (n.Kind == yaml.ScalarNode && n.ShortTag() == "!!null")
}

// Map calls f for each key and value of the mapping n, in file order.
// Keys must be scalars, each given once, and, unless known is nil, one of
// known; an unknown key is an error naming it and suggesting the known
// key it resembles. what names the map in messages ("build settings").
// A null n is an empty map.
func (y YAML) Map(n *yaml.Node, what string, known []string, f func(key string, k, v *yaml.Node) error) error {
	n = resolve(n)
	if IsNull(n) {
		return nil
	}
	if n.Kind != yaml.MappingNode {
		return y.Errorf(n, "%s: want a map of key: value, got %s", what, describe(n))
	}
	seen := make(map[string]int, len(n.Content)/2)
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := resolve(n.Content[i]), resolve(n.Content[i+1])
		if k.Kind != yaml.ScalarNode {
			return y.Errorf(k, "%s: a key must be a plain name, got %s", what, describe(k))
		}
		key := k.Value
		if prev, dup := seen[key]; dup {
			return y.Errorf(k, "%s: key %q given twice (lines %d and %d)", what, geom.Excerpt(key), prev, k.Line)
		}
		seen[key] = k.Line
		if known != nil && !contains(known, key) {
			return y.Errorf(k, "%s: unknown key %q%s", what, geom.Excerpt(key), didYouMean(key, known))
		}
		if err := f(key, k, v); err != nil {
			return err
		}
	}
	return nil
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// List returns the items of the sequence n; a null n is an empty list.
func (y YAML) List(n *yaml.Node, what string) ([]*yaml.Node, error) {
	n = resolve(n)
	if IsNull(n) {
		return nil, nil
	}
	if n.Kind != yaml.SequenceNode {
		return nil, y.Errorf(n, "%s: want a list, got %s", what, describe(n))
	}
	out := make([]*yaml.Node, len(n.Content))
	for i, c := range n.Content {
		out[i] = resolve(c)
	}
	return out, nil
}

// String returns the text of the scalar n as written (numbers keep their
// spelling: "007" stays "007"); a null is "".
func (y YAML) String(n *yaml.Node, what string) (string, error) {
	n = resolve(n)
	if IsNull(n) {
		return "", nil
	}
	if n.Kind != yaml.ScalarNode {
		return "", y.Errorf(n, "%s: want a single value, got %s", what, describe(n))
	}
	return n.Value, nil
}

// Strings returns a list of scalars as text.
func (y YAML) Strings(n *yaml.Node, what string) ([]string, error) {
	items, err := y.List(n, what)
	if err != nil {
		return nil, err
	}
	out := make([]string, len(items))
	for i, it := range items {
		if out[i], err = y.String(it, what); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// Float returns the finite number in the scalar n.
func (y YAML) Float(n *yaml.Node, what string) (float64, error) {
	n = resolve(n)
	if !isNumber(n) {
		return 0, y.Errorf(n, "%s: want a number, got %s", what, describe(n))
	}
	if l := strings.ToLower(n.Value); strings.Contains(l, "nan") || strings.Contains(l, "inf") {
		return 0, y.Errorf(n, "%s: %q is not a finite number", what, geom.Excerpt(n.Value))
	}
	if !plainDecimal(n.Value, true) {
		return 0, y.Errorf(n, "%s: %q: write numbers as plain decimals (like 1.5 or -2e-3)", what, geom.Excerpt(n.Value))
	}
	v, err := strconv.ParseFloat(n.Value, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, y.Errorf(n, "%s: %q is not a finite number", what, geom.Excerpt(n.Value))
	}
	return v, nil
}

// plainDecimal reports whether s is a plain decimal number: an optional
// sign, digits with at most one point (only when real is set), and for
// reals an optional exponent. YAML's other spellings (1_000, 0x10, 0o17,
// .inf) are refused, so that a typo such as 1_0 for 1.0 cannot pass as 10.
func plainDecimal(s string, real bool) bool {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits, point := 0, false
	for ; i < len(s); i++ {
		c := s[i]
		switch {
		case c >= '0' && c <= '9':
			digits++
		case c == '.' && real && !point:
			point = true
		default:
			goto exponent
		}
	}
exponent:
	if digits == 0 {
		return false
	}
	if i == len(s) {
		return true
	}
	if !real || (s[i] != 'e' && s[i] != 'E') {
		return false
	}
	i++
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	if i == len(s) {
		return false
	}
	for ; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return false
		}
	}
	return true
}

// Int returns the integer in the scalar n.
func (y YAML) Int(n *yaml.Node, what string) (int64, error) {
	n = resolve(n)
	if n == nil || n.Kind != yaml.ScalarNode || n.ShortTag() != "!!int" {
		return 0, y.Errorf(n, "%s: want an integer, got %s", what, describe(n))
	}
	if !plainDecimal(n.Value, false) {
		return 0, y.Errorf(n, "%s: %q: write integers as plain decimals (like 1042)", what, geom.Excerpt(n.Value))
	}
	v, err := strconv.ParseInt(n.Value, 10, 64)
	if err != nil {
		return 0, y.Errorf(n, "%s: %q is not a 64-bit integer", what, geom.Excerpt(n.Value))
	}
	return v, nil
}

// Bool returns the boolean in the scalar n (true or false).
func (y YAML) Bool(n *yaml.Node, what string) (bool, error) {
	n = resolve(n)
	if n == nil || n.Kind != yaml.ScalarNode || n.ShortTag() != "!!bool" {
		return false, y.Errorf(n, "%s: want true or false, got %s", what, describe(n))
	}
	var v bool
	if err := n.Decode(&v); err != nil {
		return false, y.Errorf(n, "%s: %q is not true or false", what, geom.Excerpt(n.Value))
	}
	return v, nil
}

func isNumber(n *yaml.Node) bool {
	if n == nil || n.Kind != yaml.ScalarNode {
		return false
	}
	t := n.ShortTag()
	return t == "!!int" || t == "!!float"
}

// describe names what a node holds, for messages.
func describe(n *yaml.Node) string {
	n = resolve(n)
	switch {
	case n == nil:
		return "nothing"
	case n.Kind == yaml.MappingNode:
		return "a map"
	case n.Kind == yaml.SequenceNode:
		return "a list"
	case n.Kind == yaml.ScalarNode && n.ShortTag() == "!!null":
		return "nothing"
	case n.Kind == yaml.ScalarNode:
		return fmt.Sprintf("%q", geom.Excerpt(n.Value))
	}
	return "an unsupported YAML node"
}
