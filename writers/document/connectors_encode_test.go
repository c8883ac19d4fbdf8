package document

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
)

// encodeConnectorsJSON is EncodeConnectors as it was before
// appendConnector: every connector through encoding/json. The tests hold
// the two to the same bytes and the benchmark compares them.
func encodeConnectorsJSON(w *bytes.Buffer, doc *ConnectorsDoc) error {
	return encodeLines(w, connectorsHead(doc), "connectors", doc.Connectors, jsonItems[ConnectorDoc]())
}

// sameAsEncodingJSON fails t unless EncodeConnectors writes doc byte for
// byte as encoding/json does, and returns what it wrote.
func sameAsEncodingJSON(t testing.TB, name string, doc *ConnectorsDoc) []byte {
	t.Helper()
	var got, want bytes.Buffer
	errGot := EncodeConnectors(&got, doc)
	errWant := encodeConnectorsJSON(&want, doc)
	if fmt.Sprint(errGot) != fmt.Sprint(errWant) {
		t.Fatalf("%s: error %v, encoding/json %v", name, errGot, errWant)
	}
	if !bytes.Equal(got.Bytes(), want.Bytes()) {
		g, w := got.Bytes(), want.Bytes()
		i := 0
		for i < len(g) && i < len(w) && g[i] == w[i] {
			i++
		}
		t.Fatalf("%s: differs from encoding/json at byte %d:\n got %q\nwant %q", name, i, excerptAt(g, i), excerptAt(w, i))
	}
	return got.Bytes()
}

func excerptAt(b []byte, i int) []byte {
	return b[max(0, i-60):min(len(b), i+60)]
}

// The golden connectors.json files, read back and written again, come
// out as they are and as encoding/json writes them.
func TestEncodeConnectorsGolden(t *testing.T) {
	for name, raw := range goldenConnectors(t) {
		doc, err := ParseConnectors(raw, name)
		if err != nil {
			t.Fatal(err)
		}
		if got := sameAsEncodingJSON(t, name, doc); !bytes.Equal(got, raw) {
			t.Errorf("%s: written again, differs from the file", name)
		}
	}
}

// appendConnector writes what encoding/json writes on random documents:
// every field random, nil and empty slices, maps and pointers, strings
// with quotes, backslashes, HTML characters, control characters, DEL,
// U+2028/2029, invalid UTF-8 and multi-byte runes, floats at and around
// the 1e-6 and 1e21 form cut-offs, subnormal, huge, -0 and integral.
func TestEncodeConnectorsRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	n := 2000
	if testing.Short() {
		n = 300
	}
	for i := range n {
		doc := randomConnectors(rng)
		if i%2 == 1 {
			harshen(rng, reflect.ValueOf(doc).Elem())
		}
		sameAsEncodingJSON(t, fmt.Sprintf("document %d", i), doc)
	}
}

