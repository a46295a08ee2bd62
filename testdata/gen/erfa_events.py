#!/usr/bin/python3
"""Reference times of the events of a night for package ephem (events.go,
twilight.go, night.go), computed with python3-erfa.

Run from the repository root:

    /usr/bin/python3 testdata/gen/erfa_events.py

It writes testdata/erfa_events.txt, starting with a provenance header.
Everything here is this script's own: ERFA routines for the positions and
the Earth's rotation, and a bisection of its own on the altitudes. Nothing
of package ephem is used and nothing needs the network (astropy is not used).

Definitions:

  night     the night of DATE at a site is the span from local noon of DATE
            to local noon of DATE + 1 day in the site's local mean solar
            time, a fixed offset of round(240 s * east longitude in degrees)
            seconds from UTC. The span's start is written as a UTC two-part
            JD; the end is one day later.
  time      TT = UTC + (TAI-UTC) + 32.184 s (eraUtctai, eraTaitt; ERFA keeps
            37 s past its table), UT1 = UTC (dut1 = 0: the test uses the
            same), TDB = TT + eraDtdb (geocentric).
  observer  eraApco13 (site on WGS84, no polar motion, no refraction):
            astrom.eb the observer's barycentric position, astrom.v its
            barycentric velocity / c (diurnal part included).
  Sun       barycentric S = pvb - pvh of eraEpv00; astrometric direction
            S(t - tau) - O(t), tau iterated (S(t - tau) = S(t) - tau * dS/dt);
            eraAb for aberration; eraPnm06a to the true equator and equinox of
            date; hour angle eraGst06a(UT1, TT) + east longitude - RA; altitude
            and azimuth from eraHd2ae. The altitude is geometric: no refraction.
  Moon      eraMoon98 geocentric (GCRS axes), astrometric direction
            m(t - tau) - tau * v_E - g(t), with v_E the Earth's barycentric
            velocity (eraEpv00) and g the site's geocentric position
            (astrom.eb - Earth's barycentric position); then as the Sun.
  sunset, sunrise   the Sun's centre at geometric altitude -0.8333 deg (its
            upper limb on the horizon with the standard 34' of refraction
            and a 16' semidiameter).
  twilights the Sun's centre at geometric altitude -6, -12, -18 deg.
  selection for each Sun threshold h: the intervals of the night's span in
            which the Sun is below h; the longest of them. Its start is the
            dusk (sunset) unless it is the span's start, its end the dawn
            (sunrise) unless it is the span's end. state: 'interval', or
            'always_below' / 'never_below' when the Sun is below h during
            the whole span / never.
  moonrise, moonset  the Moon's upper limb 34' below the geometric horizon:
            topocentric geometric altitude of the centre + s = -34', with the
            topocentric semidiameter s = asin(0.2725 * 6378.14 km / distance)
            (Meeus, Astronomical Algorithms, 2nd ed., ch. 15, p. 102: k =
            0.2725 and 34' of refraction). Every crossing in the span.
  moontransit  the Moon's upper meridian transit: topocentric apparent hour
            angle 0, every one in the span.
  roots     the functions are sampled every 5 minutes over the span (extended
            by 5 minutes each side), sign changes bracketed and bisected to
            0.01 s.
  sunalt    the lowest and highest geometric altitude of the Sun's centre
            among the 5-minute samples of the span (deg; informative).
"""

import math
import os
import sys
import warnings

import erfa
import numpy as np

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "erfa_events.txt")
COMMAND = "/usr/bin/python3 testdata/gen/erfa_events.py"
VERSIONS = "python3-erfa %s (ERFA %s), numpy %s, Python %s" % (
    erfa.__version__,
    getattr(erfa.version, "erfa_version", "?"),
    np.__version__,
    sys.version.split()[0],
)

DEG = math.pi / 180
AU_KM = 149597870.700
C_AU_DAY = 173.14463267424034  # 299792.458 km/s * 86400 s / AU_KM
MOON_K = 0.2725
EARTH_RADIUS_KM = 6378.14

# Invented sites: name, lat deg, east lon deg, height m (WGS84).
SITES = [
    ("Brackenfold", 51.72, -2.35, 180.0),
    ("Corrie_Flat", -38.20, 145.90, 120.0),
    ("Vardhaug", 69.30, 18.70, 50.0),
    ("Tavu_Point", -17.20, 179.50, 20.0),
    ("Siglak_Spit", 51.80, -179.50, 30.0),
    ("Khar_Tolgoi", 45.80, 106.20, 1400.0),
    ("Isbrae_Camp", 86.00, 40.00, 300.0),
]

