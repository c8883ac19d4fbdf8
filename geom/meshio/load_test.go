package meshio

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// strip is a hand-built mesh of n quads in a row with ids starting at
// base+1, parts from part (nil: no part array), element thickness th
// (nil: none) and part thickness partTh (as a native part record gives
// it), plus one skipped vertex cell.
type strip struct {
	base   int64
	n      int
	part   []int64
	th     []float64
	partTh float64
}

func (s strip) cells(file string) *geom.CellSet {
	cs := &geom.CellSet{File: file, Offsets: []int64{0}}
	for i := 0; i <= s.n; i++ {
		x := float64(i) * 5
		cs.Points = append(cs.Points, r3.Vec{X: x}, r3.Vec{X: x, Y: 5})
		cs.NodeIDs = append(cs.NodeIDs, s.base+int64(2*i)+1, s.base+int64(2*i)+2)
	}
	for i := 0; i < s.n; i++ {
		a := int64(2 * i)
		cs.Types = append(cs.Types, geom.VTKQuad)
		cs.Conn = append(cs.Conn, a, a+2, a+3, a+1)
		cs.Offsets = append(cs.Offsets, int64(len(cs.Conn)))
		cs.ElemIDs = append(cs.ElemIDs, s.base+int64(i)+1)
	}
	cs.Types = append(cs.Types, 1)
	cs.Conn = append(cs.Conn, 0)
	cs.Offsets = append(cs.Offsets, int64(len(cs.Conn)))
	cs.ElemIDs = append(cs.ElemIDs, s.base+int64(s.n)+1)
	if s.part != nil {
		cs.Part = append(slices.Clone(s.part), 1)
	}
	if s.th != nil {
		cs.Thickness = append(slices.Clone(s.th), 1)
	}
	return cs
}

// fakeReader reads meshes from a map of strips by path.
func fakeReader(files map[string]strip) func(string, geom.ReadOptions) (*geom.Mesh, error) {
	return func(path string, opt geom.ReadOptions) (*geom.Mesh, error) {
		s, ok := files[path]
		if !ok {
			return nil, fmt.Errorf("open %s: %w", path, os.ErrNotExist)
		}
		m, err := geom.MeshFromCells(s.cells(path), opt)
		if err == nil {
			for i := range m.Parts {
				m.Parts[i].Thickness = s.partTh
			}
		}
		return m, err
	}
}

