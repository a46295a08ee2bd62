#!/usr/bin/python3
"""Reference tables for the Moon of package ephem (position, illumination,
phases), computed with python3-erfa.

Run from the repository root:

    /usr/bin/python3 testdata/gen/erfa_moon.py

It writes two files, each starting with a provenance header:

    testdata/erfa_moon.txt         at 300 TT instants 1900-2100: the geocentric
                                   Moon of eraMoon98 (GCRS, au) and its ecliptic
                                   longitude, latitude (mean ecliptic and equinox
                                   of date, eraEcm06) and distance; the geometric
                                   geocentric Sun (from eraEpv00); the Moon's
                                   phase angle (eraSepp), illuminated fraction
                                   and the position angle of the Sun from the
                                   Moon (eraPas)
    testdata/erfa_moon_phases.txt  instants of the principal phases, solved
                                   from eraMoon98 and eraEpv00 (definitions in
                                   the header)

The instants are fixed (no random numbers) and nothing needs the network.
"""

import math
import os
import sys

import erfa
import numpy as np

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
COMMAND = "/usr/bin/python3 testdata/gen/erfa_moon.py"
VERSIONS = "python3-erfa %s (ERFA %s), numpy %s, Python %s" % (
    erfa.__version__,
    getattr(erfa.version, "erfa_version", "?"),
    np.__version__,
    sys.version.split()[0],
)

N_DATES = 300
JD_FIRST = 2415020.5  # 1900 January 1 0h
JD_LAST = 2488069.5  # 2100 January 1 0h
C_AU_DAY = erfa.CMPS * 86400.0 / erfa.DAU
AU_KM = erfa.DAU / 1000.0


def dates():
    """Two-part TT dates (midnight, fraction), evenly spread."""
    out = []
    span = JD_LAST - JD_FIRST
    for i in range(N_DATES):
        t = JD_FIRST + span * i / (N_DATES - 1)
        day = math.floor(t - 0.5) + 0.5
        frac = (t - day) + (i * 0.2113) % 1.0
        if frac >= 1.0:
            frac -= 1.0
            day += 1.0
        out.append((day, frac))
    return out


def ecliptic_of_date(day, frac, p):
    """Longitude (rad, [0, 2pi)), latitude (rad) of a GCRS vector on the mean
    ecliptic and equinox of date (IAU 2006, eraEcm06)."""
    v = erfa.ecm06(day, frac) @ p
    lon, lat = erfa.c2s(v)
    return erfa.anp(lon), lat


def write_positions():
    path = os.path.join(OUT, "erfa_moon.txt")
    with open(path, "w") as f:
        f.write("# Geocentric Moon (eraMoon98) and Sun (eraEpv00), phase angle and limb angle\n")
        f.write("# Made by: %s\n# With: %s\n" % (COMMAND, VERSIONS))
        f.write("# Columns: jd_tt_day jd_tt_frac mx my mz (au) lon_deg lat_deg dist_km"
                " sx sy sz (au) phase_deg fraction limb_pa_deg\n")
        f.write("# m: erfa.moon98(day, frac) position, GCRS; Meeus ch. 47 in full without the\n"
                "#   light-time term of the mean longitude (eraMoon98 note 2), i.e. geometric.\n")
        f.write("# lon, lat: erfa.c2s(erfa.ecm06(day, frac) @ m), mean ecliptic and equinox of\n"
                "#   date (IAU 2006); dist_km = |m| * DAU/1000.\n")
        f.write("# s: geometric geocentric Sun, -erfa.epv00(day, frac) heliocentric Earth position\n"
                "#   (BCRS axes = GCRS axes), with TT used for TDB (< 2 ms).\n")
        f.write("# phase_deg: erfa.sepp(-m, s - m), the angle Sun-Moon-Earth; fraction = (1 + cos)/2.\n")
        f.write("# limb_pa_deg: erfa.pas(ra_m, dec_m, ra_s, dec_s) of the GCRS directions of m and s,\n"
                "#   the position angle of the Sun seen from the Moon's centre, from north through east.\n")
        for day, frac in dates():
            m = erfa.moon98(day, frac)["p"]
            lon, lat = ecliptic_of_date(day, frac, m)
            pvh, _ = erfa.epv00(day, frac)
            s = -pvh["p"]
            phase = erfa.sepp(-m, s - m)
            frac_ill = (1.0 + math.cos(phase)) / 2.0
            ram, decm = erfa.c2s(m)
            ras, decs = erfa.c2s(s)
            pa = erfa.anp(erfa.pas(ram, decm, ras, decs))
            f.write("%.1f %.17f %.17e %.17e %.17e %.12f %.12f %.6f %.17e %.17e %.17e %.12f %.15f %.12f\n" % (
                day, frac, m[0], m[1], m[2], math.degrees(lon), math.degrees(lat),
                np.linalg.norm(m) * AU_KM, s[0], s[1], s[2], math.degrees(phase), frac_ill,
                math.degrees(pa)))


