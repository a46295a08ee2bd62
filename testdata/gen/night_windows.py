#!/usr/bin/python3
"""Reference night windows of invented element-set targets for package
fit/plan (night.go, window.go), computed with python3-astropy and numpy.

Run from the repository root:

    /usr/bin/python3 testdata/gen/night_windows.py

It writes two files:

    fit/plan/testdata/night_targets.csv   the invented element sets (the
                                          orbital-elements CSV of design.md)
    fit/plan/testdata/night_windows.txt   for each site, night and target: the
                                          dark window, the target's window(s)
                                          above the altitude limit within it,
                                          the best time and the state

Everything is this script's own: the two-body positions come from a Kepler
solver written here in numpy (Newton's method on Kepler's equation), the
Earth, the Sun and the site from astropy (its builtin solar-system ephemeris,
ERFA's epv00), the altitudes from astropy's AltAz frame. Nothing of arcfit is
used. astropy is kept offline: no IERS or leap-second downloads; UT1 = UTC
(delta_ut1_utc = 0, as arcfit takes it); astropy's IERS-B table ends before
these dates, so it takes the polar motion from its 50-year mean (it says so
on stderr; an arcsecond-level effect, far below the minutes compared).

Definitions:

  night     the night of DATE at a site spans local noon of DATE to local
            noon of DATE + 1 in the site's local mean solar time, a fixed
            offset of round(240 s * east longitude in degrees) from UTC
            (arcfit's default local time).
  grid      the span sampled every minute (1441 instants, UTC); every
            crossing of a threshold is first bracketed on that grid, then
            located by linear interpolation on a 1-second grid of +-60 s
            around the first estimate (all astropy evaluations).
  dark      the Sun (astropy get_sun) in AltAz with pressure = 0, i.e. the
            geometric altitude of its centre; astronomical darkness is the
            Sun below -18 deg; the dark window is the longest stretch of the
            span with the Sun below -18 deg (its ends the span's ends when
            the Sun is that low there). 'none' when the Sun never gets so low.
  target    heliocentric ecliptic-J2000 position from the elements (GM = k^2,
            k = 0.01720209895 au^1.5/day, time in TDB days), turned to ICRS
            axes by R1(-eps0), eps0 = 84381.448 arcsec (no frame bias);
            barycentric X = helio + the Sun's barycentric position (astropy
            get_body_barycentric_posvel 'sun', taken at t - tau as
            S(t) - tau * dS/dt); observer O = the Earth's barycentric position
            (get_body_barycentric_posvel 'earth') + the site's GCRS position
            (EarthLocation.get_gcrs_posvel). Astrometric direction: that of
            X(t - tau) - O(t), tau = |X(t - tau) - O(t)| / c iterated 6 times.
  altitude  that direction as an ICRS SkyCoord without distance, transformed
            by astropy to AltAz(location, obstime, pressure = 1010 hPa,
            temperature = 10 C, relative_humidity = 0, obswl = 0.55 um): the
            refracted altitude for arcfit's standard conditions. astropy's
            refraction (ERFA refco) is about 4 % below the Saemundsson formula
            arcfit uses (checks/references.md): 5 arcsec at 25 deg, a second
            or so of time at a crossing.
  window    the parts of the dark window in which the target's altitude is at
            least MINALT (one line per part, in time order).
  best      the instant of the highest altitude within the window(s): the
            vertex of a parabola through the 1-second samples around the
            highest sample when it lies inside a window, else the window end
            with the higher altitude.
  elong     angle at the observer between the target's astrometric direction
            and the Sun's (S(t) - O(t)), at the middle of the dark window, or
            at local midnight when there is none.
  state     near_sun (elong < 15 deg), else no_darkness, else below_limit
            (no window), else observable: the order in which arcfit gives the
            reason.
  next      for the SEARCHES below, the nights after DATE are evaluated one
            by one as above until three observable ones are found or the
            search's limit of nights has been tried; each found night gives
            the window part holding its best time and the best time.

The sites and element sets are invented; they describe no real place or
object.
"""

import math
import os
import sys
import warnings

from astropy.utils import iers
iers.conf.auto_download = False
iers.conf.auto_max_age = None
from astropy.utils.data import conf as data_conf
data_conf.allow_internet = False

import astropy
import astropy.units as u
import erfa
import numpy as np
from astropy.coordinates import (AltAz, EarthLocation, SkyCoord, get_body_barycentric_posvel,
                                 get_sun, solar_system_ephemeris)
