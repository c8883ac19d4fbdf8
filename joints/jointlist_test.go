package joints

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"
	"unicode/utf8"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// exampleJoints is the content of testdata/joints/welds.csv and
// welds.yaml, without File and Line.
func exampleJoints() []Joint {
	station := func(s string) map[string]string { return map[string]string{"station": s} }
	return []Joint{
		{ID: "W1", Point: r3.Vec{X: 0, Y: -400, Z: 12.5}, Group: "flange-left", Tags: station("S01")},
		{ID: "W2", Point: r3.Vec{X: 30, Y: -400, Z: 12.5}, Group: "flange-left", Tags: station("S01")},
		{ID: "W10", Point: r3.Vec{X: 60, Y: -400, Z: 12.5}, Parts: []int64{100, 200}, Diameter: 5.5, Group: "flange-left", Tags: station("S02")},
		{ID: "W3", Point: r3.Vec{X: 0, Y: 400, Z: 12.5}, Group: "flange-right", Tags: station("S03")},
		{ID: "W4", Point: r3.Vec{X: 30, Y: 400, Z: 12.5}, Parts: []int64{100, 200, 300}, Diameter: 6, Group: "end-stack", Tags: station("S03")},
		// M10 bolts: washer 20 mm (ISO 7089), hole 11 mm (ISO 273 medium).
		{ID: "B1", Kind: Bolt, Point: r3.Vec{X: 450, Z: 40}, Parts: []int64{200, 400}, Diameter: 10, Washer: 20, Hole: 11, Group: "tow-eye"},
		{ID: "B2", Kind: Bolt, Point: r3.Vec{X: 490, Z: 40}, Parts: []int64{200, 400}, Diameter: 10, Washer: 20, Hole: 11, Group: "tow-eye"},
	}
}

func TestReadJointsFiles(t *testing.T) {
	tests := []struct {
		file  string
		lines []int
	}{
		{"welds.csv", []int{4, 5, 6, 7, 9, 10, 11}},
		{"welds.yaml", []int{3, 4, 5, 13, 14, 16, 17}},
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			path := filepath.Join("..", "testdata", "joints", tt.file)
			got, warns, err := ReadJoints(path)
			if err != nil {
				t.Fatal(err)
			}
			if len(warns) != 0 {
				t.Errorf("warnings: %v", warns)
			}
			want := exampleJoints()
			if len(got) != len(want) {
				t.Fatalf("%d joints, want %d", len(got), len(want))
			}
			for i := range want {
				want[i].File, want[i].Line = path, tt.lines[i]
				if !reflect.DeepEqual(got[i], want[i]) {
					t.Errorf("joint %d:\n got %+v\nwant %+v", i, got[i], want[i])
				}
			}
		})
	}
}

func TestReadJointsCSVColumns(t *testing.T) {
	// Columns in any order and case, unknown ones kept as tags, empty
	// optional cells not given, quoted fields.
	in := " Z ,Parts,ID,y,X,Torque,Note\n1,\"3;1\",17,2,3,4.5,\"left, rear\"\n1,,18,2,3,,\n"
	got, warns, err := ReadJointsCSV(strings.NewReader(in), "w.csv")
	if err != nil {
		t.Fatal(err)
	}
	want := []Joint{
		{ID: "17", Point: r3.Vec{X: 3, Y: 2, Z: 1}, Parts: []int64{3, 1}, Tags: map[string]string{"Torque": "4.5", "Note": "left, rear"}, File: "w.csv", Line: 2},
		{ID: "18", Point: r3.Vec{X: 3, Y: 2, Z: 1}, File: "w.csv", Line: 3},
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("got  %+v\nwant %+v", got, want)
	}
	if len(warns) != 0 {
		t.Errorf("warnings %v", warns)
	}
}

