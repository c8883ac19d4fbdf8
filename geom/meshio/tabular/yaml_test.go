package tabular

import (
	"errors"
	"fmt"
	"strings"
	"testing"

	"gopkg.in/yaml.v3"

	"github.com/joinery-cae/joinery/geom"
)

func TestYAMLParseErrors(t *testing.T) {
	tests := []struct {
		name, in, want string
	}{
		{"syntax", "a: 1\nb: [1,\n", "t.yaml:2: YAML: "},
		{"tab indent", "a:\n\t- 1\n", "t.yaml:2: YAML: "},
		{"two documents", "a: 1\n---\nb: 2\n", "t.yaml:2: a second YAML document"},
		{"deep nesting", strings.Repeat("[", 20000), "t.yaml"},
		// A mesh file given as a table is refused before it is parsed.
		{"native mesh", "joinery-mesh 1\npart 1 thickness=1\n", "t.yaml: this is a mesh file, not YAML"},
		{"legacy vtk", "# vtk DataFile Version 3.0\nmesh\nBINARY\n", "t.yaml: this is a mesh file"},
		{"xml vtk", "<?xml version=\"1.0\"?>\n<VTKFile>\n", "t.yaml: this is a mesh file"},
	}
	y := YAML{File: "t.yaml"}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := y.Parse(strings.NewReader(tt.in))
			if err == nil || !strings.HasPrefix(err.Error(), tt.want) {
				t.Fatalf("err = %v, want prefix %q", err, tt.want)
			}
			if !errors.Is(err, geom.ErrInput) {
				t.Errorf("errors.Is(err, geom.ErrInput) = false for %v", err)
			}
		})
	}
}

func TestYAMLAliasBomb(t *testing.T) {
	// 1000 aliases of a 2000-key map expand to 4 million nodes.
	var b strings.Builder
	b.WriteString("tags: &t {")
	for i := range 2000 {
		fmt.Fprintf(&b, "k%d: v, ", i)
	}
	b.WriteString("}\nlist:\n")
	for range 1000 {
		b.WriteString("  - *t\n")
	}
	_, err := YAML{File: "t.yaml"}.Parse(strings.NewReader(b.String()))
	if err == nil || !strings.Contains(err.Error(), "YAML aliases expand the document") || !errors.Is(err, geom.ErrInput) {
		t.Fatalf("err = %v", err)
	}
	// A few aliases are fine.
	if _, err := (YAML{}).Parse(strings.NewReader("a: &x {k: 1}\nb: *x\nc: *x\n")); err != nil {
		t.Fatal(err)
	}
}

func TestYAMLEmpty(t *testing.T) {
	for _, in := range []string{"", "# only a comment\n", "---\n"} {
		root, err := YAML{File: "t.yaml"}.Parse(strings.NewReader(in))
		if err != nil || (root != nil && !IsNull(root)) {
			t.Errorf("Parse(%q) = %v, %v; want nothing", in, root, err)
		}
	}
}

func TestYAMLMap(t *testing.T) {
	known := []string{"attach", "search_distance"}
	tests := []struct {
		name, in, want string
	}{
		{"ok", "attach: patch\nsearch_distance: 2\n", ""},
		{"unknown close", "attach: patch\natach: x\n", `t.yaml:2: build: unknown key "atach" (did you mean "attach"?)`},
		{"unknown far", "colour: red\n", `t.yaml:1: build: unknown key "colour" (known: attach, search_distance)`},
		{"duplicate", "attach: a\n\nattach: b\n", `t.yaml:3: build: key "attach" given twice (lines 1 and 3)`},
		{"not a map", "- 1\n", "t.yaml:1: build: want a map of key: value, got a list"},
		{"complex key", "? [a]\n: 1\n", "t.yaml:1: build: a key must be a plain name, got a list"},
	}
	y := YAML{File: "t.yaml"}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			root, err := y.Parse(strings.NewReader(tt.in))
			if err != nil {
				t.Fatal(err)
			}
			var keys []string
			err = y.Map(root, "build", known, func(k string, _, _ *yaml.Node) error {
				keys = append(keys, k)
				return nil
			})
			if tt.want == "" {
				if err != nil || len(keys) != 2 {
					t.Fatalf("err = %v, keys %v", err, keys)
				}
				return
			}
			if err == nil || err.Error() != tt.want {
				t.Fatalf("err = %v\nwant  %s", err, tt.want)
			}
		})
	}
}

