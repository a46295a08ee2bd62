package ephem

import (
	"bufio"
	"errors"
	"fmt"
	"math"
	"os"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"
	_ "time/tzdata" // the IANA zones of the tests, independent of the system's copy

	"arcfit/astro"
)

// eventsTable is testdata/erfa_events.txt, made by testdata/gen/erfa_events.py
// (python3-erfa 2.0.0.1): for invented sites and dates in 2026–2028, the
// night's span, the state of each Sun level and the UTC instants of the
// Sun's and the Moon's events, found by bisection (to 0.01 s) on ERFA-computed
// altitudes with the definitions of this package.
type eventsNight struct {
	site   astro.Site
	date   [3]int
	start  astro.JD
	state  map[string]string     // level → interval | always_below | never_below
	events map[string][]astro.JD // kind → instants
}

func readEventsTable(t *testing.T) []*eventsNight {
	t.Helper()
	const path = "../testdata/erfa_events.txt"
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sites := map[string]astro.Site{}
	var nights []*eventsNight
	byKey := map[string]*eventsNight{}
	sc := bufio.NewScanner(f)
	line := 0
	num := func(s string) float64 {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("%s:%d: %v", path, line, err)
		}
		return v
	}
	for sc.Scan() {
		line++
		fs := strings.Fields(sc.Text())
		if len(fs) == 0 {
			continue
		}
		if fs[0] == "#" {
			if len(fs) == 6 && fs[1] == "site" {
				sites[fs[2]] = astro.Site{Name: fs[2], Lat: astro.AngleFromDegrees(num(fs[3])),
					Lon: astro.AngleFromDegrees(num(fs[4])), HeightM: num(fs[5])}
			}
			continue
		}
		key := fs[1] + " " + fs[2]
		switch fs[0] {
		case "night":
			var y, m, d int
			if _, err := fmt.Sscanf(fs[2], "%d-%d-%d", &y, &m, &d); err != nil {
				t.Fatalf("%s:%d: %v", path, line, err)
			}
			n := &eventsNight{site: sites[fs[1]], date: [3]int{y, m, d},
				start: astro.JD{Day: num(fs[3]), Frac: num(fs[4]), Scale: astro.UTC},
				state: map[string]string{}, events: map[string][]astro.JD{}}
			nights = append(nights, n)
			byKey[key] = n
		case "state":
			byKey[key].state[fs[3]] = fs[4]
		case "event":
			byKey[key].events[fs[3]] = append(byKey[key].events[fs[3]], astro.JD{Day: num(fs[4]), Frac: num(fs[5]), Scale: astro.UTC})
		}
	}
	if len(nights) < 100 {
		t.Fatalf("%s: %d nights, want the full table", path, len(nights))
	}
	return nights
}

// maxDelta collects the worst difference per event kind.
type maxDelta map[string]float64

func (m maxDelta) add(kind string, d float64) {
	if math.Abs(d) > math.Abs(m[kind]) {
		m[kind] = d
	}
}

func (m maxDelta) log(t *testing.T) {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		t.Logf("worst %-14s Δ %+.2f s", k, m[k])
	}
}

// eventTolSec is the tolerance of the comparison with the ERFA table. The
// issue asks for rise, set and twilight times within 1 minute of the
// reference; we hold them to 2 s, which is what the two computations allow:
// the reference is bisected to 0.01 s and ours refined to 0.05 s, on
// positions that agree to 0.05″ (the Sun, place tests) and well below 1″
// (the Moon: the same Meeus ch. 47 series in ERFA's moon98), i.e. a few
// hundredths of a second at the altitude rates of the table's crossings.
// The measured worst differences are logged.
const eventTolSec = 2

