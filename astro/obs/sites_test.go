package obs

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// TestParseSiteSpec checks the inline form "lat_deg,lon_deg,height_m"
// (design.md: −180…360 accepted and normalised to (−180, 180]; beyond, and
// latitudes beyond ±90, are errors).
func TestParseSiteSpec(t *testing.T) {
	tests := []struct {
		in          string
		lat, lon, h float64
		err         error
		src         string
	}{
		{"44.52,-72.80,410", 44.52, -72.80, 410, nil, "design.md example"},
		{" 44.52 , 287.20 , 410 ", 44.52, -72.80, 410, nil, "287.20 − 360 = −72.80 (normalisation)"},
		{"-33.9,−180,5", -33.9, 180, 5, nil, "−180 is 180 in (−180, 180]; Unicode minus"},
		{"0,360,0", 0, 0, 0, nil, "360 − 360 = 0"},
		{"44.52,-180.5,410", 0, 0, 0, ErrRange, "beyond −180"},
		{"44.52,360.1,410", 0, 0, 0, ErrRange, "beyond 360"},
		{"90.01,0,0", 0, 0, 0, ErrRange, "latitude beyond ±90"},
		{"44.52,-72.80", 0, 0, 0, ErrSyntax, "height missing"},
		{"44,52,-72,80,410", 0, 0, 0, ErrSyntax, "decimal commas"},
		{"44.52,NaN,410", 0, 0, 0, ErrSyntax, "NaN"},
	}
	for _, tt := range tests {
		s, err := ParseSiteSpec(tt.in)
		if tt.err != nil {
			if !errors.Is(err, tt.err) || strings.Contains(err.Error(), "\n") {
				t.Errorf("ParseSiteSpec(%q) = %v, want %v (%s)", tt.in, err, tt.err, tt.src)
			}
			continue
		}
		if err != nil {
			t.Errorf("ParseSiteSpec(%q): %v (%s)", tt.in, err, tt.src)
			continue
		}
		if math.Abs(s.Lat.Degrees()-tt.lat) > 1e-12 || math.Abs(s.Lon.Degrees()-tt.lon) > 1e-12 || s.HeightM != tt.h {
			t.Errorf("ParseSiteSpec(%q) = %.12g°, %.12g°, %g m; want %g, %g, %g (%s)", tt.in,
				s.Lat.Degrees(), s.Lon.Degrees(), s.HeightM, tt.lat, tt.lon, tt.h, tt.src)
		}
	}
}

// TestReadSites checks the sites CSV and its rejects.
func TestReadSites(t *testing.T) {
	s, err := ReadSitesFile(dataDir + "sites.csv")
	if err != nil {
		t.Fatal(err)
	}
	if l := s["Lakeside Club"]; math.Abs(l.Lon.Degrees()-(288.05-360)) > 1e-12 || l.HeightM != 220 {
		t.Errorf("Lakeside Club %+v, want lon 288.05−360°, 220 m", l)
	}
	in := bom + "Height_M,\"Name\",lat_deg,lon_deg,notes\r\n410,\"Hill Top, north pier\",44.52,-72.80,x\r\n410,Hill Top,44.52,-72.80,y\r\n410,Hill Top,44.52,-72.80,z\r\n"
	m, warns, err := ReadSitesWarnings(strings.NewReader(in), "s.csv")
	if err != nil || len(m) != 2 || len(warns) != 2 {
		t.Fatalf("%v, %d sites, warnings %v; want 2 sites, an unused-column and a repeat warning", err, len(m), warns)
	}
	for _, tt := range []struct {
		file, pos string
		err       error
	}{
		{"sites_bad_lon.csv", "2:16", ErrRange},
		{"sites_bad_lat.csv", "2:10", ErrRange},
		{"sites_bad_twice.csv", "3:1", ErrDuplicateSite},
		{"sites_bad_header.csv", "1:1", ErrHeader},
	} {
		_, err := ReadSitesFile(dataDir + tt.file)
		if !errors.Is(err, tt.err) || !strings.HasPrefix(err.Error(), dataDir+tt.file+":"+tt.pos+": ") {
			t.Errorf("%s: %v, want %s:%s and %v", tt.file, err, tt.file, tt.pos, tt.err)
		}
	}
}
