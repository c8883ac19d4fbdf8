package main

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

// runDocs runs a command with --out and --quiet, failing the test on any
// exit but 0, and returns the output directory.
func runDocs(t *testing.T, cmd string, args ...string) string {
	t.Helper()
	out := t.TempDir()
	code, _, errs := runCLI(t, append([]string{cmd, "--out", out, "--quiet", "--fail-on", "never"}, args...)...)
	if code != exitOK {
		t.Fatalf("%s %v: exit %d: %s", cmd, args, code, errs)
	}
	return out
}

// decodeFile opens path and decodes it with dec (one of document's
// decoders), failing the test on any error.
func decodeFile[T any](t *testing.T, path string, dec func(r io.Reader, name string) (T, error)) T {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	doc, err := dec(f, filepath.Base(path))
	if err != nil {
		t.Fatal(err)
	}
	return doc
}

func readConnectors(t *testing.T, path string) *document.ConnectorsDoc {
	t.Helper()
	return decodeFile(t, path, document.DecodeConnectors)
}

func readReport(t *testing.T, path string) *document.ReportDoc {
	t.Helper()
	return decodeFile(t, path, document.DecodeReport)
}

func readFlanges(t *testing.T, path string) *document.FlangesDoc {
	t.Helper()
	return decodeFile(t, path, document.DecodeFlanges)
}

func readSurfaces(t *testing.T, path string) *document.SurfacesDoc {
	t.Helper()
	return decodeFile(t, path, document.DecodeSurfaces)
}

// readManifest reads a sweep's manifest.json from dir.
func readManifest(t *testing.T, dir string) *document.ManifestDoc {
	t.Helper()
	return decodeFile(t, filepath.Join(dir, "manifest.json"), document.DecodeManifest)
}

// vtkPoints reads the POINTS block of a legacy ASCII VTK file.
func vtkPoints(t *testing.T, path string) []float64 {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	var pts []float64
	n := -1
	for sc.Scan() {
		line := sc.Text()
		if n < 0 {
			if rest, ok := strings.CutPrefix(line, "POINTS "); ok {
				n, _ = strconv.Atoi(strings.Fields(rest)[0])
				n *= 3
			}
			continue
		}
		if len(pts) == n {
			break
		}
		for _, w := range strings.Fields(line) {
			v, err := strconv.ParseFloat(w, 64)
			if err != nil {
				t.Fatalf("%s: %q: %v", path, line, err)
			}
			pts = append(pts, v)
		}
	}
	if n < 0 || len(pts) != n {
		t.Fatalf("%s: %d point coordinates, want %d", path, len(pts), n)
	}
	return pts
}

// fit compares a length from a flange's fits, in mm, with one in a unit
// of scale mm: a model read in another unit scales back to mm with
// rounding in the sixteenth digit, which the outline's fits (smoothing,
// centreline, stations) turn into a wobble of up to about 0.005 mm.
func fit(mm, v, scale float64) bool { return math.Abs(mm-v*scale) <= 0.01+1e-9*math.Abs(mm) }

// fitArea compares an area in mm² with one in the square of a unit of
// scale² mm²: to 1e-5 of its size (the outline's fits, as for fit).
func fitArea(mm2, v, scale2 float64) bool { return math.Abs(mm2-v*scale2) <= 1e-5*math.Abs(mm2) }