// TestNightAtERFA compares NightAt with testdata/erfa_events.txt for every
// night of the table: the span, the state of each Sun level (polar day and
// night, no astronomical darkness), every Sun event and every moonrise and
// moonset, in the site's local mean time.
func TestNightAtERFA(t *testing.T) {
	nights := readEventsTable(t)
	worst := maxDelta{}
	for i, rn := range nights {
		if testing.Short() && i%4 != 0 {
			continue // a quarter of the table under -short
		}
		name := fmt.Sprintf("%s %04d-%02d-%02d", rn.site.Name, rn.date[0], rn.date[1], rn.date[2])
		n, err := NightAt(rn.date[0], rn.date[1], rn.date[2], rn.site, nil)
		if err != nil && !errors.Is(err, astro.ErrStaleTable) {
			t.Fatalf("NightAt(%s): %v", name, err)
		}
		if d := n.Start.Sub(rn.start) * 86400; math.Abs(d) > 1e-3 {
			t.Errorf("NightAt(%s): start %v, want %v (Δ %.3g s; erfa_events.py definition)", name, n.Start, rn.start, d)
		}
		check := func(kind string, got astro.JD) {
			want := rn.events[kind]
			switch {
			case len(want) == 0 && Happens(got):
				t.Errorf("NightAt(%s): %s at %s, want none (erfa_events.txt)", name, kind, astro.FormatISO8601(got, 0))
			case len(want) == 1 && !Happens(got):
				t.Errorf("NightAt(%s): no %s, want %s (erfa_events.txt)", name, kind, astro.FormatISO8601(want[0], 0))
			case len(want) == 1:
				d := got.Sub(want[0]) * 86400
				worst.add(kind, d)
				if math.Abs(d) > eventTolSec {
					t.Errorf("NightAt(%s): %s = %s, want %s (Δ %.1f s, erfa_events.txt)", name, kind,
						astro.FormatISO8601(got, 0), astro.FormatISO8601(want[0], 0), d)
				}
			case len(want) > 1:
				t.Fatalf("erfa_events.txt: %s: %d %s", name, len(want), kind)
			}
		}
		check("sunset", n.Sunset)
		check("sunrise", n.Sunrise)
		check("civil_dusk", n.CivilDusk)
		check("civil_dawn", n.CivilDawn)
		check("nautical_dusk", n.NauticalDusk)
		check("nautical_dawn", n.NauticalDawn)
		check("astro_dusk", n.AstroDusk)
		check("astro_dawn", n.AstroDawn)

		if got, want := n.PolarDay, rn.state["sun"] == "never_below"; got != want {
			t.Errorf("NightAt(%s): PolarDay %v, want %v (erfa_events.txt state %s)", name, got, want, rn.state["sun"])
		}
		if got, want := n.PolarNight, rn.state["sun"] == "always_below"; got != want {
			t.Errorf("NightAt(%s): PolarNight %v, want %v (erfa_events.txt state %s)", name, got, want, rn.state["sun"])
		}
		switch rn.state["astro"] {
		case "never_below":
			if Happens(n.DarkStart) || Happens(n.DarkEnd) || n.DarkReason == "" || n.DarkHours() != 0 {
				t.Errorf("NightAt(%s): dark %v–%v (%q), want no dark window with a reason", name, n.DarkStart, n.DarkEnd, n.DarkReason)
			}
		case "always_below":
			if !Happens(n.DarkStart) || math.Abs(n.DarkStart.Sub(n.Start)) > 1e-9 || math.Abs(n.DarkEnd.Sub(n.End)) > 1e-9 {
				t.Errorf("NightAt(%s): dark %v–%v, want the whole span", name, n.DarkStart, n.DarkEnd)
			}
		case "interval":
			if Happens(n.AstroDusk) && n.AstroDusk.Sub(n.DarkStart) != 0 || Happens(n.AstroDawn) && n.AstroDawn.Sub(n.DarkEnd) != 0 {
				t.Errorf("NightAt(%s): dark %v–%v, want astronomical dusk to dawn %v–%v", name, n.DarkStart, n.DarkEnd, n.AstroDusk, n.AstroDawn)
			}
			if !(n.DarkHours() > 0) {
				t.Errorf("NightAt(%s): dark hours %g, want > 0", name, n.DarkHours())
			}
		}

		for _, mk := range []struct {
			kind string
			got  []astro.JD
		}{{"moonrise", n.Moonrise}, {"moonset", n.Moonset}} {
			want := rn.events[mk.kind]
			if len(mk.got) != len(want) {
				t.Errorf("NightAt(%s): %d %s %v, want %d %v (erfa_events.txt)", name, len(mk.got), mk.kind, mk.got, len(want), want)
				continue
			}
			for i := range want {
				d := mk.got[i].Sub(want[i]) * 86400
				worst.add(mk.kind, d)
				if math.Abs(d) > eventTolSec {
					t.Errorf("NightAt(%s): %s = %s, want %s (Δ %.1f s, erfa_events.txt)", name, mk.kind,
						astro.FormatISO8601(mk.got[i], 0), astro.FormatISO8601(want[i], 0), d)
				}
			}
		}
		if len(rn.events["moonrise"])+len(rn.events["moonset"]) == 0 && n.Moon == RisesAndSets {
			t.Errorf("NightAt(%s): Moon %v with no rise or set", name, n.Moon)
		}
	}
	worst.log(t)
}

