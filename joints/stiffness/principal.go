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

// Principal returns the principal stiffnesses of the translational and
// the rotational block of k, ascending: the eigenvalues of each
// symmetric 3 x 3 block, those below relZero times the block's largest
// set to zero.
func Principal(k Matrix) (trans, rot [3]float64) {
	return eigen3(k, 0), eigen3(k, 3)
}

func eigen3(k Matrix, off int) [3]float64 {
	sym := mat.NewSymDense(3, nil)
	for i := range 3 {
		for j := i; j < 3; j++ {
			sym.SetSym(i, j, (k[off+i][off+j]+k[off+j][off+i])/2)
		}
	}
	var out [3]float64
	var e mat.EigenSym
	if !e.Factorize(sym, false) {
		return out
	}
	vals := e.Values(nil)
	slices.Sort(vals)
	top := math.Max(math.Abs(vals[0]), math.Abs(vals[2]))
	for i, v := range vals {
		if v < relZero*top {
			v = 0
		}
		out[i] = v
	}
	return out
}
