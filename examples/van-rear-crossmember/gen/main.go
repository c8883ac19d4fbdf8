// Command gen writes the bundled van-rear-crossmember example: an invented
// rear cross-member of a small electric delivery van, meshed on
// mid-surfaces, with its parts table, joint list and job file.
//
// Run it from the repository root:
//
//	go run ./examples/van-rear-crossmember/gen
//
// It writes, in -out (default examples/van-rear-crossmember):
// mesh/floor.vtk (binary legacy VTK), mesh/beam.vtk (ASCII legacy VTK),
// mesh/closing-plate.jmesh, mesh/bracket.jmesh, parts.yaml, welds.csv and
// job.yaml. The output depends on nothing but this program.
//
// Frame: x points rearward, y to the left, z up, in mm; the origin lies on
// the floor's mid-surface under the middle of the cross-member, which runs
// along y.
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/examples/internal/exio"
	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/geom/vtk"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers"
)

// Sheet thicknesses, mm.
const (
	tFloor   = 0.8
	tBeam    = 1.5
	tPlate   = 1.2
	tBracket = 3.0
)

// Part ids; node and element ids of part p start at p*1000+1.
const (
	partFloor   = 100
	partBeam    = 200
	partPlate   = 300
	partBracket = 400
)

// Cross-member geometry, mm.
const (
	halfLen   = 180.0 // the beam runs over y in [-halfLen, halfLen]
	flangeOut = 60.0  // flange outer edges at x = -/+flangeOut
	flangeW   = 20.0  // flange width
	webRise   = 55.0  // height of the hat's top above its flanges
	webLean   = 10.0  // the webs lean inwards by this much over webRise
	plateLen  = 60.0  // closing plates cover |y| in [halfLen-plateLen, halfLen]
	plateHalf = 66.0  // closing plates span x in [-plateHalf, plateHalf]
	rampLen   = 10.0  // the beam steps up over the closing plates over this length
	rampGap   = 2.0   // between the end of the step and the plate's inner edge
	margin    = 12.0  // weld to the end of a sheet of its stack
	pitch     = 30.0  // weld pitch (car-body pitch 25 to 40 mm, common practice)
)

// Heights of the mid-surfaces: sheets in contact have their mid-surfaces
// (t1+t2)/2 apart.
const (
	zFlange    = (tFloor + tBeam) / 2                   // beam flange on the floor
	zPlate     = (tFloor + tPlate) / 2                  // closing plate on the floor
	zFlangeEnd = zPlate + (tPlate+tBeam)/2              // beam flange on a closing plate
	bracketOff = (tBeam + tBracket) / 2                 // bracket off the rear web
	xWeld      = flangeOut - flangeW/2                  // weld line x
	yStepEnd   = halfLen - plateLen - rampGap           // |y| where the beam reaches zFlangeEnd
	yStepStart = halfLen - plateLen - rampGap - rampLen // |y| where the beam leaves zFlange
)

// Bolts: M10 with a plain washer of 20 mm outer diameter (ISO 7089) in
// clearance holes of 11 mm (ISO 273, medium series).
const (
	boltD      = 10.0
	boltWasher = 20.0
	boltHole   = 11.0
	// The holes are meshed, 11 mm across, except the bracket's hole at
	// the second bolt, drilled 12 mm (ISO 273, coarse series) to take up
	// the bracket's tolerances: the list's 11 mm for it is off (the build
	// reports hole-size).
	boltHoleWide = 12.0
	boltU        = 31.0 // up the rear web
	holeHalf     = 13.0 // mm: the O-grid replaces the cells within this of the axis
)

// boltYs are the bolts' y positions.
var boltYs = []float64{-25, 25}

