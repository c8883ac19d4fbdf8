package main

import (
	"bytes"
	"cmp"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/writers/document"
)

// renumberModel is a model for TestFlangesRenumbered: its native mesh
// text and parts table, both written with part ids through id.
type renumberModel struct {
	name string
	// write returns the mesh file's text and the parts table's with
	// every part id passed through id (node and element ids kept).
	write func(t *testing.T, id func(int64) int64) (mesh, parts string)
}

// TestFlangesRenumbered runs flanges (welds at 30 mm) on models whose
// parts are renumbered so that the order of their ids reverses, node and
// element ids kept: the bundled example, and two overlapping plates
// meshed with other element sizes, with grids of one size shifted
// against each other, and as triangles against quads. Every flange
// (areas, widths, centrelines, normals, hosts, thicknesses, facing node
// pairs with their separations and lateral offsets, weld stations and
// points) must be the same once the ids are mapped back; the output's
// order and the flange and weld ids follow the new ids.
//
// The host, whose mesh traces an overlap and from whose nodes the facing
// pairs are measured, was the finer mesh there with ties to the lower
// part id: plates meshed at one element size (shifted grids, triangles
// against quads) were traced on the other plate once renumbered, which
// moved their areas, widths, centrelines, facing pairs and welds. It is
// now chosen by geometry alone down to meshes that coincide
// (geom.Contacts.Host).
func TestFlangesRenumbered(t *testing.T) {
	models := []renumberModel{
		{name: "sizes", write: platesModel(5, 4, 0, false)},
		{name: "shifted", write: platesModel(5, 5, 2.5, false)},
		{name: "tri-quad", write: platesModel(5, 5, 0, true)},
		{name: "stack", write: stackModel},
	}
	if _, err := os.Stat(exampleJob); err == nil {
		models = append(models, renumberModel{name: "example", write: exampleRenumbered})
	}
	for _, md := range models {
		t.Run(md.name, func(t *testing.T) {
			root := t.TempDir()
			ids := partIDs(t, md)
			hi := slices.Max(ids) + slices.Min(ids)
			flip := func(id int64) int64 { return hi - id }
			want := runRenumbered(t, filepath.Join(root, "as-is"), md, func(id int64) int64 { return id })
			got := runRenumbered(t, filepath.Join(root, "renumbered"), md, flip)
			if len(want) == 0 {
				t.Fatal("no flange found")
			}
			mapped := mapFlanges(t, got, flip) // flip is its own inverse
			compareFlanges(t, want, mapped)
			// The renumbering must reverse the order of the flanges' parts,
			// or it tests nothing.
			for _, f := range got {
				if o := [2]int64{flip(f.Parts[0]), flip(f.Parts[1])}; o[0] < o[1] {
					t.Errorf("flange %s: parts %v keep their order when renumbered", f.ID, f.Parts)
				}
			}
		})
	}
}

// partIDs returns the part ids of the model.
func partIDs(t *testing.T, md renumberModel) []int64 {
	t.Helper()
	_, parts := md.write(t, func(id int64) int64 { return id })
	var ids []int64
	for _, m := range regexp.MustCompile(`(?m)^\s*- id: (\d+)`).FindAllStringSubmatch(parts, -1) {
		v, _ := strconv.ParseInt(m[1], 10, 64)
		ids = append(ids, v)
	}
	if len(ids) < 2 {
		t.Fatalf("%d parts", len(ids))
	}
	return ids
}

// runRenumbered writes the model with ids through id into dir, runs
// flanges on it and returns its flanges.
func runRenumbered(t *testing.T, dir string, md renumberModel, id func(int64) int64) []document.FlangeDoc {
	t.Helper()
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	mesh, parts := md.write(t, id)
	files := map[string]string{
		"model.jmesh": mesh, "parts.yaml": parts,
		"job.yaml": "version: 1\nmeshes: [model.jmesh]\nparts: parts.yaml\nout: out\n",
	}
	for name, text := range files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	out := filepath.Join(dir, "out")
	if code, _, errs := runCLI(t, "flanges", filepath.Join(dir, "job.yaml"), "--pitch", "30", "--out", out, "--quiet", "--fail-on", "never"); code != exitOK {
		t.Fatalf("flanges: exit %d: %s", code, errs)
	}
	doc := readFlanges(t, filepath.Join(out, "flanges.json"))
	return doc.Flanges
}

