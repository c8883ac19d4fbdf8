package main

import (
	"bytes"
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/joints"
)

// boltSheet is one flat sheet of the planted bolt model, in mm: an
// annulus of quads about (CX, CY) from the hole's radius out to Outer,
// its hole's edge nodes on the circle, or with Hole 0 a square grid of
// 2.5 mm quads 40 mm across about (CX, 0).
type boltSheet struct {
	Part   int64
	T, Z   float64
	Hole   float64
	Outer  float64
	Seg    int
	CX, CY float64
}

// plantedBolt is one bolt of the planted model with its sheets.
type plantedBolt struct {
	ID               string
	X, Y, Z          float64
	Diameter, Washer float64
	Hole             float64
	Ground           string
	Sheets           []boltSheet
}

// plantedBolts returns the planted model: bolts 200 mm apart along x,
// each with its own parts, each set up for one finding (or none): an
// M10 (ISO 7089 washer 20 mm, ISO 273 medium hole 11 mm, from
// REFERENCES.md) unless said otherwise.
func plantedBolts() []plantedBolt {
	pair := func(x float64, hole float64, p int64) []boltSheet {
		return []boltSheet{
			{Part: p + 1, T: 1.5, Z: 0, Hole: hole, Outer: 40, Seg: 24, CX: x},
			{Part: p + 2, T: 3, Z: 2.25, Hole: hole, Outer: 40, Seg: 24, CX: x},
		}
	}
	m10 := func(id string, x float64, ss []boltSheet) plantedBolt {
		return plantedBolt{ID: id, X: x, Z: 1.125, Diameter: 10, Washer: 20, Hole: 11, Sheets: ss}
	}
	var bs []plantedBolt
	// Clean: two sheets in contact, holes as declared.
	bs = append(bs, m10("B01-clean", 0, pair(0, 11, 100)))
	// Three sheets in contact (1, 1.5, 2 mm: mid-surfaces at 0, 1.25, 3).
	b := m10("B02-three", 200, []boltSheet{
		{Part: 201, T: 1, Z: 0, Hole: 11, Outer: 40, Seg: 24, CX: 200},
		{Part: 202, T: 1.5, Z: 1.25, Hole: 11, Outer: 40, Seg: 24, CX: 200},
		{Part: 203, T: 2, Z: 3, Hole: 11, Outer: 40, Seg: 24, CX: 200},
	})
	b.Z = 1.5
	bs = append(bs, b)
	// Meshed 12 mm (ISO 273 coarse) where 11 is declared: hole-size; the
	// point 0.3 mm off the centre, within the 1 mm clearance: info.
	b = m10("B03-hole-size", 400, pair(400, 12, 300))
	b.Y = 0.3
	bs = append(bs, b)
	// The point 1.2 mm off, beyond the 0.5 mm clearance: warning.
	b = m10("B04-off-centre", 600, pair(600, 11, 400))
	b.Y = 1.2
	bs = append(bs, b)
	// Declared hole 12.5 (beyond ISO 273's coarse 12.0) and washer 18
	// (under ISO 7089's 20): hole-class and washer-small.
	b = m10("B05-sizes", 800, pair(800, 12.5, 500))
	b.Hole, b.Washer = 12.5, 18
	bs = append(bs, b)
	// One sheet, grounded, no axis listed: fixture-side.
	b = m10("B06-ground", 1000, []boltSheet{{Part: 601, T: 2, Z: 0, Hole: 11, Outer: 40, Seg: 24, CX: 1000}})
	b.Z, b.Ground = 0, "yes"
	bs = append(bs, b)
	// The sheets end 9 mm from the centre, inside the washer's 10 mm
	// radius: edge-close.
	b = m10("B07-edge", 1200, pair(1200, 11, 700))
	for i := range b.Sheets {
		b.Sheets[i].Outer = 9
	}
	bs = append(bs, b)
	// Mid-surfaces 3.25 mm apart where contact is 2.25: gap-open.
	b = m10("B08-gap", 1400, pair(1400, 11, 800))
	b.Sheets[1].Z = 3.25
	bs = append(bs, b)
	// No hole meshed: patch rings.
	bs = append(bs, m10("B09-solid", 1600, []boltSheet{
		{Part: 901, T: 1.5, Z: 0, CX: 1600},
		{Part: 902, T: 3, Z: 2.25, CX: 1600},
	}))
	// The second hole 1.5 mm off the first: holes-misaligned.
	b = m10("B10-misaligned", 1800, pair(1800, 11, 1000))
	b.Sheets[1].CY = 1.5
	bs = append(bs, b)
	// A 9.6 mm hole meshed for an M10: hole-size, an error.
	bs = append(bs, m10("B11-tight", 2000, pair(2000, 9.6, 1100)))
	// A single sheet not grounded: single-sheet.
	b = m10("B12-single", 2200, []boltSheet{{Part: 1201, T: 2, Z: 0, Hole: 11, Outer: 40, Seg: 24, CX: 2200}})
	b.Z = 0
	bs = append(bs, b)
	// Few-node holes: a hexagon and an octagon with corners on the 11 mm
	// circle.
	b = m10("B13-hexagon", 2400, pair(2400, 11, 1300))
	for i := range b.Sheets {
		b.Sheets[i].Seg = 6
	}
	bs = append(bs, b)
	b = m10("B14-octagon", 2600, pair(2600, 11, 1400))
	for i := range b.Sheets {
		b.Sheets[i].Seg = 8
	}
	bs = append(bs, b)
	// Mid-surfaces 0.005 mm apart: gap-closed, and with a beam shank
	// shank-short.
	b = m10("B15-coincide", 2800, pair(2800, 11, 1500))
	b.Sheets[1].Z, b.Z = 0.005, 0
	bs = append(bs, b)
	return bs
}

