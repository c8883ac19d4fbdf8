package document

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

// referenceConnectors decodes data with encoding/json, the reference
// ParseConnectors must agree with.
func referenceConnectors(data []byte) (*ConnectorsDoc, error) {
	var doc ConnectorsDoc
	err := json.Unmarshal(data, &doc)
	return &doc, err
}

// sameDoc reports whether two decoded documents hold the same values
// (the bookkeeping of lines left out).
func sameDoc(a, b *ConnectorsDoc) bool {
	x, y := *a, *b
	x.raw, x.starts, x.lines = nil, nil, nil
	y.raw, y.starts, y.lines = nil, nil, nil
	return reflect.DeepEqual(x, y)
}

// goldenConnectors are the connectors documents of the repository.
func goldenConnectors(t testing.TB) map[string][]byte {
	out := map[string][]byte{}
	for _, p := range []string{
		filepath.Join("..", "..", "cmd", "joinery", "testdata", "golden", "build-connectors.json"),
	} {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		out[p] = b
	}
	return out
}

// ParseConnectors gives what encoding/json gives: on the golden files,
// on random documents in every layout (compact, indented, one connector
// per line, keys shuffled, escapes, other number forms, unknown fields),
// and on the seeds.
func TestParseConnectorsAsEncodingJSON(t *testing.T) {
	docs := goldenConnectors(t)
	docs["seed"] = []byte(seedConnectors)
	rng := rand.New(rand.NewPCG(1, 2))
	n := 300
	if testing.Short() {
		n = 60
	}
	for i := range n {
		doc := randomConnectors(rng)
		var b bytes.Buffer
		switch i % 3 {
		case 0:
			if err := EncodeConnectors(&b, doc); err != nil {
				t.Fatal(err)
			}
		case 1:
			if err := EncodeJSON(&b, doc); err != nil {
				t.Fatal(err)
			}
		default:
			raw, err := json.Marshal(doc)
			if err != nil {
				t.Fatal(err)
			}
			b.Write(raw)
		}
		docs[fmt.Sprintf("random %d", i)] = b.Bytes()
		docs[fmt.Sprintf("random %d, rewritten", i)] = rewrite(rng, b.Bytes())
	}
	for name, data := range docs {
		want, err := referenceConnectors(data)
		if err != nil {
			t.Fatalf("%s: encoding/json: %v", name, err)
		}
		got, err := ParseConnectors(data, "c.json")
		if err != nil {
			t.Fatalf("%s: %v\n%s", name, err, geom.Excerpt(data))
		}
		if !sameDoc(got, want) {
			t.Fatalf("%s: decoded values differ from encoding/json's\n%s", name, data)
		}
		// The line of each connector is where its object starts.
		for k := range got.Connectors {
			off := got.starts[k]
			if data[off] != '{' || got.ConnectorLine(k) != 1+bytes.Count(data[:off], []byte("\n")) {
				t.Fatalf("%s: connector %d: start %d, line %d", name, k, off, got.ConnectorLine(k))
			}
		}
	}
}

