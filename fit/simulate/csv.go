package simulate

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"arcfit/fit/plan"
)

// Header returns the provenance lines of the file (without the "# "): that
// the observations are synthetic, the object, the sites, the nights, the
// cadence and the limits, the noise and the seed, the columns.
func (r *Result) Header() []string {
	c := r.Config
	src := c.Source
	if src == "" {
		src = "not described"
	}
	var sites []string
	for _, s := range c.Sites {
		sites = append(sites, fmt.Sprintf("%s (%.6f, %.6f, %g m)", s.Name, s.Lat.Degrees(), s.Lon.Degrees(), s.HeightM))
	}
	var nights []string
	for _, d := range c.Nights {
		nights = append(nights, d.String())
	}
	place := "the target's prediction for the site (Predict)"
	if _, ok := c.Target.(plan.ElementsTarget); ok {
		place = "astrometric ICRS, topocentric, two-body motion with light time (ephem.PlaceOfElements)"
	}
	mag := "no magnitudes (the object has none)"
	if r.hasMag() {
		mag = "magnitudes: the object's predicted V"
		if c.MagSigma > 0 {
			mag += fmt.Sprintf(" with Gaussian noise of %g mag", c.MagSigma)
		} else {
			mag += ", without noise"
		}
	}
	return []string{
		"SYNTHETIC observations made by arcfit simulate: not measurements of the real sky.",
		"object: " + oneLine(src),
		"sites (lat_deg, lon_deg, height_m; WGS84, east positive): " + strings.Join(sites, "; "),
		"nights (local date of the evening, the site's local mean solar time): " + strings.Join(nights, ", "),
		fmt.Sprintf("per night and site: %d observations every %s, centred on the best time, only with the Sun's centre below -18 deg and the object at least %g deg high (refracted, 10 C, 1010 hPa)",
			c.PerNight, shortDuration(c.Cadence), c.MinAlt.Degrees()),
		"positions: " + place,
		fmt.Sprintf("noise: Gaussian, sigma %g arcsec per coordinate (RA on the sky), seed %d (PCG, Box-Muller); %s", c.SigmaArcsec, c.Seed, mag),
		"columns: time UTC; ra_deg, dec_deg astrometric ICRS, degrees; sigma the noise's sigma, arcsec",
	}
}

// hasMag reports whether any sample has a magnitude.
func (r *Result) hasMag() bool {
	for _, s := range r.Samples {
		if !math.IsNaN(s.Mag) {
			return true
		}
	}
	return false
}

// WriteCSV writes the samples as design.md's observation CSV: the Header
// lines and then extra (each as a '#' comment), a header row, and one row a
// sample in time order — time (ISO 8601 UTC to the second), ra_deg and
// dec_deg (to 1e-9°), sigma (arcsec), site, and mag and band (V) when any
// sample has a magnitude (an empty mag where one has none). Fields that
// hold a comma or a quote are quoted.
func (r *Result) WriteCSV(w io.Writer, extra ...string) error {
	bw := bufio.NewWriter(w)
	for _, l := range append(r.Header(), extra...) {
		fmt.Fprintf(bw, "# %s\n", oneLine(l))
	}
	cw := csv.NewWriter(bw)
	head := []string{"time", "ra_deg", "dec_deg", "sigma", "site"}
	withMag := r.hasMag()
	if withMag {
		head = append(head, "mag", "band")
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	sigma := strconv.FormatFloat(r.Config.SigmaArcsec, 'g', -1, 64)
	for _, s := range r.Samples {
		rec := []string{formatTime(s.UTC), formatDeg(s.RA.Degrees()), formatDeg(s.Dec.Degrees()), sigma, s.Site}
		if withMag {
			if math.IsNaN(s.Mag) {
				rec = append(rec, "", "")
			} else {
				rec = append(rec, formatMag(s.Mag), "V")
			}
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	return bw.Flush()
}

// oneLine keeps a header line on one line.
func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

// shortDuration formats a cadence: 20m, 1h30m, 45s.
func shortDuration(d time.Duration) string {
	var b strings.Builder
	if h := d / time.Hour; h > 0 {
		fmt.Fprintf(&b, "%dh", h)
	}
	if m := d % time.Hour / time.Minute; m > 0 {
		fmt.Fprintf(&b, "%dm", m)
	}
	if s := d % time.Minute; s > 0 || b.Len() == 0 {
		fmt.Fprintf(&b, "%gs", s.Seconds())
	}
	return b.String()
}