func TestReadJointsDelimiters(t *testing.T) {
	// The same list written with commas, with semicolons (a spreadsheet
	// export where the comma is the decimal separator: parts quoted) and
	// with tabs reads the same.
	lists := []string{
		"id,x,y,z,parts,diameter,group\nW1,12.5,-3,0.25,\"10;20\",6,rear\nW2,1,2,3,,,\n",
		"id;x;y;z;parts;diameter;group\nW1;12.5;-3;0.25;\"10;20\";6;rear\nW2;1;2;3;;;\n",
		"id\tx\ty\tz\tparts\tdiameter\tgroup\nW1\t12.5\t-3\t0.25\t10;20\t6\trear\nW2\t1\t2\t3\t\t\t\n",
	}
	var first []Joint
	for i, in := range lists {
		got, _, err := ReadJointsCSV(strings.NewReader(in), "w.csv")
		if err != nil {
			t.Fatalf("list %d: %v", i, err)
		}
		if i == 0 {
			first = got
			if len(got) != 2 || got[0].Diameter != 6 || !slices.Equal(got[0].Parts, []int64{10, 20}) || got[0].Point.X != 12.5 {
				t.Fatalf("got %+v", got)
			}
			continue
		}
		if !reflect.DeepEqual(got, first) {
			t.Errorf("list %d: got %+v\nwant %+v", i, got, first)
		}
	}
}

func TestReadJointsNearMissColumn(t *testing.T) {
	// A column or key within a small edit distance of a known one is an
	// error in both forms, with the file, the line and the suggestion:
	// kept as a tag, a misspelt diameter would give way to the rule's.
	_, _, err := ReadJointsCSV(strings.NewReader("# plan\nid,x,y,z,diamter\nW1,0,0,0,6\n"), "w.csv")
	checkErr(t, err, `w.csv:2: unknown column "diamter" (did you mean "diameter"?); a column meant as a free tag needs a name unlike the known ones`)
	_, _, err = ReadJointsYAML(strings.NewReader("joints:\n  - {id: W1, point: [0, 0, 0], diamter: 6}\n"), "w.yaml")
	checkErr(t, err, `w.yaml:2: joint: unknown key "diamter" (did you mean "diameter"?)`)
	for _, name := range []string{"Part_s", "part", "Group_", "washers"} {
		_, _, err := ReadJointsCSV(strings.NewReader("id,x,y,z,"+name+"\n"), "w.csv")
		checkErr(t, err, fmt.Sprintf("w.csv:1: unknown column %q (did you mean", name))
	}
}

// CSV and YAML lists agree: an empty file is an error in both forms (the
// issue found an empty YAML file accepted where an empty CSV was refused);
// a list that is declared but holds no joints reads as empty, with a
// warning.
func TestReadJointsEmpty(t *testing.T) {
	empty := []InputWarning{{"w.csv", 0, "the list holds no joints"}}
	got, warns, err := ReadJointsCSV(strings.NewReader("# no joints yet\nid,x,y,z\n"), "w.csv")
	if err != nil || len(got) != 0 || !reflect.DeepEqual(warns, empty) {
		t.Errorf("header only: %v, %v, %v", got, warns, err)
	}
	empty[0].File = "w.yaml"
	for _, in := range []string{"joints:\n", "joints: []\n"} {
		got, warns, err := ReadJointsYAML(strings.NewReader(in), "w.yaml")
		if err != nil || len(got) != 0 || !reflect.DeepEqual(warns, empty) {
			t.Errorf("ReadJointsYAML(%q) = %v, %v, %v", in, got, warns, err)
		}
	}
	for _, c := range []struct{ in, want string }{
		{"", "w.yaml: empty file"},
		{"# nothing yet\n", "w.yaml: empty file"},
		{"{}\n", "w.yaml:1: joint list: no key joints:"},
	} {
		if _, _, err := ReadJointsYAML(strings.NewReader(c.in), "w.yaml"); !errors.Is(err, geom.ErrInput) || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("ReadJointsYAML(%q): %v, want %q", c.in, err, c.want)
		}
	}
	for _, in := range []string{"", "# nothing yet\n", "\n\n"} {
		if _, _, err := ReadJointsCSV(strings.NewReader(in), "w.csv"); !errors.Is(err, geom.ErrInput) || !strings.HasPrefix(err.Error(), "w.csv: empty table") {
			t.Errorf("ReadJointsCSV(%q): %v, want an empty-table error", in, err)
		}
	}
}

