package stiffness

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// relZero is how small a principal stiffness may be, relative to the
// largest of its block, before it is taken as zero: eigenvalues of a
// singular block come out as rounding noise near 1e-16 of the largest
// (our choice, far above that noise and far below any real ratio).
const relZero = 1e-9

// Principal returns the principal stiffnesses of k, ascending:
// translational, the eigenvalues of its translational block K_tt, and
// rotational, the eigenvalues of the rotational stiffness with the
// translations free to adjust, the Schur complement
//
//	S = K_rr - K_rt K_tt^+ K_tr
//
// (static condensation of the translations; any matrix structural
// analysis text, e.g. Przemieniecki 1968; from memory). S is the
// minimum over the translations u of the energy form [u; theta]^T k
// [u; theta] at a given rotation theta; moving the reference point
// replaces u by u plus a linear function of theta, which leaves that
// minimum as it is, so S and its eigenvalues do not depend on the point
// k was assembled about: they are the rotational stiffnesses about the
// pair's elastic centre. K_tt may be singular (springs coupling only
// some translations); K_tt^+ is then its pseudo-inverse, through its
// eigen-decomposition with the eigenvalues below relZero times the
// largest dropped (the energy form is positive semi-definite, so K_tr's
// columns lie in K_tt's range and the minimum is still S). Eigenvalues
// below relZero times their block's largest are set to zero.
func Principal(k Matrix) (trans, rot [3]float64) {
	var tt, rr, tr mat3
	for i := range 3 {
		for j := range 3 {
			tt[i][j] = (k[i][j] + k[j][i]) / 2
			rr[i][j] = (k[i+3][j+3] + k[j+3][i+3]) / 2
			tr[i][j] = (k[i][j+3] + k[j+3][i]) / 2 // K_tr = K_rt^T
		}
	}
	vals, vecs, ok := eigen3(tt)
	if !ok {
		return trans, rot
	}
	trans = clean(vals)
	// K_tt^+ = sum of v v^T / lambda over the eigenpairs kept.
	var pinv mat3
	top := math.Max(math.Abs(vals[0]), math.Abs(vals[2]))
	for e := range 3 {
		if vals[e] < relZero*top || vals[e] <= 0 {
			continue
		}
		for i := range 3 {
			for j := range 3 {
				pinv[i][j] += vecs[i][e] * vecs[j][e] / vals[e]
			}
		}
	}
	cond := mul(transpose(tr), mul(pinv, tr)) // K_rt K_tt^+ K_tr
	var s mat3
	for i := range 3 {
		for j := range 3 {
			s[i][j] = rr[i][j] - (cond[i][j]+cond[j][i])/2
		}
	}
	rv, _, ok := eigen3(s)
	if !ok {
		return trans, rot
	}
	return trans, clean(rv)
}

// eigen3 returns the eigenvalues of the symmetric a, ascending, and
// its eigenvectors as the columns of vecs in the same order.
func eigen3(a mat3) (vals [3]float64, vecs mat3, ok bool) {
	sym := mat.NewSymDense(3, nil)
	for i := range 3 {
		for j := i; j < 3; j++ {
			sym.SetSym(i, j, a[i][j])
		}
	}
	var e mat.EigenSym
	if !e.Factorize(sym, true) {
		return vals, vecs, false
	}
	v := e.Values(nil)
	var ev mat.Dense
	e.VectorsTo(&ev)
	idx := []int{0, 1, 2}
	slices.SortStableFunc(idx, func(x, y int) int {
		switch {
		case v[x] < v[y]:
			return -1
		case v[x] > v[y]:
			return 1
		}
		return 0
	})
	for c, o := range idx {
		vals[c] = v[o]
		for r := range 3 {
			vecs[r][c] = ev.At(r, o)
		}
	}
	return vals, vecs, true
}

// clean returns the ascending eigenvalues of a block with those below
// relZero times the largest in magnitude set to zero.
func clean(vals [3]float64) [3]float64 {
	top := math.Max(math.Abs(vals[0]), math.Abs(vals[2]))
	for i, v := range vals {
		if v < relZero*top {
			vals[i] = 0
		}
	}
	return vals
}
