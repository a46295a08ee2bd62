package fit

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// Kind is the family of a motion model.
type Kind int

// The model families. (The constructors [Poly] and [Piecewise] carry the short
// names, so the kinds are prefixed.)
const (
	// KindPoly is a polynomial in time in each of ξ and η.
	KindPoly Kind = iota
	// KindPiecewise is continuous piecewise-linear motion: straight segments
	// joined at knots.
	KindPiecewise
	// KindKepler is a heliocentric two-body orbit fitted to the observations
	// ([FitOrbit]); it is not a sky-plane model and [Fit] refuses it.
	KindKepler
	// KindNBody is a heliocentric orbit perturbed by the planets and the
	// Moon, fitted to the observations ([FitNBody]); not a sky-plane model
	// either.
	KindNBody
)

// Kepler returns the two-body orbit model.
func Kepler() Model { return Model{Kind: KindKepler} }

// NBody returns the perturbed orbit model.
func NBody() Model { return Model{Kind: KindNBody} }

// Model is a sky-plane motion model: the geocentric standard coordinates
// ξ(τ), η(τ) as linear combinations of the same basis functions of the scaled
// time τ = T/TimeScaleDays (T in TT days from the track's epoch).
//
//	poly d:     1, τ, τ², …, τ^d                         (d + 1 functions)
//	piecewise:  1, τ, max(0, τ − κ₁), …, max(0, τ − κ_k)  (k + 2 functions)
//
// with κ_i = Knots[i]/TimeScaleDays. The hinge basis gives a path that is
// continuous at every knot and straight between knots: k knots give k + 1
// segments, the slope changing by the hinge coefficient at each knot.
//
// Reference: polynomial and hinge (truncated power) bases of degree 1 — de
// Boor, A Practical Guide to Splines, rev. ed. (2001), ch. VIII (the
// truncated power basis); Hastie, Tibshirani & Friedman, The Elements of
// Statistical Learning, 2nd ed. (2009), §5.2 (piecewise-linear bases).
type Model struct {
	Kind   Kind
	Degree int       // 1..3 for KindPoly; 1 for KindPiecewise
	Knots  []float64 // days from the track's EpochTT, increasing; KindPiecewise only
}

// Poly returns the polynomial model of the given degree (1, 2 or 3; other
// degrees give a model that [Fit] rejects).
func Poly(degree int) Model { return Model{Kind: KindPoly, Degree: degree} }

// Piecewise returns the continuous piecewise-linear model with the given knots
// (TT days from the track's epoch); the knots are copied and sorted. With no
// knots it is the straight line, poly1.
func Piecewise(knots []float64) Model {
	k := append([]float64(nil), knots...)
	sort.Float64s(k)
	return Model{Kind: KindPiecewise, Degree: 1, Knots: k}
}

// Name returns "poly1", "poly2", "poly3" or "piecewise".
func (m Model) Name() string {
	switch m.Kind {
	case KindPiecewise:
		return "piecewise"
	case KindKepler:
		return "kepler"
	case KindNBody:
		return "nbody"
	}
	return fmt.Sprintf("poly%d", m.Degree)
}

// String returns the name, with the knots of a piecewise model in days
// ("piecewise[-1.021,+0.987]").
func (m Model) String() string {
	if m.Kind != KindPiecewise {
		return m.Name()
	}
	parts := make([]string, len(m.Knots))
	for i, k := range m.Knots {
		parts[i] = fmt.Sprintf("%+.3f", k)
	}
	return "piecewise[" + strings.Join(parts, ",") + "]"
}

// ModelNames are the names [ParseModelName] accepts, "auto" first.
var ModelNames = []string{"auto", "poly1", "poly2", "poly3", "piecewise", "kepler", "nbody"}

// ParseModelName checks a model name given by a user (case and surrounding
// blanks ignored) and returns it in canonical form: one of auto, poly1,
// poly2, poly3, piecewise, kepler, nbody.
func ParseModelName(s string) (name string, err error) {
	t := strings.ToLower(strings.TrimSpace(s))
	for _, n := range ModelNames {
		if t == n {
			return n, nil
		}
	}
	return "", fmt.Errorf("fit: unknown model %q (want one of %s)", s, strings.Join(ModelNames, ", "))
}

// NumPerCoord returns the number of basis functions, the parameters per
// coordinate.
func (m Model) NumPerCoord() int {
	switch m.Kind {
	case KindPiecewise:
		return 2 + len(m.Knots)
	case KindKepler, KindNBody:
		return 3 // the six elements of the state, counted three per coordinate
	}
	return m.Degree + 1
}

// NumMotionParams returns the number of motion parameters of both
// coordinates, 2 × [Model.NumPerCoord] (the inverse distance, when fitted,
// comes on top).
func (m Model) NumMotionParams() int { return 2 * m.NumPerCoord() }

// validate reports a model that cannot be fitted as it stands.
func (m Model) validate() error {
	switch m.Kind {
	case KindPoly:
		if m.Degree < 1 || m.Degree > 3 {
			return fmt.Errorf("fit: polynomial degree %d not supported (want 1, 2 or 3)", m.Degree)
		}
	case KindPiecewise:
		for i, k := range m.Knots {
			if math.IsNaN(k) || math.IsInf(k, 0) {
				return fmt.Errorf("fit: piecewise knot %d is not finite", i+1)
			}
			if i > 0 && !(k > m.Knots[i-1]) {
				return fmt.Errorf("fit: piecewise knots must increase (knot %d at %+.6f d)", i+1, k)
			}
		}
	case KindKepler:
		return fmt.Errorf("fit: kepler is a two-body orbit, not a sky-plane model (use FitOrbit)")
	case KindNBody:
		return fmt.Errorf("fit: nbody is a perturbed orbit, not a sky-plane model (use FitNBody)")
	default:
		return fmt.Errorf("fit: unknown model kind %d", int(m.Kind))
	}
	return nil
}

// basis writes the basis functions at scaled time tau into dst
// (len NumPerCoord) for a track whose time scale is scaleDays.
func (m Model) basis(dst []float64, tau, scaleDays float64) {
	dst[0] = 1
	dst[1] = tau
	if m.Kind == KindPiecewise {
		for i, k := range m.Knots {
			h := tau - k/scaleDays
			if h < 0 {
				h = 0
			}
			dst[2+i] = h
		}
		return
	}
	p := tau
	for j := 2; j <= m.Degree; j++ {
		p *= tau
		dst[j] = p
	}
}

// basisDeriv writes the derivatives d/dτ of the basis functions into dst (the
// right derivative at a knot).
func (m Model) basisDeriv(dst []float64, tau, scaleDays float64) {
	dst[0] = 0
	dst[1] = 1
	if m.Kind == KindPiecewise {
		for i, k := range m.Knots {
			if tau >= k/scaleDays {
				dst[2+i] = 1
			} else {
				dst[2+i] = 0
			}
		}
		return
	}
	// d/dτ τ^j = j τ^(j−1)
	q := 1.0
	for j := 2; j <= m.Degree; j++ {
		q *= tau
		dst[j] = float64(j) * q
	}
}