func TestReadJointsWarnings(t *testing.T) {
	in := "id,x,y,z,washer,hole\nW1,0,0,0,12,6.6\n"
	_, warns, err := ReadJointsCSV(strings.NewReader(in), "w.csv")
	if err != nil {
		t.Fatal(err)
	}
	want := `w.csv:2: spot weld "W1": washer and hole apply to bolts and are ignored`
	if len(warns) != 1 || warns[0].String() != want {
		t.Errorf("warnings %v, want %s", warns, want)
	}
}

func TestReadJointsCSVErrors(t *testing.T) {
	const h = "id,x,y,z,kind,parts,diameter,washer,hole\n"
	tests := []struct {
		name, in, want string
	}{
		{"empty file", "", "w.csv: empty table"},
		{"no z", "id,x,y\n", `w.csv:1: missing required column "z"`},
		{"no id", "# c\nx,y,z,ident\n", `w.csv:2: missing required column "id"`},
		{"duplicate column", "id,x,y,z,X\n", `w.csv:1: column "X" given twice (columns 2 and 5)`},
		{"too few", h + "W1,0,0\n", "w.csv:2: row has 3 fields; the header has 9 columns"},
		{"too many", h + "W1,0,0,0,spot,,,,,9\n", "w.csv:2: row has 10 fields; the header has 9 columns"},
		{"empty id", h + ",0,0,0,,,,,\n", "w.csv:2: joint id is empty"},
		{"empty x", h + "W1,,0,0,,,,,\n", "w.csv:2: x is empty"},
		{"bad y", h + "W1,0,1e,0,,,,,\n", `w.csv:2: y: "1e" is not a finite number`},
		{"nan z", h + "W1,0,0,nan,,,,,\n", `w.csv:2: z: "nan" is not a finite number`},
		{"inf x", h + "W1,+Inf,0,0,,,,,\n", `w.csv:2: x: "+Inf" is not a finite number`},
		{"bad diameter", h + "W1,0,0,0,,,five,,\n", `w.csv:2: diameter: "five" is not a finite number`},
		{"negative diameter", h + "W1,0,0,0,,,-5,,\n", "w.csv:2: diameter: -5 mm is negative"},
		{"negative washer", h + "W1,0,0,0,bolt,,,-1,\n", "w.csv:2: washer: -1 mm is negative"},
		{"unknown kind", h + "W1,0,0,0,rivet,,,,\n", `w.csv:2: kind: unknown joint kind "rivet" (want spot or bolt)`},
		{"malformed parts", h + "W1,0,0,0,,1;;2,,,\n", `w.csv:2: parts: "1;;2" is not a list of part ids separated by ';'`},
		{"parts with commas", h + "W1,0,0,0,,\"1,2\",,,\n", `w.csv:2: parts: "1,2" is not a list`},
		{"zero part", h + "W1,0,0,0,,0;2,,,\n", "w.csv:2: parts: part id 0 is not positive"},
		{"duplicate part", h + "W1,0,0,0,,5; 7;5,,,\n", "w.csv:2: parts: part 5 listed twice"},
		{"duplicate id", h + "W1,0,0,0,,,,,\n# c\nW2,0,0,0,,,,,\nW1,1,1,1,,,,,\n", `w.csv:5: joint id "W1" given twice (lines 2 and 5)`},
		{"hole below shank", h + "B1,0,0,0,bolt,,10,20,9\n", `w.csv:2: bolt "B1": hole diameter 9 mm is smaller than the bolt diameter 10 mm`},
		{"washer inside hole", h + "B1,0,0,0,bolt,,10,11,11\n", `w.csv:2: bolt "B1": washer diameter 11 mm is not larger`},
		{"control character", h + "W\x01,0,0,0,,,,,\n", `w.csv:2: joint id "W\x01" holds a control character`},
		{"bad quote", h + "W\"1,0,0,0,,,,,\n", "w.csv:2: CSV: "},
		{"decimal comma", "id;x;y;z;diameter\nW1;0;0;0;5,5\n", `w.csv:2: diameter: "5,5" has a decimal comma; write 5.5 (the decimal separator is '.')`},
		{"unquoted parts in a semicolon list", "id;x;y;z;parts\nW1;0;0;0;10;20\n", `w.csv:2: row has 6 fields; the header has 5 columns (in a table separated by semicolons, quote a field that holds one: "10;20")`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, _, err := ReadJointsCSV(strings.NewReader(tt.in), "w.csv")
			checkErr(t, err, tt.want)
		})
	}
}