func TestYAMLScalars(t *testing.T) {
	y := YAML{File: "t.yaml"}
	root, err := y.Parse(strings.NewReader(`
f: 1.5e3
i: 42
big: 99999999999999999999
inf: .inf
nan: .nan
str: "2.5"
bool: true
null:
list: [a, 7, 007]
alias: &a 12
ref: *a
`))
	if err != nil {
		t.Fatal(err)
	}
	v := map[string]*yaml.Node{}
	if err := y.Map(root, "test", nil, func(k string, _, n *yaml.Node) error { v[k] = n; return nil }); err != nil {
		t.Fatal(err)
	}
	if f, err := y.Float(v["f"], "f"); err != nil || f != 1500 {
		t.Errorf("Float(f) = %g, %v", f, err)
	}
	if f, err := y.Float(v["i"], "i"); err != nil || f != 42 {
		t.Errorf("Float(i) = %g, %v", f, err)
	}
	if i, err := y.Int(v["ref"], "ref"); err != nil || i != 12 {
		t.Errorf("Int(ref) = %d, %v", i, err)
	}
	if b, err := y.Bool(v["bool"], "bool"); err != nil || !b {
		t.Errorf("Bool = %v, %v", b, err)
	}
	if s, err := y.Strings(v["list"], "list"); err != nil || strings.Join(s, ",") != "a,7,007" {
		t.Errorf("Strings = %q, %v", s, err)
	}
	if s, err := y.String(v["null"], "null"); err != nil || s != "" {
		t.Errorf("String(null) = %q, %v", s, err)
	}
	for _, tt := range []struct {
		got  error
		want string
	}{
		{second(y.Int(v["big"], "big")), `t.yaml:4: big: want an integer, got "99999999999999999999"`},
		{second(y.Float(v["inf"], "inf")), `t.yaml:5: inf: ".inf" is not a finite number`},
		{second(y.Float(v["nan"], "nan")), `t.yaml:6: nan: ".nan" is not a finite number`},
		{second(y.Float(v["str"], "str")), `t.yaml:7: str: want a number, got "2.5"`},
		{second(y.Int(v["f"], "f")), `t.yaml:2: f: want an integer, got "1.5e3"`},
		{second(y.Bool(v["i"], "i")), `t.yaml:3: i: want true or false, got "42"`},
		{second(y.String(v["list"], "list")), `t.yaml:10: list: want a single value, got a list`},
		{second(y.List(v["i"], "i")), `t.yaml:3: i: want a list, got "42"`},
	} {
		if tt.got == nil || tt.got.Error() != tt.want {
			t.Errorf("err = %v\nwant  %s", tt.got, tt.want)
		}
	}
}

func second[T any](_ T, err error) error { return err }

func TestPlainDecimal(t *testing.T) {
	for _, c := range []struct {
		s    string
		real bool
		ok   bool
	}{
		{"1.5", true, true}, {"-2e-3", true, true}, {"+7", true, true}, {"10", false, true}, {"-3", false, true},
		{"1_0", true, false}, {"0x10", true, false}, {"0x10", false, false}, {"0o17", false, false},
		{".inf", true, false}, {"1.5", false, false}, {"1e", true, false}, {"", true, false}, {"-", false, false},
		{"1.2.3", true, false}, {".5", true, true}, {"5.", true, true},
	} {
		if got := plainDecimal(c.s, c.real); got != c.ok {
			t.Errorf("plainDecimal(%q, %v) = %v, want %v", c.s, c.real, got, c.ok)
		}
	}
}