// boltHoles returns the holes of the bolts in the sheet offset off from
// the rear web's mid-surface, the second wide when wide is set.
func boltHoles(off float64, wide bool) []hole {
	var hs []hole
	for i, y := range boltYs {
		c, _ := rearWeb(boltU, y, off)
		a, _ := rearWeb(boltU+1, y, off)
		r := boltHole / 2
		if wide && i == 1 {
			r = boltHoleWide / 2
		}
		hs = append(hs, hole{centre: c, e1: r3.Vec{Y: 1}, e2: r3.Sub(a, c), half: holeHalf, radius: r})
	}
	return hs
}

// scenario is the whole example in memory.
type scenario struct {
	floor, beam, plate, bracket *geom.Mesh
	parts                       []geom.Part
	joints                      []joints.Joint
	stacks                      [][]int64 // aligned with joints, in +z (or +web-normal) order
}

func main() {
	fs := flag.NewFlagSet("gen", flag.ContinueOnError)
	out := fs.String("out", filepath.Join("examples", "van-rear-crossmember"), "folder to write the example into")
	if err := fs.Parse(os.Args[1:]); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return
		}
		os.Exit(2)
	}
	s, err := build()
	if err == nil {
		err = write(s, *out)
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "gen:", err)
		os.Exit(1)
	}
}

// write writes the files of s into dir.
func write(s *scenario, dir string) error {
	if err := os.MkdirAll(filepath.Join(dir, "mesh"), 0o755); err != nil {
		return err
	}
	files := []struct {
		name  string
		write func(io.Writer) error
	}{
		{"mesh/floor.vtk", func(w io.Writer) error { return vtk.Write(w, s.floor, true) }},
		{"mesh/beam.vtk", func(w io.Writer) error { return vtk.Write(w, s.beam, false) }},
		{"mesh/closing-plate.jmesh", func(w io.Writer) error { return native.Write(w, s.plate) }},
		{"mesh/bracket.jmesh", func(w io.Writer) error { return native.Write(w, s.bracket) }},
		{"parts.yaml", func(w io.Writer) error {
			return exio.WriteParts(w, s.parts, "Parts of the van-rear-crossmember example (invented). Thickness in mm.\n"+
				"Written by go run ./examples/van-rear-crossmember/gen")
		}},
		{"welds.csv", func(w io.Writer) error {
			return exio.WriteJoints(w, s.joints, "Joining plan of the van-rear-crossmember example (invented); mm.\n"+
				"Spot welds at 30 mm pitch; end-stack welds go through floor, closing plate and beam.\n"+
				"Bolts M10: washer 20 mm (ISO 7089), hole 11 mm (ISO 273 medium).\n"+
				"Written by go run ./examples/van-rear-crossmember/gen")
		}},
		{"job.yaml", func(w io.Writer) error { _, err := io.WriteString(w, jobYAML); return err }},
		{"sweep.yaml", func(w io.Writer) error { _, err := io.WriteString(w, sweepYAML); return err }},
	}
	for _, f := range files {
		if err := writers.WriteFileAtomic(filepath.Join(dir, filepath.FromSlash(f.name)), f.write); err != nil {
			return err
		}
	}
	return nil
}

const jobYAML = `# joinery job, version 1: the van-rear-crossmember example (invented).
# Written by go run ./examples/van-rear-crossmember/gen
version: 1
meshes: [mesh/floor.vtk, mesh/beam.vtk, mesh/closing-plate.jmesh, mesh/bracket.jmesh]
parts: parts.yaml
joints: [welds.csv]
out: out
build:
  attach: interpolated
`

// sweepYAML is the example's sensitivity sweep (joinery sweep): the
// job with a sweep section, bolt rotational release by attachment form.
const sweepYAML = `# joinery job, version 1: a sensitivity sweep of the van-rear-crossmember
# example (invented): the towing-eye bolts' rotations coupled or released,
# by the spot welds' attachment form.
# Written by go run ./examples/van-rear-crossmember/gen
version: 1
meshes: [mesh/floor.vtk, mesh/beam.vtk, mesh/closing-plate.jmesh, mesh/bracket.jmesh]
parts: parts.yaml
joints: [welds.csv]
out: out-sweep
sweep:
  vary:
    bolt_dofs: [tx+ty+tz+rx+ry+rz, tx+ty+tz]
    attach: [interpolated, patch]
`