func TestReadJointsYAMLErrors(t *testing.T) {
	tests := []struct {
		name, in, want string
	}{
		{"top key", "joint:\n  - {id: W1}\n", `w.yaml:1: joint list: unknown key "joint" (did you mean "joints"?)`},
		{"not a list", "joints: {id: W1}\n", "w.yaml:1: joints: want a list, got a map"},
		{"unknown key", "joints:\n  - id: W1\n    point: [0, 0, 0]\n    diamter: 5\n", `w.yaml:4: joint: unknown key "diamter" (did you mean "diameter"?)`},
		{"no id", "joints:\n  - {point: [0, 0, 0]}\n", "w.yaml:2: joint has no id"},
		{"empty id", "joints:\n  - {id: '', point: [0, 0, 0]}\n", "w.yaml:2: joint id is empty"},
		{"no point", "joints:\n  - {id: W1, x: 1, y: 2}\n", `w.yaml:2: joint "W1": no point`},
		{"both", "joints:\n  - {id: W1, x: 1, point: [0, 0, 0]}\n", `w.yaml:2: joint "W1": give either point or x, y and z, not both`},
		{"short point", "joints:\n  - {id: W1, point: [0, 0]}\n", "w.yaml:2: point: want [x, y, z], got 2 values"},
		{"text point", "joints:\n  - {id: W1, point: [0, a, 0]}\n", `w.yaml:2: point: want a number, got "a"`},
		{"nan", "joints:\n  - id: W1\n    x: .nan\n", `w.yaml:3: x: ".nan" is not a finite number`},
		{"negative hole", "joints:\n  - {id: B1, kind: bolt, point: [0, 0, 0], hole: -11}\n", "w.yaml:2: hole: -11 mm is negative"},
		{"unknown kind", "joints:\n  - {id: W1, point: [0, 0, 0], kind: weld}\n", `w.yaml:2: kind: unknown joint kind "weld"`},
		{"parts not list", "joints:\n  - {id: W1, point: [0, 0, 0], parts: '1;2'}\n", `w.yaml:2: parts: want a list, got "1;2"`},
		{"parts text", "joints:\n  - id: W1\n    point: [0, 0, 0]\n    parts:\n      - 1\n      - b\n", `w.yaml:6: parts: want an integer, got "b"`},
		{"duplicate part", "joints:\n  - {id: W1, point: [0, 0, 0], parts: [4, 4]}\n", "w.yaml:2: parts: part 4 listed twice"},
		{"duplicate id", "joints:\n  - {id: 7, point: [0, 0, 0]}\n  - {id: 7, point: [1, 0, 0]}\n", `w.yaml:3: joint id "7" given twice (lines 2 and 3)`},
		{"tag not scalar", "joints:\n  - {id: W1, point: [0, 0, 0], tags: {a: [1]}}\n", "w.yaml:2: tags: a: want a single value, got a list"},
		{"duplicate key", "joints:\n  - {id: W1, id: W2}\n", `w.yaml:2: joint: key "id" given twice`},
		{"syntax", "joints:\n  - {id: W1\n", "w.yaml:"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, _, err := ReadJointsYAML(strings.NewReader(tt.in), "w.yaml")
			checkErr(t, err, tt.want)
		})
	}
}

func TestReadJointsExtension(t *testing.T) {
	_, _, err := ReadJoints("welds.txt")
	checkErr(t, err, `welds.txt: unknown joint list type ".txt" (want .csv, .yaml or .yml)`)
}

