#!/usr/bin/python3
"""Reference positions of the Earth, the Sun and the planets from the JPL
development ephemerides DE405 and DE200, for package ephem (vsop87.go,
sun.go, place.go).

Run from the repository root, on a Debian machine with

    apt-get install casacore-data-jpl-de405 casacore-data-jpl-de200 \
        python3-casacore python3-erfa python3-numpy

as

    /usr/bin/python3 testdata/gen/de405_reference.py

It writes ephem/testdata/de405_places.txt (provenance header, then one
"earth" row and eight "place" rows per instant, 200 instants 1960-2060).

The ephemerides are read from Debian's casacore tables
(/usr/share/casacore/data/ephemerides/DE405 and DE200) with python3-casacore,
and the Chebyshev series are evaluated by this script; nothing of package
ephem is used.  Nothing needs the network (astropy is not used).

How the table layout was established (every point is re-checked by an
assertion below each time the script runs):

  * Column x of row i holds the Chebyshev coefficients of one 32-day record
    without the two leading record dates of JPL's binary files: the column
    keyword Description is the 3 x 13 JPL pointer table (per item: offset,
    number of coefficients per component, number of sub-intervals), in JPL's
    1-based word numbering that counts the two dates, so an offset o is
    index o - 3 of x.  The items are, in JPL's order, Mercury, Venus, the
    Earth-Moon barycentre, Mars, Jupiter, Saturn, Uranus, Neptune, Pluto (the
    system barycentres), the geocentric Moon, the Sun, the nutations (2
    components) and, for DE405 only, the librations (3).  Check: each offset
    is the previous one plus components x coefficients x sub-intervals, and
    the words after the last item (2 for DE405, 2 for DE200) are zero
    padding up to the row length of 1018 (826) values.
  * Within an item, sub-interval j holds component x, then y, then z, each
    with n coefficients; the sub-interval spans 32/k days and is mapped to
    [-1, 1].  Check: position and velocity are continuous at every record
    boundary and sub-interval boundary of the span (worst jumps printed,
    well below a metre).
  * Column MJD of row i is the first day of its record, MJD TDB (the
    ephemeris time argument Teph, taken as TDB); records step by dMJD = 32
    days and the first starts at MJD0 + dMJD.  Check: with this reading the
    barycentric state at JDEPOC (2440400.5, a record boundary) reproduces the
    keyword initial conditions X1...ZS (in DE405 all barycentric, the Moon
    XM geocentric; in DE200 X1...ZB are heliocentric, XM geocentric, and
    XS...ZS are not the Sun's position, so they are skipped) to a few 1e-15
    au (printed in the header), and the Earth agrees with
    ERFA's epv00 to a few km at every instant (reading MJD as the record's
    last day instead puts the Earth 0.5 au away).
  * Positions are in km, velocities in km/day; they are divided by the
    ephemeris' own au (keyword AU).  Check: the agreement with epv00, and
    the heliocentric planets against ERFA's plan94 within plan94's stated
    maximum errors (eraPlan94 note 5).
  * The Earth is EMB - Moon/(1 + EMRAT) (EMRAT the Earth/Moon mass ratio,
    keyword).  Check: epv00 agreement (the EMB alone is about 4670 km off,
    the Moon's distance over 1 + EMRAT).

Frames: DE405 is aligned with the ICRF (Standish 1998, JPL IOM 312.F-98-048,
from memory); its vectors are written as ICRS.  DE200 is referred to its own
mean equator and dynamical equinox of J2000, which differs from the ICRS by
some 0.01-0.02 arcsec (Standish 1998, from memory; a rotation fitted to the
two Earths in ephem's tests gives about 0.02 arcsec); its Earth is written in
its own axes, unrotated, and the DE200 barycentre is some 1000 km from
DE405's (different outer-planet masses), so only heliocentric DE200 vectors
are written.

Definitions of the columns:

  time      TT instants (two-part JD, day + fraction), 200 of them, spread
            over the DE405 table's span with a seeded jitter; TDB = TT +
            eraDtdb (geocentric: elong = u = v = 0).  Both sides evaluate at
            the TDB given.
  earth     heliocentric position of the Earth's centre, au:
              x405 y405 z405  DE405, Earth - Sun, ICRS axes
              x200 y200 z200  DE200, Earth - Sun, DE200's own J2000 axes
              xepv yepv zepv  ERFA epv00 heliocentric (pvh), ICRS axes
  place     geocentric places of the Sun and Mercury...Neptune from DE405:
            astrometric: direction of X(t - tau) - E(t), X the body's
            barycentric position (the planet-system barycentre for Mars to
            Neptune, as JPL gives them), E the Earth's, tau = |.|/c iterated
            to 1e-13 d (c = CLIGHT, au = AU of the ephemeris); no aberration,
            no light deflection.  ra_deg dec_deg, delta_au = |X(t-tau) - E(t)|,
            tau_d.
            ra200_deg dec200_deg: the same astrometric place from DE200
            alone (DE200's bodies, Earth and light time; DE200's axes,
            unrotated), to show how far the two JPL ephemerides differ.
            apparent of date: eraAb(astrometric unit vector, V/c, |E - S|,
            sqrt(1 - |V/c|^2)) with V the Earth's DE405 barycentric velocity,
            then eraPnm06a(TT) (IAU 2006/2000A).  raapp_deg decapp_deg.  No
            light deflection (as package ephem).
"""