// TestTransitsERFA compares the Moon's upper transits with the table's
// (topocentric apparent hour angle 0, bisected on ERFA positions) over the
// first six nights of each site.
func TestTransitsERFA(t *testing.T) {
	nights := readEventsTable(t)
	worst := maxDelta{}
	count := map[string]int{}
	for _, rn := range nights {
		if count[rn.site.Name]++; count[rn.site.Name] > 6 {
			continue
		}
		site := rn.site
		ev, err := Transits(Moon, rn.start, rn.start.AddDays(1), Observer{Site: &site})
		if err != nil && !errors.Is(err, astro.ErrStaleTable) {
			t.Fatal(err)
		}
		var got []astro.JD
		for _, e := range ev {
			if e.Kind == Transit {
				got = append(got, e.Time)
			}
		}
		want := rn.events["moontransit"]
		if len(got) != len(want) {
			t.Errorf("Transits(Moon, %s %v): %d upper transits, want %d (erfa_events.txt)", site.Name, rn.date, len(got), len(want))
			continue
		}
		for i := range want {
			d := got[i].Sub(want[i]) * 86400
			worst.add("moontransit", d)
			if math.Abs(d) > eventTolSec {
				t.Errorf("Transits(Moon, %s %v): %s, want %s (Δ %.1f s, erfa_events.txt)", site.Name, rn.date,
					astro.FormatISO8601(got[i], 0), astro.FormatISO8601(want[i], 0), d)
			}
		}
	}
	worst.log(t)
}

// TestSunRiseSetERFA checks SunRiseSet and Twilights on the table's spans
// (the first four nights of each site): each sunset, sunrise and
// astronomical dusk and dawn of the table is among the events within
// eventTolSec, and a level the Sun never crosses gives the right Visibility.
func TestSunRiseSetERFA(t *testing.T) {
	nights := readEventsTable(t)
	count := map[string]int{}
	for _, rn := range nights {
		if count[rn.site.Name]++; count[rn.site.Name] > 4 && rn.site.Name != "Vardhaug" {
			continue
		}
		site := rn.site
		o := Observer{Site: &site}
		end := rn.start.AddDays(1)
		for _, lv := range []struct {
			level, dusk, dawn string
			find              func() ([]Event, Visibility, error)
		}{
			{"sun", "sunset", "sunrise", func() ([]Event, Visibility, error) { return SunRiseSet(rn.start, end, o) }},
			{"astro", "astro_dusk", "astro_dawn", func() ([]Event, Visibility, error) { return Twilights(AstronomicalTwilight, rn.start, end, o) }},
		} {
			ev, vis, err := lv.find()
			if err != nil && !errors.Is(err, astro.ErrStaleTable) {
				t.Fatal(err)
			}
			wantVis := map[string]Visibility{"interval": RisesAndSets, "never_below": AlwaysAbove, "always_below": AlwaysBelow}[rn.state[lv.level]]
			if vis != wantVis && !(wantVis == RisesAndSets && len(ev) > 0) {
				t.Errorf("%s %s %v: visibility %v, want %v (erfa_events.txt)", lv.level, site.Name, rn.date, vis, wantVis)
			}
			for _, k := range []struct {
				name string
				kind EventKind
			}{{lv.dusk, Set}, {lv.dawn, Rise}} {
				for _, want := range rn.events[k.name] {
					found := false
					for _, e := range ev {
						if e.Kind == k.kind && math.Abs(e.Time.Sub(want)*86400) <= eventTolSec {
							found = true
						}
					}
					if !found {
						t.Errorf("%s %s %v: no %v within %g s of %s (erfa_events.txt); got %v", lv.level, site.Name, rn.date, k.kind, float64(eventTolSec), astro.FormatISO8601(want, 0), ev)
					}
				}
			}
		}
	}
}