func TestCheckParts(t *testing.T) {
	cs := &geom.CellSet{
		File:    "m.vtk",
		Points:  []r3.Vec{{}, {X: 1}, {Y: 1}, {X: 1, Y: 1}},
		Types:   []uint8{geom.VTKTriangle, geom.VTKTriangle},
		Offsets: []int64{0, 3, 6},
		Conn:    []int64{0, 1, 2, 1, 3, 2},
		Part:    []int64{100, 200},
	}
	m, err := geom.MeshFromCells(cs, geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	js := []Joint{
		{ID: "W1", Parts: []int64{100, 200}, File: "a.csv", Line: 2},
		{ID: "W2", Parts: []int64{100, 7}, File: "a.csv", Line: 3},
		{ID: "W3", Parts: []int64{9, 7}, File: "b.csv", Line: 8},
	}
	if err := CheckParts(js[:1], m); err != nil {
		t.Errorf("known parts: %v", err)
	}
	want := `a.csv:3: unknown part ids in the joint list: 7 (joint "W2", line 3), 9 (joint "W3", line b.csv:8)`
	err = CheckParts(js, m)
	checkErr(t, err, want)
	if err.Error() != want {
		t.Errorf("err = %v\nwant  %s", err, want)
	}
	var many []Joint
	for i := range 12 {
		many = append(many, Joint{ID: fmt.Sprint(i), Parts: []int64{int64(1000 + i)}, File: "c.csv", Line: i + 2})
	}
	if err := CheckParts(many, m); err == nil || !strings.HasSuffix(err.Error(), " and 2 more") {
		t.Errorf("err = %v, want a list ending in ' and 2 more'", err)
	}
}

func TestCompareIDs(t *testing.T) {
	tests := []struct {
		a, b string
		want int
	}{
		{"W2", "W10", -1},
		{"9", "10", -1},
		{"100", "99", 1},
		{"W7", "W007", 1}, // equal by value: plain string order breaks the tie
		{"W007", "W7", -1},
		{"W1", "W1", 0},
		{"W1", "W1a", -1},
		{"W1a", "W1b", -1},
		{"A10", "B2", -1},
		{"rail-2-3", "rail-2-10", -1},
		{"", "1", -1},
		{"12345678901234567890123", "12345678901234567890124", -1}, // beyond int64
		{"x", "1", 1},
	}
	for _, tt := range tests {
		if got := CompareIDs(tt.a, tt.b); got != tt.want {
			t.Errorf("CompareIDs(%q, %q) = %d, want %d", tt.a, tt.b, got, tt.want)
		}
		if got := CompareIDs(tt.b, tt.a); got != -tt.want {
			t.Errorf("CompareIDs(%q, %q) = %d, want %d", tt.b, tt.a, got, -tt.want)
		}
	}
}

// TestCompareIDsOrder checks on seeded random ids that CompareIDs is a
// total order: antisymmetric, transitive, 0 only for equal strings.
func TestCompareIDsOrder(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	const alphabet = "0019aW-"
	ids := make([]string, 300)
	for i := range ids {
		b := make([]byte, rng.IntN(6))
		for k := range b {
			b[k] = alphabet[rng.IntN(len(alphabet))]
		}
		ids[i] = string(b)
	}
	for _, a := range ids {
		for _, b := range ids {
			ab := CompareIDs(a, b)
			if ab != -CompareIDs(b, a) || (ab == 0) != (a == b) {
				t.Fatalf("CompareIDs(%q, %q) = %d, reverse %d", a, b, ab, CompareIDs(b, a))
			}
		}
	}
	slices.SortFunc(ids, CompareIDs)
	for i := range ids {
		for j := i + 1; j < len(ids); j++ {
			if CompareIDs(ids[i], ids[j]) > 0 {
				t.Fatalf("not transitive: %q sorted before %q", ids[i], ids[j])
			}
		}
	}
}

func TestSortJoints(t *testing.T) {
	js := []Joint{{ID: "W10"}, {ID: "B1"}, {ID: "W2"}, {ID: "W1"}, {ID: "10"}, {ID: "9"}}
	SortJoints(js)
	var got []string
	for _, j := range js {
		got = append(got, j.ID)
	}
	if want := []string{"9", "10", "B1", "W1", "W2", "W10"}; !slices.Equal(got, want) {
		t.Errorf("sorted %v, want %v", got, want)
	}
}

// checkErr fails unless err starts with want and is an input error.
func checkErr(t *testing.T, err error, want string) {
	t.Helper()
	if err == nil || !strings.HasPrefix(err.Error(), want) {
		t.Fatalf("err = %v\nwant prefix %s", err, want)
	}
	if !errors.Is(err, geom.ErrInput) {
		t.Errorf("errors.Is(err, geom.ErrInput) = false for %v", err)
	}
}

// addSeeds adds the files matching pattern under testdata/joints as seeds.
func addSeeds(f *testing.F, pattern string, extra ...string) {
	files, _ := filepath.Glob(filepath.Join("..", "testdata", "joints", pattern))
	for _, p := range files {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(string(b))
	}
	for _, s := range extra {
		f.Add(s)
	}
}

// checkJoints checks what a successful read promises.
func checkJoints(t *testing.T, js []Joint, err error) {
	t.Helper()
	if err != nil {
		if !errors.Is(err, geom.ErrInput) {
			t.Fatalf("not an input error: %v", err)
		}
		return
	}
	ids := map[string]bool{}
	for _, j := range js {
		if j.ID == "" || ids[j.ID] || !utf8.ValidString(j.ID) || len(j.ID) > MaxJointIDLength || !utf8.ValidString(j.Group) {
			t.Fatalf("empty, repeated, long or not UTF-8 id %q (group %q)", j.ID, j.Group)
		}
		for k, v := range j.Tags {
			if !utf8.ValidString(k) || !utf8.ValidString(v) {
				t.Fatalf("joint %q: tag %q = %q is not UTF-8", j.ID, k, v)
			}
		}
		ids[j.ID] = true
		for _, v := range []float64{j.Point.X, j.Point.Y, j.Point.Z, j.Diameter, j.Washer, j.Hole} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("joint %q has a non-finite value: %+v", j.ID, j)
			}
		}
		if j.Diameter < 0 || j.Washer < 0 || j.Hole < 0 || j.Line <= 0 {
			t.Fatalf("joint %+v", j)
		}
		for _, p := range j.Parts {
			if p <= 0 {
				t.Fatalf("joint %q: part %d", j.ID, p)
			}
		}
	}
}

