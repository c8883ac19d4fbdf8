package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/offset/offsettest"
	"github.com/joinery-cae/joinery/writers/document"
)

// writeModel writes plates as a native mesh, a parts table declaring
// the given surfaces (id -> surface; mid where not given) and a weld
// list, and returns their paths.
func writeModel(t *testing.T, dir string, plates []offsettest.Plate, declared map[int64]string, welds []joints.Joint) (mesh, parts, list string) {
	t.Helper()
	m, err := offsettest.Mesh(plates, offsettest.H)
	if err != nil {
		t.Fatal(err)
	}
	mesh = filepath.Join(dir, "model.jmesh")
	f, err := os.Create(mesh)
	if err != nil {
		t.Fatal(err)
	}
	if err := native.Write(f, m); err != nil {
		t.Fatal(err)
	}
	f.Close()
	var pt strings.Builder
	pt.WriteString("parts:\n")
	for _, p := range plates {
		s := declared[p.ID]
		if s == "" {
			s = "mid"
		}
		fmt.Fprintf(&pt, "  - {id: %d, thickness: %g, surface: %s}\n", p.ID, p.Thickness, s)
	}
	parts = filepath.Join(dir, "parts.yaml")
	var wl strings.Builder
	wl.WriteString("id,x,y,z\n")
	for _, w := range welds {
		fmt.Fprintf(&wl, "%s,%g,%g,%g\n", w.ID, w.Point.X, w.Point.Y, w.Point.Z)
	}
	list = filepath.Join(dir, "welds.csv")
	for name, text := range map[string]string{parts: pt.String(), list: wl.String()} {
		if err := os.WriteFile(name, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return mesh, parts, list
}

// findingCodes reads a report.json and returns its findings by code.
func findingCodes(t *testing.T, path string) map[string][]document.FindingDoc {
	t.Helper()
	rep := readReport(t, path)
	out := map[string][]document.FindingDoc{}
	for _, fd := range rep.Findings {
		out[fd.Code] = append(out[fd.Code], fd)
	}
	return out
}

// The planted model end to end: offsets finds every surface and every
// flipped element; a build with surfaces.yaml laid over the parts table
// (which says mid everywhere) reports no gap finding, where the build
// without it reports several.
func TestOffsetsPlantedModel(t *testing.T) {
	dir := t.TempDir()
	plates := offsettest.Planted()
	mesh, parts, welds := writeModel(t, dir, plates, nil, offsettest.PlantedWelds())
	out := filepath.Join(dir, "offsets")
	code, stdout, errs := runCLI(t, "offsets", "--mesh", mesh, "--parts", parts, "--joints", welds, "--out", out)
	if code != exitOK {
		t.Fatalf("offsets: exit %d: %s\n%s", code, errs, stdout)
	}
	validate(t, "surfaces.schema.json", filepath.Join(out, "surfaces.json"))
	validate(t, "report.schema.json", filepath.Join(out, "report.json"))
	table, err := meshio.ReadParts(filepath.Join(out, "surfaces.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	doc := readSurfaces(t, filepath.Join(out, "surfaces.json"))
	for i, p := range plates {
		if table[i].ID != p.ID || table[i].Surface != p.Surface || table[i].Thickness != p.Thickness {
			t.Errorf("surfaces.yaml: %+v, want part %d %s", table[i], p.ID, p.Surface)
		}
		if want := offsettest.FlippedIDs(p, offsettest.H); !slices.Equal(doc.Parts[i].Flip, append([]int64{}, want...)) || doc.Parts[i].FlipCount != len(want) {
			t.Errorf("part %d: flip %v, want %v", p.ID, doc.Parts[i].Flip, want)
		}
	}
	fs := findingCodes(t, filepath.Join(out, "report.json"))
	if d := fs[joints.CodeContactDisagrees]; len(d) != 1 || !slices.Equal(d[0].Parts, []int64{10, 50}) {
		t.Errorf("contact-disagrees %+v, want one, parts 10 and 50", d)
	}
	if d := fs[joints.CodeNormalsFlipped]; len(d) != 1 || !strings.Contains(d[0].Message, "part 40: 40 of its 80 elements") {
		t.Errorf("normals-flipped %+v", d)
	}
	if d := fs[joints.CodeSurfaceDiffers]; len(d) != 2 {
		t.Errorf("surface-differs %+v, want parts 20 and 30", d)
	}
	runIDs := map[string]bool{}
	gaps := func(args ...string) int {
		bo := filepath.Join(dir, "build")
		code, _, errs := runCLI(t, append([]string{"build", "--mesh", mesh, "--joints", welds, "--out", bo, "--fail-on", "never"}, args...)...)
		if code != exitOK {
			t.Fatalf("build %v: exit %d: %s", args, code, errs)
		}
		fs := findingCodes(t, filepath.Join(bo, "report.json"))
		raw, _ := os.ReadFile(filepath.Join(bo, "report.json"))
		runIDs[document.FindRunID(raw)] = true
		return len(fs[joints.CodeGapOpen]) + len(fs[joints.CodeGapClosed])
	}
	if n := gaps("--parts", parts); n == 0 {
		t.Errorf("build with the table's surfaces: no gap finding; the planted outer-face meshes should give some")
	}
	if n := gaps("--parts", parts, "--parts", filepath.Join(out, "surfaces.yaml")); n != 0 {
		t.Errorf("build with the surfaces found: %d gap finding(s), want none", n)
	}
	if len(runIDs) != 2 {
		t.Errorf("the table laid over the first does not enter the run id: %v", runIDs)
	}
}

// The new user's case: a part meshed on its top face whose element
// normals point down, declared top, comes out of build as gap-closed
// (the sheets penetrate by 1 mm, a whole thickness: the mid-surface is
// placed on the wrong side of the mesh). offsets tells that, relative
// to its normals, the mesh lies on its bottom face; with that laid
// over the table, the build finds the sheets in contact.
func TestOffsetsNewUserFlippedTopMesh(t *testing.T) {
	dir := t.TempDir()
	plates := []offsettest.Plate{
		{ID: 1, Thickness: 1, Surface: geom.SurfaceMid, Mid: 0, X0: 0, X1: 50, Y0: 0, Y1: 50},
		// Under part 1, drawn on its physical top face (z = -0.5, the
		// faying face), normals pointing down: relative to them that face
		// is its bottom.
		{ID: 2, Thickness: 1, Surface: geom.SurfaceBottom, FlipAll: true, Mid: -1, X0: 0, X1: 50, Y0: 0, Y1: 50},
	}
	welds := []joints.Joint{{ID: "W1", Kind: joints.Spot, Point: geom3(22.5, 22.5, -0.25)}}
	mesh, parts, list := writeModel(t, dir, plates, map[int64]string{2: "top"}, welds)
	bo := filepath.Join(dir, "build")
	if code, _, errs := runCLI(t, "build", "--mesh", mesh, "--parts", parts, "--joints", list, "--out", bo); code != exitOK {
		t.Fatalf("build: exit %d: %s", code, errs)
	}
	fs := findingCodes(t, filepath.Join(bo, "report.json"))
	if g := fs[joints.CodeGapClosed]; len(g) != 1 || !strings.Contains(g[0].Message, "the sheets penetrate by 1 mm") {
		t.Fatalf("build with the declared top: %+v, want gap-closed, penetrating by 1 mm", fs)
	}
	out := filepath.Join(dir, "offsets")
	if code, _, errs := runCLI(t, "offsets", "--mesh", mesh, "--parts", parts, "--joints", list, "--out", out, "--quiet"); code != exitOK {
		t.Fatalf("offsets: exit %d: %s", code, errs)
	}
	table, err := meshio.ReadParts(filepath.Join(out, "surfaces.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if table[1].ID != 2 || table[1].Surface != geom.SurfaceBottom {
		t.Errorf("surfaces.yaml part 2: %+v, want bottom", table[1])
	}
	if code, _, errs := runCLI(t, "build", "--mesh", mesh, "--parts", parts, "--parts", filepath.Join(out, "surfaces.yaml"), "--joints", list, "--out", bo); code != exitOK {
		t.Fatalf("build with surfaces: exit %d: %s", code, errs)
	}
	fs = findingCodes(t, filepath.Join(bo, "report.json"))
	if len(fs[joints.CodeGapClosed])+len(fs[joints.CodeGapOpen]) != 0 {
		t.Errorf("build with the surfaces found: %+v, want no gap finding", fs)
	}
}

func TestOffsetsExampleGolden(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	code, out, errs := runCLI(t, "offsets", exampleJob, "--out", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s\n%s", code, errs, out)
	}
	for _, name := range []string{"surfaces.yaml", "report.txt"} {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		golden(t, "offsets-"+name, b)
	}
	validate(t, "surfaces.schema.json", filepath.Join(dir, "surfaces.json"))
	validate(t, "report.schema.json", filepath.Join(dir, "report.json"))
	// The report names the run that wrote it (report.schema.json: command).
	if c := readReport(t, filepath.Join(dir, "report.json")).Command; c != "offsets" {
		t.Errorf("report.json: command %q, want offsets", c)
	}
	code, out, _ = runCLI(t, "offsets", exampleJob, "--out", dir, "--json")
	var js offsetsJSON
	if code != exitOK || json.Unmarshal([]byte(out), &js) != nil || len(js.Parts) != 4 {
		t.Errorf("--json: exit %d, %s", code, out)
	}
}

// build --links offset on the example: the documents validate, every
// connector has three links per pair of sheets, connectors.csv and
// connectors.vtk carry the offset form.
func TestBuildOffsetLinksExample(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	code, _, errs := runCLI(t, "build", exampleJob, "--out", dir, "--links", "offset")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	validate(t, "connectors.schema.json", filepath.Join(dir, "connectors.json"))
	doc := readConnectors(t, filepath.Join(dir, "connectors.json"))
	if doc.Options.Links != "offset" {
		t.Errorf("options.links %q", doc.Options.Links)
	}
	for _, c := range doc.Connectors {
		if c.State == "not-built" {
			continue
		}
		if len(c.Links) != 3*(len(c.Sheets)-1) {
			t.Errorf("%s: %d links for %d sheets", c.ID, len(c.Links), len(c.Sheets))
		}
		for _, l := range c.Links {
			// Mid-surface meshes in contact: offsets of t/2.
			if l.Kind == "offset" && abs(l.Length-c.Sheets[l.From].Thickness/2) > 1e-9 {
				t.Errorf("%s: offset %g on a %g mm sheet", c.ID, l.Length, c.Sheets[l.From].Thickness)
			}
		}
	}
	csv, _ := os.ReadFile(filepath.Join(dir, "connectors.csv"))
	vtk, _ := os.ReadFile(filepath.Join(dir, "connectors.vtk"))
	if !strings.Contains(string(csv), ",faying_nodes,offsets,") || !strings.Contains(string(vtk), "SCALARS link_kind int 1") {
		t.Errorf("connectors.csv or .vtk lacks the offset form")
	}
	code, _, errs = runCLI(t, "build", exampleJob, "--out", dir, "--links", "rigid")
	if code != exitBadInput || !strings.Contains(errs, `unknown link form "rigid"`) {
		t.Errorf("--links rigid: exit %d, %s", code, errs)
	}
}

func abs(v float64) float64 {
	if v < 0 {
		return -v
	}
	return v
}

func geom3(x, y, z float64) r3.Vec { return r3.Vec{X: x, Y: y, Z: z} }

// The planted model in metres and in inches, end to end: offsets finds
// the same surfaces as in mm, and its surfaces.yaml, laid over the parts
// table in the same unit, reads back as those surfaces and gives a build
// without gap findings. Part 30 (0.8 mm, meshed on its bottom face) has
// the offset +0.4 mm: +0.0004 m, within 0.0005 of 0, which a tolerance
// taken in the table's unit instead of mm reads as mid (hand
// calculation; 1 in = 25.4 mm).
func TestOffsetsPlantedModelInOtherUnits(t *testing.T) {
	plates := offsettest.Planted()
	for _, u := range []joints.Unit{joints.Metre, joints.Inch} {
		t.Run(u.String(), func(t *testing.T) {
			dir := t.TempDir()
			s := u.MM()
			m, err := offsettest.Mesh(plates, offsettest.H)
			if err != nil {
				t.Fatal(err)
			}
			m.Scale(1 / s)
			mesh := filepath.Join(dir, "model.jmesh")
			var mb strings.Builder
			if err := native.Write(&mb, m); err != nil {
				t.Fatal(err)
			}
			var pt, wl strings.Builder
			pt.WriteString("parts:\n")
			for _, p := range plates {
				fmt.Fprintf(&pt, "  - {id: %d, thickness: %v, surface: mid}\n", p.ID, p.Thickness/s)
			}
			wl.WriteString("id,x,y,z\n")
			for _, w := range offsettest.PlantedWelds() {
				fmt.Fprintf(&wl, "%s,%v,%v,%v\n", w.ID, w.Point.X/s, w.Point.Y/s, w.Point.Z/s)
			}
			parts, welds := filepath.Join(dir, "parts.yaml"), filepath.Join(dir, "welds.csv")
			for name, text := range map[string]string{mesh: mb.String(), parts: pt.String(), welds: wl.String()} {
				if err := os.WriteFile(name, []byte(text), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			in := []string{"--mesh", mesh, "--joints", welds, "--units", u.String(), "--parts", parts}
			out := filepath.Join(dir, "offsets")
			if code, _, errs := runCLI(t, append([]string{"offsets", "--out", out, "--quiet"}, in...)...); code != exitOK {
				t.Fatalf("offsets: exit %d: %s", code, errs)
			}
			surfaces := filepath.Join(out, "surfaces.yaml")
			bo := filepath.Join(dir, "build")
			code, _, errs := runCLI(t, append(append([]string{"build", "--out", bo, "--quiet", "--fail-on", "never"}, in...), "--parts", surfaces)...)
			if code != exitOK {
				t.Fatalf("build with surfaces.yaml: exit %d: %s", code, errs)
			}
			fs := findingCodes(t, filepath.Join(bo, "report.json"))
			if n := len(fs[joints.CodeGapOpen]) + len(fs[joints.CodeGapClosed]); n != 0 {
				t.Errorf("build with the surfaces found: %d gap finding(s), want none: %+v", n, fs)
			}
			doc := readConnectors(t, filepath.Join(bo, "connectors.json"))
			if len(doc.Connectors) != 3 {
				t.Fatalf("%d connectors, want 3", len(doc.Connectors))
			}
			// The surfaces the build used, read back from the overlay in the
			// unit: those planted.
			lo := meshio.LoadOptions{Meshes: []string{mesh}, Parts: parts, Scale: s}
			md, err := meshio.Load(lo)
			if err != nil {
				t.Fatal(err)
			}
			if err := md.Overlay([]string{surfaces}, nil, s); err != nil {
				t.Fatal(err)
			}
			for i, p := range plates {
				if got := md.Mesh.Parts[i]; got.ID != p.ID || got.Surface != p.Surface {
					t.Errorf("part %d: surface %s from surfaces.yaml, want %s", got.ID, got.Surface, p.Surface)
				}
			}
		})
	}
}

// The planted model built in the offset form with the surfaces offsets
// found laid over the parts table (which says mid everywhere): every
// offset link runs from its sheet's mesh to the faying plane between
// its sheet and the next, z = Mid + t/2 of the lower sheet (hand
// calculation from the planted mid-surfaces: sheets in contact), so its
// length is t/2 from a mid-surface mesh, 0 from a faying-face mesh and t
// from a far-face one; every faying joint has no length, and no gap or
// offset-mismatch finding is reported. With the table's surfaces the
// outer-face meshes put faying points apart.
func TestOffsetsPlantedOffsetLinks(t *testing.T) {
	dir := t.TempDir()
	plates := offsettest.Planted()
	mesh, parts, welds := writeModel(t, dir, plates, nil, offsettest.PlantedWelds())
	out := filepath.Join(dir, "offsets")
	if code, _, errs := runCLI(t, "offsets", "--mesh", mesh, "--parts", parts, "--joints", welds, "--out", out, "--quiet"); code != exitOK {
		t.Fatalf("offsets: exit %d: %s", code, errs)
	}
	byID := map[int64]offsettest.Plate{}
	for _, p := range plates {
		byID[p.ID] = p
	}
	build := func(tables ...string) (*document.ConnectorsDoc, map[string][]document.FindingDoc) {
		bo := filepath.Join(dir, "build")
		args := []string{"build", "--mesh", mesh, "--joints", welds, "--out", bo, "--links", "offset", "--fail-on", "never", "--quiet"}
		for _, tb := range tables {
			args = append(args, "--parts", tb)
		}
		if code, _, errs := runCLI(t, args...); code != exitOK {
			t.Fatalf("build: exit %d: %s", code, errs)
		}
		doc := readConnectors(t, filepath.Join(bo, "connectors.json"))
		return doc, findingCodes(t, filepath.Join(bo, "report.json"))
	}
	doc, fs := build(parts, filepath.Join(out, "surfaces.yaml"))
	for _, code := range []string{joints.CodeGapOpen, joints.CodeGapClosed, joints.CodeOffsetMismatch} {
		if len(fs[code]) != 0 {
			t.Errorf("%s: %+v, want none", code, fs[code])
		}
	}
	offsets := 0
	for _, c := range doc.Connectors {
		// W1's four sheets are beyond ISO 14373's two or three
		// (thickness-range, a warning): flagged, built.
		if c.State == "not-built" {
			t.Errorf("%s: %s: %+v", c.ID, c.State, c.Findings)
			continue
		}
		for _, l := range c.Links {
			switch l.Kind {
			case "offset":
				a, b := byID[c.Sheets[l.From].Part], byID[c.Sheets[l.To].Part]
				lower := a
				if b.Mid < a.Mid {
					lower = b
				}
				fz := lower.Mid + lower.Thickness/2
				want := math.Abs(fz - a.MeshZ())
				if math.Abs(l.Length-want) > 1e-12 || math.Abs(l.End[2]-fz) > 1e-12 {
					t.Errorf("%s: offset of part %d (%s) toward %d: length %g to z %g, want %g to z %g", c.ID, a.ID, a.Surface, b.ID, l.Length, l.End[2], want, fz)
				}
				offsets++
			case "faying":
				if l.Length > 1e-12 {
					t.Errorf("%s: faying joint %d-%d length %g, want 0", c.ID, c.Sheets[l.From].Part, c.Sheets[l.To].Part, l.Length)
				}
			}
		}
	}
	// W1 joins 4 sheets, W2 3, W3 2: 2 offset links per pair of sheets.
	if offsets != 2*(3+2+1) {
		t.Errorf("%d offset links, want 12", offsets)
	}
	if _, fs := build(parts); len(fs[joints.CodeGapOpen])+len(fs[joints.CodeGapClosed]) == 0 {
		t.Errorf("build with the table's surfaces: no gap finding, want some for the outer-face meshes")
	}
}