// plantedBoltMesh meshes the planted model in mm.
func plantedBoltMesh(bs []plantedBolt) *geom.Mesh {
	m := &geom.Mesh{ElemStart: []int32{0}}
	for _, b := range bs {
		for _, s := range b.Sheets {
			pi := int32(len(m.Parts))
			m.Parts = append(m.Parts, geom.Part{ID: s.Part, Thickness: s.T, Name: fmt.Sprintf("%s part %d", b.ID, s.Part)})
			base := int32(len(m.Coords))
			nn, ne := 0, 0
			node := func(x, y, z float64) {
				nn++
				m.NodeIDs = append(m.NodeIDs, s.Part*10000+int64(nn))
				m.Coords = append(m.Coords, r3.Vec{X: x, Y: y, Z: z})
			}
			elem := func(ns ...int32) {
				ne++
				m.Conn = append(m.Conn, ns...)
				m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
				m.ElemIDs = append(m.ElemIDs, s.Part*10000+int64(ne))
				m.ElemPart = append(m.ElemPart, pi)
			}
			if s.Hole == 0 {
				const n, h = 16, 2.5
				for j := 0; j <= n; j++ {
					for i := 0; i <= n; i++ {
						node(s.CX-20+float64(i)*h, s.CY-20+float64(j)*h, s.Z)
					}
				}
				for j := range n {
					for i := range n {
						n0 := base + int32(j*(n+1)+i)
						elem(n0, n0+1, n0+n+2, n0+n+1)
					}
				}
				continue
			}
			const rings = 6
			for r := 0; r <= rings; r++ {
				rad := s.Hole/2 + (s.Outer-s.Hole/2)*float64(r)/rings
				for k := range s.Seg {
					a := 2 * math.Pi * float64(k) / float64(s.Seg)
					node(s.CX+rad*math.Cos(a), s.CY+rad*math.Sin(a), s.Z)
				}
			}
			at := func(r, k int) int32 { return base + int32(r*s.Seg+k%s.Seg) }
			for r := range rings {
				for k := range s.Seg {
					elem(at(r, k), at(r+1, k), at(r+1, k+1), at(r, k+1))
				}
			}
		}
	}
	return m
}