func writeFile(t *testing.T, dir, name, text string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestLoadWithTable(t *testing.T) {
	dir := t.TempDir()
	table := writeFile(t, dir, "parts.yaml", `parts:
  - {id: 1, name: floor, thickness: 0.8, material: DC04}
  - {id: 2, name: beam, thickness: 1.5, surface: top}
  - {id: 3, name: plate, thickness: 1.2, mesh: plate.jmesh}
  - {id: 9, name: unused, thickness: 2}
  - {id: 5, name: unused too, thickness: 2}
`)
	files := map[string]strip{
		"a/floor.vtk":   {base: 0, n: 3, part: []int64{1, 1, 2}},
		"b/plate.jmesh": {base: 100, n: 2}, // no part array: the table names it
	}
	m, err := Load(LoadOptions{Meshes: []string{"a/floor.vtk", "b/plate.jmesh"}, Parts: table, Read: fakeReader(files)})
	if err != nil {
		t.Fatal(err)
	}
	mesh := m.Mesh
	if mesh.NumElems() != 5 || mesh.NumNodes() != 14 {
		t.Fatalf("%d elements, %d nodes; want 5, 14", mesh.NumElems(), mesh.NumNodes())
	}
	want := []geom.Part{
		{ID: 1, Name: "floor", Thickness: 0.8, Material: "DC04"},
		{ID: 2, Name: "beam", Thickness: 1.5, Surface: geom.SurfaceTop},
		{ID: 3, Name: "plate", Thickness: 1.2, Mesh: "plate.jmesh"},
	}
	if !reflect.DeepEqual(mesh.Parts, want) {
		t.Errorf("parts %+v\nwant  %+v", mesh.Parts, want)
	}
	if !slices.Equal(m.UnusedParts, []int64{5, 9}) {
		t.Errorf("UnusedParts = %v, want [5 9]", m.UnusedParts)
	}
	if !reflect.DeepEqual(m.SkippedTotal(), geom.SkippedCells{1: 2}) || len(m.Skipped) != 2 {
		t.Errorf("Skipped = %v", m.Skipped)
	}
	if len(m.MissingThickness()) != 0 {
		t.Errorf("MissingThickness = %v", m.MissingThickness())
	}
}

func TestLoadWithoutTable(t *testing.T) {
	files := map[string]strip{
		"x.vtk": {base: 0, n: 2, part: []int64{4, 6}, th: []float64{1, 1.2}},
		"y.vtk": {base: 0, n: 2, part: []int64{7, 7}},
	}
	read := fakeReader(files)
	_, err := Load(LoadOptions{Meshes: []string{"x.vtk", "y.vtk"}, Read: read})
	if err == nil || !strings.Contains(err.Error(), "node id 1 appears twice (x.vtk and y.vtk)") {
		t.Fatalf("clashing ids: err = %v", err)
	}
	m, err := Load(LoadOptions{Meshes: []string{"x.vtk", "y.vtk"}, Renumber: true, Read: read})
	if err != nil {
		t.Fatal(err)
	}
	// geom.Merge: largest node id of x.vtk is 6, so the offset is 6.
	if len(m.Renumbered) != 1 || m.Renumbered[0].File != "y.vtk" || m.Renumbered[0].NodeOffset != 6 {
		t.Errorf("Renumbered = %+v", m.Renumbered)
	}
	// Parts 4 and 6 have their elements' own thickness; part 7 has none.
	if got := m.MissingThickness(); !slices.Equal(got, []int64{7}) {
		t.Errorf("MissingThickness = %v, want [7]", got)
	}
	if m.UnusedParts != nil {
		t.Errorf("UnusedParts = %v without a table", m.UnusedParts)
	}
}

func TestLoadOrderAndWorkers(t *testing.T) {
	files := map[string]strip{}
	var paths []string
	for i := range 9 {
		p := fmt.Sprintf("m%d.vtk", i)
		files[p] = strip{base: int64(i) * 1000, n: 1 + i, part: slices.Repeat([]int64{int64(i + 1)}, 1+i)}
		paths = append(paths, p)
	}
	for _, w := range []int{0, 1, 3, 20} {
		m, err := Load(LoadOptions{Meshes: paths, Workers: w, Read: fakeReader(files)})
		if err != nil {
			t.Fatal(err)
		}
		for i, s := range m.Mesh.Sources {
			if s.File != paths[i] {
				t.Fatalf("workers %d: source %d is %s, want %s", w, i, s.File, paths[i])
			}
		}
	}
	// The error reported is that of the first failing file in argument
	// order, whatever finishes first.
	bad := slices.Clone(paths)
	bad[2], bad[7] = "missing2.vtk", "missing7.vtk"
	_, err := Load(LoadOptions{Meshes: bad, Workers: 4, Read: fakeReader(files)})
	if err == nil || !strings.Contains(err.Error(), "missing2.vtk") {
		t.Errorf("err = %v, want the error of missing2.vtk", err)
	}
}

func TestLoadErrors(t *testing.T) {
	dir := t.TempDir()
	table := writeFile(t, dir, "parts.csv", "id,thickness\n1,1\n")
	files := map[string]strip{
		"a.vtk":      {n: 2, part: []int64{1, 2}},
		"b.vtk":      {base: 50, n: 1, part: []int64{1}, partTh: 2},
		"c.vtk":      {base: 80, n: 1, part: []int64{1}, partTh: 3},
		"nopart.vtk": {base: 90, n: 1},
	}
	tests := []struct {
		name string
		opts LoadOptions
		want string
		in   bool // input error
	}{
		{"no meshes", LoadOptions{}, "meshio: no mesh files given", false},
		{"twice", LoadOptions{Meshes: []string{"a.vtk", "./a.vtk"}}, "./a.vtk: mesh file given twice (meshes 1 and 2)", true},
		{"part not in table", LoadOptions{Meshes: []string{"a.vtk"}, Parts: table}, "a.vtk: part 2 is not in the parts table " + table, true},
		{"bad table", LoadOptions{Meshes: []string{"a.vtk"}, Parts: "parts.txt"}, `parts.txt: unknown parts table type ".txt"`, true},
		{"thickness conflict", LoadOptions{Meshes: []string{"b.vtk", "c.vtk"}}, "c.vtk: part 1 has thickness 3 mm here and 2 mm in b.vtk", true},
		{"no part for file", LoadOptions{Meshes: []string{"nopart.vtk"}}, `nopart.vtk: no cell array "part"`, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			tt.opts.Read = fakeReader(files)
			_, err := Load(tt.opts)
			if err == nil || !strings.HasPrefix(err.Error(), tt.want) {
				t.Fatalf("err = %v\nwant prefix %s", err, tt.want)
			}
			if errors.Is(err, geom.ErrInput) != tt.in {
				t.Errorf("errors.Is(err, geom.ErrInput) = %v for %v", !tt.in, err)
			}
		})
	}
}