from astropy.time import Time

HERE = os.path.dirname(os.path.abspath(__file__))
OUTDIR = os.path.normpath(os.path.join(HERE, "..", "..", "fit", "plan", "testdata"))
COMMAND = "/usr/bin/python3 testdata/gen/night_windows.py"


def dpkg_versions():
    """The Debian package versions, as dpkg-query -W prints them."""
    import subprocess
    try:
        out = subprocess.run(["dpkg-query", "-W", "python3-astropy", "python3-erfa", "python3-numpy"],
                             capture_output=True, text=True, check=True).stdout
        return "; ".join(" ".join(line.split()) for line in out.strip().splitlines())
    except Exception:  # not a Debian machine: the module versions below still say it
        return "dpkg-query unavailable"


VERSIONS = "astropy %s, pyerfa %s, numpy %s, Python %s" % (
    astropy.__version__, erfa.__version__, np.__version__, sys.version.split()[0])

K = 0.01720209895          # Gaussian gravitational constant (IAU 1976), au^1.5/day
GM = K * K
C_AU_DAY = 299792.458 * 86400 / 149597870.700
DEG = math.pi / 180
EPS0 = 84381.448 / 3600 * DEG
AU_M = 149597870700.0

# Invented sites: name (spaces as underscores), lat deg, east lon deg, height m.
SITES = [
    ("Alder_Ridge", 44.52, -72.80, 410.0),
    ("Norrvale", 62.40, 17.30, 90.0),
    ("Wattle_Rise", -34.60, 138.90, 350.0),
]

# Invented element sets: name, epoch (TT JD), a au, e, i, node, peri, M (deg), H, G.
TARGETS = [
    ("Invented-N1", 2461300.5, 2.55, 0.12, 11.0, 80.0, 140.0, 200.0, 14.8, 0.15),
    ("Invented-P2", 2461300.5, 2.20, 0.25, 48.0, 300.0, 60.0, 330.0, 16.1, 0.15),
    ("Invented-H3", 2461385.5, 1.57, 0.10, 112.4, 116.1, 56.7, 0.0, 18.5, 0.15),
]

# Nights: site, date, [(target, min alt deg), ...].
ALL25 = [(t[0], 25.0) for t in TARGETS]
NIGHTS = [
    ("Alder_Ridge", (2026, 4, 28), ALL25),
    ("Alder_Ridge", (2026, 7, 4), ALL25),
    ("Alder_Ridge", (2026, 10, 15), ALL25),
    ("Alder_Ridge", (2026, 12, 11), ALL25 + [("Invented-N1", 60.0)]),
    ("Alder_Ridge", (2027, 2, 14), ALL25),
    ("Norrvale", (2026, 6, 24), ALL25),
    ("Norrvale", (2026, 9, 5), ALL25),
    ("Norrvale", (2026, 10, 30), ALL25),
    ("Norrvale", (2026, 12, 11), ALL25 + [("Invented-H3", 40.0)]),
    ("Wattle_Rise", (2026, 6, 20), ALL25),
    ("Wattle_Rise", (2026, 8, 10), ALL25),
    ("Wattle_Rise", (2026, 12, 11), ALL25 + [("Invented-N1", 40.0)]),
    ("Wattle_Rise", (2027, 3, 1), ALL25),
]

# Searches for the next observable nights: site, date, target, min alt,
# nights to try at most. Nights after date are tried one by one until
# SEARCH_LIST observable ones are found or that many have been tried
# (arcfit's defaults are 3 and 60; the second search, which finds none, is
# kept to 20 nights to keep the test short).
SEARCHES = [
    ("Wattle_Rise", (2026, 6, 20), "Invented-N1", 25.0, 60),
    ("Norrvale", (2026, 6, 24), "Invented-P2", 25.0, 20),
]
SEARCH_LIST = 3

SUN_DARK = -18.0
NEAR_SUN = 15.0


def kepler(m, e):
    """Eccentric anomaly for mean anomalies m (array, rad), 0 <= e < 1."""
    E = np.where(e < 0.8, m + e * np.sin(m), np.pi * np.ones_like(m))
    for _ in range(60):
        E = E - (E - e * np.sin(E) - m) / (1 - e * np.cos(E))
    return E