// mapFlanges returns the flanges fs with their part ids passed through
// inv, in the form and order flanges gives with the ids so numbered:
// parts the smaller id first (thicknesses and facing pairs' columns
// swapped with them, the pairs sorted by their first node), flange and
// weld ids renamed, flanges sorted by parts and number.
func mapFlanges(t *testing.T, fs []document.FlangeDoc, inv func(int64) int64) []document.FlangeDoc {
	t.Helper()
	out := make([]document.FlangeDoc, 0, len(fs))
	for _, f := range fs {
		k := f.ID[strings.LastIndexByte(f.ID, '-')+1:]
		a, b := inv(f.Parts[0]), inv(f.Parts[1])
		if a > b {
			a, b = b, a
			f.Thickness[0], f.Thickness[1] = f.Thickness[1], f.Thickness[0]
			f.Facing = slices.Clone(f.Facing)
			for i := range f.Facing {
				f.Facing[i][0], f.Facing[i][1] = f.Facing[i][1], f.Facing[i][0]
			}
			slices.SortFunc(f.Facing, func(x, y [4]float64) int { return cmp.Compare(x[0], y[0]) })
		}
		f.Parts = [2]int64{a, b}
		f.Host = inv(f.Host)
		f.ID = fmt.Sprintf("%d-%d-%s", a, b, k)
		f.Welds = slices.Clone(f.Welds)
		for i := range f.Welds {
			w := &f.Welds[i]
			w.ID = fmt.Sprintf("%s-%d", f.ID, w.Station)
			w.Parts = slices.Clone(w.Parts)
			for j := range w.Parts {
				w.Parts[j] = inv(w.Parts[j])
			}
		}
		out = append(out, f)
	}
	slices.SortFunc(out, func(x, y document.FlangeDoc) int {
		n := func(id string) int { v, _ := strconv.Atoi(id[strings.LastIndexByte(id, '-')+1:]); return v }
		return cmp.Or(cmp.Compare(x.Parts[0], y.Parts[0]), cmp.Compare(x.Parts[1], y.Parts[1]), cmp.Compare(n(x.ID), n(y.ID)))
	})
	return out
}

// compareFlanges reports every flange of got that differs from want,
// field by field.
func compareFlanges(t *testing.T, want, got []document.FlangeDoc) {
	t.Helper()
	if len(want) != len(got) {
		t.Errorf("%d flanges, want %d", len(got), len(want))
	}
	for i := range min(len(want), len(got)) {
		w, g := want[i], got[i]
		wj, _ := json.Marshal(w)
		gj, _ := json.Marshal(g)
		if bytes.Equal(wj, gj) {
			continue
		}
		var wm, gm map[string]json.RawMessage
		_ = json.Unmarshal(wj, &wm)
		_ = json.Unmarshal(gj, &gm)
		var diff []string
		for k, v := range wm {
			if !bytes.Equal(v, gm[k]) {
				diff = append(diff, fmt.Sprintf("%s: %s, want %s", k, excerpt(gm[k]), excerpt(v)))
			}
		}
		slices.Sort(diff)
		t.Errorf("flange %s differs once renumbered:\n  %s", w.ID, strings.Join(diff, "\n  "))
	}
}

func excerpt(b []byte) string {
	if len(b) > 160 {
		return string(b[:160]) + "..."
	}
	return string(b)
}

// platesModel returns two overlapping flat plates: part 10 (1 mm)
// meshed at element size h1 from x = 0 to 100, part 20 (1.5 mm) at h2
// from x = 80 to 180 on top of it (mid-surfaces 1.25 mm apart, in
// contact), both 200 mm along y: a 20 mm strip of overlap. shift moves
// part 20 by that much along x and y (its grid lines then fall between
// part 10's); tri meshes part 20 with triangles.
func platesModel(h1, h2, shift float64, tri bool) func(t *testing.T, id func(int64) int64) (string, string) {
	return func(t *testing.T, id func(int64) int64) (string, string) {
		var b strings.Builder
		b.WriteString("joinery-mesh 1\n")
		fmt.Fprintf(&b, "part %d thickness=1\npart %d thickness=1.5\n", id(10), id(20))
		plateText(&b, 1, id(10), 0, 0, 0, 100, 200, h1, false)
		plateText(&b, 2, id(20), 80+shift, shift, 1.25, 100, 200, h2, tri)
		parts := fmt.Sprintf("parts:\n  - id: %d\n    thickness: 1\n  - id: %d\n    thickness: 1.5\n", id(10), id(20))
		return b.String(), parts
	}
}