def moon_apparent_lon(jd):
    """Moon's ecliptic longitude of date as seen at jd (TT): moon98 at jd - tau."""
    day = math.floor(jd)
    m = erfa.moon98(day, jd - day)["p"]
    tau = np.linalg.norm(m) / C_AU_DAY
    m = erfa.moon98(day, jd - day - tau)["p"]
    return ecliptic_of_date(day, jd - day, m)[0]


def sun_apparent_lon(jd):
    """Sun's ecliptic longitude of date as seen at jd: light time and aberration."""
    day = math.floor(jd)
    pvh, pvb = erfa.epv00(day, jd - day)
    earth_b = pvb["p"]
    tau = np.linalg.norm(pvh["p"]) / C_AU_DAY
    for _ in range(3):
        pvh2, pvb2 = erfa.epv00(day, jd - day - tau)
        sun_b = pvb2["p"] - pvh2["p"]
        p = sun_b - earth_b
        tau = np.linalg.norm(p) / C_AU_DAY
    dist = np.linalg.norm(p)
    v = pvb["v"] / C_AU_DAY
    bm1 = math.sqrt(1.0 - float(v @ v))
    u = erfa.ab(p / dist, v, dist, bm1)
    return ecliptic_of_date(day, jd - day, u)[0]


def elongation_minus(jd, target):
    d = moon_apparent_lon(jd) - sun_apparent_lon(jd) - target
    return (d + math.pi) % (2 * math.pi) - math.pi


def solve_phase(t0, t1, target):
    """Bisection then secant on a bracket [t0, t1] of days."""
    f0 = elongation_minus(t0, target)
    f1 = elongation_minus(t1, target)
    for _ in range(60):
        tm = 0.5 * (t0 + t1)
        fm = elongation_minus(tm, target)
        if (fm < 0) == (f0 < 0):
            t0, f0 = tm, fm
        else:
            t1, f1 = tm, fm
        if t1 - t0 < 1e-9:
            break
    return 0.5 * (t0 + t1)


def phases_after(jd_start, count):
    """The next `count` principal phases after jd_start: (phase index, jd)."""
    out = []
    t = jd_start
    step = 0.25
    while len(out) < count:
        el = (moon_apparent_lon(t) - sun_apparent_lon(t)) % (2 * math.pi)
        q = int(el // (math.pi / 2)) + 1
        target = (q % 4) * math.pi / 2
        a = t
        fa = elongation_minus(a, target)
        while True:
            b = a + step
            fb = elongation_minus(b, target)
            if fa < 0 <= fb and fb - fa < 1.0:
                break
            a, fa = b, fb
        jd = solve_phase(a, b, target)
        out.append((q % 4, jd))
        t = jd + 1.0
    return out


def write_phases():
    path = os.path.join(OUT, "erfa_moon_phases.txt")
    starts = [2415021.5 + 1826.2 * k for k in range(40)]  # about every 5 years, 1900-2095
    starts += [2443184.5, 2467628.5]  # 1977 Feb 10 and 2044 Jan 13 (Meeus 49.a, 49.b)
    with open(path, "w") as f:
        f.write("# Instants of the Moon's principal phases from eraMoon98 and eraEpv00\n")
        f.write("# Made by: %s\n# With: %s\n" % (COMMAND, VERSIONS))
        f.write("# Columns: phase (0 new, 1 first quarter, 2 full, 3 last quarter) jd_tt\n")
        f.write("# Definition: the instant (TT) at which the apparent geocentric ecliptic longitudes of\n"
                "#   Moon and Sun differ by phase*90 deg (Meeus ch. 49), nutation cancelling. Moon:\n"
                "#   erfa.moon98 at t - tau, tau = |m|/c. Sun: barycentric Sun (epv00 pvb - pvh) at\n"
                "#   t - tau minus the barycentric Earth at t, light time iterated, then erfa.ab with\n"
                "#   the Earth's barycentric velocity. Both rotated by erfa.ecm06(t). TT used for TDB.\n"
                "#   Solved by bisection to 1e-9 d after a 0.25 d scan from each start date.\n")
        for s in starts:
            for q, jd in phases_after(s, 4):
                f.write("%d %.9f\n" % (q, jd))


if __name__ == "__main__":
    write_positions()
    write_phases()
