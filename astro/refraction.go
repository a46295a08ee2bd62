package astro

import (
	"fmt"
	"math"
)

// Standard conditions for refraction (design.md): the formulas of Meeus ch. 16
// are for these, and arcfit's refracted altitudes use them unless told
// otherwise.
const (
	// StandardPressureHPa is the standard air pressure at the observer, 1010 hPa.
	StandardPressureHPa = 1010.0
	// StandardTemperatureC is the standard air temperature at the observer, 10 °C.
	StandardTemperatureC = 10.0
)

// Limits of the refraction formulas as arcfit evaluates them.
const (
	// refractionFloorDeg is the altitude below which the refraction is held at
	// its value there: the formulas are fits to observations above the horizon,
	// and below about −2° Saemundsson's turns over and then diverges at −5.11°.
	refractionFloorDeg = -1.0
)

// RefractionBennett returns the atmospheric refraction R to subtract from an
// apparent (observed) altitude to get the true (airless) altitude, for an
// observer at pressure pressureHPa (hPa) and temperature temperatureC (°C):
//
//	R = 1′ / tan(h0 + 7.31/(h0 + 4.4))          h0 apparent altitude in degrees
//	R ← R · (P/1010) · (283/(273 + T))          P in hPa, T in °C
//
// Accuracy (Bennett's own, as quoted by Meeus; the figure recalled from
// memory): 0.07′ for altitudes 0–90° at the standard conditions. Outside the formula's domain:
//   - below an apparent altitude of −1° the refraction is held at its value at −1°
//     (49.8′ at standard conditions), so the result is smooth, finite and never NaN;
//   - within about 0.08° of the zenith (and above 90°) the formula turns slightly
//     negative (−0.0014′ at 90°); the result is clamped to zero there.
//
// NaN altitude gives NaN. Conditions that are not physical (pressure < 0,
// temperature ≤ −273 °C, NaN) give NaN; check user input with
// [CheckRefractionConditions]. Pressure 0 gives no refraction.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 16, eq. 16.4 and the
// pressure and temperature factor of p. 107; the original, as cited there
// (citation recalled from memory): Bennett, G. G., Journal of Navigation 35
// (1982), 255–259.
func RefractionBennett(apparentAlt Angle, pressureHPa, temperatureC float64) Angle {
	h := apparentAlt.Degrees()
	if math.IsNaN(h) {
		return Angle(math.NaN())
	}
	h = max(h, refractionFloorDeg)
	r := 1 / math.Tan((h+7.31/(h+4.4))*math.Pi/180)
	return refractionScaled(r, pressureHPa, temperatureC)
}

// RefractionSaemundsson returns the atmospheric refraction R to add to a true
// (airless) altitude to get the apparent altitude, for an observer at pressure
// pressureHPa (hPa) and temperature temperatureC (°C):
//
//	R = 1.02′ / tan(h + 10.3/(h + 5.11))        h true altitude in degrees
//	R ← R · (P/1010) · (283/(273 + T))
//
// It is consistent with [RefractionBennett] to about 0.1′ (Meeus; figure
// recalled from memory, and checked in refraction_test.go).
// Outside the formula's domain, as for RefractionBennett: below a true altitude
// of −1° the refraction is held at its value at −1° (38.8′ at standard
// conditions; the formula itself turns over at −1.9° and diverges at −5.11°),
// and negative values near the zenith are clamped to zero. NaN altitude or
// non-physical conditions give NaN.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 16, eq. 16.5 and the
// factor of p. 107; the original, as cited there (recalled from memory):
// Sæmundsson, Þ., Sky and Telescope 72 (1986), 70.
func RefractionSaemundsson(trueAlt Angle, pressureHPa, temperatureC float64) Angle {
	h := trueAlt.Degrees()
	if math.IsNaN(h) {
		return Angle(math.NaN())
	}
	h = max(h, refractionFloorDeg)
	r := 1.02 / math.Tan((h+10.3/(h+5.11))*math.Pi/180)
	return refractionScaled(r, pressureHPa, temperatureC)
}

// refractionScaled applies the clamp at zero and the pressure and temperature
// factor of Meeus p. 107 to a refraction r in arcminutes.
func refractionScaled(rArcmin, pressureHPa, temperatureC float64) Angle {
	f := refractionFactor(pressureHPa, temperatureC)
	if math.IsNaN(f) {
		return Angle(math.NaN())
	}
	return Angle(max(rArcmin, 0)*f) * Arcminute
}

// refractionFactor is (P/1010)·(283/(273 + T)), Meeus p. 107, or NaN for
// conditions that are not physical.
func refractionFactor(pressureHPa, temperatureC float64) float64 {
	if !(pressureHPa >= 0) || !(temperatureC > -273) || math.IsInf(pressureHPa, 0) || math.IsInf(temperatureC, 0) {
		return math.NaN()
	}
	return pressureHPa / 1010 * 283 / (273 + temperatureC)
}

// Accepted ranges of the observing conditions, chosen to cover every
// observing site on the Earth (common knowledge: recorded surface temperatures
// stay within about −90 °C and +57 °C, sea-level pressure below about 1085 hPa).
const (
	minPressureHPa  = 0.0
	maxPressureHPa  = 1200.0
	minTemperatureC = -100.0
	maxTemperatureC = 60.0
)

// CheckRefractionConditions reports whether a pressure (hPa) and temperature
// (°C) given by a user are plausible for an observing site: pressure 0–1200 hPa
// (0 meaning no atmosphere) and temperature −100 to +60 °C. The error wraps
// [ErrRange]; NaN and ±Inf are errors.
func CheckRefractionConditions(pressureHPa, temperatureC float64) error {
	if !(pressureHPa >= minPressureHPa && pressureHPa <= maxPressureHPa) {
		return fmt.Errorf("astro: pressure %g hPa: want %g–%g hPa: %w", pressureHPa, minPressureHPa, maxPressureHPa, ErrRange)
	}
	if !(temperatureC >= minTemperatureC && temperatureC <= maxTemperatureC) {
		return fmt.Errorf("astro: temperature %g °C: want %g to %g °C: %w", temperatureC, minTemperatureC, maxTemperatureC, ErrRange)
	}
	return nil
}