def helio_icrs(el, tdb1, tdb2):
    """Heliocentric ICRS positions (au) of element set el at TDB jd1 + jd2."""
    _, epoch, a, e, i, node, peri, m0, _, _ = el
    n = K / a ** 1.5
    dt = (tdb1 - epoch) + tdb2
    M = np.mod(m0 * DEG + n * dt, 2 * np.pi)
    E = kepler(M, e)
    x = a * (np.cos(E) - e)
    y = a * math.sqrt(1 - e * e) * np.sin(E)
    i, node, peri = i * DEG, node * DEG, peri * DEG
    P = np.array([math.cos(peri) * math.cos(node) - math.sin(peri) * math.sin(node) * math.cos(i),
                  math.cos(peri) * math.sin(node) + math.sin(peri) * math.cos(node) * math.cos(i),
                  math.sin(peri) * math.sin(i)])
    Q = np.array([-math.sin(peri) * math.cos(node) - math.cos(peri) * math.sin(node) * math.cos(i),
                  -math.sin(peri) * math.sin(node) + math.cos(peri) * math.cos(node) * math.cos(i),
                  math.cos(peri) * math.sin(i)])
    r = np.outer(x, P) + np.outer(y, Q)
    ce, se = math.cos(EPS0), math.sin(EPS0)
    return np.stack([r[:, 0], ce * r[:, 1] - se * r[:, 2], se * r[:, 1] + ce * r[:, 2]], axis=1)


def times(day, frac):
    t = Time(day, frac, format="jd", scale="utc")
    t.delta_ut1_utc = np.zeros(t.shape)
    return t


def sun_alt(loc, day, frac):
    t = times(day, frac)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        aa = get_sun(t).transform_to(AltAz(obstime=t, location=loc, pressure=0 * u.hPa))
    return aa.alt.deg


def target_alt(loc, el, day, frac):
    """Refracted altitude (deg) and Sun elongation (deg) of the target."""
    t = times(day, frac)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        tdb = t.tdb
        ep, ev = get_body_barycentric_posvel("earth", t)
        sp, sv = get_body_barycentric_posvel("sun", t)
        gp, _ = loc.get_gcrs_posvel(t)
    earth = ep.xyz.to(u.au).value.T
    sun_p = sp.xyz.to(u.au).value.T
    sun_v = sv.xyz.to(u.au / u.day).value.T
    site = gp.xyz.to(u.m).value.T / AU_M
    obs = earth + site
    tau = np.zeros(len(frac))
    for _ in range(6):
        X = helio_icrs(el, tdb.jd1, tdb.jd2 - tau) + sun_p - tau[:, None] * sun_v
        p = X - obs
        tau = np.linalg.norm(p, axis=1) / C_AU_DAY
    d = p / np.linalg.norm(p, axis=1)[:, None]
    ra = np.arctan2(d[:, 1], d[:, 0])
    dec = np.arcsin(d[:, 2])
    s = sun_p - obs
    s = s / np.linalg.norm(s, axis=1)[:, None]
    elong = np.degrees(np.arccos(np.clip(np.sum(s * d, axis=1), -1, 1)))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        c = SkyCoord(ra=ra * u.rad, dec=dec * u.rad, frame="icrs")
        aa = c.transform_to(AltAz(obstime=t, location=loc, pressure=1010 * u.hPa,
                                  temperature=10 * u.deg_C, relative_humidity=0, obswl=0.55 * u.um))
    return aa.alt.deg, elong


def crossings(f, day, frac, vals, level):
    """Refined instants (frac of day) where the sampled vals cross level."""
    out = []
    for k in range(len(vals) - 1):
        a, b = vals[k] - level, vals[k + 1] - level
        if (a < 0) != (b < 0):
            x = frac[k] + (frac[k + 1] - frac[k]) * a / (a - b)
            fine = x + np.arange(-60, 61) / 86400.0
            fv = f(day, fine) - level
            hit = None
            for j in range(len(fine) - 1):
                if (fv[j] < 0) != (fv[j + 1] < 0):
                    hit = fine[j] + (fine[j + 1] - fine[j]) * fv[j] / (fv[j] - fv[j + 1])
                    break
            if hit is None:
                raise SystemExit("crossing not refined near %.6f" % x)
            out.append((hit, b > a))
    return out


def longest_below(f, day, frac, vals, level):
    """The longest stretch of the span below level: (start, end) fracs or None."""
    cs = crossings(f, day, frac, vals, level)
    edges = [frac[0]] + [c[0] for c in cs] + [frac[-1]]
    below = vals[0] < level
    best = None
    for k in range(len(edges) - 1):
        if below and (best is None or edges[k + 1] - edges[k] > best[1] - best[0]):
            best = (edges[k], edges[k + 1])
        below = not below
    return best