func TestReadMeshExtension(t *testing.T) {
	_, err := ReadMesh("model.stl", geom.ReadOptions{})
	checkErr(t, err, `model.stl: unknown mesh file type ".stl" (want .vtk, .vtu, .vtp or .jmesh)`)
	// A directory named without an extension is refused as a directory,
	// not as a file of an unknown type.
	dir := t.TempDir()
	_, err = ReadMesh(dir, geom.ReadOptions{})
	checkErr(t, err, dir+": a directory, not a regular file")
}

// TestLoadFixture loads the shared "small" fixture in every format present
// under testdata/formats and testdata/native with the parts table
// testdata/parts/small.yaml.
func TestLoadFixture(t *testing.T) {
	root := filepath.Join("..", "..", "testdata")
	files, _ := filepath.Glob(filepath.Join(root, "formats", "small_*"))
	files = append(files, filepath.Join(root, "native", "small.jmesh"))
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			if _, err := os.Stat(f); err != nil {
				t.Skip(err)
			}
			m, err := Load(LoadOptions{Meshes: []string{f}, Parts: filepath.Join(root, "parts", "small.yaml")})
			if err != nil {
				if strings.Contains(err.Error(), "not implemented") {
					t.Skip(err)
				}
				t.Fatal(err)
			}
			mesh := m.Mesh
			if mesh.NumNodes() != 12 || mesh.NumElems() != 5 || len(mesh.Parts) != 2 {
				t.Fatalf("%d nodes, %d elements, %d parts; want 12, 5, 2", mesh.NumNodes(), mesh.NumElems(), len(mesh.Parts))
			}
			// Values of testdata/parts/small.yaml.
			if p := mesh.Parts[1]; p.ID != 20 || p.Name != "bracket" || p.Thickness != 1.5 || p.Surface != geom.SurfaceTop {
				t.Errorf("part 20 = %+v", p)
			}
			if !slices.Equal(m.UnusedParts, []int64{30}) {
				t.Errorf("UnusedParts = %v, want [30]", m.UnusedParts)
			}
			if filepath.Ext(f) != ".jmesh" && m.SkippedTotal()[1] != 1 {
				t.Errorf("Skipped = %v, want one vertex (VTK type 1)", m.Skipped)
			}
		})
	}
}

// TestLoadFixtureAll loads every variant of the "small" fixture at once:
// all share their ids, so each file after the first is renumbered.
func TestLoadFixtureAll(t *testing.T) {
	root := filepath.Join("..", "..", "testdata")
	files, _ := filepath.Glob(filepath.Join(root, "formats", "small_*"))
	if len(files) < 2 {
		t.Skip("fewer than two fixture files")
	}
	m, err := Load(LoadOptions{Meshes: files, Renumber: true, Parts: filepath.Join(root, "parts", "small.csv")})
	if err != nil {
		t.Fatal(err)
	}
	if got, want := m.Mesh.NumElems(), 5*len(files); got != want {
		t.Errorf("%d elements, want %d", got, want)
	}
	if len(m.Renumbered) != len(files)-1 || len(m.Mesh.Parts) != 2 {
		t.Errorf("%d files renumbered, %d parts; want %d, 2", len(m.Renumbered), len(m.Mesh.Parts), len(files)-1)
	}
	if m.SkippedTotal()[1] != len(files) || len(m.Skipped) != len(files) {
		t.Errorf("Skipped = %v", m.Skipped)
	}
}

// recorder is a geom.Progress that records its calls.
type recorder struct {
	calls []string
	total int64
	done  int64
}

func (r *recorder) Start(label string, total int64) {
	r.calls = append(r.calls, fmt.Sprintf("start %s %d", label, total))
	r.total = total
}
func (r *recorder) Add(n int64) { r.calls = append(r.calls, "add"); r.done += n }
func (r *recorder) Done()       { r.calls = append(r.calls, "done") }

func TestLoadProgress(t *testing.T) {
	// The read advances once per file, by the file's size, to the total
	// of the sizes; files are read two at a time.
	dir := t.TempDir()
	files := map[string]strip{}
	var paths []string
	var total int64
	for i, n := range []int{2, 5, 1} {
		p := writeFile(t, dir, fmt.Sprintf("m%d.vtk", i), strings.Repeat("x", 100*n))
		files[p] = strip{base: int64(1000 * i), n: n, part: slices.Repeat([]int64{1}, n)}
		paths = append(paths, p)
		total += int64(100 * n)
	}
	var r recorder
	if _, err := Load(LoadOptions{Meshes: paths, Read: fakeReader(files), Workers: 2, Progress: &r}); err != nil {
		t.Fatal(err)
	}
	want := []string{fmt.Sprintf("start reading mesh files %d", total), "add", "add", "add", "done"}
	if !slices.Equal(r.calls, want) || r.done != total {
		t.Errorf("calls %v (done %d), want %v (done %d)", r.calls, r.done, want, total)
	}
}
