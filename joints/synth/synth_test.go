package synth

import (
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// hashModel returns a digest of everything in a model.
func hashModel(m *Model) string {
	h := sha256.New()
	put := func(vs ...any) {
		for _, v := range vs {
			if err := binary.Write(h, binary.LittleEndian, v); err != nil {
				panic(err)
			}
		}
	}
	str := func(s string) { put(int64(len(s))); h.Write([]byte(s)) }
	me := m.Mesh
	for _, p := range me.Parts {
		put(p.ID, p.Thickness, int8(p.Surface))
		str(p.Name)
		str(p.Material)
	}
	put(me.NodeIDs, me.Coords, me.ElemIDs, me.ElemPart, me.ElemStart, me.Conn)
	for i, j := range m.Joints {
		str(j.ID)
		str(j.Group)
		put(int8(j.Kind), j.Point, j.Parts, j.Diameter, j.Washer, j.Hole, m.Stacks[i], m.Normals[i])
	}
	put(m.Pitch)
	return fmt.Sprintf("%x", h.Sum(nil))
}

func mustGenerate(t testing.TB, cfg Config) *Model {
	t.Helper()
	m, err := Generate(cfg)
	if err != nil {
		t.Fatalf("Generate(%+v): %v", cfg, err)
	}
	return m
}

func TestDeterministic(t *testing.T) {
	cfg := Config{Elements: 30_000, Welds: 100, Bolts: 3, Seed: 7}
	a, b := mustGenerate(t, cfg), mustGenerate(t, cfg)
	if ha, hb := hashModel(a), hashModel(b); ha != hb {
		t.Errorf("same config, different models: %s vs %s", ha, hb)
	}
	cfg.Seed = 8
	if hc := hashModel(mustGenerate(t, cfg)); hc == hashModel(a) {
		t.Errorf("seeds 7 and 8 give the same model")
	}
}

func TestCounts(t *testing.T) {
	for _, cfg := range []Config{
		{Elements: 5_000, Welds: 10, Seed: 1},
		{Elements: 20_000, Welds: 60, Bolts: 2, Seed: 2},
		{Elements: 60_000, Welds: 200, Bolts: 5, Seed: 3},
		{Elements: 100_000, Welds: 0, Seed: 4},
		{Elements: 100_000, Welds: 300, Bolts: 10, Seed: 5, ElementSize: 4},
		{Elements: 150_000, Welds: 20, Seed: 6},
		{Elements: 150_000, Welds: 1500, Seed: 6, ElementSize: 8},
	} {
		t.Run(fmt.Sprintf("%d_%d_%d", cfg.Elements, cfg.Welds, cfg.Bolts), func(t *testing.T) {
			m := mustGenerate(t, cfg)
			if n := m.Mesh.NumElems(); math.Abs(float64(n)/float64(cfg.Elements)-1) > 0.05 {
				t.Errorf("%d elements, want %d within 5%%", n, cfg.Elements)
			}
			var spots, bolts, three int
			for i, j := range m.Joints {
				if j.Kind == joints.Bolt {
					bolts++
				} else {
					spots++
					if len(m.Stacks[i]) == 3 {
						three++
					}
				}
			}
			if spots != cfg.Welds || bolts != cfg.Bolts {
				t.Errorf("%d welds and %d bolts, want %d and %d", spots, bolts, cfg.Welds, cfg.Bolts)
			}
			if cfg.Welds > 0 && (m.Pitch < MinPitch || m.Pitch > MaxPitch) {
				t.Errorf("pitch %g outside %g..%g", m.Pitch, MinPitch, MaxPitch)
			}
			// About Elements/5000 main parts, plus doublers (a few) and a
			// link plate between consecutive assemblies (Elements/10000).
			if want, got := max(2, float64(cfg.Elements)/5000), float64(len(m.Mesh.Parts)); got < 0.8*want || got > 2*want+1 {
				t.Errorf("%v parts, want about %v", got, want)
			}
			if cfg.Welds >= 200 {
				// About a tenth through three sheets (the layout's goal).
				if share := float64(three) / float64(spots); share < 0.04 || share > 0.25 {
					t.Errorf("%.3f of the welds are three-sheet stacks, want about 0.1", share)
				}
			}
			t.Logf("%d elements, %d nodes, %d parts, %d welds (%d three-sheet), %d bolts, pitch %g",
				m.Mesh.NumElems(), m.Mesh.NumNodes(), len(m.Mesh.Parts), spots, three, bolts, m.Pitch)
		})
	}
}

func TestUniqueIDs(t *testing.T) {
	m := mustGenerate(t, Config{Elements: 40_000, Welds: 120, Bolts: 4, Seed: 11})
	for _, c := range []struct {
		name string
		ids  []int64
	}{{"node", m.Mesh.NodeIDs}, {"element", m.Mesh.ElemIDs}} {
		seen := make(map[int64]bool, len(c.ids))
		for _, id := range c.ids {
			if id <= 0 || seen[id] {
				t.Fatalf("%s id %d repeated or not positive", c.name, id)
			}
			seen[id] = true
		}
	}
	parts := map[int64]bool{}
	for _, p := range m.Mesh.Parts {
		if parts[p.ID] {
			t.Errorf("part id %d repeated", p.ID)
		}
		parts[p.ID] = true
	}
	ids := map[string]bool{}
	for _, j := range m.Joints {
		if ids[j.ID] {
			t.Errorf("joint id %q repeated", j.ID)
		}
		ids[j.ID] = true
	}
	// Ids of a part start at part*1,000,000 (package documentation).
	for e, id := range m.Mesh.ElemIDs {
		if p := m.Mesh.Part(e).ID; id/1_000_000 != p {
			t.Fatalf("element %d of part %d", id, p)
		}
	}
}

func TestParts(t *testing.T) {
	m := mustGenerate(t, Config{Elements: 80_000, Welds: 250, Seed: 12})
	gauges := []float64{0.7, 0.8, 1.0, 1.2, 1.5, 2.0} // the layout's gauges (package documentation)
	thick := map[int64]float64{}
	for _, p := range m.Mesh.Parts {
		if !slices.Contains(gauges, p.Thickness) || p.Name == "" || p.Material == "" || p.Surface != geom.SurfaceMid {
			t.Errorf("part %+v", p)
		}
		thick[p.ID] = p.Thickness
	}
	var tris int
	for e := range m.Mesh.NumElems() {
		if m.Mesh.Type(e) == geom.Tri3 {
			tris++
		}
	}
	if tris == 0 || tris > m.Mesh.NumElems()/10 {
		t.Errorf("%d triangles in %d elements, want a few", tris, m.Mesh.NumElems())
	}
	for i, st := range m.Stacks {
		lo, hi := math.Inf(1), 0.0
		for _, p := range st {
			lo, hi = min(lo, thick[p]), max(hi, thick[p])
		}
		// Thickness ratio at most 3:1 (ISO 14373, scope).
		if hi > 3*lo {
			t.Errorf("joint %s: stack %v has thickness ratio %g", m.Joints[i].ID, st, hi/lo)
		}
	}
}

// closestOnTriangle returns the point of triangle abc closest to p, by
// the region-based method of C. Ericson, Real-Time Collision Detection
// (2005), section 5.1.5.
func closestOnTriangle(p, a, b, c r3.Vec) r3.Vec {
	ab, ac, ap := r3.Sub(b, a), r3.Sub(c, a), r3.Sub(p, a)
	d1, d2 := r3.Dot(ab, ap), r3.Dot(ac, ap)
	if d1 <= 0 && d2 <= 0 {
		return a
	}
	bp := r3.Sub(p, b)
	d3, d4 := r3.Dot(ab, bp), r3.Dot(ac, bp)
	if d3 >= 0 && d4 <= d3 {
		return b
	}
	vc := d1*d4 - d3*d2
	if vc <= 0 && d1 >= 0 && d3 <= 0 {
		return r3.Add(a, r3.Scale(d1/(d1-d3), ab))
	}
	cp := r3.Sub(p, c)
	d5, d6 := r3.Dot(ab, cp), r3.Dot(ac, cp)
	if d6 >= 0 && d5 <= d6 {
		return c
	}
	vb := d5*d2 - d1*d6
	if vb <= 0 && d2 >= 0 && d6 <= 0 {
		return r3.Add(a, r3.Scale(d2/(d2-d6), ac))
	}
	va := d3*d6 - d5*d4
	if va <= 0 && d4-d3 >= 0 && d5-d6 >= 0 {
		w := (d4 - d3) / ((d4 - d3) + (d5 - d6))
		return r3.Add(b, r3.Scale(w, r3.Sub(c, b)))
	}
	denom := 1 / (va + vb + vc)
	v, w := vb*denom, vc*denom
	return r3.Add(a, r3.Add(r3.Scale(v, ab), r3.Scale(w, ac)))
}

// closestOnPart returns the point of part pi's elements closest to p, by
// brute force over the triangles of every element (quads are flat here).
func closestOnPart(m *geom.Mesh, pi int32, p r3.Vec) (r3.Vec, float64) {
	best, bestD := r3.Vec{}, math.Inf(1)
	for e := range m.NumElems() {
		if m.ElemPart[e] != pi {
			continue
		}
		ns := m.ElemNodes(e)
		for k := 1; k+1 < len(ns); k++ {
			q := closestOnTriangle(p, m.Coords[ns[0]], m.Coords[ns[k]], m.Coords[ns[k+1]])
			if d := r3.Norm(r3.Sub(q, p)); d < bestD {
				best, bestD = q, d
			}
		}
	}
	return best, bestD
}

// freeEdges returns the edges of part pi used by one element only.
func freeEdges(m *geom.Mesh, pi int32) [][2]int32 {
	count := map[[2]int32]int{}
	for e := range m.NumElems() {
		if m.ElemPart[e] != pi {
			continue
		}
		ns := m.ElemNodes(e)
		for k := range ns {
			a, b := ns[k], ns[(k+1)%len(ns)]
			count[[2]int32{min(a, b), max(a, b)}]++
		}
	}
	var out [][2]int32
	for e, n := range count {
		if n == 1 {
			out = append(out, e)
		}
	}
	return out
}

// TestStacks checks every joint of small models against the mesh by
// brute force: the sheets of its stack lie within half the stack's
// thickness along the normal, in order and in contact, no other sheet is
// near, and no free edge of a stack sheet is closer than 8 mm.
func TestStacks(t *testing.T) {
	for _, cfg := range []Config{
		{Elements: 20_000, Welds: 70, Bolts: 3, Seed: 21},
		{Elements: 30_000, Welds: 80, Bolts: 2, Seed: 22, ElementSize: 6},
		{Elements: 10_000, Welds: 30, Seed: 23},
	} {
		t.Run(fmt.Sprint(cfg.Seed), func(t *testing.T) { checkStacks(t, cfg) })
	}
}

// checkStacks generates the model of cfg and checks every joint by brute
// force.
func checkStacks(t *testing.T, cfg Config) {
	t.Helper()
	m := mustGenerate(t, cfg)
	me := m.Mesh
	free := map[int32][][2]int32{}
	for i, j := range m.Joints {
		stack, n := m.Stacks[i], m.Normals[i]
		if math.Abs(r3.Norm(n)-1) > 1e-9 {
			t.Fatalf("joint %s: normal %v is not a unit vector", j.ID, n)
		}
		var total float64
		for _, id := range stack {
			pi, _ := me.PartIndex(id)
			total += me.Parts[pi].Thickness
		}
		var offs []float64
		for k := range me.Parts {
			pi := int32(k)
			id := me.Parts[pi].ID
			_, d := closestOnPart(me, pi, j.Point)
			if !slices.Contains(stack, id) {
				if d < total/2+2 {
					t.Errorf("joint %s: part %d not in stack %v is %.3f mm away", j.ID, id, stack, d)
				}
				continue
			}
			// Within half the stack's thickness, (t1+t2)/2 for two
			// sheets, plus 0.1 mm for the rounding of coordinates.
			if d > total/2+0.1 {
				t.Errorf("joint %s: stack part %d is %.3f mm away, want <= %.3f", j.ID, id, d, total/2+0.1)
			}
			if _, ok := free[pi]; !ok {
				free[pi] = freeEdges(me, pi)
			}
			// Spot welds: 8 mm, about 1.5 nugget diameters (common
			// practice); bolts: the washer inside the sheet with 2 mm to
			// spare (the layout's rule).
			edge := 8.0
			if j.Kind == joints.Bolt {
				edge = j.Washer/2 + 2 - 0.01
			}
			for _, e := range free[pi] {
				if dd := geom.SegmentDistance(j.Point, me.Coords[e[0]], me.Coords[e[1]]); dd < edge {
					t.Errorf("joint %s: %.2f mm from a free edge of part %d, want >= %g", j.ID, dd, id, edge)
					break
				}
			}
		}
		for _, id := range stack {
			pi, _ := me.PartIndex(id)
			q, _ := closestOnPart(me, pi, j.Point)
			offs = append(offs, r3.Dot(r3.Sub(q, j.Point), n))
		}
		// In order along the normal, sheets in contact
		// (mid-surfaces (t1+t2)/2 apart), point mid-way.
		for k := 1; k < len(stack); k++ {
			pa, _ := me.PartIndex(stack[k-1])
			pb, _ := me.PartIndex(stack[k])
			want := (me.Parts[pa].Thickness + me.Parts[pb].Thickness) / 2
			if got := offs[k] - offs[k-1]; math.Abs(got-want) > 0.01 {
				t.Errorf("joint %s: sheets %d and %d are %.4f mm apart along the normal, want %.4f", j.ID, stack[k-1], stack[k], got, want)
			}
		}
		if mid := offs[0] + offs[len(offs)-1]; math.Abs(mid) > 0.01 {
			t.Errorf("joint %s: point is %.4f mm off the middle of its stack", j.ID, mid/2)
		}
	}
}

// TestNormals checks that the elements around a joint are parallel to its
// normal.
func TestNormals(t *testing.T) {
	m := mustGenerate(t, Config{Elements: 20_000, Welds: 60, Seed: 31})
	me := m.Mesh
	for i, j := range m.Joints {
		for _, id := range m.Stacks[i] {
			pi, _ := me.PartIndex(id)
			best, bestD := -1, math.Inf(1)
			for e := range me.NumElems() {
				if me.ElemPart[e] != pi {
					continue
				}
				ns := me.ElemNodes(e)
				if d := r3.Norm(r3.Sub(me.Coords[ns[0]], j.Point)); d < bestD {
					best, bestD = e, d
				}
			}
			ns := me.ElemNodes(best)
			c := r3.Cross(r3.Sub(me.Coords[ns[1]], me.Coords[ns[0]]), r3.Sub(me.Coords[ns[2]], me.Coords[ns[0]]))
			if cos := math.Abs(r3.Dot(r3.Unit(c), m.Normals[i])); cos < 0.9999 {
				t.Errorf("joint %s, part %d: element normal at %.4f to the stack normal", j.ID, id, cos)
			}
		}
	}
}

// TestSpacing checks the weld pitch: no two welds closer than 20 mm (10 t
// for the thickest sheet, common practice) and neighbours on a weld line
// at most the pitch apart.
func TestSpacing(t *testing.T) {
	m := mustGenerate(t, Config{Elements: 50_000, Welds: 150, Bolts: 4, Seed: 41})
	for i, a := range m.Joints {
		near, nearLine := math.Inf(1), math.Inf(1)
		for k, b := range m.Joints {
			if k != i {
				d := r3.Norm(r3.Sub(a.Point, b.Point))
				near = min(near, d)
				if !strings.HasSuffix(b.Group, "-link") {
					nearLine = min(nearLine, d)
				}
			}
		}
		if near < 20 {
			t.Errorf("joint %s: nearest joint %.2f mm away", a.ID, near)
		}
		if a.Kind == joints.Bolt {
			// The stations either side of a bolt on its flange are left
			// empty (the link welds, on the strips, are not on a flange).
			near = nearLine
			if a.Diameter == 0 || a.Washer <= a.Diameter || a.Hole <= a.Diameter {
				t.Errorf("bolt %+v", a)
			}
			if near < 2*m.Pitch-0.01 {
				t.Errorf("bolt %s: nearest joint %.2f mm away, want >= 2 pitches", a.ID, near)
			}
		}
	}
}

func TestConfigErrors(t *testing.T) {
	for _, c := range []struct {
		cfg      Config
		tooMany  bool
		contains string
	}{
		{cfg: Config{}},
		{cfg: Config{Elements: -1}},
		{cfg: Config{Elements: MaxElements + 1}},
		{cfg: Config{Elements: 1000, Welds: -1}},
		{cfg: Config{Elements: 1000, Bolts: -1}},
		{cfg: Config{Elements: 1000, ElementSize: 0.1}},
		{cfg: Config{Elements: 1000, ElementSize: math.NaN()}},
		{cfg: Config{Elements: 1000, ElementSize: math.Inf(1)}},
		{cfg: Config{Elements: 10_000, Welds: 5000}, tooMany: true},
		{cfg: Config{Elements: 10_000, Bolts: 5000}, tooMany: true},
	} {
		_, err := Generate(c.cfg)
		if err == nil {
			t.Errorf("Generate(%+v): no error", c.cfg)
			continue
		}
		if got := errors.Is(err, ErrTooManyJoints); got != c.tooMany {
			t.Errorf("Generate(%+v): %v; errors.Is(ErrTooManyJoints) = %v", c.cfg, err, got)
		}
	}
}

func TestTinyModels(t *testing.T) {
	for _, cfg := range []Config{
		{Elements: 1},
		{Elements: 1, Welds: 1},
		{Elements: 300, Welds: 2, Bolts: 1},
		{Elements: 2000, Welds: 3, ElementSize: 25},
		{Elements: 2000, Welds: 3, ElementSize: 0.5},
	} {
		if _, err := Generate(cfg); err != nil && !errors.Is(err, ErrTooManyJoints) {
			t.Errorf("Generate(%+v): %v", cfg, err)
		}
	}
}

// FuzzGenerate checks that no Config makes Generate panic or break its
// promises (small element counts keep it fast).
func FuzzGenerate(f *testing.F) {
	f.Add(uint32(5000), uint16(10), uint8(1), uint64(1), 5.0)
	f.Add(uint32(1), uint16(0), uint8(0), uint64(0), 0.0)
	f.Add(uint32(30000), uint16(500), uint8(20), uint64(9), 12.5)
	f.Fuzz(func(t *testing.T, elems uint32, welds uint16, bolts uint8, seed uint64, size float64) {
		cfg := Config{Elements: int(elems % 40_000), Welds: int(welds), Bolts: int(bolts), Seed: seed, ElementSize: size}
		m, err := Generate(cfg)
		if err != nil {
			return
		}
		spots := 0
		for _, j := range m.Joints {
			if j.Kind == joints.Spot {
				spots++
			}
		}
		if spots != cfg.Welds || len(m.Joints)-spots != cfg.Bolts || len(m.Stacks) != len(m.Joints) {
			t.Fatalf("%+v: %d welds, %d bolts", cfg, spots, len(m.Joints)-spots)
		}
	})
}

// BenchmarkGenerate2M generates a 2,000,000-element model with 6,000 spot
// welds (skipped with -short).
func BenchmarkGenerate2M(b *testing.B) {
	if testing.Short() {
		b.Skip("2M elements: skipped with -short")
	}
	for b.Loop() {
		m, err := Generate(Config{Elements: 2_000_000, Welds: 6000, Bolts: 40, Seed: 1})
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(m.Mesh.NumElems()), "elements")
	}
}

