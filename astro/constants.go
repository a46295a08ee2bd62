package astro

import "math"

// Epochs and calendar constants.
const (
	// J2000 is the Julian date of the epoch J2000.0, 2000 January 1 12h TT.
	J2000 = 2451545.0
	// MJDOffset is JD − MJD (the Modified Julian Date starts at 1858 Nov 17 0h).
	MJDOffset = 2400000.5
	// DaysPerJulianCentury is the length of a Julian century in days.
	DaysPerJulianCentury = 36525.0
	// DaysPerJulianMillennium is the length of a Julian millennium in days.
	DaysPerJulianMillennium = 365250.0
	// SecondsPerDay is the number of SI seconds in a day of 86400 s.
	SecondsPerDay = 86400.0
)

// Physical constants.
const (
	// AUKm is the astronomical unit in kilometres (IAU 2012 Resolution B2, exact).
	AUKm = 149597870.700
	// SpeedOfLightKmS is the speed of light in km/s (SI, exact).
	SpeedOfLightKmS = 299792.458
	// SpeedOfLightAUDay is the speed of light in au per day of 86400 s.
	SpeedOfLightAUDay = SpeedOfLightKmS * SecondsPerDay / AUKm
	// WGS84EquatorialRadiusKm is the WGS84 semi-major axis (NIMA TR8350.2, 2000).
	WGS84EquatorialRadiusKm = 6378.137
	// WGS84Flattening is the WGS84 flattening f (NIMA TR8350.2, 2000).
	WGS84Flattening = 1 / 298.257223563
	// TTMinusTAISeconds is TT − TAI, fixed by definition (IAU 1991 Resolution A4).
	TTMinusTAISeconds = 32.184
)

// Angle units as [Angle] values, so that 3*Degree or 1.5*Arcsecond read as written.
const (
	Radian         Angle = 1
	Degree         Angle = math.Pi / 180
	Arcminute      Angle = Degree / 60
	Arcsecond      Angle = Degree / 3600
	Milliarcsecond Angle = Arcsecond / 1000
	// HourAngle is one hour of right ascension or hour angle, 15°.
	HourAngle Angle = 15 * Degree
	// TimeSecond is one second of time in right ascension, 15″.
	TimeSecond Angle = HourAngle / 3600
)

const twoPi = 2 * math.Pi
