package joints

import (
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// EvenWeights returns the weights of nodes closest to w0 (least sum of
// squared differences; nil w0 means uniform, 1/N each: the most uniform
// weights) that sum to 1 and whose weighted mean of the nodes' positions
// is q in the plane through q square to normal:
// w = w0 + Aᵀ(AAᵀ)⁻¹(b − A w0), A the rows (1), (u_i), (v_i) of the
// nodes' in-plane coordinates about q, b = (1, 0, 0) (a least-norm
// correction under linear constraints, the classical closed form). A
// rigid translation of the nodes then moves q by the same amount. False
// when the nodes do not span the plane (fewer than 3, or on a line).
// Spot-weld patches and bolt rings use it.
func EvenWeights(m *geom.Mesh, nodes []int32, q, normal r3.Vec, w0 []float64) ([]float64, bool) {
	n := len(nodes)
	t1, t2, ok := tangents(normal)
	if !ok || n < 3 {
		return nil, false
	}
	if w0 != nil && len(w0) != n {
		return nil, false
	}
	A := mat.NewDense(3, n, nil)
	start := mat.NewVecDense(n, nil)
	for i, nd := range nodes {
		d := r3.Sub(m.Coords[nd], q)
		A.Set(0, i, 1)
		A.Set(1, i, r3.Dot(d, t1))
		A.Set(2, i, r3.Dot(d, t2))
		if w0 != nil {
			start.SetVec(i, w0[i])
		} else {
			start.SetVec(i, 1/float64(n))
		}
	}
	// residual = b - A w0, with b = (1, 0, 0).
	var aw mat.VecDense
	aw.MulVec(A, start)
	res := mat.NewVecDense(3, []float64{1 - aw.AtVec(0), -aw.AtVec(1), -aw.AtVec(2)})
	var aat mat.Dense
	aat.Mul(A, A.T())
	var lu mat.LU
	lu.Factorize(&aat)
	if c := lu.Cond(); math.IsInf(c, 1) || c > 1e12 {
		return nil, false
	}
	var y mat.VecDense
	if err := lu.SolveVecTo(&y, false, res); err != nil {
		return nil, false
	}
	var corr mat.VecDense
	corr.MulVec(A.T(), &y)
	w := make([]float64, n)
	for i := range w {
		w[i] = start.AtVec(i) + corr.AtVec(i)
	}
	return w, true
}

// tangents returns two unit vectors perpendicular to n and to each other.
func tangents(n r3.Vec) (r3.Vec, r3.Vec, bool) {
	if r3.Norm2(n) == 0 {
		return r3.Vec{}, r3.Vec{}, false
	}
	ref := r3.Vec{X: 1}
	if math.Abs(n.X) > 0.9 {
		ref = r3.Vec{Y: 1}
	}
	t1 := r3.Unit(r3.Cross(n, ref))
	t2 := r3.Unit(r3.Cross(n, t1))
	return t1, t2, true
}