// BenchmarkGenerate200k generates a 200,000-element model.
func BenchmarkGenerate200k(b *testing.B) {
	for b.Loop() {
		if _, err := Generate(Config{Elements: 200_000, Welds: 600, Bolts: 4, Seed: 1}); err != nil {
			b.Fatal(err)
		}
	}
}

// TestChained checks that the welds join every part into one assembly
// (by the ground-truth stacks: consecutive sheets of a stack are
// joined), once there are enough welds for the links.
func TestChained(t *testing.T) {
	for _, cfg := range []Config{
		{Elements: 60_000, Welds: 300, Bolts: 4, Seed: 7},
		{Elements: 200_000, Welds: 600, Bolts: 4, Seed: 1},
		{Elements: 100_000, Welds: 300, Bolts: 10, Seed: 5, ElementSize: 4},
	} {
		m := mustGenerate(t, cfg)
		parent := map[int64]int64{}
		var find func(int64) int64
		find = func(p int64) int64 {
			if q, ok := parent[p]; ok && q != p {
				r := find(q)
				parent[p] = r
				return r
			}
			parent[p] = p
			return p
		}
		for _, p := range m.Mesh.Parts {
			find(p.ID)
		}
		links := 0
		for i, st := range m.Stacks {
			if strings.HasSuffix(m.Joints[i].Group, "-link") {
				links++
			}
			for k := 1; k < len(st); k++ {
				parent[find(st[k])] = find(st[k-1])
			}
		}
		roots := map[int64]bool{}
		for _, p := range m.Mesh.Parts {
			roots[find(p.ID)] = true
		}
		if len(roots) != 1 {
			t.Errorf("%+v: %d separate groups of parts, want one assembly", cfg, len(roots))
		}
		if want := linkWelds * (cfg.Elements/elemsPerAs - 1); links != want {
			t.Errorf("%+v: %d link welds, want %d", cfg, links, want)
		}
	}
}