// writePlantedBolts writes the planted model drawn in unit u (every
// length divided by u.MM()) into a new directory: the mesh, the parts
// table and the joint list, and returns the build arguments. With
// digits > 0 the bolts' sizes are written to that many significant
// digits, as a spreadsheet might export them.
func writePlantedBolts(t *testing.T, u joints.Unit, digits int) []string {
	t.Helper()
	f := 1 / u.MM()
	bs := plantedBolts()
	m := plantedBoltMesh(bs)
	m.Scale(f)
	dir := t.TempDir()
	var buf bytes.Buffer
	if err := native.Write(&buf, m); err != nil {
		t.Fatal(err)
	}
	writeFile(t, dir, "bolts.jmesh", buf.String())
	num := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	var p strings.Builder
	p.WriteString("parts:\n")
	for _, pt := range m.Parts {
		fmt.Fprintf(&p, "  - {id: %d, name: %q, thickness: %s}\n", pt.ID, pt.Name, num(pt.Thickness))
	}
	writeFile(t, dir, "parts.yaml", p.String())
	var w strings.Builder
	w.WriteString("id,x,y,z,kind,diameter,washer,hole,ground\n")
	for _, b := range bs {
		size := num
		if digits > 0 {
			size = func(v float64) string { return strconv.FormatFloat(v, 'g', digits, 64) }
		}
		fmt.Fprintf(&w, "%s,%s,%s,%s,bolt,%s,%s,%s,%s\n", b.ID, num(b.X*f), num(b.Y*f), num(b.Z*f), size(b.Diameter*f), size(b.Washer*f), size(b.Hole*f), b.Ground)
	}
	writeFile(t, dir, "bolts.csv", w.String())
	return []string{"--mesh", filepath.Join(dir, "bolts.jmesh"), "--parts", filepath.Join(dir, "parts.yaml"),
		"--joints", filepath.Join(dir, "bolts.csv"), "--units", u.String()}
}

// lengthKeys are the members of connectors.json that hold lengths (in
// units.length) and the power of the length they hold; every other
// number must come out the same whatever the unit.
var lengthKeys = map[string]int{
	"point": 1, "distance": 1, "thickness": 1, "position": 1, "lateral": 1, "edge_distance": 1,
	"end_point": 1, "hole_diameter": 1, "node_points": 1, "washer": 1, "hole": 1, "diameter": 1,
	"start": 1, "end": 1, "length": 1, "contact_gap": 1, "mid_gap": 1, "square_gap": 1, "mismatch": 1,
	"reach": 1, "gap_allowance": 1, "hole_tolerance": 1, "location": 1, "pitch": 1, "area": 2, "inertia": 4, "torsion": 4,
}