DATES = [
    (2026, 1, 8), (2026, 2, 17), (2026, 3, 20), (2026, 4, 29), (2026, 5, 24),
    (2026, 6, 21), (2026, 7, 30), (2026, 9, 5), (2026, 10, 14), (2026, 11, 30),
    (2026, 12, 21), (2027, 1, 20), (2027, 3, 3), (2027, 5, 15), (2027, 6, 21),
    (2027, 8, 12), (2027, 10, 1), (2027, 12, 21), (2028, 2, 29), (2028, 4, 8),
    (2028, 7, 15), (2028, 11, 5),
]

SUN_LEVELS = [("sun", -0.8333, "sunset", "sunrise"),
              ("civil", -6.0, "civil_dusk", "civil_dawn"),
              ("nautical", -12.0, "nautical_dusk", "nautical_dawn"),
              ("astro", -18.0, "astro_dusk", "astro_dawn")]
MOON_LEVEL = -34.0 / 60.0

STEP = 5.0 / 1440.0
TOL = 0.01 / 86400.0


def scales(d1, d2):
    """UTC two-part (arrays) -> (tt1, tt2), (tdb1, tdb2)."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        a1, a2 = erfa.utctai(d1, d2)
    t1, t2 = erfa.taitt(a1, a2)
    b2 = t2 + erfa.dtdb(t1, t2, 0.0, 0.0, 0.0, 0.0) / 86400.0
    return (t1, t2), (t1, b2)


def topo(site, d1, d2, body):
    """Geometric altitude (rad), azimuth (rad), hour angle (rad), distance (au)
    of the Sun or the Moon from the site at UTC d1 + d2 (arrays)."""
    _, lat, lon, h = site
    d1 = np.atleast_1d(np.asarray(d1, dtype=float))
    d2 = np.atleast_1d(np.asarray(d2, dtype=float))
    (t1, t2), (b1, b2) = scales(d1, d2)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        astrom, _ = erfa.apco13(d1, d2, 0.0, lon * DEG, lat * DEG, h, 0.0, 0.0, 0.0, 0.0, 0.0, 0.55)
    eb = astrom["eb"]
    pvh, pvb = erfa.epv00(b1, b2)
    if body == "sun":
        s = pvb["p"] - pvh["p"]
        sv = pvb["v"] - pvh["v"]
        tau = np.zeros(len(d1))
        for _ in range(6):
            p = s - tau[:, None] * sv - eb
            tau = np.linalg.norm(p, axis=1) / C_AU_DAY
    else:
        g = eb - pvb["p"]
        tau = np.zeros(len(d1))
        for _ in range(4):
            m = erfa.moon98(b1, b2 - tau)["p"]
            p = m - tau[:, None] * pvb["v"] - g
            tau = np.linalg.norm(p, axis=1) / C_AU_DAY
    dist = np.linalg.norm(p, axis=1)
    u = p / dist[:, None]
    app = erfa.ab(u, astrom["v"], astrom["em"], astrom["bm1"])
    rnpb = erfa.pnm06a(t1, t2)
    pd = np.einsum("nij,nj->ni", rnpb, app)
    ra, dec = erfa.c2s(pd)
    ha = erfa.anpm(erfa.gst06a(d1, d2, t1, t2) + lon * DEG - ra)
    az, el = erfa.hd2ae(ha, dec, lat * DEG)
    return el, az, ha, dist


def sun_alt(site, d1, d2):
    return topo(site, d1, d2, "sun")[0]


def moon_limb(site, d1, d2):
    el, _, _, dist = topo(site, d1, d2, "moon")
    s = np.arcsin(MOON_K * EARTH_RADIUS_KM / (dist * AU_KM))
    return el + s


def moon_ha(site, d1, d2):
    return topo(site, d1, d2, "moon")[2]


def bisect(f, day, lo, hi, flo):
    """Root of f(day + x) - 0 in [lo, hi], f(lo) having the sign of flo."""
    while hi - lo > TOL:
        mid = 0.5 * (lo + hi)
        fm = f(day, mid)
        if (fm < 0) == (flo < 0):
            lo, flo = mid, fm
        else:
            hi = mid
    return 0.5 * (lo + hi)


def crossings(g, day, xs, vals):
    """Sign changes of the sampled g; returns [(x, rising)]."""
    out = []
    for i in range(len(xs) - 1):
        a, b = vals[i], vals[i + 1]
        if (a < 0) != (b < 0):
            out.append((bisect(g, day, xs[i], xs[i + 1], a), b >= 0))
    return out


def night(site, y, mo, d, w):
    name, lat, lon, _ = site
    offset_s = round(240.0 * lon)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # ERFA's "dubious year" past its leap-second table
        day, frac = erfa.dtf2d("UTC", y, mo, d, 12, 0, 0.0)
    start = frac - offset_s / 86400.0  # relative to day
    end = start + 1.0
    w("night %s %04d-%02d-%02d %.1f %.12f" % (name, y, mo, d, day + math.floor(start), start - math.floor(start)))
    xs = np.arange(start - STEP, end + 1.5 * STEP, STEP)
    sun = sun_alt(site, np.full(len(xs), day), xs)
    inside = (xs >= start) & (xs <= end)
    w("sunalt %s %04d-%02d-%02d %.4f %.4f" % (name, y, mo, d, sun[inside].min() / DEG, sun[inside].max() / DEG))

    def jd(x):
        whole = math.floor(x)
        return "%.1f %.12f" % (day + whole, x - whole)

    for level, hdeg, dusk, dawn in SUN_LEVELS:
        h = hdeg * DEG

        def g(dd, x, h=h):
            return sun_alt(site, dd, x)[0] - h

        roots = [(x, r) for x, r in crossings(g, day, xs, sun - h) if start <= x < end]
        # intervals below h within [start, end]
        below0 = g(day, start) < 0
        edges = [start] + [x for x, _ in roots] + [end]
        best, blen = None, -1.0
        below = below0
        for i in range(len(edges) - 1):
            if below and edges[i + 1] - edges[i] > blen:
                best, blen = (i, i + 1), edges[i + 1] - edges[i]
            below = not below
        if best is None:
            w("state %s %04d-%02d-%02d %s never_below" % (name, y, mo, d, level))
            continue
        a, b = edges[best[0]], edges[best[1]]
        if best == (0, len(edges) - 1):
            w("state %s %04d-%02d-%02d %s always_below" % (name, y, mo, d, level))
            continue
        w("state %s %04d-%02d-%02d %s interval" % (name, y, mo, d, level))
        if best[0] != 0:
            w("event %s %04d-%02d-%02d %s %s" % (name, y, mo, d, dusk, jd(a)))
        if best[1] != len(edges) - 1:
            w("event %s %04d-%02d-%02d %s %s" % (name, y, mo, d, dawn, jd(b)))

    hm = MOON_LEVEL * DEG

    def gm(dd, x):
        return moon_limb(site, dd, x)[0] - hm

    mv = moon_limb(site, np.full(len(xs), day), xs) - hm
    for x, rising in crossings(gm, day, xs, mv):
        if start <= x < end:
            w("event %s %04d-%02d-%02d %s %s" % (name, y, mo, d, "moonrise" if rising else "moonset", jd(x)))

    def gh(dd, x):
        return moon_ha(site, dd, x)[0]

    hv = moon_ha(site, np.full(len(xs), day), xs)
    for i in range(len(xs) - 1):
        # an upper transit: the hour angle goes from negative to positive
        # through 0 (not the jump from +pi to -pi at the lower transit)
        if hv[i] < 0 <= hv[i + 1] and hv[i + 1] - hv[i] < 1.0:
            x = bisect(gh, day, xs[i], xs[i + 1], hv[i])
            if start <= x < end:
                w("event %s %04d-%02d-%02d moontransit %s" % (name, y, mo, d, jd(x)))


def main():
    lines = []
    w = lines.append
    w("# Reference times of rise, set, twilight and transit for package ephem (events.go, twilight.go, night.go).")
    w("# Made by: %s" % COMMAND)
    w("# With: %s" % VERSIONS)
    w("# Definitions: see the docstring of testdata/gen/erfa_events.py. In short: the night of DATE spans")
    w("#   local noon to local noon in local mean solar time (offset round(240 s * east lon deg));")
    w("#   Sun from eraEpv00 + eraAb + eraPnm06a + eraGst06a + eraHd2ae via eraApco13 (no refraction,")
    w("#   no polar motion, UT1 = UTC); sunset/sunrise = centre at geometric -0.8333 deg; twilights =")
    w("#   centre at -6/-12/-18 deg; for each level the longest interval below it in the span;")
    w("#   Moon from eraMoon98, rise/set = topocentric centre altitude + asin(0.2725*6378.14 km/dist)")
    w("#   = -34 arcmin (Meeus ch. 15); moontransit = topocentric apparent hour angle 0.")
    w("#   Roots: 5-minute samples, bisection to 0.01 s.")
    w("# Sites (invented; lat deg, east lon deg, height m, WGS84):")
    for s in SITES:
        w("#   site %s %.6f %.6f %.1f" % s)
    w("# lines: night SITE DATE start_utc_day start_utc_frac (end = start + 1 d)")
    w("#        sunalt SITE DATE min_deg max_deg")
    w("#        state SITE DATE LEVEL interval|always_below|never_below   (LEVEL sun civil nautical astro)")
    w("#        event SITE DATE KIND utc_day utc_frac")
    for s in SITES:
        for (y, mo, d) in DATES:
            night(s, y, mo, d, w)
    with open(OUT, "w") as f:
        f.write("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
