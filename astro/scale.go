package astro

import "fmt"

// Scale is a time scale.
type Scale int

// The time scales arcfit uses. The zero value is UTC, the scale of observation
// times as users write them.
const (
	UTC Scale = iota // Coordinated Universal Time
	TAI              // International Atomic Time
	TT               // Terrestrial Time (TT = TAI + 32.184 s)
	TDB              // Barycentric Dynamical Time
	UT1              // Universal Time, the Earth's rotation angle as a time
)

var scaleNames = [...]string{UTC: "UTC", TAI: "TAI", TT: "TT", TDB: "TDB", UT1: "UT1"}

// String returns the scale's usual abbreviation, such as "TT".
func (s Scale) String() string {
	if s >= 0 && int(s) < len(scaleNames) {
		return scaleNames[s]
	}
	return fmt.Sprintf("Scale(%d)", int(s))
}

// ParseScale returns the scale named by s ("UTC", "TAI", "TT", "TDB", "UT1"),
// exactly as [Scale.String] writes it.
func ParseScale(s string) (Scale, error) {
	for i, n := range scaleNames {
		if n == s {
			return Scale(i), nil
		}
	}
	return 0, fmt.Errorf("astro: unknown time scale %q (want UTC, TAI, TT, TDB or UT1)", s)
}