import math
import os
import subprocess
import sys

import casacore
import casacore.tables as ctables
import erfa
import numpy as np

ROOT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..")
OUT = os.path.normpath(os.path.join(ROOT, "ephem", "testdata", "de405_places.txt"))
COMMAND = "/usr/bin/python3 testdata/gen/de405_reference.py"
EPHDIR = "/usr/share/casacore/data/ephemerides"
DEBS = ["casacore-data-jpl-de405", "casacore-data-jpl-de200", "python3-casacore",
        "python3-erfa", "python3-numpy"]

N_INSTANTS = 200
SEED = 405

# JPL item numbers (0-based columns of the pointer table).
MERCURY, VENUS, EMB, MARS, JUPITER, SATURN, URANUS, NEPTUNE, PLUTO, MOON, SUN = range(11)
PLACES = [("Sun", SUN), ("Mercury", MERCURY), ("Venus", VENUS), ("Mars", MARS),
          ("Jupiter", JUPITER), ("Saturn", SATURN), ("Uranus", URANUS),
          ("Neptune", NEPTUNE)]

# plan94's stated maximum differences from DE200 over 1800-2100 (eraPlan94
# note 5, last table; longitude and latitude arcsec, distance km), as printed
# by python3-erfa 2.0.0.1's docstring.  Used only to check the reading; DE405
# and DE200 differ by far less than these.
PLAN94_MAX = {MERCURY: (7, 1, 500), VENUS: (7, 1, 1100), MARS: (26, 1, 9000),
              JUPITER: (78, 6, 82000), SATURN: (87, 14, 263000),
              URANUS: (86, 7, 661000), NEPTUNE: (11, 2, 248000)}
# JPL item -> plan94 planet number
PLAN94_NUMBER = {MERCURY: 1, VENUS: 2, MARS: 4, JUPITER: 5, SATURN: 6,
                 URANUS: 7, NEPTUNE: 8}


