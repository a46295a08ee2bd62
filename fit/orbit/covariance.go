package orbit

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// covFromSVD returns the parameter covariance (JᵀJ)⁻¹ from the SVD
// J̃ = U Σ Vᵀ of the column-scaled Jacobian J̃ = J·D⁻¹ (d the column norms):
//
//	(JᵀJ)⁻¹ = D⁻¹ V Σ⁻² Vᵀ D⁻¹,   Cov_jk = Σᵢ V_ji V_ki / (σᵢ² d_j d_k)
//
// The caller has checked that every σᵢ > 0 (the condition number is finite).
// The normal matrix JᵀJ is never formed or inverted.
//
// Reference: Björck, Numerical Methods for Least Squares Problems (1996),
// §1.2.3 (covariance from the SVD); Press et al., Numerical Recipes, 3rd ed.
// (2007), §15.4.2, eq. 15.4.20.
func covFromSVD(sv []float64, v *mat.Dense, d [6]float64) *mat.SymDense {
	cov := mat.NewSymDense(6, nil)
	for j := 0; j < 6; j++ {
		for k := j; k < 6; k++ {
			s := 0.0
			for i := 0; i < 6; i++ {
				s += v.At(j, i) * v.At(k, i) / (sv[i] * sv[i])
			}
			cov.SetSym(j, k, s/(d[j]*d[k]))
		}
	}
	return cov
}

// Sigma returns the 1-σ uncertainties of the state's six components from
// the covariance (au for Pos, au/day for Vel, in the order X, Y, Z).
func (s *Solution) Sigma() (pos, vel [3]float64) {
	for k := 0; k < 3; k++ {
		pos[k] = sqrtNonNeg(s.Cov.At(k, k))
		vel[k] = sqrtNonNeg(s.Cov.At(k+3, k+3))
	}
	return pos, vel
}

// sqrtNonNeg is √x for x ≥ 0 and 0 for a negative x (rounding of a variance
// that is zero).
func sqrtNonNeg(x float64) float64 {
	if x > 0 {
		return math.Sqrt(x)
	}
	return 0
}