// The example drawn in mm, m and in gives the same flanges, facing pairs
// and welds, up to the unit's scale (areas by its square), when its unit
// is given; flanges.json records the unit, and the welds of joints.csv,
// fed back to build with the same --units, build as the mm ones do. The
// rules and options (--pitch) apply in mm.
func TestUnitsGiveTheSameFlanges(t *testing.T) {
	skipWithoutExample(t)
	_, argsMM := scaledExample(t, joints.Millimetre)
	// flanges reads no joint list; build reads the welds flanges placed.
	noJoints := func(args []string) []string {
		var out []string
		for i := 0; i < len(args); i += 2 {
			if args[i] != "--joints" {
				out = append(out, args[i], args[i+1])
			}
		}
		return out
	}
	flangeArgs := func(args []string) []string { return append(noJoints(args), "--pitch", "30") }
	refDir := runDocs(t, "flanges", flangeArgs(argsMM)...)
	ref := readFlanges(t, filepath.Join(refDir, "flanges.json"))
	refPts := vtkPoints(t, filepath.Join(refDir, "flanges.vtk"))
	refWelds, _, err := joints.ReadJoints(filepath.Join(refDir, "joints.csv"))
	if err != nil || len(refWelds) == 0 {
		t.Fatalf("joints.csv: %d welds, %v", len(refWelds), err)
	}
	refBuild, _ := buildDocs(t, append(noJoints(argsMM), "--joints", filepath.Join(refDir, "joints.csv"))...)
	if ref.Units.Length != "mm" {
		t.Fatalf("units %q, want mm", ref.Units.Length)
	}
	for _, u := range []joints.Unit{joints.Metre, joints.Inch} {
		t.Run(u.String(), func(t *testing.T) {
			s := u.MM()
			_, args := scaledExample(t, u)
			fargs := append(flangeArgs(args), "--units", u.String())
			dir := runDocs(t, "flanges", fargs...)
			validate(t, "flanges.schema.json", filepath.Join(dir, "flanges.json"))
			got := readFlanges(t, filepath.Join(dir, "flanges.json"))
			if got.Units.Length != u.String() {
				t.Errorf("units.length %q, want %q", got.Units.Length, u)
			}
			if ref.Options.Pitch == nil || got.Options.Pitch == nil || !fit(*ref.Options.Pitch, *got.Options.Pitch, s) {
				t.Errorf("options.pitch %v, want %v mm", got.Options.Pitch, ref.Options.Pitch)
			}
			if len(got.Flanges) != len(ref.Flanges) {
				t.Fatalf("%d flanges, want %d", len(got.Flanges), len(ref.Flanges))
			}
			vec := func(a, b document.Vec) bool { return fit(a[0], b[0], s) && fit(a[1], b[1], s) && fit(a[2], b[2], s) }
			for i, r := range ref.Flanges {
				g := got.Flanges[i]
				if r.ID != g.ID || r.Parts != g.Parts || r.Match != g.Match || r.Shape != g.Shape || len(r.Facing) != len(g.Facing) ||
					len(r.Welds) != len(g.Welds) || len(r.Centreline) != len(g.Centreline) || r.Nodes != g.Nodes {
					t.Errorf("flange %s: %v %s %s, %d facing, %d welds; want %s %v %s %s, %d, %d", g.ID, g.Parts, g.Match, g.Shape,
						len(g.Facing), len(g.Welds), r.ID, r.Parts, r.Match, r.Shape, len(r.Facing), len(r.Welds))
					continue
				}
				if !fit(r.Thickness[0], g.Thickness[0], s) || !fit(r.Contact, g.Contact, s) || !fit(r.Length, g.Length, s) ||
					!fit(r.Width.Min, g.Width.Min, s) || !fit(r.Width.Max, g.Width.Max, s) || !fitArea(r.Area, g.Area, s*s) {
					t.Errorf("flange %s: figures differ:\n got %+v\nwant %+v (mm)", r.ID, g, r)
				}
				for k := range r.Centreline {
					if !vec(r.Centreline[k], g.Centreline[k]) {
						t.Errorf("flange %s: centreline point %d %v, want %v mm", r.ID, k, g.Centreline[k], r.Centreline[k])
					}
				}
				for k, rf := range r.Facing {
					gf := g.Facing[k]
					if rf[0] != gf[0] || rf[1] != gf[1] || !fit(rf[2], gf[2], s) || !fit(rf[3], gf[3], s) {
						t.Errorf("flange %s: facing pair %v, want %v mm", r.ID, gf, rf)
					}
				}
				for k, rw := range r.Welds {
					gw := g.Welds[k]
					if rw.ID != gw.ID || !vec(rw.Point, gw.Point) || !fit(rw.S, gw.S, s) || !fit(rw.Diameter, gw.Diameter, s) {
						t.Errorf("flange %s: weld %+v, want %+v mm", r.ID, gw, rw)
					}
				}
			}
			pts := vtkPoints(t, filepath.Join(dir, "flanges.vtk"))
			if len(pts) != len(refPts) {
				t.Fatalf("flanges.vtk: %d coordinates, want %d", len(pts), len(refPts))
			}
			for k := range pts {
				if !fit(refPts[k], pts[k], s) {
					t.Fatalf("flanges.vtk: coordinate %d is %g, want %g mm", k, pts[k], refPts[k])
				}
			}
			welds, _, err := joints.ReadJoints(filepath.Join(dir, "joints.csv"))
			if err != nil || len(welds) != len(refWelds) {
				t.Fatalf("joints.csv: %d welds, %v; want %d", len(welds), err, len(refWelds))
			}
			for k, w := range welds {
				r := refWelds[k]
				if w.ID != r.ID || !fit(r.Point.X, w.Point.X, s) || !fit(r.Point.Y, w.Point.Y, s) || !fit(r.Point.Z, w.Point.Z, s) ||
					!fit(r.Diameter, w.Diameter, s) {
					t.Errorf("joints.csv: weld %+v, want %+v mm", w, r)
				}
			}
			// Fed back to build in the same unit, the welds build as in mm.
			// (The weld points wobble as the fits do: compare what was
			// built, not where on the elements.)
			conn, _ := buildDocs(t, append(noJoints(args), "--joints", filepath.Join(dir, "joints.csv"), "--units", u.String())...)
			if len(conn.Connectors) != len(refBuild.Connectors) {
				t.Fatalf("build: %d connectors, want %d", len(conn.Connectors), len(refBuild.Connectors))
			}
			for k, r := range refBuild.Connectors {
				g := conn.Connectors[k]
				if g.ID != r.ID || g.State != r.State || fmt.Sprint(g.Findings) != fmt.Sprint(r.Findings) || len(g.Sheets) != len(r.Sheets) {
					t.Errorf("build: connector %s %s %v, want %s %s %v", g.ID, g.State, g.Findings, r.ID, r.State, r.Findings)
					continue
				}
				// (A station on an element edge may fall in either element.)
				for n := range r.Sheets {
					if g.Sheets[n].Part != r.Sheets[n].Part {
						t.Errorf("build: connector %s sheet %d on part %d, want %d", g.ID, n, g.Sheets[n].Part, r.Sheets[n].Part)
					}
				}
			}
		})
	}
}

