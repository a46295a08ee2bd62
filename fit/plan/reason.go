package plan

import "fmt"

// Reason says whether a target can be observed on a night and, when not, why.
// When several reasons hold, the first of this order is given: the
// prediction fails, the target is near the Sun, there is no astronomical
// darkness, the target stays below the altitude limit.
type Reason int

const (
	// Observable: the target stands above the limit during darkness.
	Observable Reason = iota
	// ReasonPredictionFailed: the target cannot be predicted for the night.
	ReasonPredictionFailed
	// ReasonNearSun: the target is within 15° of the Sun (ephem.NearSunLimit)
	// at the middle of the dark window, or at local midnight when there is
	// none. With the Sun 18° below the horizon such a target is at least 3°
	// below it.
	ReasonNearSun
	// ReasonNoDarkness: the Sun does not get 18° below the horizon on that
	// night at that latitude (a high-latitude summer).
	ReasonNoDarkness
	// ReasonBelowLimit: the target stays below the altitude limit throughout
	// the dark window.
	ReasonBelowLimit
)

var reasonCodes = [...]string{Observable: "observable", ReasonPredictionFailed: "prediction_failed",
	ReasonNearSun: "near_sun", ReasonNoDarkness: "no_darkness", ReasonBelowLimit: "below_limit"}

// String returns the reason's code: "observable", "prediction_failed",
// "near_sun", "no_darkness" or "below_limit" (the JSON of night uses them).
func (r Reason) String() string {
	if r >= 0 && int(r) < len(reasonCodes) {
		return reasonCodes[r]
	}
	return fmt.Sprintf("Reason(%d)", int(r))
}
