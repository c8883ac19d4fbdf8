package main

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/geom/vtk"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers/document"
)

const exampleDir = "../../examples/van-rear-crossmember"

// scaledExample writes the bundled example into a new directory with
// every length divided by u.MM(), i.e. drawn in unit u: meshes in their
// own formats, the parts table and the joint list. It returns the
// directory and the arguments that build it.
func scaledExample(t *testing.T, u joints.Unit) (string, []string) {
	t.Helper()
	f := 1 / u.MM()
	dir := t.TempDir()
	os.Mkdir(filepath.Join(dir, "mesh"), 0o755)
	args := []string{"--parts", filepath.Join(dir, "parts.yaml"), "--joints", filepath.Join(dir, "welds.csv")}
	for _, name := range []string{"floor.vtk", "beam.vtk", "closing-plate.jmesh", "bracket.jmesh"} {
		m, err := meshio.ReadMesh(filepath.Join(exampleDir, "mesh", name), geom.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		m.Scale(f)
		var b bytes.Buffer
		if strings.HasSuffix(name, ".vtk") {
			err = vtk.Write(&b, m, true)
		} else {
			err = native.Write(&b, m)
		}
		if err != nil {
			t.Fatal(err)
		}
		writeFile(t, filepath.Join(dir, "mesh"), name, b.String())
		args = append(args, "--mesh", filepath.Join(dir, "mesh", name))
	}
	parts, err := meshio.ReadParts(filepath.Join(exampleDir, "parts.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	num := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	var p strings.Builder
	p.WriteString("parts:\n")
	for _, pt := range parts {
		fmt.Fprintf(&p, "  - {id: %d, name: %q, thickness: %s, material: %s, surface: %s}\n", pt.ID, pt.Name, num(pt.Thickness*f), pt.Material, pt.Surface)
	}
	writeFile(t, dir, "parts.yaml", p.String())
	js, _, err := joints.ReadJoints(filepath.Join(exampleDir, "welds.csv"))
	if err != nil {
		t.Fatal(err)
	}
	var w strings.Builder
	w.WriteString("id,x,y,z,kind,parts,diameter,washer,hole,group\n")
	opt := func(v float64) string {
		if v == 0 {
			return ""
		}
		return num(v * f)
	}
	for _, j := range js {
		ps := make([]string, len(j.Parts))
		for i, id := range j.Parts {
			ps[i] = strconv.FormatInt(id, 10)
		}
		fmt.Fprintf(&w, "%s,%s,%s,%s,%s,%s,%s,%s,%s,%s\n", j.ID, num(j.Point.X*f), num(j.Point.Y*f), num(j.Point.Z*f),
			j.Kind, strings.Join(ps, ";"), opt(j.Diameter), opt(j.Washer), opt(j.Hole), j.Group)
	}
	writeFile(t, dir, "welds.csv", w.String())
	return dir, args
}

// buildDocs runs build and decodes its two documents.
func buildDocs(t *testing.T, args ...string) (*document.ConnectorsDoc, *document.ReportDoc) {
	t.Helper()
	out := t.TempDir()
	code, _, errs := runCLI(t, append([]string{"build", "--out", out, "--quiet", "--fail-on", "never"}, args...)...)
	if code != exitOK {
		t.Fatalf("build %v: exit %d: %s", args, code, errs)
	}
	conn := readConnectors(t, filepath.Join(out, "connectors.json"))
	rep := readReport(t, filepath.Join(out, "report.json"))
	validate(t, "connectors.schema.json", filepath.Join(out, "connectors.json"))
	validate(t, "report.schema.json", filepath.Join(out, "report.json"))
	return conn, rep
}

// The same model drawn in mm, m and in gives the same connectors, up to
// the unit's scale, and the same findings, when its unit is given: the
// rules apply in mm, and the outputs come back in the model's unit.
func TestUnitsGiveTheSameConnectors(t *testing.T) {
	skipWithoutExample(t)
	_, argsMM := scaledExample(t, joints.Millimetre)
	// Both link forms: offset links carry lengths of their own (offsets,
	// faying mismatch).
	for _, links := range []string{"gap", "offset"} {
		refConn, refRep := buildDocs(t, append(argsMM, "--links", links)...)
		if refConn.Units.Length != "mm" || refRep.Units.Length != "mm" {
			t.Fatalf("units %q, %q; want mm", refConn.Units.Length, refRep.Units.Length)
		}
		for _, u := range []joints.Unit{joints.Metre, joints.Inch} {
			t.Run(links+"/"+u.String(), func(t *testing.T) {
				_, args := scaledExample(t, u)
				conn, rep := buildDocs(t, append(args, "--units", u.String(), "--links", links)...)
				if conn.Units.Length != u.String() || rep.Units.Length != u.String() {
					t.Errorf("units recorded %q and %q, want %q", conn.Units.Length, rep.Units.Length, u)
				}
				compareConnectors(t, refConn, conn, u.MM())
				compareFindings(t, refRep, rep, u.MM())
			})
		}
	}
}

// near compares a length in mm with one in a unit of scale mm: to 1e-9
// of the larger magnitude, or 1e-9 mm near zero (values pass through a
// division and a multiplication by the scale on the way).
func near(mm, v, scale float64) bool {
	return math.Abs(mm-v*scale) <= 1e-9*math.Max(1, math.Abs(mm))
}

func compareConnectors(t *testing.T, ref, got *document.ConnectorsDoc, scale float64) {
	t.Helper()
	if len(ref.Connectors) != len(got.Connectors) || ref.IDs != got.IDs {
		t.Fatalf("%d connectors, ids %v; want %d, %v", len(got.Connectors), got.IDs, len(ref.Connectors), ref.IDs)
	}
	if !near(ref.Options.Reach, got.Options.Reach, scale) {
		t.Errorf("reach %g, want %g mm", got.Options.Reach, ref.Options.Reach)
	}
	vec := func(a, b document.Vec) bool {
		return near(a[0], b[0], scale) && near(a[1], b[1], scale) && near(a[2], b[2], scale)
	}
	for i, r := range ref.Connectors {
		g := got.Connectors[i]
		if r.ID != g.ID || r.State != g.State || strings.Join(r.Findings, ",") != strings.Join(g.Findings, ",") || len(r.Sheets) != len(g.Sheets) || len(r.Links) != len(g.Links) {
			t.Errorf("connector %s: state %s findings %v sheets %d; want %s %s %v %d", g.ID, g.State, g.Findings, len(g.Sheets), r.ID, r.State, r.Findings, len(r.Sheets))
			continue
		}
		if !vec(r.Point, g.Point) || (r.Diameter == nil) != (g.Diameter == nil) || r.Diameter != nil && !near(*r.Diameter, *g.Diameter, scale) {
			t.Errorf("connector %s: point or diameter differ", r.ID)
		}
		for k, rs := range r.Sheets {
			gs := g.Sheets[k]
			if rs.Part != gs.Part || rs.Element != gs.Element || fmt.Sprint(rs.Nodes) != fmt.Sprint(gs.Nodes) ||
				!vec(rs.Point, gs.Point) || !near(rs.Distance, gs.Distance, scale) || !near(rs.Thickness, gs.Thickness, scale) ||
				!near(rs.Position, gs.Position, scale) || !near(rs.Lateral, gs.Lateral, scale) {
				t.Errorf("connector %s sheet %d differs:\n got %+v\nwant %+v (mm)", r.ID, k, gs, rs)
			}
			for n := range rs.Weights {
				if math.Abs(rs.Weights[n]-gs.Weights[n]) > 1e-9 {
					t.Errorf("connector %s sheet %d: weight %d is %g, want %g", r.ID, k, n, gs.Weights[n], rs.Weights[n])
				}
			}
		}
		for k, rl := range r.Links {
			gl := g.Links[k]
			if rl.ID != gl.ID || !vec(rl.Start, gl.Start) || !vec(rl.End, gl.End) || !near(rl.Length, gl.Length, scale) ||
				!near(rl.ContactGap, gl.ContactGap, scale) || !near(rl.MidGap, gl.MidGap, scale) ||
				rl.SquareGap == nil || gl.SquareGap == nil || !near(*rl.SquareGap, *gl.SquareGap, scale) ||
				(rl.Mismatch == nil) != (gl.Mismatch == nil) || rl.Mismatch != nil && !near(*rl.Mismatch, *gl.Mismatch, scale) {
				t.Errorf("connector %s link %d differs:\n got %+v\nwant %+v (mm)", r.ID, k, gl, rl)
			}
		}
	}
}

func compareFindings(t *testing.T, ref, got *document.ReportDoc, scale float64) {
	t.Helper()
	if len(ref.Findings) != len(got.Findings) {
		t.Fatalf("%d findings, want %d", len(got.Findings), len(ref.Findings))
	}
	for i, r := range ref.Findings {
		g := got.Findings[i]
		// Messages state mm whatever the inputs' unit.
		if r.Code != g.Code || r.Message != g.Message || fmt.Sprint(r.Parts) != fmt.Sprint(g.Parts) {
			t.Errorf("finding %d: %s %q, want %s %q", i, g.Code, g.Message, r.Code, r.Message)
		}
		if (r.Location == nil) != (g.Location == nil) || r.Location != nil && !(near(r.Location[0], g.Location[0], scale) && near(r.Location[1], g.Location[1], scale) && near(r.Location[2], g.Location[2], scale)) {
			t.Errorf("finding %d: location %v, want %v mm", i, g.Location, r.Location)
		}
	}
}

// A model in metres or inches given as millimetres gets a units-suspect
// warning; given with its unit, or in mm, it does not.
func TestUnitsSuspect(t *testing.T) {
	skipWithoutExample(t)
	codes := func(rep *document.ReportDoc) map[string]bool {
		c := map[string]bool{}
		for _, f := range rep.Findings {
			c[f.Code] = true
		}
		return c
	}
	_, argsMM := scaledExample(t, joints.Millimetre)
	if _, rep := buildDocs(t, argsMM...); codes(rep)[joints.CodeUnitsSuspect] {
		t.Errorf("the example in mm is units-suspect")
	}
	for _, u := range []joints.Unit{joints.Metre, joints.Inch} {
		_, args := scaledExample(t, u)
		if _, rep := buildDocs(t, args...); !codes(rep)[joints.CodeUnitsSuspect] {
			t.Errorf("the example in %s read as mm: no units-suspect finding", u)
		}
		if _, rep := buildDocs(t, append(args, "--units", u.String())...); codes(rep)[joints.CodeUnitsSuspect] {
			t.Errorf("the example in %s read as %s is units-suspect", u, u)
		}
	}
}

// units: in the job file works like --units, a bad unit is an error at
// its line, and a bad --units is bad usage.
func TestUnitsInJobFile(t *testing.T) {
	skipWithoutExample(t)
	dir, _ := scaledExample(t, joints.Metre)
	job := "version: 1\nmeshes: [mesh/floor.vtk, mesh/beam.vtk, mesh/closing-plate.jmesh, mesh/bracket.jmesh]\nparts: parts.yaml\njoints: [welds.csv]\nunits: m\n"
	p := writeFile(t, dir, "job.yaml", job)
	conn, rep := buildDocs(t, p)
	if conn.Units.Length != "m" {
		t.Errorf("units %q, want m", conn.Units.Length)
	}
	for _, f := range rep.Findings {
		if f.Code == joints.CodeUnitsSuspect {
			t.Errorf("units: m in the job file: %s", f.Message)
		}
	}
	bad := writeFile(t, dir, "bad.yaml", strings.Replace(job, "units: m", "units: km", 1))
	if code, _, errs := runCLI(t, "build", bad, "--quiet", "--out", t.TempDir()); code != exitBadInput || !strings.Contains(errs, "bad.yaml:5: units") {
		t.Errorf("units: km: exit %d, %s", code, errs)
	}
	if code, _, errs := runCLI(t, "build", p, "--units", "ft", "--quiet", "--out", t.TempDir()); code != exitBadInput || !strings.Contains(errs, `unknown unit "ft"`) {
		t.Errorf("--units ft: exit %d, %s", code, errs)
	}
}

// --units mm is the default: the same outputs, the same run id.
func TestUnitsMMIsTheDefault(t *testing.T) {
	skipWithoutExample(t)
	a, _ := buildDocs(t, exampleJob)
	b, _ := buildDocs(t, exampleJob, "--units", "mm")
	if a.RunID != b.RunID {
		t.Errorf("run ids %s and %s", a.RunID, b.RunID)
	}
}

// check reads back a connectors.json written in metres: checking the
// example built in m with --units m finds what checking it in mm finds.
func TestCheckReadsUnits(t *testing.T) {
	skipWithoutExample(t)
	codesOf := func(u joints.Unit) []string {
		_, args := scaledExample(t, u)
		args = append(args, "--units", u.String())
		built := t.TempDir()
		if code, _, errs := runCLI(t, append([]string{"build", "--out", built, "--quiet", "--fail-on", "never"}, args...)...); code != exitOK {
			t.Fatalf("build in %s: exit %d: %s", u, code, errs)
		}
		out := t.TempDir()
		chk := append([]string{"check", "--connectors", filepath.Join(built, "connectors.json"), "--out", out, "--quiet", "--fail-on", "never"}, args...)
		for i := 0; i < len(chk); i++ { // check takes no joint lists here
			if chk[i] == "--joints" {
				chk = append(chk[:i], chk[i+2:]...)
				break
			}
		}
		if code, _, errs := runCLI(t, chk...); code != exitOK {
			t.Fatalf("check in %s: exit %d: %s", u, code, errs)
		}
		rep := readReport(t, filepath.Join(out, "report.json"))
		var codes []string
		for _, fd := range rep.Findings {
			codes = append(codes, fmt.Sprint(fd.Joint != nil && *fd.Joint != "", ":", fd.Code, fd.Joints))
		}
		return codes
	}
	mm, m := codesOf(joints.Millimetre), codesOf(joints.Metre)
	if strings.Join(mm, " ") != strings.Join(m, " ") {
		t.Errorf("check in m found\n %v\nin mm\n %v", m, mm)
	}
}