// randomConnectors makes a document with random values in every field,
// nil and empty slices and pointers included.
func randomConnectors(rng *rand.Rand) *ConnectorsDoc {
	str := func() string {
		const alphabet = "abcXYZ019 -_/.\"\\\t\né€😀<>&"
		runes := []rune(alphabet)
		n := rng.IntN(8)
		var b strings.Builder
		for range n {
			b.WriteRune(runes[rng.IntN(len(runes))])
		}
		return b.String()
	}
	num := func() float64 {
		switch rng.IntN(6) {
		case 0:
			return 0
		case 1:
			return float64(rng.IntN(2000) - 1000)
		case 2:
			return rng.NormFloat64() * 1e-7
		case 3:
			return rng.NormFloat64() * 1e12
		default:
			return rng.NormFloat64() * 100
		}
	}
	integer := func() int64 {
		switch rng.IntN(4) {
		case 0:
			return rng.Int64() - math.MaxInt64/2
		case 1:
			return -rng.Int64N(1000)
		default:
			return rng.Int64N(10000000)
		}
	}
	vec := func() Vec { return Vec{num(), num(), num()} }
	vecp := func() *Vec {
		if rng.IntN(3) == 0 {
			return nil
		}
		v := vec()
		return &v
	}
	fp := func() *float64 {
		if rng.IntN(3) == 0 {
			return nil
		}
		v := num()
		return &v
	}
	ip := func() *int64 {
		if rng.IntN(3) == 0 {
			return nil
		}
		v := integer()
		return &v
	}
	strs := func() []string {
		switch rng.IntN(4) {
		case 0:
			return nil
		case 1:
			return []string{}
		}
		out := make([]string, 1+rng.IntN(4))
		for i := range out {
			if rng.IntN(2) == 0 {
				out[i] = []string{"tx", "ty", "tz", "rx", "ry", "rz"}[rng.IntN(6)]
			} else {
				out[i] = str()
			}
		}
		return out
	}
	ints := func() []int64 {
		if rng.IntN(5) == 0 {
			return nil
		}
		out := make([]int64, rng.IntN(6))
		for i := range out {
			out[i] = integer()
		}
		return out
	}
	floats := func() []float64 {
		if rng.IntN(5) == 0 {
			return nil
		}
		out := make([]float64, rng.IntN(6))
		for i := range out {
			out[i] = num()
		}
		return out
	}
	smap := func() map[string]string {
		if rng.IntN(3) == 0 {
			return nil
		}
		m := map[string]string{}
		for range rng.IntN(3) {
			m[str()] = str()
		}
		return m
	}
	doc := &ConnectorsDoc{
		Schema: ConnectorsSchema, Version: ConnectorsVersion, Generator: str(), RunID: str(), Caution: str(),
		Units: Units{Length: str(), Angle: str()},
		Inputs: Inputs{Meshes: strs(), Parts: str(), PartsOverlays: strs(), Joints: strs(), Connectors: strs(),
			Renumbered: []Shift{{File: str(), NodeOffset: integer(), ElemOffset: integer()}}},
		Options: OptionsDoc{Reach: num(), GapAllowance: fp(), AngleLimit: num(), LateralFactor: num(), EdgeFactor: num(),
			NodeFactor: num(), Attach: str(), GroupAttach: smap(), SpotDOFs: strs(), NuggetRule: str(), Links: str()},
		IDs: IDRange{First: integer(), Next: integer()},
	}
	if rng.IntN(2) == 0 {
		doc.Inputs.TagColumns = []TagColumns{{File: str(), Columns: strs()}}
	}
	if rng.IntN(2) == 0 {
		doc.Options.Bolts = &BoltOptionsDoc{DOFs: strs(), Coupling: str(), Shank: str(), Ring: str(), ShankModulus: num(), HoleTolerance: num()}
	}
	nc := rng.IntN(6)
	if rng.IntN(8) == 0 {
		nc = 0
	}
	for range nc {
		c := ConnectorDoc{ID: str(), Kind: str(), State: str(), Group: str(), Point: vec(), Axis: vecp(), Diameter: fp(),
			DiameterSource: str(), Attach: str(), DOFs: strs(), Findings: strs(), Listed: ints(), Tags: smap()}
		if rng.IntN(6) != 0 {
			c.Sheets = []SheetDoc{}
			for range rng.IntN(4) {
				s := SheetDoc{Part: integer(), Element: integer(), Point: vec(), Distance: num(), Thickness: num(), Position: num(),
					Lateral: num(), EdgeDistance: fp(), EndNode: ip(), EndPoint: vecp(), Nodes: ints(), Weights: floats(),
					HoleDiameter: fp(), Ring: str()}
				if rng.IntN(3) == 0 {
					s.NodePoints = []Vec{vec(), vec()}
				}
				c.Sheets = append(c.Sheets, s)
			}
		}
		if rng.IntN(6) != 0 {
			c.Links = []LinkDoc{}
			for range rng.IntN(4) {
				c.Links = append(c.Links, LinkDoc{ID: integer(), Kind: str(), From: int(integer()), To: int(integer()), Start: vec(), End: vec(),
					StartNode: integer(), EndNode: integer(), NewNode: rng.IntN(2) == 0, Length: num(), Direction: vec(),
					DOFs: strs(), ContactGap: num(), MidGap: num(), SquareGap: fp(), Mismatch: fp()})
			}
		}
		if rng.IntN(3) == 0 {
			b := &BoltDoc{Washer: num(), Hole: num(), Ground: rng.IntN(2) == 0, Coupling: str(), Shank: str(), Ring: str()}
			if rng.IntN(2) == 0 {
				b.Beam = &BeamDoc{Diameter: num(), Area: num(), Inertia: num(), Torsion: num(), Modulus: num(), Poisson: num()}
			}
			if rng.IntN(2) == 0 {
				b.Support = &SupportDoc{Sheet: int(integer()), Node: integer(), DOFs: strs()}
			}
			c.Bolt = b
		}
		doc.Connectors = append(doc.Connectors, c)
	}
	return doc
}