// sameScaled compares two decoded JSON values, ref in mm and got in a
// unit of scale mm, and returns the paths where they differ: lengths
// (lengthKeys) scaled, to 1e-9 relative or 1e-9 mm; other numbers to
// 1e-12 (weights pass through the same sums in every unit); everything
// else exactly.
func sameScaled(ref, got any, scale float64, power int, path string, out *[]string) {
	switch r := ref.(type) {
	case map[string]any:
		g, ok := got.(map[string]any)
		if !ok {
			*out = append(*out, path+": not an object")
			return
		}
		keys := make([]string, 0, len(r))
		for k := range r {
			keys = append(keys, k)
		}
		for k := range g {
			if _, ok := r[k]; !ok {
				*out = append(*out, path+"."+k+": extra")
			}
		}
		sort.Strings(keys)
		for _, k := range keys {
			if slices.Contains([]string{"run_id", "units", "inputs"}, k) {
				continue
			}
			p := power
			if lk, ok := lengthKeys[k]; ok {
				p = lk
			}
			if k == "direction" || k == "axis" || k == "weights" || k == "modulus" || k == "poisson" {
				p = 0
			}
			gv, ok := g[k]
			if !ok {
				*out = append(*out, path+"."+k+": missing")
				continue
			}
			sameScaled(r[k], gv, scale, p, path+"."+k, out)
		}
	case []any:
		g, ok := got.([]any)
		if !ok || len(g) != len(r) {
			*out = append(*out, fmt.Sprintf("%s: %d items, want %d", path, len(g), len(r)))
			return
		}
		for i := range r {
			sameScaled(r[i], g[i], scale, power, fmt.Sprintf("%s[%d]", path, i), out)
		}
	case float64:
		g, ok := got.(float64)
		if !ok {
			*out = append(*out, path+": not a number")
			return
		}
		if power == 0 {
			if math.Abs(r-g) > 1e-12*math.Max(1, math.Abs(r)) {
				*out = append(*out, fmt.Sprintf("%s: %v, want %v", path, g, r))
			}
			return
		}
		if v := g * math.Pow(scale, float64(power)); math.Abs(r-v) > 1e-9*math.Max(1, math.Abs(r)) {
			*out = append(*out, fmt.Sprintf("%s: %v (%v mm^%d), want %v mm^%d", path, g, v, power, r, power))
		}
	default:
		if fmt.Sprint(ref) != fmt.Sprint(got) {
			*out = append(*out, fmt.Sprintf("%s: %v, want %v", path, got, ref))
		}
	}
}

// The planted bolt model drawn in mm, m and in gives the same bolts and
// findings, with every length of connectors.json scaled by the unit
// and every finding message the same (messages state mm).
func TestBoltUnits(t *testing.T) {
	for _, opts := range [][]string{
		nil,
		{"--shank", "beam", "--links", "offset", "--bolt-ring", "washer", "--bolt-dofs", "tx,ty,tz,rx,ry,rz"},
		{"--bolt-coupling", "averaging", "--hole-tolerance", "1.5", "--gap-allowance", "1.5"},
	} {
		name := strings.Join(opts, " ")
		build := func(u joints.Unit) (any, any) {
			out := t.TempDir()
			args := append([]string{"build", "--out", out, "--quiet", "--fail-on", "never"}, writePlantedBolts(t, u, 0)...)
			code, _, errs := runCLI(t, append(args, opts...)...)
			if code != exitOK {
				t.Fatalf("%s in %s: exit %d: %s", name, u, code, errs)
			}
			return anyJSON(t, filepath.Join(out, "connectors.json")), anyJSON(t, filepath.Join(out, "report.json"))
		}
		refConn, refRep := build(joints.Millimetre)
		for _, u := range []joints.Unit{joints.Metre, joints.Inch} {
			conn, rep := build(u)
			var diffs []string
			sameScaled(refConn, conn, u.MM(), 0, "connectors", &diffs)
			sameScaled(refRep.(map[string]any)["findings"], rep.(map[string]any)["findings"], u.MM(), 0, "findings", &diffs)
			sameScaled(refRep.(map[string]any)["summary"], rep.(map[string]any)["summary"], u.MM(), 0, "summary", &diffs)
			if len(diffs) > 0 {
				if len(diffs) > 30 {
					diffs = diffs[:30]
				}
				t.Errorf("%s in %s differs from mm:\n%s", name, u, strings.Join(diffs, "\n"))
			}
		}
		if opts == nil {
			// Each planted bolt's findings, so that the comparison covers
			// every bolt code's threshold.
			got := summaryCodes(refRep)
			for _, w := range []string{"B03-hole-size:hole-off-centre", "B03-hole-size:hole-size", "B04-off-centre:hole-off-centre",
				"B05-sizes:hole-class", "B05-sizes:washer-small", "B06-ground:fixture-side", "B07-edge:edge-close", "B08-gap:gap-open",
				"B10-misaligned:holes-misaligned", "B11-tight:hole-size", "B12-single:single-sheet", "B15-coincide:gap-closed"} {
				if !strings.Contains(got, w) {
					t.Errorf("planted finding %s missing: %s", w, got)
				}
			}
			for _, clean := range []string{"B01-clean", "B02-three", "B09-solid", "B13-hexagon", "B14-octagon"} {
				if strings.Contains(strings.ReplaceAll(got, clean+":free-part", ""), clean+":") {
					t.Errorf("%s has findings: %s", clean, got)
				}
			}
		}
	}
}