// plateText writes a flat plate of part in the plane z, lx by ly from
// (x0, y0), of quads of size h (lx and ly multiples of it) or each quad
// split in two triangles; node and element ids from k*100000+1.
func plateText(b *strings.Builder, k int, part int64, x0, y0, z, lx, ly, h float64, tri bool) {
	nx, ny := int(math.Round(lx/h)), int(math.Round(ly/h))
	base := int64(k) * 100000
	node := func(i, j int) int64 { return base + int64(j*(nx+1)+i) + 1 }
	for j := range ny + 1 {
		for i := range nx + 1 {
			fmt.Fprintf(b, "node %d %s %s %s\n", node(i, j), ff(x0+float64(i)*h), ff(y0+float64(j)*h), ff(z))
		}
	}
	e := base
	for j := range ny {
		for i := range nx {
			n0, n1, n2, n3 := node(i, j), node(i+1, j), node(i+1, j+1), node(i, j+1)
			if tri {
				e++
				fmt.Fprintf(b, "shell %d %d %d %d %d\n", e, part, n0, n1, n2)
				e++
				fmt.Fprintf(b, "shell %d %d %d %d %d\n", e, part, n0, n2, n3)
				continue
			}
			e++
			fmt.Fprintf(b, "shell %d %d %d %d %d %d\n", e, part, n0, n1, n2, n3)
		}
	}
}

// stackModel returns platesModel(5, 5, 0, false) with a third plate,
// part 30 (1 mm), on top of part 20 over their strip of overlap, 20 mm
// by 200: the welds of flanges 10-20 and 20-30 go through all three
// sheets at the same points, and only one flange keeps them.
func stackModel(t *testing.T, id func(int64) int64) (string, string) {
	mesh, parts := platesModel(5, 5, 0, false)(t, id)
	var b strings.Builder
	b.WriteString(strings.Replace(mesh, "\nnode ", fmt.Sprintf("\npart %d thickness=1\nnode ", id(30)), 1))
	plateText(&b, 3, id(30), 80, 0, 2.5, 20, 200, 5, false)
	return b.String(), parts + fmt.Sprintf("  - id: %d\n    thickness: 1\n", id(30))
}

func ff(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

// exampleRenumbered returns the bundled example merged into one native
// file, its parts renumbered through id, and its parts table so
// renumbered.
func exampleRenumbered(t *testing.T, id func(int64) int64) (string, string) {
	t.Helper()
	exDir := filepath.Dir(exampleJob)
	all := exampleMerged(t)
	for i := range all.Parts {
		all.Parts[i].ID = id(all.Parts[i].ID)
	}
	var buf bytes.Buffer
	if err := native.Write(&buf, all); err != nil {
		t.Fatal(err)
	}
	table, err := os.ReadFile(filepath.Join(exDir, "parts.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	parts := regexp.MustCompile(`(?m)^(\s*- id: )(\d+)`).ReplaceAllStringFunc(string(table), func(s string) string {
		i := strings.LastIndexByte(s, ' ')
		v, _ := strconv.ParseInt(s[i+1:], 10, 64)
		return s[:i+1] + strconv.FormatInt(id(v), 10)
	})
	return buf.String(), parts
}

// exampleMerged returns the bundled example's meshes merged into one.
func exampleMerged(t *testing.T) *geom.Mesh {
	t.Helper()
	var ms []*geom.Mesh
	for _, mn := range []string{"floor.vtk", "beam.vtk", "closing-plate.jmesh", "bracket.jmesh"} {
		m, err := meshio.ReadMesh(filepath.Join(filepath.Dir(exampleJob), "mesh", mn), geom.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		ms = append(ms, m)
	}
	all, _, err := geom.Merge(ms, false)
	if err != nil {
		t.Fatal(err)
	}
	return all
}