// rewrite writes the JSON document data again with its object keys
// shuffled, random white space, some characters of strings escaped,
// numbers in other forms of the same value, unknown fields added, and
// nulls in place of some arrays: the same document for any decoder that
// follows JSON and the schema.
func rewrite(rng *rand.Rand, data []byte) []byte {
	var v any
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	if err := dec.Decode(&v); err != nil {
		panic(err)
	}
	var b bytes.Buffer
	space := func() {
		for range rng.IntN(3) {
			b.WriteByte(" \t\n\r"[rng.IntN(4)])
		}
	}
	// write writes v, the value of key in its object.
	var write func(v any, key string, depth int)
	write = func(v any, key string, depth int) {
		space()
		switch x := v.(type) {
		case map[string]any:
			keys := make([]string, 0, len(x))
			for k := range x {
				keys = append(keys, k)
			}
			// Map order is random already; sort and shuffle with rng so
			// that the test repeats.
			sortStrings(keys)
			rng.Shuffle(len(keys), func(i, j int) { keys[i], keys[j] = keys[j], keys[i] })
			b.WriteByte('{')
			// Maps (tags, group_attach) hold no fields, unknown or not.
			extra := rng.IntN(4) == 0 && key != "tags" && key != "group_attach"
			for i, k := range keys {
				if i > 0 {
					b.WriteByte(',')
				}
				writeString(rng, &b, k)
				space()
				b.WriteByte(':')
				write(x[k], k, depth+1)
			}
			if extra {
				if len(keys) > 0 {
					b.WriteByte(',')
				}
				writeString(rng, &b, "unknown_"+strconv.Itoa(rng.IntN(100)))
				b.WriteByte(':')
				write(map[string]any{"a": []any{json.Number("1e3"), "x", nil, true, map[string]any{}}, "ID": "y"}, "", depth+1)
			}
			space()
			b.WriteByte('}')
		case []any:
			if depth > 2 && rng.IntN(40) == 0 && !isNumbers(x) {
				b.WriteString("null") // a null for an array of objects or strings: nil
				break
			}
			b.WriteByte('[')
			for i, e := range x {
				if i > 0 {
					b.WriteByte(',')
				}
				write(e, "", depth+1)
			}
			space()
			b.WriteByte(']')
		case string:
			writeString(rng, &b, x)
		case json.Number:
			b.WriteString(otherForm(rng, string(x)))
		case bool:
			b.WriteString(strconv.FormatBool(x))
		case nil:
			b.WriteString("null")
		}
		space()
	}
	write(v, "", 0)
	return b.Bytes()
}

// isNumbers reports whether a holds numbers only (a vector, nodes or
// weights, which the test leaves as arrays).
func isNumbers(a []any) bool {
	for _, e := range a {
		if _, ok := e.(json.Number); !ok {
			return false
		}
	}
	return len(a) > 0
}

func sortStrings(s []string) {
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && s[j] < s[j-1]; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
}