// grid is a structured patch of quads: node (i, j) sits at at(i, j) for
// i in [0, nu], j in [0, nv].
type grid struct {
	nu, nv int
	at     func(i, j int) r3.Vec
	// split reports the quads (i, j) drawn as two triangles.
	split func(i, j int) bool
	// holes are meshed into the patch.
	holes []hole
}

// hole is a circular hole meshed into a grid: the quads whose corners
// all lie within half of the centre along E1 and E2 (the grid's two
// directions there, unit) and within 1 mm of its plane are replaced by an O-grid of holeLayers rings
// of quads from the window's edge to the circle of the hole's radius.
// Every node of the hole's edge lies on the circle (to the 0.001 mm the
// coordinates are rounded to), at the angles of the window's edge nodes.
type hole struct {
	centre, e1, e2 r3.Vec
	half, radius   float64
}

// holeLayers is the number of rings of quads round a meshed hole.
const holeLayers = 2

// meshOf builds a one-part mesh from patches (which share no nodes), with
// node and element ids from part*1000+1.
func meshOf(p geom.Part, patches ...grid) (*geom.Mesh, error) {
	m := &geom.Mesh{Parts: []geom.Part{p}, ElemStart: []int32{0}}
	base := p.ID * 1000
	addElem := func(ns ...int32) {
		m.ElemIDs = append(m.ElemIDs, base+int64(len(m.ElemIDs))+1)
		m.ElemPart = append(m.ElemPart, 0)
		m.Conn = append(m.Conn, ns...)
		m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
	}
	for _, g := range patches {
		first := int32(len(m.Coords))
		for i := 0; i <= g.nu; i++ {
			for j := 0; j <= g.nv; j++ {
				v := g.at(i, j)
				m.Coords = append(m.Coords, r3.Vec{X: round3(v.X), Y: round3(v.Y), Z: round3(v.Z)})
				m.NodeIDs = append(m.NodeIDs, base+int64(len(m.NodeIDs))+1)
			}
		}
		node := func(i, j int) int32 { return first + int32(i*(g.nv+1)+j) }
		windows := make([][4]int, len(g.holes)) // i0, i1, j0, j1 per hole
		inWindow := func(i, j int) bool {
			for _, w := range windows {
				if i >= w[0] && i < w[1] && j >= w[2] && j < w[3] {
					return true
				}
			}
			return false
		}
		for h, ho := range g.holes {
			w, err := holeWindow(g, ho)
			if err != nil {
				return nil, fmt.Errorf("meshing %s: %w", p.Name, err)
			}
			windows[h] = w
		}
		for i := range g.nu {
			for j := range g.nv {
				if inWindow(i, j) {
					continue
				}
				a, b, c, d := node(i, j), node(i+1, j), node(i+1, j+1), node(i, j+1)
				if g.split != nil && g.split(i, j) {
					addElem(a, b, c)
					addElem(a, c, d)
					continue
				}
				addElem(a, b, c, d)
			}
		}
		for h, ho := range g.holes {
			w := windows[h]
			// The window's edge nodes, once round.
			var edge []int32
			for i := w[0]; i < w[1]; i++ {
				edge = append(edge, node(i, w[2]))
			}
			for j := w[2]; j < w[3]; j++ {
				edge = append(edge, node(w[1], j))
			}
			for i := w[1]; i > w[0]; i-- {
				edge = append(edge, node(i, w[3]))
			}
			for j := w[3]; j > w[2]; j-- {
				edge = append(edge, node(w[0], j))
			}
			// rings[l][k]: layer l (0 the window's edge, holeLayers the
			// hole's) on the ray through edge node k.
			rings := [][]int32{edge}
			for l := 1; l <= holeLayers; l++ {
				f := float64(l) / holeLayers
				var ring []int32
				for _, n := range edge {
					v := r3.Sub(m.Coords[n], ho.centre)
					v = r3.Add(r3.Scale(r3.Dot(v, ho.e1), ho.e1), r3.Scale(r3.Dot(v, ho.e2), ho.e2)) // in the plane
					d := r3.Norm(v)
					q := r3.Add(ho.centre, r3.Scale((d+(ho.radius-d)*f)/d, v))
					ring = append(ring, int32(len(m.Coords)))
					m.Coords = append(m.Coords, r3.Vec{X: round3(q.X), Y: round3(q.Y), Z: round3(q.Z)})
					m.NodeIDs = append(m.NodeIDs, base+int64(len(m.NodeIDs))+1)
				}
				rings = append(rings, ring)
			}
			// The grid's quads turn from e_i to e_j; the ring's quads
			// turn the same way when the edge runs that way round.
			n := len(edge)
			for l := range holeLayers {
				for k := range n {
					a, b := rings[l][k], rings[l][(k+1)%n]
					c, d := rings[l+1][(k+1)%n], rings[l+1][k]
					addElem(a, b, c, d)
				}
			}
		}
	}
	m.Sources = []geom.Source{{File: p.Name}}
	if err := m.Index(); err != nil {
		return nil, fmt.Errorf("meshing %s: %w", p.Name, err)
	}
	return m, nil
}