func summaryCodes(rep any) string {
	var s []string
	for _, f := range rep.(map[string]any)["findings"].([]any) {
		fm := f.(map[string]any)
		s = append(s, fmt.Sprint(fm["joint"], ":", fm["code"]))
	}
	return strings.Join(s, " ")
}

func anyJSON(t *testing.T, file string) any {
	t.Helper()
	var v any
	readJSON(t, file, &v)
	return v
}

// Bolt sizes given in inches to 6 or 4 significant digits (an M10 at
// 0.393701 in is 10.0000054 mm) meet the same ISO 273 and ISO 7089
// checks as in mm: the same findings on every bolt.
func TestBoltUnitsRoundedSizes(t *testing.T) {
	codesOf := func(args []string) string {
		out := t.TempDir()
		code, _, errs := runCLI(t, append([]string{"build", "--out", out, "--quiet", "--fail-on", "never"}, args...)...)
		if code != exitOK {
			t.Fatalf("exit %d: %s", code, errs)
		}
		return summaryCodes(anyJSON(t, filepath.Join(out, "report.json")))
	}
	want := codesOf(writePlantedBolts(t, joints.Millimetre, 0))
	if !strings.Contains(want, "B05-sizes:hole-class") || !strings.Contains(want, "B05-sizes:washer-small") {
		t.Fatalf("the planted model in mm lacks its size findings: %s", want)
	}
	for _, digits := range []int{6, 4} {
		if got := codesOf(writePlantedBolts(t, joints.Inch, digits)); got != want {
			t.Errorf("sizes in inches to %d digits:\n %s\nwant\n %s", digits, got, want)
		}
	}
}

// check reads the planted bolts back in every unit: the same findings
// as in mm, and no end-moved (the bolt centres rebuilt on the mesh lie
// where connectors.json, written in the unit, puts them).
func TestBoltUnitsCheck(t *testing.T) {
	var want string
	for _, u := range []joints.Unit{joints.Millimetre, joints.Metre, joints.Inch} {
		args := writePlantedBolts(t, u, 0)
		built := t.TempDir()
		if code, _, errs := runCLI(t, append([]string{"build", "--out", built, "--quiet", "--fail-on", "never"}, args...)...); code != exitOK {
			t.Fatalf("build in %s: exit %d: %s", u, code, errs)
		}
		out := t.TempDir()
		chk := []string{"check", "--connectors", filepath.Join(built, "connectors.json"), "--out", out, "--quiet", "--fail-on", "never"}
		for i := 0; i < len(args); i += 2 {
			if args[i] != "--joints" {
				chk = append(chk, args[i], args[i+1])
			}
		}
		if code, _, errs := runCLI(t, chk...); code != exitOK {
			t.Fatalf("check in %s: exit %d: %s", u, code, errs)
		}
		got := summaryCodes(anyJSON(t, filepath.Join(out, "report.json")))
		if strings.Contains(got, joints.CodeEndMoved) {
			t.Errorf("check in %s: %s", u, got)
		}
		if u == joints.Millimetre {
			want = got
		} else if got != want {
			t.Errorf("check in %s:\n %s\nwant (mm)\n %s", u, got, want)
		}
	}
}