// TestNightAtLocalDate checks the definition of the night (design.md: the
// night of DATE begins on the evening of DATE in local time) at the sites on
// either side of the date line and with IANA zones: the sunset falls on DATE
// and the sunrise on the next day, in local time; the same Sun events come
// out whatever zone frames the span; a change to daylight-saving time makes
// the span 23 hours (the EU rule, common practice: clocks go forward at
// 01:00 UTC on the last Sunday of March, 2026-03-29).
func TestNightAtLocalDate(t *testing.T) {
	tavu := astro.Site{Name: "Tavu Point", Lat: astro.AngleFromDegrees(-17.2), Lon: astro.AngleFromDegrees(179.5), HeightM: 20}
	siglak := astro.Site{Name: "Siglak Spit", Lat: astro.AngleFromDegrees(51.8), Lon: astro.AngleFromDegrees(-179.5), HeightM: 30}
	for _, site := range []astro.Site{tavu, siglak} {
		n, err := NightAt(2027, 3, 3, site, nil)
		if err != nil && !errors.Is(err, astro.ErrStaleTable) {
			t.Fatal(err)
		}
		set, rise := n.Local(n.Sunset), n.Local(n.Sunrise)
		if set.Day() != 3 || set.Hour() < 15 || rise.Day() != 4 || rise.Hour() > 9 {
			t.Errorf("NightAt(%s, 2027-03-03): sunset %v, sunrise %v (local); want the evening of the 3rd and the morning of the 4th", site.Name, set, rise)
		}
		if want := map[bool]string{true: "LMT+11:58", false: "LMT-11:58"}[site.Lon > 0]; n.Location.String() != want {
			t.Errorf("NightAt(%s): zone %q, want %q", site.Name, n.Location, want)
		}
	}

	khar := astro.Site{Name: "Khar Tolgoi", Lat: astro.AngleFromDegrees(45.8), Lon: astro.AngleFromDegrees(106.2), HeightM: 1400}
	ulan, err := time.LoadLocation("Asia/Ulaanbaatar")
	if err != nil {
		t.Fatal(err)
	}
	a, _ := NightAt(2026, 10, 14, khar, nil)
	b, _ := NightAt(2026, 10, 14, khar, ulan)
	for _, p := range [][2]astro.JD{{a.Sunset, b.Sunset}, {a.Sunrise, b.Sunrise}, {a.AstroDusk, b.AstroDusk}, {a.DarkEnd, b.DarkEnd}} {
		if d := p[0].Sub(p[1]) * 86400; math.Abs(d) > 0.1 {
			t.Errorf("NightAt(Khar Tolgoi, 2026-10-14): LMT and Asia/Ulaanbaatar spans give events %.2f s apart, want the same events", d)
		}
	}

	bracken := astro.Site{Name: "Brackenfold", Lat: astro.AngleFromDegrees(51.72), Lon: astro.AngleFromDegrees(-2.35), HeightM: 180}
	london, err := time.LoadLocation("Europe/London")
	if err != nil {
		t.Fatal(err)
	}
	n, err := NightAt(2026, 3, 28, bracken, london)
	if err != nil {
		t.Fatal(err)
	}
	if h := n.End.Sub(n.Start) * 24; math.Abs(h-23) > 1e-6 {
		t.Errorf("NightAt(Brackenfold, 2026-03-28, Europe/London): span %.6f h, want 23 h", h)
	}
}

// TestNightAtErrors checks bad input: an impossible date, a bad site.
func TestNightAtErrors(t *testing.T) {
	ok := astro.Site{Name: "ok", Lat: astro.AngleFromDegrees(40), Lon: astro.AngleFromDegrees(10)}
	bad := []struct {
		name    string
		y, m, d int
		site    astro.Site
	}{
		{"February 30", 2027, 2, 30, ok},
		{"month 13", 2027, 13, 1, ok},
		{"latitude 95°", 2027, 2, 3, astro.Site{Lat: astro.AngleFromDegrees(95)}},
		{"NaN longitude", 2027, 2, 3, astro.Site{Lon: astro.Angle(math.NaN())}},
		{"day 0", 2027, 1, 0, ok},
	}
	for _, tt := range bad {
		if _, err := NightAt(tt.y, tt.m, tt.d, tt.site, nil); err == nil || errors.Is(err, astro.ErrStaleTable) {
			t.Errorf("NightAt(%s): err %v, want an error", tt.name, err)
		}
	}
}

