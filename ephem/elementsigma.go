package ephem

import "arcfit/astro"

// ElementSigma holds the 1-σ uncertainties of an element set, each taken as
// independent of the others (a published element set seldom gives the
// correlations). The asteroid form uses A, E, I, Node, Peri and M; the comet
// form Q, E, I, Node, Peri and TpDays; the other fields are 0.
//
// In the elements CSV they are the optional columns sigma_a_au, sigma_e,
// sigma_i_deg, sigma_node_deg, sigma_peri_deg, sigma_m_deg, sigma_q_au and
// sigma_tp_days (days).
type ElementSigma struct {
	A, E             float64     // au, dimensionless
	I, Node, Peri, M astro.Angle // radians
	Q                float64     // au
	TpDays           float64     // days
}