// writeString writes s as a JSON string, escaping some of its characters
// that need no escape.
func writeString(rng *rand.Rand, b *bytes.Buffer, s string) {
	b.WriteByte('"')
	for _, r := range s {
		switch {
		case r == '"' || r == '\\':
			b.WriteByte('\\')
			b.WriteRune(r)
		case r < 0x20 || rng.IntN(10) == 0:
			if r > 0xffff {
				r1, r2 := utf16Pair(r)
				fmt.Fprintf(b, "\\u%04x\\u%04X", r1, r2)
			} else {
				fmt.Fprintf(b, "\\u%04x", r)
			}
		case r == '/' && rng.IntN(2) == 0:
			b.WriteString(`\/`)
		default:
			b.WriteRune(r)
		}
	}
	b.WriteByte('"')
}

func utf16Pair(r rune) (rune, rune) {
	r -= 0x10000
	return 0xd800 + r>>10, 0xdc00 + r&0x3ff
}

// otherForm writes the number n in another form of the same decimal
// value: an exponent, a capital E, a shifted decimal point.
func otherForm(rng *rand.Rand, n string) string {
	if rng.IntN(3) != 0 {
		return n
	}
	mant, exp := n, 0
	if i := strings.IndexAny(n, "eE"); i >= 0 {
		mant = n[:i]
		e, err := strconv.Atoi(n[i+1:])
		if err != nil {
			return n
		}
		exp = e
	}
	neg := strings.HasPrefix(mant, "-")
	mant = strings.TrimPrefix(mant, "-")
	intPart, frac, _ := strings.Cut(mant, ".")
	if strings.Contains(n, ".") || strings.ContainsAny(n, "eE") {
		// d.ddd e X -> dddd e (X - len(frac)): the same value.
		digits := strings.TrimLeft(intPart+frac, "0")
		if digits == "" {
			digits = "0"
		}
		s := digits + "e" + strconv.Itoa(exp-len(frac))
		if rng.IntN(2) == 0 {
			s = digits + "E+" + strconv.Itoa(exp-len(frac))
			if exp-len(frac) < 0 {
				s = digits + "E" + strconv.Itoa(exp-len(frac))
			}
		}
		if neg {
			s = "-" + s
		}
		return s
	}
	// An integer stays an integer for encoding/json's int fields.
	return n
}

// The documented differences with encoding/json, where the schema is
// stricter or allows more, and syntax errors with their place.
func TestParseConnectorsStricter(t *testing.T) {
	head := `{"schema":"joinery/connectors","version":2,"connectors":[` + "\n"
	one := func(c string) string { return head + c + "\n]}" }
	for _, tc := range []struct {
		name, in string
		err      string // "" : accepted
	}{
		{"key in other case is unknown", one(`{"ID":"W1","id":"W2","Sheets":5}`), ""},
		{"whole integer with a fraction", one(`{"id":"W","sheets":[{"part":10.0,"element":1e3}]}`), ""},
		{"vector of 2", one(`{"id":"W","point":[1,2]}`), `c.json:2: byte 76: connector 0 ("W"), "point": a vector has 3 numbers, found 2`},
		{"vector of 4", one(`{"id":"W","point":[1,2,3,4]}`), `c.json:2: byte 83: connector 0 ("W"), "point": a vector has 3 numbers, found more`},
		{"key twice", one(`{"id":"W","state":"built","state":"flagged"}`), `c.json:2: byte 84: connector 0 ("W"), "state": key "state" given twice in one object`},
		{"fraction in an integer", one(`{"id":"W","sheets":[{"part":1.5}]}`), `c.json:2: byte 86: connector 0 ("W"), sheet 0, "part": want an integer, found 1.5`},
		{"string for a number", one(`{"id":"W","sheets":[{"thickness":"1"}]}`), `connector 0 ("W"), sheet 0, "thickness": want a number, found a string`},
		{"number out of range", one(`{"id":"W","diameter":1e999}`), `number 1e999 out of range`},
		{"integer out of range", one(`{"id":"W","links":[{"id":9223372036854775808}]}`), `integer 9223372036854775808 out of range`},
		{"not closed", one(`{"id":"W"`), `want ',' or '}' after an object member`},
		{"trailing data", head + "]} x", `c.json:2: byte 61: data after the end of the document`},
		{"bad escape", one(`{"id":"W\q"}`), `invalid escape \q in a string`},
		{"control character", one("{\"id\":\"W\x01\"}"), `control character 0x1 in a string`},
		{"leading zero", one(`{"id":"W","diameter":01}`), `want ',' or '}' after an object member`},
		{"bare dot", one(`{"id":"W","diameter":1.}`), `no digit after the decimal point`},
		{"nested deep", one(`{"id":"W","x":` + strings.Repeat("[", maxDepth+1) + `}`), `nested more than 10000 deep`},
		{"escaped key", one(`{"\u0069d":"W","state":"b\u0075ilt"}`), ""},
		{"null everywhere nullable", one(`{"id":null,"point":null,"axis":null,"diameter":null,"dofs":null,"sheets":[{"nodes":null,"weights":[1,null],"end_node":null,"edge_distance":null}],"links":null}`), ""},
	} {
		_, err := ParseConnectors([]byte(tc.in), "c.json")
		switch {
		case tc.err == "" && err != nil:
			t.Errorf("%s: %v", tc.name, err)
		case tc.err != "" && (err == nil || !strings.Contains(err.Error(), tc.err) || !errors.Is(err, geom.ErrInput)):
			t.Errorf("%s: err %v, want an input error with %q", tc.name, err, tc.err)
		}
	}
	// Accepted both ways, the values agree where the key case does.
	in := one(`{"id":"W","sheets":[{"part":10.0,"element":1e3}],"point":[1,2,3]}`)
	doc, err := ParseConnectors([]byte(in), "c.json")
	if err != nil || doc.Connectors[0].Sheets[0].Part != 10 || doc.Connectors[0].Sheets[0].Element != 1000 {
		t.Errorf("%v %+v", err, doc)
	}
}

