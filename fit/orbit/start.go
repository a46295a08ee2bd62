package orbit

// MethodGauss is the [Start.Method] of an initial orbit by Gauss's method
// ([GaussStarts]).
const MethodGauss = "gauss"

// Start is an initial orbit: a starting point for the differential
// correction, with the method that produced it.
type Start struct {
	// State is the orbit at the TDB instant of the observation it was
	// determined at (for Gauss's method, the middle one of its three).
	State State
	// Method names the method that produced it: [MethodGauss], or that of a
	// method made for short arcs.
	Method string
	// Chi2 is the start's χ² against all the used observations
	// ([State.Residuals]); starts are returned best first.
	Chi2 float64
	// Notes say how the start was found (the observations used, the root,
	// the refinement), one line each.
	Notes []string
}