def iso(day, frac):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        y, m, d, hmsf = erfa.d2dtf("UTC", 1, day, frac)
    return "%04d-%02d-%02dT%02d:%02d:%02d.%dZ" % (y, m, d, hmsf[0], hmsf[1], hmsf[2], hmsf[3])


def evaluate_night(site, date, cases):
    """The dark window and, for each (target, min alt) of cases, the state,
    elongation, windows and best (time, alt) on the night of date at site."""
    _, lat, lon, h = site
    y, mo, d = date
    loc = EarthLocation.from_geodetic(lon * u.deg, lat * u.deg, h * u.m)
    offset = round(240 * lon)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        day, noon = erfa.dtf2d("UTC", y, mo, d, 12, 0, 0.0)
    noon = noon - offset / 86400.0
    frac = noon + np.arange(1441) / 1440.0
    sv = sun_alt(loc, day, frac)
    dark = longest_below(lambda dd, ff: sun_alt(loc, dd, ff), day, frac, sv, SUN_DARK)
    ref = noon + 0.5 if dark is None else 0.5 * (dark[0] + dark[1])
    results = []
    cache = {}
    for el, minalt in cases:
        f = lambda dd, ff, el=el: target_alt(loc, el, dd, ff)[0]
        elong = target_alt(loc, el, day, np.array([ref]))[1][0]
        wins, best = [], None
        if dark is not None:
            if el[0] not in cache:
                cache[el[0]] = target_alt(loc, el, day, frac)[0]
            tv = cache[el[0]]
            inside = (frac > dark[0]) & (frac < dark[1])
            gf = np.concatenate([[dark[0]], frac[inside], [dark[1]]])
            gv = np.concatenate([f(day, np.array([dark[0]])), tv[inside], f(day, np.array([dark[1]]))])
            cs = crossings(f, day, gf, gv, minalt)
            edges = [gf[0]] + [c[0] for c in cs] + [gf[-1]]
            above = gv[0] >= minalt
            for k in range(len(edges) - 1):
                if above:
                    wins.append((edges[k], edges[k + 1]))
                above = not above
        if elong < NEAR_SUN:
            state = "near_sun"
        elif dark is None:
            state = "no_darkness"
        elif not wins:
            state = "below_limit"
        else:
            state = "observable"
        if state == "observable":
            # Best: the highest altitude within the windows.
            cand = []
            for a, b in wins:
                ends = f(day, np.array([a, b]))
                cand.append((ends[0], a))
                cand.append((ends[1], b))
                sel = (gf > a) & (gf < b)
                if np.any(sel):
                    k = int(np.argmax(np.where(sel, gv, -1e9)))
                    if 0 < k < len(gf) - 1 and sel[k - 1] and sel[k + 1]:
                        fine = gf[k] + np.arange(-120, 121) / 86400.0
                        fine = fine[(fine > a) & (fine < b)]
                        fv = f(day, fine)
                        j = int(np.argmax(fv))
                        if 0 < j < len(fine) - 1:
                            y0, y1, y2 = fv[j - 1], fv[j], fv[j + 1]
                            den = y0 - 2 * y1 + y2
                            x = fine[j] + (0.5 * (y0 - y2) / den if den != 0 else 0) / 86400.0
                            cand.append((f(day, np.array([x]))[0], x))
            alt, when = max(cand)
            best = (when, alt)
        results.append((state, elong, wins, best))
    return day, dark, results


def next_date(date, k):
    """The civil date k days after date."""
    jd = sum(erfa.cal2jd(*date)) + k
    y, m, d, _ = erfa.jd2cal(jd, 0.0)
    return (int(y), int(m), int(d))