func FuzzReadJointsCSV(f *testing.F) {
	addSeeds(f, "*.csv",
		"id,x,y,z\n",
		"ID,X,Y,Z,parts,kind\nW1,1,2,3,\"1;2\",bolt\n",
		"\ufeffid,x,y,z,diameter,washer,hole\nB1,0,0,0,10,20,11\n# c\n\n",
		"id,x,y,z\nW1,1,2,3\nW1,1,2,3\n",
		"id;x;y;z;parts;diameter\nW1;1;2;3;\"1;2\";5,5\n",
		"# a,b\nid\tx\ty\tz\tnote\nW1\t1\t\t3\t\n",
		// Hostile inputs of issue 7.
		"",
		"id,x,y,z,group,station\nW\xff1,1,2,3,g,s\nW\xfe1,1,2,3,g\xff,s\xfe\n",
		"id,x,y,z,kind,diameter\nW1,1,2,3,"+strings.Repeat("x", 3000)+",1e300\n",
	)
	f.Fuzz(func(t *testing.T, in string) {
		js, _, err := ReadJointsCSV(strings.NewReader(in), "f.csv")
		checkJoints(t, js, err)
	})
}

func FuzzReadJointsYAML(f *testing.F) {
	addSeeds(f, "*.yaml",
		"joints: []\n",
		"joints:\n  - &a {id: W1, point: [1, 2, 3], tags: {k: v}}\n  - *a\n",
		"joints:\n  - {id: B1, kind: bolt, x: 0, y: 0, z: 0, diameter: 10, hole: 11, washer: 20, parts: [1, 2]}\n",
		// Hostile inputs of issue 7.
		"",
		"{}\n",
		"joints:\n  - {id: \"W\xff1\", point: [1, 2, 3]}\n",
	)
	f.Fuzz(func(t *testing.T, in string) {
		js, _, err := ReadJointsYAML(strings.NewReader(in), "f.yaml")
		checkJoints(t, js, err)
	})
}