// TestMoonPhaseAtNight checks the Moon's phase of NightAt against Meeus'
// example 49.a: the New Moon of 1977 February 18, 3h37m42s TD (JDE
// 2443192.65118; /work/shared/checks/meeus.md). Local midnight of the night of
// February 17 at longitude 0 is 3.6 h before it: "new moon", under 1 % lit.
// The first quarter follows a quarter of the mean synodic month (29.53 d,
// common practice) later, near February 25.5; at local midnight of the night
// of the 25th (0.5 d after it, elongation near 96°) the name is "first
// quarter" and the disk about half lit.
func TestMoonPhaseAtNight(t *testing.T) {
	site := astro.Site{Name: "zero", Lat: astro.AngleFromDegrees(10)}
	n, err := NightAt(1977, 2, 17, site, nil)
	if err != nil {
		t.Fatal(err)
	}
	if e := n.MoonElongation.Wrapped().Degrees(); n.MoonPhaseName != "new moon" || n.MoonIllumination > 0.01 || math.Abs(e) > 5 {
		t.Errorf("NightAt(1977-02-17): %q, elongation %.2f°, illumination %.4f, want new moon, near 0 (Meeus 49.a)", n.MoonPhaseName, e, n.MoonIllumination)
	}
	n, err = NightAt(1977, 2, 25, site, nil)
	if err != nil {
		t.Fatal(err)
	}
	if n.MoonPhaseName != "first quarter" || math.Abs(n.MoonIllumination-0.5) > 0.1 {
		t.Errorf("NightAt(1977-02-25): %q, illumination %.3f, want first quarter near 0.5", n.MoonPhaseName, n.MoonIllumination)
	}
}

// TestHorizonMatchesPlace checks that the events' altitude function gives
// the altitude and azimuth of PlaceOfBody without refraction (the same
// model; this guards against the two drifting apart), to 1e-9 rad.
func TestHorizonMatchesPlace(t *testing.T) {
	site := astro.Site{Name: "x", Lat: astro.AngleFromDegrees(-33), Lon: astro.AngleFromDegrees(150), HeightM: 700}
	o := Observer{Site: &site, NoRefraction: true, DUT1Sec: 0.3}
	for _, b := range []Body{Sun, Moon, Mars} {
		helio, err := helioOf(b)
		if err != nil {
			t.Fatal(err)
		}
		for _, jd := range []float64{2461200.3, 2461500.81} {
			utc := astro.NewJD(jd, astro.UTC)
			pl, err := PlaceOfBody(b, utc, o)
			if err != nil {
				t.Fatal(err)
			}
			h, err := horizonOf(helio, utc, o)
			if err != nil {
				t.Fatal(err)
			}
			if d := math.Max(math.Abs(float64(h.alt-pl.Alt)), math.Abs(float64((h.az - pl.Az).Wrapped()))); d > 1e-9 {
				t.Errorf("horizonOf(%v, %.2f): alt %.9f az %.9f, PlaceOfBody alt %.9f az %.9f", b, jd, h.alt, h.az, pl.Alt, pl.Az)
			}
			if d := math.Abs(h.distAU - pl.DeltaAU); d > 1e-12 {
				t.Errorf("horizonOf(%v, %.2f): distance %.12f au, PlaceOfBody %.12f", b, jd, h.distAU, pl.DeltaAU)
			}
		}
	}
}

func BenchmarkNightAt(b *testing.B) {
	b.ReportAllocs()
	site := astro.Site{Name: "Brackenfold", Lat: astro.AngleFromDegrees(51.72), Lon: astro.AngleFromDegrees(-2.35), HeightM: 180}
	var sink float64
	for b.Loop() {
		n, _ := NightAt(2027, 2, 3, site, nil)
		sink += n.DarkHours()
	}
	_ = sink
}
