package demo

import (
	"embed"
	"sort"
)

//go:embed data/*.csv
var files embed.FS

// File names of the scenario's data, as the demo command writes them.
const (
	// ObservationsFile is the name of the invented observation CSV.
	ObservationsFile = "observations.csv"
	// SitesFile is the name of the invented sites CSV.
	SitesFile = "sites.csv"
	// ElementsFile is the name of the invented orbital-elements CSV.
	ElementsFile = "elements.csv"
	// TruthFile is the name of the CSV of noise-free positions.
	TruthFile = "truth.csv"
)

// ObjectName is the invented object's name as it appears in the elements file.
const ObjectName = "Demo-1 (invented)"

func mustRead(name string) []byte {
	b, err := files.ReadFile("data/" + name)
	if err != nil {
		// The files are embedded at build time; a missing one is a build defect.
		panic("demo: embedded file missing: " + name)
	}
	return b
}

// Observations returns the invented observation CSV (design.md's native format:
// time, ra, dec, sigma, site, mag, band), fourteen rows with comment headers.
// The slice is a fresh copy the caller may keep or modify.
func Observations() []byte { return mustRead(ObservationsFile) }

// Sites returns the invented sites CSV (name, lat_deg, lon_deg, height_m),
// geodetic WGS84, east longitude positive. The slice is a fresh copy.
func Sites() []byte { return mustRead(SitesFile) }

// Elements returns the invented orbital elements CSV (name, epoch_tt, a_au, e,
// i_deg, node_deg, peri_deg, m_deg, h, g): heliocentric, ecliptic and equinox
// J2000. The slice is a fresh copy.
func Elements() []byte { return mustRead(ElementsFile) }

// Truth returns the CSV of noise-free positions: astrometric ICRS RA and Dec in
// degrees, topocentric for the named site, at the observation times (kind
// "obs") and hourly over the following 60 nights (kind "hourly"), with
// distances in au, elongation, refracted altitude and azimuth in degrees, the
// Sun's altitude and the V magnitude. The slice is a fresh copy.
func Truth() []byte { return mustRead(TruthFile) }

// Files returns every file of the scenario, keyed by the file name the demo
// command writes it as. The map and its slices are fresh copies.
func Files() map[string][]byte {
	return map[string][]byte{
		ObservationsFile: Observations(),
		SitesFile:        Sites(),
		ElementsFile:     Elements(),
		TruthFile:        Truth(),
	}
}

// FileNames returns the names of the scenario's files in sorted order.
func FileNames() []string {
	names := []string{ObservationsFile, SitesFile, ElementsFile, TruthFile}
	sort.Strings(names)
	return names
}
