package stiffness

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// Spring is one connector's tie between two parts, at a point: a beam
// along Axis with its four stiffnesses, of which only the degrees of
// freedom in DOFs (global axes, tx ty tz rx ry rz) carry anything.
type Spring struct {
	Point   r3.Vec  // mm
	Axis    r3.Vec  // unit, the beam's axis
	Axial   float64 // N/mm, along the axis: EA/L
	Shear   float64 // N/mm, across the axis: clamped-clamped Timoshenko beam
	Torsion float64 // N mm/rad, about the axis: GJ/L
	Bending float64 // N mm/rad, about an axis across it: EI/L
	DOFs    joints.DOFs
}

// ShearCoefficient returns Timoshenko's shear coefficient of a solid
// circular section, 6 (1 + nu) / (7 + 6 nu) (G. R. Cowper, The shear
// coefficient in Timoshenko's beam theory, J. Appl. Mech. 33, 1966;
// from memory): 0.886 for nu = 0.3.
func ShearCoefficient(nu float64) float64 { return 6 * (1 + nu) / (7 + 6*nu) }

// Beam returns the spring of a straight circular beam of diameter d and
// length L, mm, of material m, between two rigid bodies: axial EA/L,
// torsion GJ/L and bending EI/L (the relative rotation of its two ends
// under a uniform moment), and across the axis 12 EI / (L^3 (1 + phi))
// with phi = 12 EI / (kappa G A L^2), the transverse stiffness of a
// beam with both ends held against rotation, Timoshenko's shear term
// included (A = pi d^2/4, I = pi d^4/64, J = pi d^4/32; any matrix
// structural analysis text, e.g. Przemieniecki, Theory of Matrix
// Structural Analysis, 1968; from memory). Point, Axis and DOFs are left
// for the caller.
func Beam(d, L float64, m Material) Spring {
	a := math.Pi * d * d / 4
	i := math.Pi * math.Pow(d, 4) / 64
	j := 2 * i
	phi := 12 * m.E * i / (ShearCoefficient(m.Nu) * m.G * a * L * L)
	return Spring{
		Axial:   m.E * a / L,
		Shear:   12 * m.E * i / (L * L * L * (1 + phi)),
		Torsion: m.G * j / L,
		Bending: m.E * i / L,
	}
}

// mat3 is a 3 x 3 matrix, row major.
type mat3 [3][3]float64

// blocks returns the spring's translational and rotational stiffness
// in global axes: k_across I + (k_along - k_across) n n^T, with the rows
// and columns of the uncoupled degrees of freedom zero.
func (s *Spring) blocks() (kt, kr mat3) {
	n := [3]float64{s.Axis.X, s.Axis.Y, s.Axis.Z}
	for r := range 3 {
		for c := range 3 {
			id := 0.0
			if r == c {
				id = 1
			}
			if s.DOFs&(1<<r) != 0 && s.DOFs&(1<<c) != 0 {
				kt[r][c] = s.Shear*id + (s.Axial-s.Shear)*n[r]*n[c]
			}
			if s.DOFs&(1<<(r+3)) != 0 && s.DOFs&(1<<(c+3)) != 0 {
				kr[r][c] = s.Bending*id + (s.Torsion-s.Bending)*n[r]*n[c]
			}
		}
	}
	return kt, kr
}

// Matrix is the 6 x 6 stiffness of the relative rigid motion of two
// bodies (translation tx ty tz of the reference point, rotation rx ry rz
// about it), N/mm, N/rad and N mm/rad.
type Matrix [6][6]float64

// Assemble returns the 6 x 6 stiffness of the relative rigid motion of
// two bodies tied by springs, about the point c: a body's rotation theta
// moves a spring's point p by theta x (p - c), so each spring adds
// T^T K_t T with T = [I | -[r]x], r = p - c, and its rotational block.
func Assemble(springs []Spring, c r3.Vec) Matrix {
	var k Matrix
	for i := range springs {
		s := &springs[i]
		kt, kr := s.blocks()
		r := r3.Sub(s.Point, c)
		// sk is [r]x: sk v = r x v.
		sk := mat3{{0, -r.Z, r.Y}, {r.Z, 0, -r.X}, {-r.Y, r.X, 0}}
		ktS := mul(kt, sk)              // K_t [r]x
		stkS := mul(transpose(sk), ktS) // [r]x^T K_t [r]x
		for a := range 3 {
			for b := range 3 {
				k[a][b] += kt[a][b]
				k[a][b+3] -= ktS[a][b]
				k[b+3][a] -= ktS[a][b]
				k[a+3][b+3] += stkS[a][b] + kr[a][b]
			}
		}
	}
	return k
}

func mul(a, b mat3) mat3 {
	var c mat3
	for i := range 3 {
		for j := range 3 {
			for k := range 3 {
				c[i][j] += a[i][k] * b[k][j]
			}
		}
	}
	return c
}

func transpose(a mat3) mat3 {
	var t mat3
	for i := range 3 {
		for j := range 3 {
			t[i][j] = a[j][i]
		}
	}
	return t
}