// The example drawn in mm, m and in gives the same surfaces, offsets and
// contacts, up to the unit's scale, when its unit is given; surfaces.json
// records the unit, and surfaces.yaml, read as a parts table in that
// unit, gives the same thicknesses and offsets.
func TestUnitsGiveTheSameSurfaces(t *testing.T) {
	skipWithoutExample(t)
	_, argsMM := scaledExample(t, joints.Millimetre)
	refDir := runDocs(t, "offsets", argsMM...)
	ref := readSurfaces(t, filepath.Join(refDir, "surfaces.json"))
	refTable, err := meshio.ReadParts(filepath.Join(refDir, "surfaces.yaml"))
	if err != nil || len(refTable) == 0 {
		t.Fatalf("surfaces.yaml: %d parts, %v", len(refTable), err)
	}
	for _, u := range []joints.Unit{joints.Metre, joints.Inch} {
		t.Run(u.String(), func(t *testing.T) {
			s := u.MM()
			_, args := scaledExample(t, u)
			dir := runDocs(t, "offsets", append(args, "--units", u.String())...)
			validate(t, "surfaces.schema.json", filepath.Join(dir, "surfaces.json"))
			got := readSurfaces(t, filepath.Join(dir, "surfaces.json"))
			if got.Units.Length != u.String() {
				t.Errorf("units.length %q, want %q", got.Units.Length, u)
			}
			if !near(ref.Options.Window, got.Options.Window, s) || !near(ref.Options.Reach, got.Options.Reach, s) ||
				!near(ref.Options.JointSiteWeight, got.Options.JointSiteWeight, s*s) {
				t.Errorf("options %+v, want %+v mm", got.Options, ref.Options)
			}
			if len(got.Parts) != len(ref.Parts) || len(got.Contacts) != len(ref.Contacts) {
				t.Fatalf("%d parts, %d contacts; want %d, %d", len(got.Parts), len(got.Contacts), len(ref.Parts), len(ref.Contacts))
			}
			for i, r := range ref.Parts {
				g := got.Parts[i]
				if r.ID != g.ID || r.Surface != g.Surface || r.Contacts != g.Contacts || !near(r.Thickness, g.Thickness, s) ||
					!near(r.Offset, g.Offset, s) || !near(r.Evidence, g.Evidence, s*s) || !near(r.Agreeing, g.Agreeing, s*s) {
					t.Errorf("part %+v, want %+v mm", g, r)
				}
			}
			for i, r := range ref.Contacts {
				g := got.Contacts[i]
				if r.A != g.A || r.B != g.B || r.Agrees != g.Agrees || !near(r.Separation, g.Separation, s) ||
					!near(r.Expected, g.Expected, s) || !near(r.Area, g.Area, s*s) || !near(r.Weight, g.Weight, s*s) ||
					!near(r.Point[0], g.Point[0], s) || !near(r.Allowance, g.Allowance, s) {
					t.Errorf("contact %+v, want %+v mm", g, r)
				}
			}
			table, err := meshio.ReadParts(filepath.Join(dir, "surfaces.yaml"))
			if err != nil || len(table) != len(refTable) {
				t.Fatalf("surfaces.yaml: %d parts, %v; want %d", len(table), err, len(refTable))
			}
			for i, r := range refTable {
				g := table[i]
				if r.ID != g.ID || r.Surface != g.Surface || !near(r.Thickness, g.Thickness, s) {
					t.Errorf("surfaces.yaml: %+v, want %+v mm", g, r)
				}
			}
			refOff, gotOff := yamlOffsets(t, filepath.Join(refDir, "surfaces.yaml")), yamlOffsets(t, filepath.Join(dir, "surfaces.yaml"))
			if len(refOff) != len(gotOff) || len(refOff) != len(refTable) {
				t.Fatalf("surfaces.yaml: %d offsets, want %d", len(gotOff), len(refOff))
			}
			for i := range refOff {
				if !near(refOff[i], gotOff[i], s) {
					t.Errorf("surfaces.yaml: offset %d is %g %s, want %g mm", i, gotOff[i], u, refOff[i])
				}
			}
		})
	}
}

// yamlOffsets returns the offsets of a surfaces.yaml, in order.
func yamlOffsets(t *testing.T, path string) []float64 {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var out []float64
	for _, line := range strings.Split(string(b), "\n") {
		if rest, ok := strings.CutPrefix(strings.TrimSpace(line), "offset: "); ok {
			v, err := strconv.ParseFloat(strings.Fields(rest)[0], 64)
			if err != nil {
				t.Fatalf("%s: %q: %v", path, line, err)
			}
			out = append(out, v)
		}
	}
	return out
}