// holeWindow returns the cells of g (i0, i1, j0, j1: cells i0 to i1-1
// by j0 to j1-1) that a hole replaces: those whose corners all lie
// within ho.half of its centre along its directions (and in its plane). They must form a
// rectangle round the hole, with the hole inside.
func holeWindow(g grid, ho hole) ([4]int, error) {
	within := func(i, j int) bool {
		v := r3.Sub(g.at(i, j), ho.centre)
		n := r3.Cross(ho.e1, ho.e2)
		return math.Abs(r3.Dot(v, ho.e1)) <= ho.half && math.Abs(r3.Dot(v, ho.e2)) <= ho.half && math.Abs(r3.Dot(v, n)) < 1
	}
	w := [4]int{g.nu, 0, g.nv, 0}
	count := 0
	for i := range g.nu {
		for j := range g.nv {
			if within(i, j) && within(i+1, j) && within(i+1, j+1) && within(i, j+1) {
				w = [4]int{min(w[0], i), max(w[1], i+1), min(w[2], j), max(w[3], j+1)}
				count++
			}
		}
	}
	if count == 0 || count != (w[1]-w[0])*(w[3]-w[2]) || w[1]-w[0] < 2 || w[3]-w[2] < 2 {
		return w, fmt.Errorf("hole at %v: the cells within %g mm form no rectangle of 2 x 2 or more (%d cells in %v)", ho.centre, ho.half, count, w)
	}
	return w, nil
}

func round3(v float64) float64 { return math.Round(v*1000) / 1000 }

// stations returns n+1 evenly spaced values from a to b.
func stations(a, b float64, n int) []float64 {
	s := make([]float64, n+1)
	for i := range s {
		s[i] = a + (b-a)*float64(i)/float64(n)
	}
	return s
}

// concat joins station lists that share their end points.
func concat(lists ...[]float64) []float64 {
	out := lists[0]
	for _, l := range lists[1:] {
		out = append(out, l[1:]...)
	}
	return out
}

// beamLift returns the height of the beam's flange mid-surface at y: on
// the floor in the middle, stepped up onto the closing plates at the ends.
func beamLift(y float64) float64 {
	a := math.Abs(y)
	switch {
	case a <= yStepStart:
		return zFlange
	case a >= yStepEnd:
		return zFlangeEnd
	}
	return zFlange + (zFlangeEnd-zFlange)*(a-yStepStart)/rampLen
}

