package meshio

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

// The offset column: alone it sets the surface it stands for, with the
// surface the two must agree, and only 0, -t/2 and +t/2 are offsets.
func TestPartsOffsetColumn(t *testing.T) {
	ok := []struct {
		yaml, csv string
		want      geom.Surface
	}{
		{"{id: 1, thickness: 0.8, offset: -0.4}", "1,0.8,,-0.4", geom.SurfaceTop},
		{"{id: 1, thickness: 0.8, offset: 0.4}", "1,0.8,,0.4", geom.SurfaceBottom},
		{"{id: 1, thickness: 0.8, offset: 0}", "1,0.8,,0", geom.SurfaceMid},
		{"{id: 1, thickness: 0.8, offset: -0.4, surface: top}", "1,0.8,top,-0.4", geom.SurfaceTop},
		{"{id: 1, thickness: 1.5, offset: 0.7504}", "1,1.5,,0.7504", geom.SurfaceBottom}, // within 0.0005 mm
		{"{id: 1, thickness: 0.8, surface: top}", "1,0.8,top,", geom.SurfaceTop},
	}
	for _, tc := range ok {
		y, err := ReadPartsYAML(strings.NewReader("parts:\n- "+tc.yaml+"\n"), "p.yaml")
		if err != nil || y[0].Surface != tc.want {
			t.Errorf("%s: %v, %v; want %s", tc.yaml, y, err, tc.want)
		}
		c, err := ReadPartsCSV(strings.NewReader("id,thickness,surface,offset\n"+tc.csv+"\n"), "p.csv")
		if err != nil || c[0].Surface != tc.want {
			t.Errorf("%s: %v, %v; want %s", tc.csv, c, err, tc.want)
		}
	}
	bad := []struct{ yaml, want string }{
		{"{id: 1, thickness: 1, offset: -0.3}", "p.yaml:2: offset: -0.3 mm for thickness 1 mm is none of 0 (mid), -0.5 mm (top) or 0.5 mm (bottom)"},
		{"{id: 1, thickness: 1, offset: 0.5, surface: top}", "p.yaml:2: offset: 0.5 mm is the offset of surface bottom, but the entry gives surface top"},
		{"{id: 1, thickness: 1, offset: thin}", `p.yaml:2: offset: want a number`},
	}
	for _, tc := range bad {
		_, err := ReadPartsYAML(strings.NewReader("parts:\n- "+tc.yaml+"\n"), "p.yaml")
		if err == nil || !strings.HasPrefix(err.Error(), tc.want) || !errors.Is(err, geom.ErrInput) {
			t.Errorf("%s: err %v, want %q", tc.yaml, err, tc.want)
		}
	}
	if _, err := ReadPartsCSV(strings.NewReader("id,thickness,offset\n1,1,0.2\n"), "p.csv"); err == nil || !strings.HasPrefix(err.Error(), "p.csv:2:") {
		t.Errorf("csv bad offset: %v", err)
	}
}

// A table laid over the first sets surfaces, keeps what it does not give,
// and refuses other thicknesses and mesh names.
func TestOverlay(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	m := &geom.Mesh{Parts: []geom.Part{{ID: 1, Name: "floor", Thickness: 0.8, Material: "DC04"}, {ID: 2, Thickness: 1.5, Surface: geom.SurfaceTop}}}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	m.ElemPart = []int32{0, 1} // one element in each part: a part without elements counts as unused
	md := &Model{Mesh: m}
	s := write("surfaces.yaml", "parts:\n- {id: 1, thickness: 0.8, surface: bottom, offset: 0.4}\n- {id: 9, thickness: 1, surface: top}\n")
	if err := md.Overlay([]string{s}, nil, 1); err != nil {
		t.Fatal(err)
	}
	if p := m.Parts[0]; p.Surface != geom.SurfaceBottom || p.Name != "floor" || p.Material != "DC04" || p.Thickness != 0.8 {
		t.Errorf("part 1 %+v", p)
	}
	if m.Parts[1].Surface != geom.SurfaceTop || len(md.UnusedParts) != 1 || md.UnusedParts[0] != 9 {
		t.Errorf("part 2 %+v, unused %v", m.Parts[1], md.UnusedParts)
	}
	for _, tc := range []struct{ text, want string }{
		{"parts:\n- {id: 1, thickness: 1.0, surface: top}\n", "part 1 has thickness 1 mm here and 0.8 mm in the tables before it"},
		{"parts:\n- {id: 1, thickness: 0.8, mesh: floor.vtk}\n", `part 1: mesh "floor.vtk": only the first parts table`},
	} {
		err := md.Overlay([]string{write("bad.yaml", tc.text)}, nil, 1)
		if err == nil || !strings.Contains(err.Error(), tc.want) || !errors.Is(err, geom.ErrInput) {
			t.Errorf("err %v, want %q", err, tc.want)
		}
	}
}