// FuzzParseConnectors checks that no document makes the decoder panic,
// that its errors are input errors, and that it agrees with
// encoding/json: a document encoding/json refuses is refused, and one
// both accept decodes to the same values; the decoder refuses more only
// where the schema does (a vector not of 3, a key twice), and accepts
// more only where the schema does (a whole integer written 12.0).
func FuzzParseConnectors(f *testing.F) {
	f.Add([]byte(seedConnectors))
	for _, b := range goldenConnectors(f) {
		f.Add(b)
	}
	rng := rand.New(rand.NewPCG(3, 4))
	for range 4 {
		var b bytes.Buffer
		EncodeConnectors(&b, randomConnectors(rng))
		f.Add(rewrite(rng, b.Bytes()))
	}
	names := fieldNames()
	f.Fuzz(func(t *testing.T, data []byte) {
		got, err := ParseConnectors(data, "f.json")
		want, refErr := referenceConnectors(data)
		if err != nil {
			if !errors.Is(err, geom.ErrInput) {
				t.Fatalf("not an input error: %v", err)
			}
			return
		}
		if refErr != nil {
			var te *json.UnmarshalTypeError
			if errors.As(refErr, &te) && strings.HasPrefix(te.Value, "number") {
				return // a whole number written with a fraction for an integer
			}
			if strings.Contains(refErr.Error(), "schema") || strings.Contains(refErr.Error(), "version") {
				return
			}
			t.Fatalf("accepted what encoding/json refuses (%v)", refErr)
		}
		if !foldedKeys(data, names) && !sameDoc(got, want) {
			t.Fatalf("decoded values differ from encoding/json's")
		}
	})
}

// foldedKeys reports whether data holds an object key that differs only
// in case from a field name of names (all of them lower case), which
// encoding/json matches and the schema does not.
func foldedKeys(data []byte, names map[string]bool) bool {
	dec := json.NewDecoder(bytes.NewReader(data))
	type frame struct{ object, key bool }
	var stack []frame
	for {
		tok, err := dec.Token()
		if err != nil {
			return false
		}
		top := len(stack) - 1
		if k, ok := tok.(string); ok && top >= 0 && stack[top].object && stack[top].key {
			if !names[k] && names[strings.ToLower(k)] {
				return true
			}
			stack[top].key = false
			continue
		}
		switch tok {
		case json.Delim('{'):
			stack = append(stack, frame{object: true, key: true})
			continue
		case json.Delim('['):
			stack = append(stack, frame{})
			continue
		case json.Delim('}'), json.Delim(']'):
			stack = stack[:top]
			top--
		}
		if top >= 0 && stack[top].object {
			stack[top].key = true // a value done: a key comes next
		}
	}
}

