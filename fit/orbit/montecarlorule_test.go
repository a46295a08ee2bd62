package orbit

import (
	"strings"
	"testing"

	"arcfit/astro"
)

func TestChooseSampling(t *testing.T) {
	two, ss := rgTwoNights(4, 4)
	obs2, _ := rgSynthetic(t, rgMainBelt, two, ss, 0.5, nil)
	ts, ss3 := mcThreeNights(10)
	obs3, _ := rgSynthetic(t, rgMainBelt, ts, ss3, 0.5, nil)
	last := ts[len(ts)-1]
	for _, c := range []struct {
		name    string
		obs     []Observation
		at      astro.JD
		haveCov bool
		want    string
	}{
		{"two nights", obs2, last.AddDays(1), true, SamplingRanging},
		{"three nights, no covariance", obs3, last.AddDays(1), false, SamplingRanging},
		{"three nights, 5 d after a 10 d arc", obs3, last.AddDays(5), true, SamplingLinear},
		{"three nights, inside the arc", obs3, ts[5], true, SamplingLinear},
		{"three nights, 30 d after a 10 d arc", obs3, last.AddDays(30), true, SamplingCovariance},
		{"three nights, 11 d before a 10 d arc", obs3, ts[0].AddDays(-11), true, SamplingCovariance},
	} {
		got := ChooseSampling(c.obs, c.at, c.haveCov)
		if got.Method != c.want || got.Reason == "" {
			t.Errorf("%s: %q (%s), want %q", c.name, got.Method, got.Reason, c.want)
		}
	}
}

func TestCompareLinear(t *testing.T) {
	ra, dec := 150*astro.Degree, 12*astro.Degree
	lin := [2][2]float64{{4, 1}, {1, 9}} // arcsec²
	same := &SampledRegion{RA: ra, Dec: dec, CovArcsec2: lin}
	if differ, why := CompareLinear(ra, dec, lin, same); differ {
		t.Errorf("identical regions differ: %s", why)
	}
	big := &SampledRegion{RA: ra, Dec: dec, CovArcsec2: [2][2]float64{{4 * 1.5 * 1.5, 1.5 * 1.5}, {1.5 * 1.5, 9 * 1.5 * 1.5}}}
	if differ, why := CompareLinear(ra, dec, lin, big); !differ || !strings.Contains(why, "semi-major") {
		t.Errorf("a region 1.5× larger: differ %v (%s)", differ, why)
	}
	// 2″ north: σ_N = 3″, so about 0.7σ (with the correlation) — beyond 0.5σ.
	moved := &SampledRegion{RA: ra, Dec: dec + 2*astro.Arcsecond, CovArcsec2: lin}
	if differ, why := CompareLinear(ra, dec, lin, moved); !differ || !strings.Contains(why, "centre") {
		t.Errorf("a centre 2″ away: differ %v (%s)", differ, why)
	}
	// 0.5″ north: under 0.2σ.
	near := &SampledRegion{RA: ra, Dec: dec + 0.5*astro.Arcsecond, CovArcsec2: lin}
	if differ, why := CompareLinear(ra, dec, lin, near); differ {
		t.Errorf("a centre 0.5″ away differs: %s", why)
	}
}
