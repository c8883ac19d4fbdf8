package geom

import (
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// stackMesh builds parallel and tilted sheets of quads near each other,
// each its own part, turned by a random rotation: a flange stack of
// three sheets with different element sizes and offsets, a sheet that
// bends away (a flange and a wall), one meshed with triangles, one with
// its node order reversed, and a strip beside the stack that faces
// nothing.
func stackMesh(rng *rand.Rand) *Mesh {
	m := &Mesh{ElemStart: []int32{0}}
	rot := rotation(rng)
	addSheet := func(id int64, pts func(i, j int) r3.Vec, nx, ny int, tri, flip bool) {
		pi := int32(len(m.Parts))
		m.Parts = append(m.Parts, Part{ID: id, Thickness: 1})
		base := int32(len(m.Coords))
		for j := 0; j <= ny; j++ {
			for i := 0; i <= nx; i++ {
				m.NodeIDs = append(m.NodeIDs, int64(len(m.Coords)+1))
				m.Coords = append(m.Coords, rot(pts(i, j)))
			}
		}
		add := func(ns ...int32) {
			if flip {
				slices.Reverse(ns)
			}
			m.Conn = append(m.Conn, ns...)
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
			m.ElemIDs = append(m.ElemIDs, int64(len(m.ElemIDs)+1))
			m.ElemPart = append(m.ElemPart, pi)
		}
		for j := range ny {
			for i := range nx {
				n0 := base + int32(j*(nx+1)+i)
				n1, n2, n3 := n0+1, n0+int32(nx)+2, n0+int32(nx)+1
				if tri {
					add(n0, n1, n2)
					add(n0, n2, n3)
				} else {
					add(n0, n1, n2, n3)
				}
			}
		}
	}
	flat := func(x0, y0, h, z float64) func(i, j int) r3.Vec {
		return func(i, j int) r3.Vec { return r3.Vec{X: x0 + float64(i)*h, Y: y0 + float64(j)*h, Z: z} }
	}
	addSheet(1, flat(0, 0, 5, 0), 16, 8, false, false)
	addSheet(2, flat(2.3, 1.1, 4.3, 1.1), 12, 9, false, true)
	addSheet(3, flat(-3.7, 0.4, 6.1, 2.05), 8, 7, true, false)
	// A flange on top of 3 that bends up into a wall after x = 20.
	addSheet(4, func(i, j int) r3.Vec {
		x := -1 + float64(i)*3
		z := 3.1
		if x > 20 {
			z += (x - 20) * 1.2
		}
		return r3.Vec{X: x, Y: 3 + float64(j)*3.5, Z: z}
	}, 14, 8, false, false)
	// A strip beside the stack, in the plane of sheet 1.
	addSheet(5, flat(0, 42, 5, 0.5), 10, 2, false, false)
	// A slightly warped sheet under 1, within the window.
	addSheet(6, func(i, j int) r3.Vec {
		return r3.Vec{X: 1 + float64(i)*4.7, Y: 2 + float64(j)*4.9, Z: -1.3 + 0.02*float64(i*j%3)}
	}, 14, 7, false, false)
	if err := m.Index(); err != nil {
		panic(err)
	}
	return m
}

func rotation(rng *rand.Rand) func(r3.Vec) r3.Vec {
	a, b, c := rng.Float64()*2*math.Pi, rng.Float64()*2*math.Pi, rng.Float64()*2*math.Pi
	off := randVec(rng, 1000)
	return func(v r3.Vec) r3.Vec {
		v = r3.Vec{X: v.X*math.Cos(a) - v.Y*math.Sin(a), Y: v.X*math.Sin(a) + v.Y*math.Cos(a), Z: v.Z}
		v = r3.Vec{X: v.X, Y: v.Y*math.Cos(b) - v.Z*math.Sin(b), Z: v.Y*math.Sin(b) + v.Z*math.Cos(b)}
		v = r3.Vec{X: v.X*math.Cos(c) + v.Z*math.Sin(c), Y: v.Y, Z: -v.X*math.Sin(c) + v.Z*math.Cos(c)}
		return r3.Add(v, off)
	}
}

// facingBrute answers FacingElements' question by testing every element
// against every other: (e, group) pairs where some element of the group
// is parallel within cosTol and holds e's normal line within r.
func facingBrute(m *Mesh, group []int32, r, cosTol float64) map[[2]int32]bool {
	out := map[[2]int32]bool{}
	var x [4]r3.Vec
	for e := range m.NumElems() {
		_, ne, ce := corners(m, e, &x)
		if r3.Norm2(ne) == 0 {
			continue
		}
		for f := range m.NumElems() {
			if group[f] == group[e] {
				continue
			}
			nc, nf, cf := corners(m, f, &x)
			cos := r3.Dot(ne, nf)
			if math.Abs(cos) < cosTol {
				continue
			}
			s := r3.Dot(r3.Sub(cf, ce), nf) / cos
			if math.Abs(s) > r {
				continue
			}
			p := r3.Add(ce, r3.Scale(s, ne))
			in := true
			for k := range nc {
				ed := r3.Sub(x[(k+1)%nc], x[k])
				l := r3.Norm(ed)
				if r3.Dot(r3.Sub(p, x[k]), r3.Cross(nf, ed))/l < -1e-6*l {
					in = false
				}
			}
			if in {
				out[[2]int32{int32(e), group[f]}] = true
			}
		}
	}
	return out
}

// FacingElements against the brute force on random rotations of a
// stack of sheets: the same (element, group) pairs, each facing element
// truly facing, whatever GOMAXPROCS.
func TestFacingElements(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	cosTol := math.Cos(20 * math.Pi / 180)
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	for trial := range 6 {
		m := stackMesh(rng)
		x := NewElemIndex(m)
		for _, r := range []float64{1.5, 4.5} {
			want := facingBrute(m, m.ElemPart, r, cosTol)
			if r > 4 && len(want) < 200 {
				t.Fatalf("trial %d: only %d facing pairs: the stack is not stacked", trial, len(want))
			}
			runtime.GOMAXPROCS(1)
			one := x.FacingElements(m.ElemPart, r, cosTol, false)
			runtime.GOMAXPROCS(3)
			got := x.FacingElements(m.ElemPart, r, cosTol, false)
			if !slices.Equal(one, got) {
				t.Errorf("trial %d r %g: the answer depends on GOMAXPROCS", trial, r)
			}
			seen := map[[2]int32]bool{}
			var xs [4]r3.Vec
			for _, f := range got {
				k := [2]int32{f.Elem, m.ElemPart[f.Other]}
				if seen[k] {
					t.Errorf("trial %d: element %d faces group %d twice", trial, f.Elem, k[1])
				}
				seen[k] = true
				// The distance is the one to Other's plane along e's normal.
				_, ne, ce := corners(m, int(f.Elem), &xs)
				_, nf, cf := corners(m, int(f.Other), &xs)
				if d := r3.Dot(r3.Sub(cf, ce), nf) / r3.Dot(ne, nf); math.Abs(d-f.Dist) > 1e-9 {
					t.Errorf("trial %d: element %d: distance %g, want %g", trial, f.Elem, f.Dist, d)
				}
			}
			for k := range want {
				if !seen[k] {
					t.Errorf("trial %d r %g: element %d (part %d) misses group %d", trial, r, k[0], m.Parts[m.ElemPart[k[0]]].ID, m.Parts[k[1]].ID)
				}
			}
			for k := range seen {
				if !want[k] {
					t.Errorf("trial %d r %g: element %d faces group %d, which the brute force does not find", trial, r, k[0], k[1])
				}
			}
			// upward: only groups above, and those below where one above faces.
			up := x.FacingElements(m.ElemPart, r, cosTol, true)
			above := map[int32]bool{}
			for _, f := range up {
				if m.ElemPart[f.Other] > m.ElemPart[f.Elem] {
					above[f.Elem] = true
				}
			}
			for k := range want {
				inUp := slices.ContainsFunc(up, func(f Facing) bool { return f.Elem == k[0] && m.ElemPart[f.Other] == k[1] })
				switch {
				case k[1] > m.ElemPart[k[0]] && !inUp:
					t.Errorf("upward: element %d misses group %d above it", k[0], k[1])
				case k[1] < m.ElemPart[k[0]] && above[k[0]] && !inUp:
					t.Errorf("upward: element %d misses group %d below it though one above faces it", k[0], k[1])
				}
			}
		}
	}
}