def main():
    if not solar_system_ephemeris.get() == "builtin":
        solar_system_ephemeris.set("builtin")
    targets = {t[0]: t for t in TARGETS}
    sites = {s[0]: s for s in SITES}
    lines = []
    for site_name, date, cases in NIGHTS:
        ds = "%04d-%02d-%02d" % date
        day, dark, results = evaluate_night(sites[site_name], date, [(targets[t], m) for t, m in cases])
        if dark is None:
            lines.append("dark %s %s none" % (site_name, ds))
        else:
            lines.append("dark %s %s %s %s" % (site_name, ds, iso(day, dark[0]), iso(day, dark[1])))
        for (tname, minalt), (state, elong, wins, best) in zip(cases, results):
            key = "%s %s %s %g" % (site_name, ds, tname, minalt)
            lines.append("case %s %s elong %.2f" % (key, state, elong))
            if state != "observable":
                continue
            for a, b in wins:
                lines.append("window %s %s %s" % (key, iso(day, a), iso(day, b)))
            lines.append("best %s %s %.4f" % (key, iso(day, best[0]), best[1]))
        sys.stderr.write("%s %s done\n" % (site_name, ds))
    for site_name, date, tname, minalt, limit in SEARCHES:
        ds = "%04d-%02d-%02d" % date
        key = "%s %s %s %g" % (site_name, ds, tname, minalt)
        found, k = 0, 0
        while found < SEARCH_LIST and k < limit:
            k += 1
            nd = next_date(date, k)
            day, _, [(state, _, wins, best)] = evaluate_night(sites[site_name], nd, [(targets[tname], minalt)])
            if state == "observable":
                found += 1
                w = [x for x in wins if x[0] <= best[0] <= x[1]][0]
                lines.append("next %s %04d-%02d-%02d %s %s %s %.4f" % (key, nd[0], nd[1], nd[2],
                             iso(day, w[0]), iso(day, w[1]), iso(day, best[0]), best[1]))
        lines.append("searched %s %d %d %d" % (key, limit, k, found))
        sys.stderr.write("search %s done\n" % key)

    os.makedirs(OUTDIR, exist_ok=True)
    with open(os.path.join(OUTDIR, "night_targets.csv"), "w") as fh:
        fh.write("# Invented element sets for the fit/plan night tests; not real objects.\n")
        fh.write("# Made by: %s (written with night_windows.txt)\n" % COMMAND)
        fh.write("name,epoch_tt,a_au,e,i_deg,node_deg,peri_deg,m_deg,h,g\n")
        for t in TARGETS:
            fh.write("%s,%.1f,%g,%g,%g,%g,%g,%g,%g,%g\n" % t)
    with open(os.path.join(OUTDIR, "night_windows.txt"), "w") as fh:
        fh.write("# Reference night windows of invented element-set targets for package fit/plan.\n")
        fh.write("# Made by: %s\n" % COMMAND)
        fh.write("# With: %s\n" % VERSIONS)
        fh.write("# Debian packages (dpkg-query -W): %s\n" % dpkg_versions())
        fh.write("# Definitions: see the docstring of testdata/gen/night_windows.py. In short: the night of\n")
        fh.write("#   DATE spans local noon to local noon in local mean solar time; dark = the Sun's centre below\n")
        fh.write("#   -18 deg geometric (astropy get_sun, AltAz, pressure 0), the longest such stretch; the\n")
        fh.write("#   target from a numpy two-body solver (elements in night_targets.csv), astrometric place with\n")
        fh.write("#   light time from astropy's builtin Earth, Sun and site, altitude from astropy's AltAz with\n")
        fh.write("#   1010 hPa, 10 C, rh 0, 0.55 um (refracted); UT1 = UTC; window = where that altitude >= MINALT\n")
        fh.write("#   within the dark window; best = highest altitude within the window(s); elong at the dark\n")
        fh.write("#   window's middle (local midnight without one); state near_sun | no_darkness | below_limit |\n")
        fh.write("#   observable, in that order. Times UTC, ISO 8601, to 0.1 s; crossings refined on 1-s grids.\n")
        fh.write("# Sites (invented; lat deg, east lon deg, height m, WGS84):\n")
        for s in SITES:
            fh.write("#   site %s %.6f %.6f %.1f\n" % s)
        fh.write("# lines: dark SITE DATE START END | dark SITE DATE none\n")
        fh.write("#        case SITE DATE TARGET MINALT STATE elong DEG\n")
        fh.write("#        window SITE DATE TARGET MINALT START END   (observable cases; one per part)\n")
        fh.write("#        best SITE DATE TARGET MINALT TIME ALT_DEG  (observable cases)\n")
        fh.write("#        next SITE DATE TARGET MINALT NEXTDATE START END BEST ALT_DEG  (a later observable\n")
        fh.write("#             night: the window part holding the best time; up to %d)\n" % SEARCH_LIST)
        fh.write("#        searched SITE DATE TARGET MINALT LIMIT NIGHTS_TRIED FOUND  (LIMIT: nights to try at most)\n")
        for line in lines:
            fh.write(line + "\n")


if __name__ == "__main__":
    main()