// fieldNames returns the JSON names of the document's fields.
func fieldNames() map[string]bool {
	m := map[string]bool{}
	seen := map[reflect.Type]bool{}
	var walk func(t reflect.Type)
	walk = func(t reflect.Type) {
		for t.Kind() == reflect.Pointer || t.Kind() == reflect.Slice || t.Kind() == reflect.Map || t.Kind() == reflect.Array {
			t = t.Elem()
		}
		if t.Kind() != reflect.Struct || seen[t] {
			return
		}
		seen[t] = true
		for i := range t.NumField() {
			f := t.Field(i)
			if name, _, _ := strings.Cut(f.Tag.Get("json"), ","); name != "" {
				m[name] = true
			}
			walk(f.Type)
		}
	}
	walk(reflect.TypeFor[ConnectorsDoc]())
	return m
}

// BenchmarkParseConnectors decodes a document of 6,000 connectors (the
// golden build's, repeated) with ParseConnectors and, for comparison,
// with encoding/json.
func BenchmarkParseConnectors(b *testing.B) {
	var buf bytes.Buffer
	if err := EncodeConnectors(&buf, repeatedGolden(b, 6000)); err != nil {
		b.Fatal(err)
	}
	data := buf.Bytes()
	b.Run("ParseConnectors", func(b *testing.B) {
		b.SetBytes(int64(len(data)))
		for b.Loop() {
			if _, err := ParseConnectors(data, "c.json"); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("encoding-json", func(b *testing.B) {
		b.SetBytes(int64(len(data)))
		for b.Loop() {
			if _, err := referenceConnectors(data); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// exactFloat gives strconv.ParseFloat's value, bit for bit, wherever it
// gives one: on numbers as Go writes them and on random digit strings
// with points, exponents and leading and trailing zeros.
func TestExactFloat(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	var cases []string
	for range 200000 {
		var s string
		switch rng.IntN(3) {
		case 0:
			v := rng.NormFloat64() * math.Pow10(rng.IntN(30)-15)
			s = strconv.FormatFloat(v, 'g', -1, 64)
			if rng.IntN(2) == 0 {
				s = strconv.FormatFloat(v, 'f', -1, 64)
			}
		default:
			var b strings.Builder
			if rng.IntN(2) == 0 {
				b.WriteByte('-')
			}
			n := 1 + rng.IntN(20)
			for k := range n {
				if k == 0 && n > 1 {
					b.WriteByte(byte('1' + rng.IntN(9)))
				} else {
					b.WriteByte(byte('0' + rng.IntN(10)))
				}
			}
			if rng.IntN(2) == 0 {
				b.WriteByte('.')
				for range 1 + rng.IntN(20) {
					b.WriteByte(byte('0' + rng.IntN(10)))
				}
			}
			if rng.IntN(2) == 0 {
				b.WriteString([]string{"e", "E", "e+", "e-", "E-"}[rng.IntN(5)])
				b.WriteString(strconv.Itoa(rng.IntN(40)))
			}
			s = b.String()
		}
		cases = append(cases, s)
	}
	cases = append(cases, "0", "-0", "0.0", "-0.0e5", "1e22", "1e23", "123456789012345", "1234567890123456", "0.000000000000000000000001", "9007199254740993", "1e-22", "4.5e-23", "0e0")
	fast := 0
	for _, s := range cases {
		want, err := strconv.ParseFloat(s, 64)
		got, ok := exactFloat([]byte(s))
		if !ok {
			continue
		}
		fast++
		if err != nil || math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("%s: %v (%x), strconv %v (%x, %v)", s, got, math.Float64bits(got), want, math.Float64bits(want), err)
		}
	}
	if fast < len(cases)/4 {
		t.Errorf("fast path taken for %d of %d numbers only", fast, len(cases))
	}
}