// jointListText returns a joint list of n spot welds in CSV or YAML, with
// parts on every tenth joint, like a car body's joining plan.
func jointListText(n int, yamlForm bool) string {
	rng := rand.New(rand.NewPCG(2, 3))
	var b strings.Builder
	if yamlForm {
		b.WriteString("joints:\n")
	} else {
		b.WriteString("id,x,y,z,kind,parts,diameter,group\n")
	}
	for i := range n {
		x, y, z := rng.Float64()*4000, rng.Float64()*1600-800, rng.Float64()*1400
		parts := ""
		if i%10 == 0 {
			parts = fmt.Sprintf("%d;%d", 100+i%50, 200+i%70)
		}
		if yamlForm {
			fmt.Fprintf(&b, "  - {id: W%d, point: [%.3f, %.3f, %.3f], diameter: 5.5, group: g%d", i+1, x, y, z, i%20)
			if parts != "" {
				fmt.Fprintf(&b, ", parts: [%s]", strings.ReplaceAll(parts, ";", ", "))
			}
			b.WriteString("}\n")
		} else {
			fmt.Fprintf(&b, "W%d,%.3f,%.3f,%.3f,spot,%s,5.5,g%d\n", i+1, x, y, z, parts, i%20)
		}
	}
	return b.String()
}

func BenchmarkReadJointsCSV(b *testing.B) {
	for _, n := range []int{6000, 100000} {
		in := jointListText(n, false)
		b.Run(fmt.Sprint(n), func(b *testing.B) {
			b.SetBytes(int64(len(in)))
			b.ReportAllocs()
			for b.Loop() {
				if _, _, err := ReadJointsCSV(strings.NewReader(in), "b.csv"); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkReadJointsYAML(b *testing.B) {
	in := jointListText(6000, true)
	b.SetBytes(int64(len(in)))
	b.ReportAllocs()
	for b.Loop() {
		if _, _, err := ReadJointsYAML(strings.NewReader(in), "b.yaml"); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSortJoints(b *testing.B) {
	js, _, err := ReadJointsCSV(strings.NewReader(jointListText(100000, false)), "b.csv")
	if err != nil {
		b.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(4, 5))
	work := make([]Joint, len(js))
	for b.Loop() {
		copy(work, js)
		rng.Shuffle(len(work), func(i, j int) { work[i], work[j] = work[j], work[i] })
		SortJoints(work)
	}
}

func ExampleReadJointsCSV() {
	list := `# two welds and a bolt
id,x,y,z,kind,parts,diameter,washer,hole
W10,60,-400,12.5,,,5.5,,
W2,30,-400,12.5,spot,100;200,,,
B1,450,0,40,bolt,200;400,10,20,11
`
	js, _, err := ReadJointsCSV(strings.NewReader(list), "welds.csv")
	if err != nil {
		fmt.Println(err)
		return
	}
	SortJoints(js)
	for _, j := range js {
		fmt.Printf("%s:%d %s %s at (%g, %g, %g) parts %v\n", j.File, j.Line, j.Kind, j.ID, j.Point.X, j.Point.Y, j.Point.Z, j.Parts)
	}
	_, _, err = ReadJointsCSV(strings.NewReader("id,x,y,z\nW1,0,0,zero\n"), "bad.csv")
	fmt.Println(err)
	// Output:
	// welds.csv:5 bolt B1 at (450, 0, 40) parts [200 400]
	// welds.csv:4 spot W2 at (30, -400, 12.5) parts [100 200]
	// welds.csv:3 spot W10 at (60, -400, 12.5) parts []
	// bad.csv:2: z: "zero" is not a finite number
}