// Offsets and overlay thicknesses are judged in mm whatever the job's
// unit: the tables hold values in that unit, and geom.OffsetTolerance,
// 0.0005 mm, is a length in mm (README: "other offsets (beyond 0.0005 mm
// of these) are an input error"). A 1 mm sheet: its offsets are 0, -0.5
// and +0.5 mm (mid, top, bottom: half the thickness, shell geometry);
// -0.3 mm is none of them in any unit. Before, in metres the tolerance
// became 0.0005 m = 0.5 mm: -0.0003 m was read as mid, silently, and an
// overlay made for 1.4 mm passed over a 1.0 mm part.
func TestOffsetToleranceInMM(t *testing.T) {
	units := []struct {
		name  string
		scale float64 // mm per unit
	}{{"mm", 1}, {"m", 1000}, {"in", 25.4}}
	cases := []struct {
		name      string
		off       float64 // mm
		want      geom.Surface
		wantError bool
	}{
		{"top", -0.5, geom.SurfaceTop, false},
		{"bottom", 0.5, geom.SurfaceBottom, false},
		{"mid", 0, geom.SurfaceMid, false},
		{"top within 0.0004 mm", -0.5004, geom.SurfaceTop, false},
		{"-0.3 mm", -0.3, 0, true},
		{"-0.1 mm", -0.1, 0, true},
		{"0.0008 mm off mid", 0.0008, 0, true},
	}
	for _, u := range units {
		for _, tc := range cases {
			th, off := 1/u.scale, tc.off/u.scale
			y, err := readPartsYAML(strings.NewReader(fmt.Sprintf("parts:\n- {id: 1, thickness: %v, offset: %v}\n", th, off)), "p.yaml", u.scale)
			c, cerr := readPartsCSV(strings.NewReader(fmt.Sprintf("id,thickness,offset\n1,%v,%v\n", th, off)), "p.csv", u.scale)
			for form, got := range map[string]struct {
				ps  []geom.Part
				err error
			}{"yaml": {y, err}, "csv": {c, cerr}} {
				switch {
				case tc.wantError && (got.err == nil || !errors.Is(got.err, geom.ErrInput)):
					t.Errorf("%s, %s, %s: %v, %v; want an input error", u.name, form, tc.name, got.ps, got.err)
				case !tc.wantError && (got.err != nil || got.ps[0].Surface != tc.want):
					t.Errorf("%s, %s, %s: %v, %v; want %s", u.name, form, tc.name, got.ps, got.err, tc.want)
				}
			}
		}
	}
	// The message names mm values.
	_, err := readPartsYAML(strings.NewReader("parts:\n- {id: 1, thickness: 0.001, offset: -0.0003}\n"), "p.yaml", 1000)
	if want := "p.yaml:2: offset: -0.0003 m (-0.3 mm) for thickness 0.001 m (1 mm) is none of 0 (mid), -0.5 mm (top) or 0.5 mm (bottom)"; err == nil || !strings.HasPrefix(err.Error(), want) {
		t.Errorf("metres: %v, want %q", err, want)
	}
	// An overlay for other thicknesses is refused in metres as in mm:
	// 1.4 mm against 1.0 mm.
	dir := t.TempDir()
	p := filepath.Join(dir, "over.yaml")
	if err := os.WriteFile(p, []byte("parts:\n- {id: 1, thickness: 0.0014, surface: top}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	m := &geom.Mesh{Parts: []geom.Part{{ID: 1, Thickness: 0.001}}, ElemPart: []int32{0}}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	err = (&Model{Mesh: m}).Overlay([]string{p}, nil, 1000)
	if want := "part 1 has thickness 0.0014 m (1.4 mm) here and 0.001 m (1 mm) in the tables before it"; err == nil || !strings.Contains(err.Error(), want) {
		t.Errorf("metres overlay: %v, want %q", err, want)
	}
}

// Offsets and thicknesses of a table in metres or inches are compared
// with their surfaces and with the tables before them in mm: the
// tolerance is geom.OffsetTolerance, 0.0005 mm, whatever the unit. In
// metres, 0.0005 is half of a 1 mm sheet, so a tolerance taken in the
// table's own unit reads the top face of such a sheet (offset -0.0005 m)
// as its mid-surface. Reference values: hand calculation (offset of top
// -t/2, of bottom +t/2; 1 in = 25.4 mm).
func TestPartsOffsetInOtherUnits(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	for i, tc := range []struct {
		scale float64 // mm per unit of the table
		entry string
		want  geom.Surface
	}{
		{1000, "{id: 1, thickness: 0.001, surface: top, offset: -0.0005}", geom.SurfaceTop}, // 1 mm sheet, top: -0.5 mm
		{1000, "{id: 1, thickness: 0.001, offset: -0.0005}", geom.SurfaceTop},
		{1000, "{id: 1, thickness: 0.0008, offset: 0.0004}", geom.SurfaceBottom}, // 0.8 mm sheet, bottom: +0.4 mm
		{1000, "{id: 1, thickness: 0.0008, offset: 0}", geom.SurfaceMid},
		{25.4, "{id: 1, thickness: 0.03, offset: -0.015}", geom.SurfaceTop}, // 0.762 mm sheet, top: -0.381 mm
		{25.4, "{id: 1, thickness: 0.03, offset: 0.015, surface: bottom}", geom.SurfaceBottom},
		{1, "{id: 1, thickness: 1, offset: -0.5}", geom.SurfaceTop},
	} {
		ps, err := readParts(write("p.yaml", "parts:\n- "+tc.entry+"\n"), nil, tc.scale)
		if err != nil || ps[0].Surface != tc.want {
			t.Errorf("%d: %s in a unit of %g mm: %v, %v; want %s", i, tc.entry, tc.scale, ps, err, tc.want)
		}

	}
	// Offsets off every surface by more than 0.0005 mm are refused in any
	// unit: 0.0004 m is 0.4 mm, far from 0 and from -0.5 mm.
	for _, tc := range []struct {
		scale       float64
		entry, want string
	}{
		{1000, "{id: 1, thickness: 0.001, offset: -0.0004}", "offset: -0.0004 m (-0.4 mm) for thickness 0.001 m (1 mm) is none of 0 (mid), -0.5 mm (top) or 0.5 mm (bottom)"},
		{1000, "{id: 1, thickness: 0.001, offset: -0.0005, surface: bottom}", "offset: -0.0005 m (-0.5 mm) is the offset of surface top, but the entry gives surface bottom (offset 0.5 mm for thickness 0.001 m (1 mm))"},
	} {
		_, err := readParts(write("p.yaml", "parts:\n- "+tc.entry+"\n"), nil, tc.scale)
		if err == nil || !strings.Contains(err.Error(), tc.want) || !errors.Is(err, geom.ErrInput) {
			t.Errorf("%s in a unit of %g mm: err %v, want %q", tc.entry, tc.scale, err, tc.want)
		}
	}
}

// An overlay made for other thicknesses is refused in any unit: 1.2 mm
// against 1.5 mm is 0.0003 apart in metres, below 0.0005 but 0.3 mm off.
func TestOverlayThicknessInOtherUnits(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "surfaces.yaml")
	if err := os.WriteFile(p, []byte("parts:\n- {id: 1, thickness: 0.0012, surface: top}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	m := &geom.Mesh{Parts: []geom.Part{{ID: 1, Thickness: 0.0015}}} // metres: not yet scaled
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	m.ElemPart = []int32{0}
	err := (&Model{Mesh: m}).Overlay([]string{p}, nil, 1000)
	if want := "part 1 has thickness 0.0012 m (1.2 mm) here and 0.0015 m (1.5 mm) in the tables before it"; err == nil || !strings.Contains(err.Error(), want) {
		t.Errorf("err %v, want %q", err, want)
	}
	// The same thickness written to other digits (1.2/25.4 in, as a
	// surfaces.yaml in inches gives it back) is the same.
	if err := os.WriteFile(p, []byte("parts:\n- {id: 1, thickness: 0.04724409999999999, surface: top}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	m.Parts[0] = geom.Part{ID: 1, Thickness: 0.0472441}
	if err := (&Model{Mesh: m}).Overlay([]string{p}, nil, 25.4); err != nil || m.Parts[0].Surface != geom.SurfaceTop {
		t.Errorf("inches: %v, surface %s", err, m.Parts[0].Surface)
	}
}
