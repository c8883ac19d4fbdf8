package audit

import (
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// Tolerances of the description of a free motion, on motions scaled to
// unit size in the frame of the ties concerned (rotations times the
// frame's size): a rotation smaller than motionZero is none (the motion
// is a translation), and a slide along the axis of less than
// screwPitchLimit frame sizes per radian leaves a plain rotation (our
// choices: far above the numerical noise of the null vectors, far below
// any screw a set of ties could produce).
const (
	motionZero      = 1e-6
	screwPitchLimit = 1e-4
)

// classify describes free motions (each the translation at the origin
// and the rotation, mm and radians) that span one free space: a single
// rotation, translation or screw; several about one point (a pivot);
// several translations; or several of no common kind. Points are the
// nearest to o, the centre of the ties concerned; sc is their size.
func classify(motions [][6]float64, o r3.Vec, sc float64) joints.Motion {
	d := len(motions)
	m := joints.Motion{Count: d}
	if d == 0 {
		return m
	}
	// At o, scaled: v the translation at o, th the rotation times sc,
	// together of unit length.
	vs := make([]r3.Vec, d)
	ths := make([]r3.Vec, d)
	for i, x := range motions {
		u := r3.Vec{X: x[0], Y: x[1], Z: x[2]}
		w := r3.Vec{X: x[3], Y: x[4], Z: x[5]}
		v := r3.Add(u, r3.Cross(w, o))
		th := r3.Scale(sc, w)
		n := math.Sqrt(r3.Norm2(v) + r3.Norm2(th))
		if n > 0 {
			v, th = r3.Scale(1/n, v), r3.Scale(1/n, th)
		}
		vs[i], ths[i] = v, th
	}
	single := func(v, th r3.Vec) joints.Motion {
		if r3.Norm(th) <= motionZero {
			return joints.Motion{Kind: joints.MotionTranslation, Direction: canonical(v), Count: 1}
		}
		t2 := r3.Norm2(th)
		p := r3.Add(o, r3.Scale(sc/t2, r3.Cross(th, v)))
		pitch := sc * r3.Dot(th, v) / t2
		out := joints.Motion{Kind: joints.MotionRotation, Point: roundVec(p, 1e-6), HasPoint: true, Direction: canonical(th), Count: 1}
		if math.Abs(pitch) > screwPitchLimit*sc {
			out.Kind, out.Pitch = joints.MotionScrew, round(pitch, 1e-6)
		}
		return out
	}
	if d == 1 {
		return single(vs[0], ths[0])
	}
	rotRank := rank3(ths)
	if rotRank == 0 {
		m.Kind, m.Direction = joints.MotionTranslation, canonical(vs[0])
		return m
	}
	// A pivot: every motion a rotation about one point p = o + sc q, that
	// is v_i = q × th_i for all i.
	if rotRank >= 2 {
		a := mat.NewDense(3*d, 3, nil)
		b := mat.NewVecDense(3*d, nil)
		for i := range d {
			t := ths[i]
			// q × t = -[t]x q
			rows := [3][3]float64{{0, t.Z, -t.Y}, {-t.Z, 0, t.X}, {t.Y, -t.X, 0}}
			for r := range 3 {
				a.SetRow(3*i+r, rows[r][:])
			}
			b.SetVec(3*i, vs[i].X)
			b.SetVec(3*i+1, vs[i].Y)
			b.SetVec(3*i+2, vs[i].Z)
		}
		var q mat.VecDense
		if err := q.SolveVec(a, b); err == nil {
			var res mat.VecDense
			res.MulVec(a, &q)
			res.SubVec(&res, b)
			if mat.Norm(&res, 2) <= screwPitchLimit {
				p := r3.Add(o, r3.Scale(sc, r3.Vec{X: q.AtVec(0), Y: q.AtVec(1), Z: q.AtVec(2)}))
				return joints.Motion{Kind: joints.MotionPivot, Point: roundVec(p, 1e-6), HasPoint: true, Count: d}
			}
		}
	}
	first := single(vs[0], ths[0])
	first.Kind, first.Count, first.Pitch = joints.MotionSeveral, d, 0
	return first
}

// rank3 returns the rank of a set of 3-vectors of length at most 1.
func rank3(vs []r3.Vec) int {
	a := mat.NewDense(len(vs), 3, nil)
	for i, v := range vs {
		a.SetRow(i, []float64{v.X, v.Y, v.Z})
	}
	var svd mat.SVD
	if !svd.Factorize(a, mat.SVDNone) {
		return 0
	}
	r := 0
	for _, s := range svd.Values(nil) {
		if s > motionZero {
			r++
		}
	}
	return r
}

// canonical returns the unit vector of v signed so that its largest
// component is positive, rounded to 1e-9.
func canonical(v r3.Vec) r3.Vec {
	n := r3.Norm(v)
	if n == 0 {
		return v
	}
	return roundVec(geom.SignLargest(r3.Scale(1/n, v)), 1e-9)
}

// round rounds v to the decimals of step (a power of ten), so that it
// prints without noise; -0 becomes 0.
func round(v, step float64) float64 {
	digits := int(math.Round(-math.Log10(step)))
	r, err := strconv.ParseFloat(strconv.FormatFloat(v, 'f', digits, 64), 64)
	if err != nil || r == 0 {
		return 0
	}
	return r
}

func roundVec(v r3.Vec, step float64) r3.Vec {
	return r3.Vec{X: round(v.X, step), Y: round(v.Y, step), Z: round(v.Z, step)}
}

// describeMotion says in words what a free motion is.
func describeMotion(m joints.Motion) string {
	n := m.Count
	switch m.Kind {
	case joints.MotionRotation:
		return fmt.Sprintf("%s, a rotation about the line through %s along %s", count(n), vec(m.Point), dir(m.Direction))
	case joints.MotionScrew:
		return fmt.Sprintf("%s, a screw motion about the line through %s along %s, %s mm per radian", count(n), vec(m.Point), dir(m.Direction), joints.MM(m.Pitch))
	case joints.MotionTranslation:
		if n == 1 {
			return fmt.Sprintf("1 free motion, a translation along %s", dir(m.Direction))
		}
		return fmt.Sprintf("%d free translations, among them along %s", n, dir(m.Direction))
	case joints.MotionPivot:
		return fmt.Sprintf("%d free rotations about the point %s", n, vec(m.Point))
	}
	if m.HasPoint {
		return fmt.Sprintf("%s, among them a rotation about the line through %s along %s", count(n), vec(m.Point), dir(m.Direction))
	}
	if r3.Norm2(m.Direction) > 0 {
		return fmt.Sprintf("%s, among them a translation along %s", count(n), dir(m.Direction))
	}
	return count(n)
}

func count(n int) string {
	if n == 1 {
		return "1 free motion"
	}
	return fmt.Sprintf("%d free motions", n)
}

// dir formats a unit direction for messages.
func dir(v r3.Vec) string {
	f := func(x float64) string { return fmt.Sprintf("%.4g", round(x, 1e-4)) }
	return fmt.Sprintf("(%s, %s, %s)", f(v.X), f(v.Y), f(v.Z))
}
