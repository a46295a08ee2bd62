package orbit

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// octicWithRoots returns a, b, c of x⁸ + a·x⁶ + b·x³ + c with the given
// three roots: the linear system r⁸ + a·r⁶ + b·r³ + c = 0 for each root,
// solved for the roots scaled by the largest.
func octicWithRoots(t *testing.T, roots [3]float64) (a, b, c float64) {
	t.Helper()
	A := mat.NewDense(3, 3, nil)
	rhs := mat.NewVecDense(3, nil)
	s := roots[2]
	for i, r := range roots {
		r /= s
		A.Set(i, 0, math.Pow(r, 6))
		A.Set(i, 1, r*r*r)
		A.Set(i, 2, 1)
		rhs.SetVec(i, -math.Pow(r, 8))
	}
	var x mat.VecDense
	if err := x.SolveVec(A, rhs); err != nil {
		t.Fatal(err)
	}
	return x.AtVec(0) * s * s, x.AtVec(1) * math.Pow(s, 5), x.AtVec(2) * math.Pow(s, 8)
}

// Polynomials built from three chosen positive roots give those roots back
// (by construction: the roots are the check values), at the scales of the
// heliocentric (au) and geocentric (km) problems.
func TestOcticPositiveRootsKnown(t *testing.T) {
	for _, roots := range [][3]float64{
		{0.9, 1.4, 2.7},
		{1.01, 1.02, 3.5},
		{6800, 9241.8, 42164},
		{0.3, 0.31, 0.5},
	} {
		a, b, c := octicWithRoots(t, roots)
		got := octicPositiveRoots(a, b, c)
		if len(got) != 3 {
			t.Errorf("roots %v: got %v, want three", roots, got)
			continue
		}
		for i := range 3 {
			// The coefficients are rounded to 1e-16 relative; a simple root
			// moves by that over its condition, well under 1e-9 here.
			if math.Abs(got[i]-roots[i]) > 1e-9*roots[i] {
				t.Errorf("roots %v: got %v", roots, got)
			}
		}
	}
}

// The equation of Gauss's method always has c = −μ²B² ≤ 0 and so at least
// one positive root; by Descartes' rule at most three. Random coefficients
// of that sign pattern give between one and three roots, each a root to
// rounding and never NaN; the companion-matrix roots agree with the
// sign-change scan wherever the scan sees them.
func TestOcticPositiveRootsRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for k := 0; k < 2000; k++ {
		a := (2*rng.Float64() - 1) * math.Pow(10, 4*rng.Float64()-2)
		b := (2*rng.Float64() - 1) * math.Pow(10, 4*rng.Float64()-2)
		c := -math.Pow(10, 4*rng.Float64()-2)
		got := octicPositiveRoots(a, b, c)
		if len(got) < 1 || len(got) > 3 {
			t.Fatalf("a=%g b=%g c=%g: %d positive roots %v, want 1 to 3", a, b, c, len(got), got)
		}
		for _, x := range got {
			q := math.Pow(x, 8) + a*math.Pow(x, 6) + b*x*x*x + c
			mag := math.Pow(x, 8) + math.Abs(a*math.Pow(x, 6)) + math.Abs(b*x*x*x) + math.Abs(c)
			if math.IsNaN(x) || !(x > 0) || math.Abs(q) > 1e-11*mag {
				t.Fatalf("a=%g b=%g c=%g: %g is not a root (q = %g)", a, b, c, x, q)
			}
		}
		s := math.Max(math.Sqrt(math.Abs(a)), math.Max(math.Pow(math.Abs(b), 0.2), math.Pow(math.Abs(c), 0.125)))
		scan := octicRootsByScan(a/(s*s), b/math.Pow(s, 5), c/math.Pow(s, 8), s)
		if len(scan) > len(got) {
			t.Fatalf("a=%g b=%g c=%g: scan finds %v, eigenvalues %v", a, b, c, scan, got)
		}
	}
	// A double root (tangency) is found once. With the structure
	// x⁸ + a·x⁶ + b·x³ + c, a double root at x0 needs q(x0) = 0 and
	// q′(x0) = 0: b = −(8x0⁵ + 6a·x0³)/3, c = −x0⁸ − a·x0⁶ − b·x0³.
	x0, a := 1.3, -1.0
	b := -(8*math.Pow(x0, 5) + 6*a*math.Pow(x0, 3)) / 3
	c := -math.Pow(x0, 8) - a*math.Pow(x0, 6) - b*x0*x0*x0
	found := false
	for _, x := range octicPositiveRoots(a, b, c) {
		// A double root is determined only to √ε relative.
		if math.Abs(x-x0) < 1e-7 {
			if found {
				t.Errorf("double root %g reported twice", x0)
			}
			found = true
		}
	}
	if !found {
		t.Errorf("double root %g not found: %v", x0, octicPositiveRoots(a, b, c))
	}
	for _, bad := range [][3]float64{{math.NaN(), 1, -1}, {0, 0, 0}, {1, math.Inf(1), -1}} {
		if r := octicPositiveRoots(bad[0], bad[1], bad[2]); r != nil {
			t.Errorf("coefficients %v: roots %v, want none", bad, r)
		}
	}
}
