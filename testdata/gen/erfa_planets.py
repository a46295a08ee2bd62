#!/usr/bin/python3
"""Reference tables for the VSOP87 planets and Earth of package ephem, computed
with python3-erfa.

Run from the repository root:

    /usr/bin/python3 testdata/gen/erfa_planets.py

It writes two files, each starting with a provenance header:

    testdata/erfa_planets.txt          heliocentric position and velocity of the
                                       Earth (eraEpv00) and of Mercury, Venus,
                                       Mars ... Neptune (eraPlan94) at 500 TDB
                                       dates 1900-2100
    testdata/erfa_ecliptic_frames.txt  the ecliptic J2000 -> equator matrix
                                       built from eraObl80, the frame bias
                                       (eraBp00), the FK5 -> Hipparcos rotation
                                       (eraFk5hip), and the IAU 1976
                                       ecliptic precession J2000 -> date built
                                       from eraPmat76 and eraObl80

The dates are fixed: 500 instants spread evenly over 1900-01-01 .. 2100-01-01
with a fractional day that cycles through the day. Nothing needs the network.
"""

import math
import os
import sys

import erfa
import numpy as np

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
COMMAND = "/usr/bin/python3 testdata/gen/erfa_planets.py"
VERSIONS = "python3-erfa %s (ERFA %s), numpy %s, Python %s" % (
    erfa.__version__,
    getattr(erfa.version, "erfa_version", "?"),
    np.__version__,
    sys.version.split()[0],
)

N_DATES = 500
JD_FIRST = 2415020.5  # 1900 January 1 0h
JD_LAST = 2488069.5  # 2100 January 1 0h
PLANETS = {1: "mercury", 2: "venus", 4: "mars", 5: "jupiter", 6: "saturn",
           7: "uranus", 8: "neptune"}


def dates():
    """Two-part TDB dates (midnight, fraction), evenly spread."""
    out = []
    span = JD_LAST - JD_FIRST
    for i in range(N_DATES):
        t = JD_FIRST + span * i / (N_DATES - 1)
        day = math.floor(t - 0.5) + 0.5
        frac = (t - day) + (i * 0.137) % 1.0
        if frac >= 1.0:
            frac -= 1.0
            day += 1.0
        out.append((day, frac))
    return out


def header(f, what, lines):
    f.write("# %s\n" % what)
    f.write("# Made by: %s\n" % COMMAND)
    f.write("# With: %s\n" % VERSIONS)
    for ln in lines:
        f.write("# %s\n" % ln)


def planets():
    path = os.path.join(OUT, "erfa_planets.txt")
    with open(path + ".tmp", "w") as f:
        header(f, "Heliocentric positions and velocities of the Earth and planets", [
            "Columns: body jd_tdb_day jd_tdb_frac x y z (au) vx vy vz (au/day).",
            "earth: erfa.epv00(day, frac) -> pvh, the heliocentric Earth in BCRS (ICRS-aligned)",
            "  axes; ERFA's own comparison with DE405 gives a few km RMS, about 11 km worst",
            "  over 1900-2100 (eraEpv00 notes).",
            "other planets: erfa.plan94(day, frac, np) -> pv, heliocentric, equatorial, mean",
            "  equator and equinox of J2000.0; maximum errors against DE200 over 1800-2100",
            "  per the eraPlan94 notes: L (arcsec) / B (arcsec) / R (km): Mercury 7/1/500,",
            "  Venus 7/1/1100, Mars 26/1/9000, Jupiter 78/6/82000, Saturn 87/14/263000,",
            "  Uranus 86/7/661000, Neptune 11/2/248000.",
            "Time scale: TDB; both functions take TDB (TT may be used, per their notes).",
        ])
        for day, frac in dates():
            pvh, pvb = erfa.epv00(day, frac)
            p, v = pvh["p"], pvh["v"]
            f.write("earth %.1f %.17f %s %s\n" % (day, frac,
                    " ".join("%.17e" % x for x in p), " ".join("%.17e" % x for x in v)))
            for n, name in PLANETS.items():
                pv = erfa.plan94(day, frac, n)
                p, v = pv["p"], pv["v"]
                f.write("%s %.1f %.17f %s %s\n" % (name, day, frac,
                        " ".join("%.17e" % x for x in p), " ".join("%.17e" % x for x in v)))
    os.replace(path + ".tmp", path)


def rows(m):
    return " ".join("%.17e" % m[i][j] for i in range(3) for j in range(3))


def frames():
    path = os.path.join(OUT, "erfa_ecliptic_frames.txt")
    j2000 = 2451545.0
    with open(path + ".tmp", "w") as f:
        header(f, "Frame matrices for the ecliptic J2000 and ICRS (row-major, 9 numbers)", [
            "ecl2icrs: rx(-obl80(J2000)), ecliptic and equinox J2000 (obliquity 84381.448",
            "  arcsec, IAU 1976) -> equator, v_eq = M v_ecl; rx is erfa.rx.",
            "bias: rb from erfa.bp00(2451545.0, 0.0), the IAU 2000 frame bias ICRS -> mean",
            "  equator and dynamical equinox J2000 (v_J2000 = rb v_ICRS).",
            "fk5hip: r5h from erfa.fk5hip(), FK5 -> Hipparcos (ICRS) rotation of Mignard &",
            "  Froeschle 2000 (v_ICRS = r5h v_FK5); the spin s5h is not used.",
            "prec <day> <frac>: rx(obl80(date)) . pmat76(date) . rx(-obl80(J2000)), the IAU",
            "  1976 precession of ecliptic coordinates from the ecliptic and equinox J2000",
            "  to the mean ecliptic and equinox of date (v_date = M v_J2000); date TT (TDB).",
        ])
        eps0 = erfa.obl80(j2000, 0.0)
        m = erfa.rx(-eps0, np.identity(3))
        rb, rp, rbp = erfa.bp00(j2000, 0.0)
        f.write("bias %s\n" % rows(rb))
        r5h, s5h = erfa.fk5hip()
        f.write("fk5hip %s\n" % rows(r5h))
        f.write("ecl2icrs %s\n" % rows(m))
        # Meeus example 32.a's date, then a spread over 1000-3000.
        for jd in [2448976.5, 2086400.5, 2268000.5, 2415020.5, 2451545.0,
                   2460000.25, 2488069.5, 2634000.5, 2816700.5]:
            day = math.floor(jd - 0.5) + 0.5
            frac = jd - day
            eps = erfa.obl80(day, frac)
            p = erfa.pmat76(day, frac)
            m = erfa.rxr(erfa.rx(eps, np.identity(3)),
                         erfa.rxr(p, erfa.rx(-eps0, np.identity(3))))
            f.write("prec %.1f %.17f %s\n" % (day, frac, rows(m)))
    os.replace(path + ".tmp", path)


if __name__ == "__main__":
    planets()
    frames()
