package astro

import "math"

// Angle is an angle in radians. Conversion to and from radians is exact; the
// other units are the constants [Degree], [Arcsecond], [HourAngle] and so on.
type Angle float64

// Radians returns a in radians.
func (a Angle) Radians() float64 { return float64(a) }

// Degrees returns a in degrees.
func (a Angle) Degrees() float64 { return float64(a / Degree) }

// Arcminutes returns a in minutes of arc.
func (a Angle) Arcminutes() float64 { return float64(a / Arcminute) }

// Arcseconds returns a in seconds of arc.
func (a Angle) Arcseconds() float64 { return float64(a / Arcsecond) }

// Milliarcseconds returns a in milliseconds of arc.
func (a Angle) Milliarcseconds() float64 { return float64(a / Milliarcsecond) }

// Hours returns a in hours (15° to the hour).
func (a Angle) Hours() float64 { return float64(a / HourAngle) }

// Normalized returns a reduced to [0, 2π). NaN and ±Inf give NaN.
func (a Angle) Normalized() Angle {
	r := math.Mod(float64(a), twoPi)
	if r < 0 {
		r += twoPi
	}
	if r >= twoPi { // -tiny + 2π rounds to 2π
		r = 0
	}
	return Angle(r)
}

// Wrapped returns a reduced to (−π, π], keeping the full precision of small
// angles of either sign. NaN and ±Inf give NaN.
func (a Angle) Wrapped() Angle {
	r := math.Remainder(float64(a), twoPi) // in [−π, π]
	if r <= -math.Pi {
		r += twoPi
	}
	return Angle(r)
}

// AngleFromDegrees returns the angle of deg degrees.
func AngleFromDegrees(deg float64) Angle { return Angle(deg) * Degree }

// AngleFromHours returns the angle of h hours (15° to the hour).
func AngleFromHours(h float64) Angle { return Angle(h) * HourAngle }

// AngleFromArcseconds returns the angle of as seconds of arc.
func AngleFromArcseconds(as float64) Angle { return Angle(as) * Arcsecond }
