package orbit

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// octicPositiveRoots returns, in increasing order, every real positive root
// of Gauss's eighth-degree equation for the middle distance,
//
//	x⁸ + a·x⁶ + b·x³ + c = 0,
//
// each to rounding. By Descartes' rule of signs there are at most three.
//
// Method (common practice for all the roots of a polynomial): the variable is
// scaled, x = s·y with s = max(|a|^(1/2), |b|^(1/5), |c|^(1/8)), so that the
// scaled coefficients are at most 1 in magnitude and every root has |y| < 2
// (Cauchy's bound); the roots of the monic octic in y are the eigenvalues of
// its 8×8 companion matrix (gonum's mat.Eigen, LAPACK's Hessenberg QR). The
// eigenvalues that are real to within 1e-6 (a double root splits into a
// complex pair of that order) and positive are polished by Newton's method on
// the scaled polynomial, kept when the polynomial then vanishes to rounding,
// and merged when two polish to the same root.
//
// Non-finite coefficients, or a = b = c = 0 (only the root 0), give none.
func octicPositiveRoots(a, b, c float64) []float64 {
	for _, v := range [...]float64{a, b, c} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil
		}
	}
	s := math.Max(math.Sqrt(math.Abs(a)), math.Max(math.Pow(math.Abs(b), 0.2), math.Pow(math.Abs(c), 0.125)))
	if !(s > 0) || math.IsInf(s, 0) {
		return nil
	}
	// Scaled coefficients of y⁸ + α·y⁶ + β·y³ + γ.
	al := a / (s * s)
	be := b / (s * s * s * s * s)
	ga := c / math.Pow(s, 8)

	// Companion matrix: ones on the superdiagonal, −coefficients in the last row.
	comp := mat.NewDense(8, 8, nil)
	for i := 0; i < 7; i++ {
		comp.Set(i, i+1, 1)
	}
	comp.Set(7, 0, -ga)
	comp.Set(7, 3, -be)
	comp.Set(7, 6, -al)
	var eig mat.Eigen
	if !eig.Factorize(comp, mat.EigenNone) {
		return octicRootsByScan(al, be, ga, s)
	}
	var roots []float64
	for _, z := range eig.Values(nil) {
		y := real(z)
		if !(y > 0) || math.Abs(imag(z)) > 1e-6*math.Max(1, math.Abs(y)) {
			continue
		}
		if y, ok := octicPolish(al, be, ga, y); ok {
			roots = octicAddRoot(roots, y)
		}
	}
	out := make([]float64, len(roots))
	for i, y := range roots {
		out[i] = s * y
	}
	sort.Float64s(out)
	return out
}

// octicValue returns q(y) = y⁸ + α·y⁶ + β·y³ + γ, its derivative and the sum
// of the magnitudes of its terms (the scale of its rounding error).
func octicValue(al, be, ga, y float64) (q, dq, mag float64) {
	y2 := y * y
	y3 := y2 * y
	y6 := y3 * y3
	y8 := y6 * y2
	q = y8 + al*y6 + be*y3 + ga
	dq = 8*y6*y + 6*al*y3*y2 + 3*be*y2
	mag = y8 + math.Abs(al*y6) + math.Abs(be*y3) + math.Abs(ga)
	return q, dq, mag
}

// octicPolish refines a root estimate y of the scaled octic by Newton's
// method and reports whether it converged to a positive root (the polynomial
// vanishing to within 1e-12 of the size of its terms).
func octicPolish(al, be, ga, y float64) (float64, bool) {
	for range 60 {
		q, dq, _ := octicValue(al, be, ga, y)
		if q == 0 || dq == 0 {
			break
		}
		next := y - q/dq
		if !(next > 0) || math.IsInf(next, 0) {
			break
		}
		done := math.Abs(next-y) <= 1e-15*y
		y = next
		if done {
			break
		}
	}
	q, _, mag := octicValue(al, be, ga, y)
	return y, y > 0 && math.Abs(q) <= 1e-12*mag
}

// octicAddRoot appends y to roots unless a root within 1e-9 relative is
// already there (the two eigenvalues of a double root polish to one).
func octicAddRoot(roots []float64, y float64) []float64 {
	for _, r := range roots {
		if math.Abs(r-y) <= 1e-9*math.Max(r, y) {
			return roots
		}
	}
	return append(roots, y)
}

// octicRootsByScan is the fallback when the eigenvalue iteration fails: the
// sign changes of the scaled polynomial on a fine grid of (0, 2] (every root
// lies below 2 by Cauchy's bound), each bracket refined by bisection. It can
// miss a pair of roots closer than the grid step, which the companion-matrix
// method does not.
func octicRootsByScan(al, be, ga, s float64) []float64 {
	const n = 4000
	var out []float64
	prevY := 0.0
	prevQ := ga
	for k := 1; k <= n; k++ {
		y := 2 * float64(k) / n
		q, _, _ := octicValue(al, be, ga, y)
		if q == 0 {
			out = append(out, s*y)
		} else if prevQ != 0 && (q < 0) != (prevQ < 0) {
			lo, hi := prevY, y
			for range 100 {
				mid := 0.5 * (lo + hi)
				qm, _, _ := octicValue(al, be, ga, mid)
				if (qm < 0) == (prevQ < 0) {
					lo = mid
				} else {
					hi = mid
				}
			}
			out = append(out, s*0.5*(lo+hi))
		}
		prevY, prevQ = y, q
	}
	return out
}
