package synth

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// idStride is the id distance between the first nodes (and elements) of
// consecutive part ids, raised to the next power of ten when a part is
// larger.
const idStride = 1_000_000

// randomRotation returns a rotation matrix drawn uniformly from all
// rotations (a normalised quaternion of four normal variates).
func randomRotation(rng *rand.Rand) [3][3]float64 {
	var w, x, y, z, n float64
	for n < 1e-6 {
		w, x, y, z = rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()
		n = math.Sqrt(w*w + x*x + y*y + z*z)
	}
	w, x, y, z = w/n, x/n, y/n, z/n
	return [3][3]float64{
		{1 - 2*(y*y+z*z), 2 * (x*y - w*z), 2 * (x*z + w*y)},
		{2 * (x*y + w*z), 1 - 2*(x*x+z*z), 2 * (y*z - w*x)},
		{2 * (x*z - w*y), 2 * (y*z + w*x), 1 - 2*(x*x+y*y)},
	}
}

// toGlobal maps a local point of a to model coordinates, rounded to
// 0.001 mm.
func (a *asmPlan) toGlobal(x, y, z float64) r3.Vec {
	x, y, z = x-a.ctr[0], y-a.ctr[1], z-a.ctr[2]
	r := &a.rot
	return r3.Vec{
		X: round3(r[0][0]*x + r[0][1]*y + r[0][2]*z + a.pos[0]),
		Y: round3(r[1][0]*x + r[1][1]*y + r[1][2]*z + a.pos[1]),
		Z: round3(r[2][0]*x + r[2][1]*y + r[2][2]*z + a.pos[2]),
	}
}

// normal returns the local z axis in model coordinates.
func (a *asmPlan) normal() r3.Vec {
	return r3.Vec{X: a.rot[0][2], Y: a.rot[1][2], Z: a.rot[2][2]}
}

func round3(v float64) float64 { return math.Round(v*1000) / 1000 }

// buildMesh meshes every sheet of every assembly into one mesh.
func buildMesh(cfg Config, asms []*asmPlan) (*geom.Mesh, error) {
	var (
		nodes, quads, most int
		ns                 []int
	)
	for _, a := range asms {
		for i := range a.parts {
			nx, n := a.parts[i].divisions(ns)
			ns = n
			cs := 0
			for _, k := range n {
				cs += k
			}
			nn, nq := (nx+1)*(cs+1), nx*cs
			nodes += nn
			quads += nq
			most = max(most, nn, 2*nq)
		}
	}
	if quads > 2*MaxElements {
		return nil, fmt.Errorf("synth: layout needs %d quads, far above the limit", quads)
	}
	stride := int64(idStride)
	for int64(most) >= stride {
		stride *= 10
	}
	ne := quads + quads/16
	m := &geom.Mesh{
		NodeIDs:   make([]int64, 0, nodes),
		Coords:    make([]r3.Vec, 0, nodes),
		ElemIDs:   make([]int64, 0, ne),
		ElemPart:  make([]int32, 0, ne),
		ElemStart: make([]int32, 1, ne+1),
		Conn:      make([]int32, 0, 4*quads+quads/8),
		Sources:   []geom.Source{{File: "synth"}},
	}
	var ys, zs []float64
	for _, a := range asms {
		for i := range a.parts {
			p := &a.parts[i]
			nx, n := p.divisions(ns)
			ns = n
			ys, zs = sectionPoints(p, n, ys[:0], zs[:0])
			if err := meshPart(m, a, p, nx, ys, zs, stride, cfg.Seed); err != nil {
				return nil, err
			}
		}
	}
	if len(m.Conn) > math.MaxInt32 {
		return nil, fmt.Errorf("synth: %d connectivity entries overflow the mesh's 32-bit offsets", len(m.Conn))
	}
	if err := m.Index(); err != nil {
		return nil, fmt.Errorf("synth: %w", err)
	}
	return m, nil
}

// sectionPoints returns the node positions along p's cross-section.
func sectionPoints(p *partPlan, ns []int, ys, zs []float64) ([]float64, []float64) {
	ys, zs = append(ys, p.prof[0].y), append(zs, p.prof[0].z)
	for k, n := range ns {
		a, b := p.prof[k], p.prof[k+1]
		for i := 1; i <= n; i++ {
			f := float64(i) / float64(n)
			ys = append(ys, a.y+(b.y-a.y)*f)
			zs = append(zs, a.z+(b.z-a.z)*f)
		}
	}
	return ys, zs
}

// meshPart appends the nodes and elements of p to m.
func meshPart(m *geom.Mesh, a *asmPlan, p *partPlan, nx int, ys, zs []float64, stride int64, seed uint64) error {
	if len(m.Coords)+(nx+1)*len(ys) > math.MaxInt32 {
		return fmt.Errorf("synth: more than %d nodes", math.MaxInt32)
	}
	pi := int32(len(m.Parts))
	m.Parts = append(m.Parts, geom.Part{ID: p.id, Name: p.name, Thickness: p.t, Material: p.material, Surface: geom.SurfaceMid})
	first := int32(len(m.Coords))
	idBase := p.id * stride
	for i := 0; i <= nx; i++ {
		x := p.x0 + (p.x1-p.x0)*float64(i)/float64(nx)
		for j := range ys {
			m.NodeIDs = append(m.NodeIDs, idBase+int64(len(m.Coords)-int(first))+1)
			m.Coords = append(m.Coords, a.toGlobal(x, ys[j], zs[j]))
		}
	}
	rng := rand.New(rand.NewPCG(seed, uint64(p.id)))
	ncs := int32(len(ys))
	elem := int64(1)
	add := func(ns ...int32) {
		m.ElemIDs = append(m.ElemIDs, idBase+elem)
		elem++
		m.ElemPart = append(m.ElemPart, pi)
		m.Conn = append(m.Conn, ns...)
		m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
	}
	for i := int32(0); i < int32(nx); i++ {
		for j := int32(0); j < ncs-1; j++ {
			q := [4]int32{first + i*ncs + j, first + (i+1)*ncs + j, first + (i+1)*ncs + j + 1, first + i*ncs + j + 1}
			if p.flip {
				q[1], q[3] = q[3], q[1]
			}
			if p.tri > 0 && rng.Float64() < p.tri {
				if rng.IntN(2) == 0 {
					add(q[0], q[1], q[2])
					add(q[0], q[2], q[3])
				} else {
					add(q[1], q[2], q[3])
					add(q[1], q[3], q[0])
				}
				continue
			}
			add(q[0], q[1], q[2], q[3])
		}
	}
	return nil
}