// hatSection returns the beam's cross-section from the front flange's
// outer edge to the rear flange's outer edge, as (x, z above the flange)
// points with the number of elements on each segment.
func hatSection() (pts [][2]float64, divs []int) {
	xi := flangeOut - flangeW // flange inner edge
	pts = [][2]float64{
		{-flangeOut, 0}, {-xi, 0}, {-xi + webLean, webRise}, {xi - webLean, webRise}, {xi, 0}, {flangeOut, 0},
	}
	divs = []int{3, 9, 10, 9, 3}
	return pts, divs
}

// rearWeb returns the point at distance u up the rear web from the rear
// flange's inner edge, at lateral position y, offset by off along the
// web's outward normal, and that normal.
func rearWeb(u, y, off float64) (r3.Vec, r3.Vec) {
	xi := flangeOut - flangeW
	l := math.Hypot(webLean, webRise)
	dir := r3.Vec{X: -webLean / l, Z: webRise / l}
	n := r3.Vec{X: webRise / l, Z: webLean / l}
	p := r3.Vec{X: xi, Y: y, Z: zFlange}
	return r3.Add(p, r3.Add(r3.Scale(u, dir), r3.Scale(off, n))), n
}

// build makes the whole scenario.
func build() (*scenario, error) {
	s := &scenario{parts: []geom.Part{
		{ID: partFloor, Name: "rear floor panel", Thickness: tFloor, Material: "DC04"},
		{ID: partBeam, Name: "rear cross-member", Thickness: tBeam, Material: "HC340LA"},
		{ID: partPlate, Name: "cross-member closing plates", Thickness: tPlate, Material: "HC260LA"},
		{ID: partBracket, Name: "towing-eye bracket", Thickness: tBracket, Material: "S355MC"},
	}}

	// Floor: flat, 8 mm quads, a few triangles near one corner.
	fx, fy := stations(-84, 84, 21), stations(-214, 214, 53)
	var err error
	if s.floor, err = meshOf(s.parts[0], grid{nu: len(fy) - 1, nv: len(fx) - 1,
		at:    func(i, j int) r3.Vec { return r3.Vec{X: fx[j], Y: fy[i]} },
		split: func(i, j int) bool { return i < 3 && j >= 15 && (i+j)%2 == 0 },
	}); err != nil {
		return nil, err
	}

	// Beam: a hat section along y, about 6 mm quads, stepped up over the
	// closing plates at both ends; nodes at the ends of each step.
	ys := concat(
		stations(-halfLen, -yStepEnd, 10), stations(-yStepEnd, -yStepStart, 2),
		stations(-yStepStart, yStepStart, 36),
		stations(yStepStart, yStepEnd, 2), stations(yStepEnd, halfLen, 10))
	pts, divs := hatSection()
	var sx, sz []float64
	for k, n := range divs {
		for i := range n {
			f := float64(i) / float64(n)
			sx = append(sx, pts[k][0]+(pts[k+1][0]-pts[k][0])*f)
			sz = append(sz, pts[k][1]+(pts[k+1][1]-pts[k][1])*f)
		}
	}
	sx, sz = append(sx, pts[len(pts)-1][0]), append(sz, pts[len(pts)-1][1])
	if s.beam, err = meshOf(s.parts[1], grid{nu: len(ys) - 1, nv: len(sx) - 1,
		at:    func(i, j int) r3.Vec { return r3.Vec{X: sx[j], Y: ys[i], Z: beamLift(ys[i]) + sz[j]} },
		holes: boltHoles(0, false),
	}); err != nil {
		return nil, err
	}

	// Closing plates: flat on the floor under both ends of the beam.
	px := stations(-plateHalf, plateHalf, 24)
	plate := func(y0, y1 float64) grid {
		py := stations(y0, y1, 10)
		return grid{nu: len(py) - 1, nv: len(px) - 1,
			at: func(i, j int) r3.Vec { return r3.Vec{X: px[j], Y: py[i], Z: zPlate} }}
	}
	if s.plate, err = meshOf(s.parts[2], plate(-halfLen, -halfLen+plateLen), plate(halfLen-plateLen, halfLen)); err != nil {
		return nil, err
	}

	// Towing-eye bracket: a plate on the rear web from 12 to 50 mm up it,
	// then a leg running rearwards from its top edge.
	const u0, u1, leg = 12.0, 50.0, 40.0
	by := stations(-50, 50, 20)
	top, _ := rearWeb(u1, 0, bracketOff)
	if s.bracket, err = meshOf(s.parts[3], grid{nu: len(by) - 1, nv: 16,
		at: func(i, j int) r3.Vec {
			if j <= 8 {
				p, _ := rearWeb(u0+(u1-u0)*float64(j)/8, by[i], bracketOff)
				return p
			}
			return r3.Vec{X: top.X + leg*float64(j-8)/8, Y: by[i], Z: top.Z}
		},
		holes: boltHoles(bracketOff, true),
	}); err != nil {
		return nil, err
	}
	s.addJoints()
	return s, nil
}