class Ephemeris:
    """One JPL ephemeris read from a casacore table."""

    def __init__(self, name):
        tb = ctables.table(os.path.join(EPHDIR, name), ack=False)
        self.name = name
        self.kw = tb.getkeywords()
        desc = tb.getcoldesc("x")["keywords"]["Description"]
        self.ptr = np.asarray(desc, dtype=int).reshape(3, 13)
        self.mjd = np.asarray(tb.getcol("MJD"), dtype=float)
        self.x = np.asarray(tb.getcol("x"), dtype=float)
        tb.close()
        self.au = float(self.kw["AU"])
        self.emrat = float(self.kw["EMRAT"])
        self.c_au_day = float(self.kw["CLIGHT"]) * 86400.0 / self.au
        self.check_layout()

    def check_layout(self):
        kw, ptr, mjd, x = self.kw, self.ptr, self.mjd, self.x
        assert np.all(np.diff(mjd) == kw["dMJD"]) and kw["dMJD"] == 32.0
        assert mjd[0] == kw["MJD0"] + kw["dMJD"], (mjd[0], kw["MJD0"])
        end = None
        for item in range(13):
            off, ncoef, nsub = ptr[:, item]
            if ncoef == 0:
                continue
            ncomp = 2 if item == 11 else 3
            if end is not None:
                assert off == end, (self.name, item, off, end)
            end = off + ncomp * ncoef * nsub
        # end is the first unused 1-based word; x index = word - 3.
        used = end - 3
        assert x.shape[1] >= used
        assert np.all(x[:, used:] == 0.0), "padding not zero"
        self.padding = x.shape[1] - used

    def row(self, mjd):
        """Row index and start of the record holding TDB date mjd."""
        i = int(math.floor((mjd - self.mjd[0]) / 32.0))
        if i == len(self.mjd) and mjd == self.mjd[-1] + 32.0:
            i -= 1
        if not 0 <= i < len(self.mjd):
            raise ValueError("%s: MJD %.5f outside %.1f-%.1f" % (self.name, mjd, self.mjd[0], self.mjd[-1] + 32))
        return i, self.mjd[i]

    def item(self, item, day, frac, sub=None, row=None):
        """Position (km) and velocity (km/day) of a JPL item at TDB JD day+frac.

        sub and row force the sub-interval and the record (for the
        continuity check)."""
        off, ncoef, nsub = self.ptr[:, item]
        mjd = (day - 2400000.5) + frac
        i, t0 = self.row(mjd)
        if row is not None:
            i, t0 = row, self.mjd[row]
        dt = ((day - 2400000.5) - t0) + frac   # days into the record
        span = 32.0 / nsub
        j = min(int(dt // span), nsub - 1) if sub is None else sub
        tc = 2.0 * (dt - j * span) / span - 1.0
        base = off - 3 + j * 3 * ncoef
        c = self.x[i, base:base + 3 * ncoef].reshape(3, ncoef)
        # T_k(tc) and dT_k/dtc by the recurrences
        t = np.zeros(ncoef)
        dtk = np.zeros(ncoef)
        t[0], dtk[0] = 1.0, 0.0
        if ncoef > 1:
            t[1], dtk[1] = tc, 1.0
        for k in range(2, ncoef):
            t[k] = 2.0 * tc * t[k - 1] - t[k - 2]
            dtk[k] = 2.0 * t[k - 1] + 2.0 * tc * dtk[k - 1] - dtk[k - 2]
        return c @ t, (c @ dtk) * (2.0 / span)

    def bary(self, item, day, frac):
        """Barycentric position (au) and velocity (au/day); the Earth for EMB."""
        if item == "earth":
            pe, ve = self.item(EMB, day, frac)
            pm, vm = self.item(MOON, day, frac)
            f = 1.0 / (1.0 + self.emrat)
            return (pe - f * pm) / self.au, (ve - f * vm) / self.au
        p, v = self.item(item, day, frac)
        return p / self.au, v / self.au


def check_initial_conditions(e):
    """The state at JDEPOC against the keyword initial conditions."""
    kw = e.kw
    day, frac = kw["JDEPOC"], 0.0
    worst = 0.0
    sun = e.bary(SUN, day, frac)[0]
    for item, key in [(MERCURY, "1"), (VENUS, "2"), (EMB, "B"), (MARS, "4"),
                      (JUPITER, "5"), (SATURN, "6"), (URANUS, "7"),
                      (NEPTUNE, "8"), (PLUTO, "9"), (MOON, "M"), (SUN, "S")]:
        if e.name == "DE200" and item == SUN:
            continue  # DE200's XS...ZS are not the Sun's state
        want = np.array([kw["X" + key], kw["Y" + key], kw["Z" + key]])
        p = e.bary(item, day, frac)[0]
        if e.name == "DE200" and item not in (MOON,):
            p = p - sun  # DE200's planetary initial conditions are heliocentric
        worst = max(worst, np.max(np.abs(p - want)))
    assert worst < 1e-12, (e.name, worst)
    return worst


def check_continuity(e):
    """Largest jump (km, km/day) of position and velocity at the record and
    sub-interval boundaries, over all items but the nutations and librations."""
    wp = wv = 0.0
    for item in range(11):
        nsub = e.ptr[2, item]
        for i in range(len(e.mjd) - 1):
            t0 = e.mjd[i]
            for j in range(nsub):
                # end of sub-interval j of row i and start of the next one
                tb = t0 + 32.0 * (j + 1) / nsub + 2400000.5
                p1, v1 = e.item(item, tb, 0.0, sub=j, row=i)
                if j + 1 < nsub:
                    p2, v2 = e.item(item, tb, 0.0, sub=j + 1, row=i)
                else:
                    p2, v2 = e.item(item, tb, 0.0, sub=0, row=i + 1)
                wp = max(wp, np.max(np.abs(p1 - p2)))
                wv = max(wv, np.max(np.abs(v1 - v2)))
    assert wp < 1e-3 and wv < 1e-3, (e.name, wp, wv)   # 1 m, 1 m/day
    return wp, wv


def instants(e):
    """TT instants (day, frac) and their TDB (day, frac)."""
    rng = np.random.default_rng(SEED)
    first = e.mjd[0] + 2.0           # leave room for the light time (< 0.2 d)
    last = e.mjd[-1] + 32.0 - 2.0
    step = (last - first - 150.0) / (N_INSTANTS - 1)
    out = []
    for i in range(N_INSTANTS):
        mjd = first + i * step + rng.uniform(0.0, 150.0)
        sec = round((mjd - math.floor(mjd)) * 86400.0)   # a whole second of TT
        day = math.floor(mjd) + 2400000.5                 # the preceding midnight
        frac = sec / 86400.0                              # in [0, 1)
        tdb_frac = frac + erfa.dtdb(day, frac, 0.0, 0.0, 0.0, 0.0) / 86400.0
        out.append((day, frac, day, tdb_frac))
    return out


def astrometric(e, item, day, frac, earth):
    """Astrometric vector X(t - tau) - E(t) (au) and tau (days)."""
    tau = 0.0
    for _ in range(30):
        x = e.bary(item, day, frac - tau)[0]
        p = x - earth
        nxt = np.linalg.norm(p) / e.c_au_day
        done = abs(nxt - tau) < 1e-13
        tau = nxt
        if done:
            return p, tau
    raise RuntimeError("light time did not converge")


def deb_versions():
    out = subprocess.run(["dpkg-query", "-W"] + DEBS, capture_output=True, text=True, check=True).stdout
    return [line.replace("\t", " ") for line in out.strip().splitlines()]


def main():
    de405 = Ephemeris("DE405")
    de200 = Ephemeris("DE200")
    log = []
    for e in (de405, de200):
        ic = check_initial_conditions(e)
        wp, wv = check_continuity(e)
        log.append("%s: %d records MJD %.1f-%.1f, row length %d (%d zero padding); initial conditions at JD %.1f reproduced to %.1e au; "
                   "worst jump at boundaries %.1e km, %.1e km/day"
                   % (e.name, len(e.mjd), e.mjd[0], e.mjd[-1] + 32, e.x.shape[1], e.padding, e.kw["JDEPOC"], ic, wp, wv))

    rows = []
    worst = {"epv405": 0.0, "epv200": 0.0, "200vs405": 0.0, "sun": 0.0}
    worst_plan94 = {k: [0.0, 0.0] for k in PLAN94_NUMBER}
    for (tt1, tt2, tdb1, tdb2) in instants(de405):
        e405, v405 = de405.bary("earth", tdb1, tdb2)
        s405 = de405.bary(SUN, tdb1, tdb2)[0]
        h405 = e405 - s405
        h200 = de200.bary("earth", tdb1, tdb2)[0] - de200.bary(SUN, tdb1, tdb2)[0]
        pvh, pvb = erfa.epv00(tdb1, tdb2)
        hepv = pvh[0]
        worst["epv405"] = max(worst["epv405"], np.linalg.norm(hepv - h405) * de405.au)
        worst["epv200"] = max(worst["epv200"], np.linalg.norm(hepv - h200) * de405.au)
        worst["200vs405"] = max(worst["200vs405"], np.linalg.norm(h200 - h405) * de405.au)
        worst["sun"] = max(worst["sun"], np.linalg.norm((pvb[0] - pvh[0]) - s405) * de405.au)
        # The reading must reproduce epv00 (11 km worst against DE405 over
        # 1900-2100, eraEpv00 note 4): 15 km.
        assert np.linalg.norm(hepv - h405) * de405.au < 15.0
        assert np.linalg.norm(pvb[0] - e405) * de405.au < 15.0
        rows.append("earth %.1f %.17f %.1f %.17f  %.15f %.15f %.15f  %.15f %.15f %.15f  %.15f %.15f %.15f"
                    % ((tt1, tt2, tdb1, tdb2) + tuple(h405) + tuple(h200) + tuple(hepv)))

        # heliocentric planets against plan94 (mean equator and equinox
        # J2000, taken as ICRS axes), turned to the ecliptic J2000 with
        # eps0 = eraObl06 at J2000 (84381.406")
        ecl = erfa.rx(erfa.obl06(2451545.0, 0.0), erfa.ir())
        for item, n in PLAN94_NUMBER.items():
            h = de405.bary(item, tdb1, tdb2)[0] - s405
            pv94 = erfa.plan94(tdb1, tdb2, n)[0]
            hl, hb = erfa.c2s(ecl @ h)
            pl, pb = erfa.c2s(ecl @ pv94)
            dl = abs(math.degrees(erfa.anpm(hl - pl))) * 3600
            db = abs(math.degrees(hb - pb)) * 3600
            dr = abs(np.linalg.norm(h) - np.linalg.norm(pv94)) * de405.au
            lim = PLAN94_MAX[item]
            assert dl < lim[0] + 1 and db < lim[1] + 1 and dr < lim[2] + 1000, (item, dl, db, dr)
            worst_plan94[item][0] = max(worst_plan94[item][0], dl)
            worst_plan94[item][1] = max(worst_plan94[item][1], dr)

        rnp = erfa.pnm06a(tt1, tt2)
        vc = v405 / de405.c_au_day
        bm1 = math.sqrt(1.0 - np.dot(vc, vc))
        em = np.linalg.norm(h405)
        e200 = de200.bary("earth", tdb1, tdb2)[0]
        for name, item in PLACES:
            p, tau = astrometric(de405, item, tdb1, tdb2, e405)
            ra, dec = erfa.c2s(p)
            delta = np.linalg.norm(p)
            app = rnp @ erfa.ab(p / delta, vc, em, bm1)
            raa, deca = erfa.c2s(app)
            p200 = astrometric(de200, item, tdb1, tdb2, e200)[0]
            ra200, dec200 = erfa.c2s(p200)
            rows.append("place %-7s %.1f %.17f %.1f %.17f  %.12f %.12f  %.12f %.12f  %.12f %.12e  %.12f %.12f"
                        % (name, tt1, tt2, tdb1, tdb2,
                           math.degrees(erfa.anp(ra)), math.degrees(dec),
                           math.degrees(erfa.anp(raa)), math.degrees(deca), delta, tau,
                           math.degrees(erfa.anp(ra200)), math.degrees(dec200)))

    log.append("Earth heliocentric, worst over the %d instants: epv00 - DE405 %.2f km, epv00 - DE200 %.2f km, DE200 - DE405 %.2f km; "
               "Sun barycentric epv00 - DE405 %.2f km" % (N_INSTANTS, worst["epv405"], worst["epv200"], worst["200vs405"], worst["sun"]))
    log.append("planets heliocentric, DE405 vs plan94, worst (|dL| arcsec, |dR| km): " + ", ".join(
        "%s %.1f %.0f" % (name, worst_plan94[item][0], worst_plan94[item][1]) for name, item in PLACES if item in worst_plan94))

    first, last = rows[0].split(), rows[-9].split()
    header = [
        "# de405_places.txt: the Earth's heliocentric position (DE405, DE200, ERFA epv00) and the",
        "# geocentric astrometric and apparent places of the Sun and Mercury...Neptune from JPL DE405.",
        "# Made by: %s" % COMMAND,
        "# Packages (dpkg-query -W):",
    ] + ["#   %s" % v for v in deb_versions()] + [
        "#   (python-casacore %s, ERFA %s, numpy %s, Python %s)" % (
            getattr(casacore, "__version__", "?"), getattr(erfa.version, "erfa_version", "?"),
            np.__version__, sys.version.split()[0]),
        "# Ephemerides: %s/DE405 and DE200 (casacore tables), Chebyshev series evaluated by the script." % EPHDIR,
        "#   DE405: AU = %.3f km, EMRAT = %.8g, CLIGHT = %.3f km/s; DE200: AU = %.3f km, EMRAT = %.8g"
        % (de405.au, de405.emrat, de405.kw["CLIGHT"], de200.au, de200.emrat),
        "# Span: %d TT instants, JD %.5f to %.5f (MJD %.0f-%.0f, 1960-2060), seed %d."
        % (N_INSTANTS, float(first[1]) + float(first[2]), float(last[2]) + float(last[3]), de405.mjd[0], de405.mjd[-1] + 32, SEED),
        "# Checks made by the generator (layout and reading; see its docstring):",
    ] + ["#   %s" % s for s in log] + [
        "# Definitions (full text in the generator's docstring):",
        "#   TDB = TT + eraDtdb (geocentric); both ephemerides evaluated at the TDB given.",
        "#   Earth = EMB - Moon/(1 + EMRAT).  Heliocentric = Earth - Sun, au of each ephemeris.",
        "#   DE405 and epv00 in ICRS axes; DE200 in its own mean equator and dynamical equinox J2000.",
        "#   Planets: system barycentres for Mars to Neptune (as JPL gives them).",
        "#   Astrometric: X(t - tau) - E(t), barycentric, tau iterated to 1e-13 d; no aberration,",
        "#   no deflection.  Apparent: eraAb with the DE405 Earth velocity, then eraPnm06a(TT).",
        "# Rows:",
        "#   earth TT_day TT_frac TDB_day TDB_frac  x405 y405 z405  x200 y200 z200  xepv yepv zepv   (au)",
        "#   place BODY TT_day TT_frac TDB_day TDB_frac  ra_deg dec_deg  raapp_deg decapp_deg  delta_au tau_d  ra200_deg dec200_deg",
        "#   (ra200_deg dec200_deg: the astrometric place from DE200 alone, in DE200's axes)",
    ]
    tmp = OUT + ".tmp"
    with open(tmp, "w") as f:
        f.write("\n".join(header + rows) + "\n")
    os.replace(tmp, OUT)
    for s in log:
        print(s)
    print("wrote %s (%d rows)" % (OUT, len(rows)))


if __name__ == "__main__":
    main()