// harshStrings and harshFloats are the values harshen puts in: the
// edges of encoding/json's string escaping and float forms.
var (
	harshStrings = []string{"", "a", `"`, `\`, "<>&", "\x00", "\x01", "\x1f", "\x7f", "\b\f\n\r\t", "\u2028", "\u2029",
		"\xff", "\xc3", "a\xe2\x80", "é", "€", "😀", "\ufffd", "\u007f\u0080", "x\"y\\z</script>", "\xed\xa0\x80"}
	harshFloats = []float64{0, math.Copysign(0, -1), 1, -1, 1e-6, math.Nextafter(1e-6, 0), -1e-6, 1e-7, 1e21,
		math.Nextafter(1e21, 0), -1e21, 1e20, 123456789, 1e-300, 5e-324, math.SmallestNonzeroFloat64 * 3, math.MaxFloat64,
		-math.MaxFloat64, 0.1, 1.0 / 3, 2.5e-8, 9.999999e-7, 1e100, 12345678901234567890, 0.000001234, 1e15, 1e16}
)

// harshen replaces, at random, the strings and floats under v with
// harsh ones, and the keys and values of its string maps.
func harshen(rng *rand.Rand, v reflect.Value) {
	str := func() string {
		var b strings.Builder
		for range rng.IntN(4) {
			b.WriteString(harshStrings[rng.IntN(len(harshStrings))])
		}
		return b.String()
	}
	switch v.Kind() {
	case reflect.String:
		if rng.IntN(2) == 0 {
			v.SetString(str())
		}
	case reflect.Float64:
		if rng.IntN(2) == 0 {
			f := harshFloats[rng.IntN(len(harshFloats))]
			if rng.IntN(4) == 0 {
				f = math.Float64frombits(rng.Uint64())
				if math.IsNaN(f) || math.IsInf(f, 0) {
					f = 0
				}
			}
			v.SetFloat(f)
		}
	case reflect.Pointer:
		if !v.IsNil() {
			harshen(rng, v.Elem())
		}
	case reflect.Struct:
		for i := range v.NumField() {
			if v.Type().Field(i).IsExported() {
				harshen(rng, v.Field(i))
			}
		}
	case reflect.Slice, reflect.Array:
		for i := range v.Len() {
			harshen(rng, v.Index(i))
		}
	case reflect.Map:
		if v.IsNil() {
			return
		}
		m := reflect.MakeMap(v.Type())
		for range v.Len() + rng.IntN(3) {
			m.SetMapIndex(reflect.ValueOf(str()), reflect.ValueOf(str()))
		}
		v.Set(m)
	}
}

// Every field of the connector's types, set, is written as encoding/json
// writes it: a field added to a type and not to appendConnector fails
// here.
func TestEncodeConnectorsFields(t *testing.T) {
	var c ConnectorDoc
	fill(t, reflect.ValueOf(&c).Elem(), 1)
	doc := &ConnectorsDoc{Schema: ConnectorsSchema, Version: ConnectorsVersion, Connectors: []ConnectorDoc{c, {}}}
	sameAsEncodingJSON(t, "filled", doc)
}

// fill sets every field under v to a value that is not its zero value,
// pointers allocated, slices and maps of two elements.
func fill(t *testing.T, v reflect.Value, k int) {
	switch v.Kind() {
	case reflect.String:
		v.SetString(fmt.Sprintf("s%d", k))
	case reflect.Float64:
		v.SetFloat(float64(k) + 0.5)
	case reflect.Int, reflect.Int64:
		v.SetInt(int64(k))
	case reflect.Bool:
		v.SetBool(true)
	case reflect.Pointer:
		v.Set(reflect.New(v.Type().Elem()))
		fill(t, v.Elem(), k+1)
	case reflect.Struct:
		for i := range v.NumField() {
			if v.Type().Field(i).IsExported() {
				fill(t, v.Field(i), k+i)
			}
		}
	case reflect.Slice:
		v.Set(reflect.MakeSlice(v.Type(), 2, 2))
		fallthrough
	case reflect.Array:
		for i := range v.Len() {
			fill(t, v.Index(i), k+i)
		}
	case reflect.Map:
		m := reflect.MakeMap(v.Type())
		for i := range 2 {
			key, val := reflect.New(v.Type().Key()).Elem(), reflect.New(v.Type().Elem()).Elem()
			fill(t, key, k+i)
			fill(t, val, k+i+10)
			m.SetMapIndex(key, val)
		}
		v.Set(m)
	default:
		t.Fatalf("fill: no value for %s", v.Type())
	}
}

// A NaN or an infinity is encoding/json's error, and what precedes the
// connector that holds it is written as before.
func TestEncodeConnectorsUnsupported(t *testing.T) {
	for _, f := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		d := f
		doc := &ConnectorsDoc{Schema: ConnectorsSchema, Version: ConnectorsVersion, Connectors: []ConnectorDoc{
			{ID: "a"}, {ID: "b", Sheets: []SheetDoc{{Weights: []float64{1, f}}}}, {ID: "c", Diameter: &d}}}
		var buf bytes.Buffer
		err := EncodeConnectors(&buf, doc)
		if err == nil || !strings.Contains(err.Error(), "unsupported value") {
			t.Fatalf("%v: error %v", f, err)
		}
		sameAsEncodingJSON(t, fmt.Sprint(f), doc)
	}
}

// FuzzEncodeConnectors holds appendConnector to encoding/json on
// strings and floats from the fuzzer.
func FuzzEncodeConnectors(f *testing.F) {
	for i, s := range harshStrings {
		f.Add(s, harshFloats[i%len(harshFloats)], harshFloats[(i+7)%len(harshFloats)])
	}
	f.Fuzz(func(t *testing.T, s string, x, y float64) {
		c := ConnectorDoc{ID: s, Group: s, Point: Vec{x, y, -x}, Diameter: &y, DOFs: []string{s, s + s},
			Tags: map[string]string{s: s, "k": s + "k"}, Findings: []string{},
			Sheets: []SheetDoc{{Ring: s, Weights: []float64{x, y}, HoleDiameter: &x}},
			Links:  []LinkDoc{{Kind: s, Length: x, Mismatch: &y}}}
		doc := &ConnectorsDoc{Schema: ConnectorsSchema, Version: ConnectorsVersion, Connectors: []ConnectorDoc{c}}
		sameAsEncodingJSON(t, "fuzz", doc)
	})
}

// BenchmarkEncodeConnectors writes a document of 6,300 connectors (the
// golden build's, repeated: the synthetic body's count) with
// appendConnector and, for comparison, with encoding/json.
func BenchmarkEncodeConnectors(b *testing.B) {
	doc := repeatedGolden(b, 6300)
	var buf bytes.Buffer
	if err := EncodeConnectors(&buf, doc); err != nil {
		b.Fatal(err)
	}
	size := int64(buf.Len())
	for _, enc := range []struct {
		name string
		f    func(*bytes.Buffer, *ConnectorsDoc) error
	}{
		{"append", func(w *bytes.Buffer, d *ConnectorsDoc) error { return EncodeConnectors(w, d) }},
		{"encoding-json", encodeConnectorsJSON},
	} {
		b.Run(enc.name, func(b *testing.B) {
			b.SetBytes(size)
			b.ReportAllocs()
			for b.Loop() {
				var w bytes.Buffer
				if err := enc.f(&w, doc); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// repeatedGolden returns the golden build's connectors document with its
// connectors repeated to n, each with its own id.
func repeatedGolden(t testing.TB, n int) *ConnectorsDoc {
	for _, raw := range goldenConnectors(t) {
		doc, err := ParseConnectors(raw, "golden")
		if err != nil {
			t.Fatal(err)
		}
		base := doc.Connectors
		doc.Connectors = nil
		for i := 0; len(doc.Connectors) < n; i++ {
			c := base[i%len(base)]
			c.ID = fmt.Sprintf("%s-%d", c.ID, i)
			doc.Connectors = append(doc.Connectors, c)
		}
		return doc
	}
	t.Fatal("no golden connectors.json")
	return nil
}