// addJoints lays out the joining plan: 2-sheet welds along both flanges
// between the steps, 3-sheet welds through the closing plates at both
// ends, and two bolts through the rear web and the bracket.
func (s *scenario) addJoints() {
	n := 0
	spot := func(x, y, z float64, group string, stack []int64, listed bool, d float64) {
		n++
		j := joints.Joint{ID: fmt.Sprintf("W%d", n), Point: r3.Vec{X: round3(x), Y: round3(y), Z: round3(z)}, Group: group, Diameter: d}
		if listed {
			j.Parts = stack
		}
		s.joints = append(s.joints, j)
		s.stacks = append(s.stacks, stack)
	}
	two := []int64{partFloor, partBeam}
	three := []int64{partFloor, partPlate, partBeam}
	// Middle: |y| <= yStepStart - margin, stations centred at the pitch.
	span := 2 * (yStepStart - margin)
	k := int(math.Floor(span/pitch)) + 1
	y0 := -(float64(k-1) * pitch) / 2
	for side, group := range []string{"flange-front", "flange-rear"} {
		x := xWeld * float64(2*side-1)
		for i := range k {
			spot(x, y0+float64(i)*pitch, zFlange/2, group, two, i == k/2, 0)
		}
	}
	// Ends: through floor, closing plate and beam flange, point mid-way
	// between the floor and flange mid-surfaces. Nugget 5*sqrt(t) with t
	// the governing (second thickest, AWS D8.1M) sheet, 1.2 mm: 5.5 mm
	// (common practice).
	lo, hi := halfLen-plateLen+margin, halfLen-margin
	ke := int(math.Floor((hi-lo)/pitch)) + 1
	start := lo + (hi-lo-float64(ke-1)*pitch)/2
	for _, sy := range []float64{-1, 1} {
		for _, sx := range []float64{-1, 1} {
			for i := range ke {
				y := sy * (start + float64(i)*pitch)
				spot(sx*xWeld, y, zFlangeEnd/2, "end-stack", three, i == ke-1, 5.5)
			}
		}
	}
	// Bolts through the rear web and the bracket, 31 mm up the web, the
	// point mid-way between their mid-surfaces.
	for i, y := range boltYs {
		p, _ := rearWeb(boltU, y, bracketOff/2)
		s.joints = append(s.joints, joints.Joint{
			ID: fmt.Sprintf("B%d", i+1), Kind: joints.Bolt, Point: r3.Vec{X: round3(p.X), Y: round3(p.Y), Z: round3(p.Z)},
			Parts: []int64{partBeam, partBracket}, Diameter: boltD, Washer: boltWasher, Hole: boltHole, Group: "tow-eye",
		})
		s.stacks = append(s.stacks, []int64{partBeam, partBracket})
	}
}
