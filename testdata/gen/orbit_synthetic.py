#!/usr/bin/python3
"""Synthetic observations of invented objects for the orbit fit (package
fit/orbit): an external reference computed with python3-erfa and numpy only.

Run from the repository root with Debian's interpreter (the python3 first on
PATH may lack erfa):

    /usr/bin/python3 testdata/gen/orbit_synthetic.py

(about 6 s). A re-run gives byte-identical files except the "# Date:" header
line, which is today's date unless ARCFIT_GEN_DATE=YYYY-MM-DD is set. It writes, into fit/orbit/testdata/synthetic/ (each file with a provenance
header):

    sites.csv              the two invented sites (arcfit's sites CSV)
    elements.csv           the true elements of the invented objects
                           (arcfit's elements CSV, both forms in one file)
    <stem>_<arc>.csv       noise-free observations of one object over one arc
                           (arcfit's observation CSV); arcs 2n, 4n, 20d, 40d
    <stem>_geometry.csv    for every observation instant of the object: time
                           scales, the observer's heliocentric position and
                           velocity, the Sun's barycentric velocity, light time
    predictions.csv        truth places 1, 7 and 30 days after the last
                           observation, from each site and the geocentre
    states.csv             the true heliocentric ICRS state at each arc's
                           middle observation (TDB)

The objects, their elements and the sites are invented; nothing here is a
real object's orbit or measurement. All arcs of one object end on the same
night with the same last observation, so the predictions are per object.

Definitions (those of package ephem and fit/orbit; see also
/work/shared/checks/references.md of the project):

  time      UTC -> TAI -> TT by erfa.utctai, erfa.taitt (TAI - UTC = 37 s;
            ERFA calls 2027-2028 a "dubious year" only because its table
            cannot know of later leap seconds; silenced). TDB = TT +
            erfa.dtdb(TT, ut, elong, u, v) with the site's own arguments
            (UT1 fraction of the day, east longitude, distance from the
            Earth's axis and from the equator plane, km; zeros for the
            geocentre). Package astro uses the geocentric series (the
            topocentric terms are below 2 us). UT1 = UTC (DUT1 = 0, as
            fit/orbit assumes). Observation times are whole centiseconds of
            UTC, and everything is computed from the time as written.
  site      ITRS vector erfa.gd2gc(1 = WGS84, lon, lat, h), m -> au with
            1 au = 149597870700 m. GCRS = (R3(GAST) . NPB)^T . ITRS with
            NPB = erfa.pnm06a(TT) and GAST = erfa.gst06a(UT1, TT) (through
            erfa.c2teqx, no polar motion): the equinox-based form that
            astro.SitePositionGCRS uses (it has IAU 1980 nutation where ERFA
            has IAU 2000A: metres at the site). Site velocity: the same
            matrix applied to w z x r, w = 2 pi 1.00273781191135448 rad per
            UT1 day (the rate of erfa.era00).
  Earth     erfa.epv00(TDB): heliocentric pvh and barycentric pvb, ICRS axes.
            The Sun's barycentric position and velocity S = pvb - pvh.
  observer  O(t) - S(t) = pvh.p + site GCRS  (the observer's heliocentric
            position, obs_x_au..., as ephem.ObserverGeometry.HelioPos);
            velocity pvh.v + site velocity (obs_vx_au_d..., HelioVel);
            the Sun's barycentric velocity pvb.v - pvh.v (sun_vx_au_d...,
            SunBaryVel). The barycentric observer O(t) = pvb.p + site GCRS.
  orbit     two-body motion about the Sun, GM = k^2, k = 0.01720209895
            au^(3/2)/day, time in TDB days; epoch_tt and tp_tt are used as
            TDB dates, as package ephem does (TDB - TT < 2 ms). This script's
            own solutions: Kepler's equation by safeguarded Newton (e < 1),
            the hyperbolic Kepler equation likewise (e > 1), Barker's cubic
            likewise (e = 1), with the small-anomaly series for E - sin E and
            sinh H - H near perihelion; cross-checked against this script's
            universal-variable propagation (Stumpff functions) from the mid-
            arc state (the largest difference is printed and must stay below
            1e-11 au). Heliocentric ecliptic and equinox J2000 elements;
            ecliptic -> ICRS axes by R1(-eps0), eps0 = 84381.448" (the value
            of ephem.ObliquityJ2000, IAU 1976), the frame bias (about 0.02")
            ignored as in package ephem. No planetary perturbations: the NEO's
            close approach is a two-body flyby past the Earth's position (the
            Earth's attraction is left out on purpose; the truth is the
            two-body orbit a fitter recovers).
  place     astrometric ICRS: the direction of X(t - tau) - O(t), X = the
            object's heliocentric position + S(t - tau), both at t - tau
            (S from epv00 at t - tau itself), tau = |X(t - tau) - O(t)|/c,
            c = 299792.458 km/s, iterated to 1e-13 day. No aberration, no
            light deflection, no refraction. ra_deg, dec_deg with 10
            decimals (rounding below 4e-7 arcsec).
  mag       for the asteroids only: H-G law with G = 0.15 (Bowell et al.
            1989; Meeus, Astronomical Algorithms, 2nd ed., ch. 33), phase
            angle at the object between the Sun and the observer; noise-free,
            2 decimals. The comets have no magnitude column.
  schedule  each night at one site (two on some): 3-6 observations spread
            over about an hour around the object's highest point while the
            Sun is below -12 deg (geometric altitudes; the schedule uses a
            nightly NPB and GAST advanced at the ERA rate, which is fine for
            choosing times). Seeded (numpy default_rng), deterministic.
  sigma     0.5 arcsec per coordinate (stated; the positions carry no noise;
            tests add their own seeded noise).
"""

import datetime
import math
import os
import subprocess
import sys
import warnings

import erfa
import numpy as np

warnings.simplefilter("ignore")  # ERFA "dubious year" for 2027-2028, see above

COMMAND = "/usr/bin/python3 testdata/gen/orbit_synthetic.py"
OUT_DIR = os.path.join("fit", "orbit", "testdata", "synthetic")

K_GAUSS = 0.01720209895                  # au^(3/2)/day (IAU 1976)
GM = K_GAUSS * K_GAUSS                   # au^3/day^2
AU_M = 149597870700.0                    # m (IAU 2012 B2)
C_AU_DAY = 299792458.0 * 86400.0 / AU_M  # au/day
EPS0 = math.radians(84381.448 / 3600.0)  # ephem.ObliquityJ2000
ERA_RATE = 2.0 * math.pi * 1.00273781191135448  # rad per UT1 day
DEG = math.pi / 180.0
ARCSEC = DEG / 3600.0
SIGMA_ARCSEC = 0.5
SEED = 20271005

# Invented sites: name, geodetic latitude (deg), east longitude (deg), height
# above the WGS84 ellipsoid (m). Not observatories.
SITES = [
    ("Cedar Knoll", 44.52, -72.80, 410.0),
    ("Dunmore Flat", -30.85, 148.40, 620.0),
]

# Invented objects. Mean-anomaly form ("M"): epoch_tt, a, e, i, node, peri, M.
# Perihelion form ("Q"): q, e, i, node, peri, tp_tt. end: the local date of
# the evening of the last night of every arc. The orientations were chosen
# (by trying values) so that each object is well placed at night, elongation
# > 60 deg over every arc; the NEO passes the Earth at < 0.05 au some 25 days
# after its arcs. The script checks all of this and stops if it fails.
OBJECTS = [
    dict(name="Invented-MB1", stem="mb1", kind="main-belt asteroid", form="M",
         epoch=2461600.5, a=2.7134, e=0.1487, i=9.83, node=23.7412,
         peri=138.41, m=183.9627, h=15.8, g=0.15, end=(2027, 10, 5)),
    dict(name="Invented-NEO1", stem="neo1", kind="near-Earth asteroid, close approach",
         form="M", epoch=2461800.5, a=1.4521, e=0.4134, i=6.27, node=182.5119,
         peri=59.6397, m=306.1339, h=21.2, g=0.15, end=(2028, 2, 24)),
    dict(name="Invented-JFC1", stem="jfc1", kind="Jupiter-family comet", form="Q",
         q=1.5213, e=0.5472, i=11.62, node=70.42, peri=14.87, tp=2461764.8127,
         end=(2027, 12, 10)),
    dict(name="Invented-NP1", stem="np1", kind="near-parabolic comet (e = 0.998)",
         form="Q", q=1.1840, e=0.998, i=72.35, node=51.27, peri=224.63, tp=2461963.9418,
         end=(2028, 5, 12)),
    dict(name="Invented-PA1", stem="pa1", kind="parabolic comet (e = 1)",
         form="Q", q=2.3170, e=1.0, i=128.40, node=160.93, peri=194.58, tp=2462053.2305,
         end=(2028, 9, 8)),
    dict(name="Invented-HY1", stem="hy1", kind="hyperbolic comet (e = 1.02)",
         form="Q", q=1.9260, e=1.02, i=41.18, node=30.66, peri=179.37, tp=2461530.7281,
         end=(2027, 4, 20)),
]

# Arcs: name, night offsets from the end night (days), what it is.
ARCS = [
    ("2n", [-1, 0], "2 consecutive nights"),
    ("4n", [-7, -5, -2, 0], "4 nights over 7 days"),
    ("20d", [-20, -15, -11, -7, -3, 0], "6 nights over 20 days"),
    ("40d", [-40, -33, -26, -20, -14, -7, -3, 0], "8 nights over 40 days"),
]
PREDICT_DAYS = [1, 7, 30]
PREDICT_LOCAL_HOUR = 22.0  # local mean time of the per-site predictions


# ---------------------------------------------------------------------------
# Two-body motion (this script's own; independent of package ephem)
# ---------------------------------------------------------------------------

def e_minus_sin(x):
    """x - sin x, by its series for small |x| (no cancellation)."""
    if abs(x) > 0.5:
        return x - math.sin(x)
    x2 = x * x
    term, s, k = x * x2 / 6.0, 0.0, 3
    for _ in range(30):  # |x| <= 0.5: 10 terms reach 1e-18 relative
        s += term
        term *= -x2 / ((k + 1) * (k + 2))
        k += 2
    return s


def sinh_minus(x):
    """sinh x - x, by its series for small |x|."""
    if abs(x) > 0.5:
        return math.sinh(x) - x
    x2 = x * x
    term, s, k = x * x2 / 6.0, 0.0, 3
    for _ in range(30):  # |x| <= 0.5: 10 terms reach 1e-18 relative
        s += term
        term *= x2 / ((k + 1) * (k + 2))
        k += 2
    return s


def solve_increasing(f, df, lo, hi, x0):
    """Root of an increasing f in [lo, hi]: Newton steps, bisection when a
    step leaves the bracket. Converges to the float64 limit."""
    x = min(max(x0, lo), hi)
    for _ in range(300):
        fx = f(x)
        if fx == 0.0:
            return x
        if fx > 0:
            hi = x
        else:
            lo = x
        d = df(x)
        nx = x - fx / d if d > 0 else 0.5 * (lo + hi)
        if not (lo < nx < hi):
            nx = 0.5 * (lo + hi)
        if abs(nx - x) <= 1e-16 * max(1.0, abs(x)):
            return nx
        x = nx
    return x


def kepler_elliptic(m, e):
    """E with E - e sin E = m (rad), 0 <= e < 1; m reduced to (-pi, pi]."""
    k = round(m / (2 * math.pi))
    mr = m - 2 * math.pi * k
    sign = 1.0 if mr >= 0 else -1.0
    ma = abs(mr)
    # (1 - e) E + e (E - sin E) - M: increasing on [0, pi], no cancellation.
    f = lambda x: (1 - e) * x + e * e_minus_sin(x) - ma
    df = lambda x: 1 - e * math.cos(x)
    x0 = ma + e * math.sin(ma) if e < 0.8 else min(math.pi, (6 * ma) ** (1 / 3.0))
    big_e = solve_increasing(f, df, 0.0, math.pi, x0)
    return sign * big_e + 2 * math.pi * k


def kepler_hyperbolic(m, e):
    """H with e sinh H - H = m, e > 1."""
    sign = 1.0 if m >= 0 else -1.0
    ma = abs(m)
    f = lambda x: (e - 1) * x + e * sinh_minus(x) - ma
    df = lambda x: e * math.cosh(x) - 1
    hi = 1.0
    while f(hi) < 0:
        hi *= 2.0
    x0 = math.log(2 * ma / e + 1.8)
    return sign * solve_increasing(f, df, 0.0, hi, x0)


def barker(b):
    """s = tan(nu/2) with s + s^3/3 = b."""
    sign = 1.0 if b >= 0 else -1.0
    ba = abs(b)
    f = lambda s: s + s ** 3 / 3.0 - ba
    df = lambda s: 1 + s * s
    x0 = ba if ba < 1 else (3 * ba) ** (1 / 3.0)
    return sign * solve_increasing(f, df, 0.0, ba, x0)


def perifocal(ob, t1, t2):
    """Position and velocity in the orbital plane (x towards perihelion) at
    the TDB date t1 + t2: (x, y, vx, vy), au and au/day."""
    e = ob["e"]
    if ob["form"] == "M":
        a = ob["a"]
        n = math.sqrt(GM / a ** 3)
        m = math.radians(ob["m"]) + n * ((t1 - ob["epoch"]) + t2)
        big_e = kepler_elliptic(m, e)
        b = a * math.sqrt(1 - e * e)
        c, s = math.cos(big_e), math.sin(big_e)
        edot = n / (1 - e * c)
        return a * (c - e), b * s, -a * s * edot, b * c * edot
    q = ob["q"]
    dt = (t1 - ob["tp"]) + t2
    if e < 1:
        a = q / (1 - e)
        n = math.sqrt(GM / a ** 3)
        big_e = kepler_elliptic(n * dt, e)
        b = a * math.sqrt(1 - e * e)
        c, s = math.cos(big_e), math.sin(big_e)
        edot = n / (1 - e * c)
        return a * (c - e), b * s, -a * s * edot, b * c * edot
    if e > 1:
        a = q / (e - 1)
        n = math.sqrt(GM / a ** 3)
        h = kepler_hyperbolic(n * dt, e)
        b = a * math.sqrt(e * e - 1)
        ch, sh = math.cosh(h), math.sinh(h)
        hdot = n / (e * ch - 1)
        return a * (e - ch), b * sh, -a * sh * hdot, b * ch * hdot
    w = math.sqrt(GM / (2 * q ** 3))
    s = barker(w * dt)
    sdot = w / (1 + s * s)
    return q * (1 - s * s), 2 * q * s, -2 * q * s * sdot, 2 * q * sdot


def plane_to_ecliptic(ob):
    """Unit vectors P (to perihelion) and Q (90 deg ahead), ecliptic J2000."""
    i, node, w = math.radians(ob["i"]), math.radians(ob["node"]), math.radians(ob["peri"])
    ci, si = math.cos(i), math.sin(i)
    cn, sn = math.cos(node), math.sin(node)
    cw, sw = math.cos(w), math.sin(w)
    p = np.array([cn * cw - sn * sw * ci, sn * cw + cn * sw * ci, sw * si])
    qv = np.array([-cn * sw - sn * cw * ci, -sn * sw + cn * cw * ci, cw * si])
    return p, qv


ECL_TO_ICRS = np.array([
    [1.0, 0.0, 0.0],
    [0.0, math.cos(EPS0), -math.sin(EPS0)],
    [0.0, math.sin(EPS0), math.cos(EPS0)],
])


def helio_state(ob, t1, t2):
    """Heliocentric ICRS position (au) and velocity (au/day) at TDB t1 + t2."""
    x, y, vx, vy = perifocal(ob, t1, t2)
    p, qv = ob["_pq"]
    return ECL_TO_ICRS @ (x * p + y * qv), ECL_TO_ICRS @ (vx * p + vy * qv)


def stumpff(z):
    """Stumpff functions C(z), S(z)."""
    if abs(z) < 1e-2:
        c = s = 0.0
        tc, ts = 0.5, 1.0 / 6.0
        for k in range(12):
            c += tc
            s += ts
            tc *= -z / ((2 * k + 3) * (2 * k + 4))
            ts *= -z / ((2 * k + 4) * (2 * k + 5))
        return c, s
    if z > 0:
        r = math.sqrt(z)
        return (1 - math.cos(r)) / z, (r - math.sin(r)) / r ** 3
    r = math.sqrt(-z)
    return (math.cosh(r) - 1) / (-z), (math.sinh(r) - r) / r ** 3


def universal(r0, v0, dt):
    """Position after dt days from (r0, v0), universal variables (Newton on
    the universal Kepler equation)."""
    mu = GM
    sq = math.sqrt(mu)
    rn = np.linalg.norm(r0)
    vr = np.dot(r0, v0) / rn
    alpha = 2.0 / rn - np.dot(v0, v0) / mu
    chi = sq * abs(alpha) * dt if abs(alpha) > 1e-12 else sq * dt / rn
    for _ in range(100):
        z = alpha * chi * chi
        c, s = stumpff(z)
        f = rn * vr / sq * chi * chi * c + (1 - alpha * rn) * chi ** 3 * s + rn * chi - sq * dt
        df = rn * vr / sq * chi * (1 - z * s) + (1 - alpha * rn) * chi * chi * c + rn
        d = f / df
        chi -= d
        if abs(d) < 1e-15 * max(1.0, abs(chi)):
            break
    z = alpha * chi * chi
    c, s = stumpff(z)
    fl = 1 - chi * chi / rn * c
    gl = dt - chi ** 3 * s / sq
    return fl * r0 + gl * v0


# ---------------------------------------------------------------------------
# Earth, site, time
# ---------------------------------------------------------------------------

def site_itrs(site):
    _, lat, lon, h = site
    return np.array(erfa.gd2gc(1, math.radians(lon), math.radians(lat), h)) / AU_M


class Instant:
    """One UTC instant, for a site (None: the geocentre), with the time
    scales and the observer geometry."""

    def __init__(self, utc1, utc2, site):
        self.utc1, self.utc2, self.site = utc1, utc2, site
        tai = erfa.utctai(utc1, utc2)
        self.tt1, self.tt2 = erfa.taitt(*tai)
        ut_frac = ((utc1 - 0.5) % 1.0 + utc2) % 1.0  # UT1 = UTC
        if site is None:
            elong = u = v = 0.0
            self.gcrs = np.zeros(3)
            self.gcrs_v = np.zeros(3)
        else:
            r = site_itrs(site)
            elong = math.radians(site[2])
            u = math.hypot(r[0], r[1]) * AU_M / 1000.0
            v = r[2] * AU_M / 1000.0
            npb = erfa.pnm06a(self.tt1, self.tt2)
            gst = erfa.gst06a(utc1, utc2, self.tt1, self.tt2)
            c2t = erfa.c2teqx(npb, gst, np.eye(3))
            self.gcrs = c2t.T @ r
            self.gcrs_v = c2t.T @ np.array([-ERA_RATE * r[1], ERA_RATE * r[0], 0.0])
            self.up = c2t.T @ geodetic_up(site)
        dtdb = erfa.dtdb(self.tt1, self.tt2, ut_frac, elong, u, v)
        self.tdb1, self.tdb2 = self.tt1, self.tt2 + dtdb / 86400.0
        pvh, pvb = erfa.epv00(self.tdb1, self.tdb2)
        self.earth_helio = np.array(pvh["p"])
        self.obs_helio = self.earth_helio + self.gcrs
        self.obs_helio_v = np.array(pvh["v"]) + self.gcrs_v
        self.sun_bary_v = np.array(pvb["v"]) - np.array(pvh["v"])
        self.obs_bary = np.array(pvb["p"]) + self.gcrs


def geodetic_up(site):
    _, lat, lon, _ = site
    la, lo = math.radians(lat), math.radians(lon)
    return np.array([math.cos(la) * math.cos(lo), math.cos(la) * math.sin(lo), math.sin(la)])


def sun_bary(t1, t2):
    pvh, pvb = erfa.epv00(t1, t2)
    return np.array(pvb["p"]) - np.array(pvh["p"])


def astrometric(ob, inst):
    """(rho = X(t - tau) - O(t), heliocentric position at t - tau, tau)."""
    tau = 0.0
    for _ in range(30):
        h, _ = helio_state(ob, inst.tdb1, inst.tdb2 - tau)
        rho = h + sun_bary(inst.tdb1, inst.tdb2 - tau) - inst.obs_bary
        new = np.linalg.norm(rho) / C_AU_DAY
        done = abs(new - tau) < 1e-13
        tau = new
        if done:
            break
    h, _ = helio_state(ob, inst.tdb1, inst.tdb2 - tau)
    rho = h + sun_bary(inst.tdb1, inst.tdb2 - tau) - inst.obs_bary
    return rho, h, tau


def angle(a, b):
    return math.atan2(np.linalg.norm(np.cross(a, b)), np.dot(a, b))


def radec_deg(v):
    ra, dec = erfa.c2s(v)
    return math.degrees(erfa.anp(ra)), math.degrees(dec)


def hg_mag(h, g, r, delta, phase):
    t = math.tan(phase / 2)
    phi1 = math.exp(-3.33 * t ** 0.63)
    phi2 = math.exp(-1.87 * t ** 1.22)
    return h + 5 * math.log10(r * delta) - 2.5 * math.log10((1 - g) * phi1 + g * phi2)


def fmt_iso(utc1, utc2, ndp):
    y, m, d, (hh, mi, ss, ff) = erfa.d2dtf("UTC", ndp, utc1, utc2)
    if ndp:
        return "%04d-%02d-%02dT%02d:%02d:%02d.%0*dZ" % (y, m, d, hh, mi, ss, ndp, ff)
    return "%04d-%02d-%02dT%02d:%02d:%02dZ" % (y, m, d, hh, mi, ss)


def utc_from_centiseconds(day0, cs):
    """The UTC instant day0 (a 0h JD) + cs centiseconds, as ERFA's two-part
    date of its calendar form (so the instant is exactly the one written)."""
    total = int(cs)
    dd, rest = divmod(total, 8640000)
    y, m, d, _ = erfa.jd2cal(day0 + dd, 0.0)
    hh, rest = divmod(rest, 360000)
    mi, rest = divmod(rest, 6000)
    return erfa.dtf2d("UTC", y, m, d, hh, mi, rest / 100.0)


# ---------------------------------------------------------------------------
# Design: orientations, schedule
# ---------------------------------------------------------------------------

def date_jd(ymd):
    return sum(erfa.cal2jd(*ymd))  # 0h UTC


def prepare(ob):
    ob["_pq"] = plane_to_ecliptic(ob)


def night_sample(ob, site, local_date_jd, nstep=145):
    """Altitudes through the night of the local date at site: list of
    (utc_jd, sun_alt_deg, obj_alt_deg, elong_deg), 18h to 06h local mean
    time, every 5 minutes (geometric, no light time, nightly NPB)."""
    lon = site[2]
    start = local_date_jd + 18.0 / 24.0 - lon / 360.0
    mid = start + 0.25
    tai = erfa.utctai(mid, 0.0)
    tt = erfa.taitt(*tai)
    npb = erfa.pnm06a(*tt)
    gst0 = erfa.gst06a(mid, 0.0, tt[0], tt[1])
    up_itrs = geodetic_up(site)
    r = site_itrs(site)
    out = []
    for k in range(nstep):
        t = start + k * 5.0 / 1440.0
        gst = gst0 + ERA_RATE * (t - mid)
        c2t = erfa.c2teqx(npb, gst, np.eye(3))
        up = c2t.T @ up_itrs
        pvh, pvb = erfa.epv00(t + 69.184 / 86400.0, 0.0)
        obs = np.array(pvh["p"]) + c2t.T @ r
        h, _ = helio_state(ob, t, 0.0)
        rho = h - obs
        sun = -obs
        sa = 90 - math.degrees(angle(sun, up))
        oa = 90 - math.degrees(angle(rho, up))
        out.append((t, sa, oa, math.degrees(angle(rho, sun))))
    return out


def schedule(ob, oi, rng):
    """Observation instants by night offset: {offset: [(site, utc1, utc2)]}."""
    end = date_jd(ob["end"])
    offsets = sorted({o for _, offs, _ in ARCS for o in offs})
    plan = {}
    for n, off in enumerate(offsets):
        day = end + off
        best = []
        for si, site in enumerate(SITES):
            samp = night_sample(ob, site, day)
            dark = [s for s in samp if s[1] < -12.0]
            if not dark:
                continue
            top = max(dark, key=lambda s: s[2])
            good = [s for s in dark if s[2] > 20.0]
            best.append((top[2], si, top, good, dark))
        if not best:
            raise SystemExit("%s: no dark sky on offset %d" % (ob["name"], off))
        # Preferred site alternates by night; the other is used when the
        # preferred one sees the object below 25 deg. Both on the last night
        # and on the first night of the 40-day arc when both see it well.
        pref = (n + oi) % 2
        by_site = {b[1]: b for b in best}
        chosen = []
        if pref in by_site and by_site[pref][0] >= 25.0:
            chosen.append(by_site[pref])
        elif (1 - pref) in by_site and by_site[1 - pref][0] >= 25.0:
            chosen.append(by_site[1 - pref])
        else:
            chosen.append(max(best))
        if off in (0, offsets[0]):
            for b in best:
                if b[1] != chosen[0][1] and b[0] >= 25.0:
                    chosen.append(b)
        rows = []
        for top_alt, si, top, good, dark in chosen:
            window = good if good else dark
            t_lo, t_hi = window[0][0], window[-1][0]
            # contiguous part of the window around the top
            span = min(1.0 / 24.0, t_hi - t_lo)
            centre = min(max(top[0], t_lo + span / 2), t_hi - span / 2)
            count = int(rng.integers(3, 7))
            for k in range(count):
                frac = (k + 0.5) / count - 0.5
                t = centre + frac * span + rng.normal(0.0, 1.5) / 1440.0
                day0 = math.floor(t - 0.5) + 0.5
                cs = round((t - day0) * 8640000.0)
                utc1, utc2 = utc_from_centiseconds(day0, cs)
                rows.append((SITES[si], utc1, utc2))
        rows.sort(key=lambda r: (r[1] + r[2]))
        plan[off] = rows
    return plan


# ---------------------------------------------------------------------------
# Output
# ---------------------------------------------------------------------------

def versions():
    try:
        out = subprocess.run(["dpkg-query", "-W", "python3-erfa", "python3-numpy"],
                             capture_output=True, text=True, check=True).stdout
        pk = "; ".join(" ".join(l.split()) for l in out.strip().splitlines())
    except (OSError, subprocess.CalledProcessError):
        pk = "dpkg-query unavailable"
    return "%s (pyerfa %s, numpy %s, Python %s)" % (
        pk, erfa.__version__, np.__version__, sys.version.split()[0])


def header(title, extra):
    lines = [
        "# arcfit orbit-fit reference: %s. INVENTED objects and sites." % title,
        "# Generated by: %s" % COMMAND,
        "# With: %s" % versions(),
        "# Date: %s" % GEN_DATE,
        "# Definitions (full text in the script's docstring): astrometric ICRS place,",
        "# direction of X(t-tau) - O(t), light time iterated, no aberration or deflection;",
        "# two-body orbit, GM = k^2, k = 0.01720209895, TDB days; ecliptic J2000 -> ICRS",
        "# by R1(-84381.448\") (ephem.ObliquityJ2000; frame bias ignored, as in ephem);",
        "# Earth and Sun erfa.epv00; site erfa.gd2gc (WGS84) turned by (R3(gst06a) pnm06a)^T,",
        "# UT1 = UTC, no polar motion; TT by erfa.utctai/taitt; TDB = TT + erfa.dtdb",
        "# (site arguments).",
    ]
    return "\n".join(lines + ["# " + e for e in extra]) + "\n"


def write(name, text):
    path = os.path.join(OUT_DIR, name)
    tmp = path + ".tmp"
    with open(tmp, "w", newline="\n") as f:
        f.write(text)
    os.replace(tmp, path)
    return len(text.encode())


def f13(v):
    return "%.13f" % v


def fe(v):
    return "%.13e" % v


def element_row(ob):
    h = "%.1f" % ob["h"] if "h" in ob else ""
    g = "%.2f" % ob["g"] if "g" in ob else ""
    if ob["form"] == "M":
        return "%s,%.1f,%.4f,%.4f,%.4f,%.4f,%.4f,%.4f,,,%s,%s" % (
            ob["name"], ob["epoch"], ob["a"], ob["e"], ob["i"], ob["node"],
            ob["peri"], ob["m"], h, g)
    return "%s,,,%.4f,%.4f,%.4f,%.4f,,%.4f,%.4f,%s,%s" % (
        ob["name"], ob["e"], ob["i"], ob["node"], ob["peri"], ob["q"], ob["tp"], h, g)


GEN_DATE = os.environ.get("ARCFIT_GEN_DATE", datetime.date.today().isoformat())


def main():
    if not os.path.isdir(os.path.join("fit", "orbit")):
        sys.exit("run from the repository root: fit/orbit not found")
    os.makedirs(OUT_DIR, exist_ok=True)
    rng = np.random.default_rng(SEED)
    sizes = {}
    geom_cols = ("time,site,utc_day,utc_frac,tt_day,tt_frac,tdb_day,tdb_frac,"
                 "obs_x_au,obs_y_au,obs_z_au,obs_vx_au_d,obs_vy_au_d,obs_vz_au_d,"
                 "sun_vx_au_d,sun_vy_au_d,sun_vz_au_d,geo_x_au,geo_y_au,geo_z_au,"
                 "ra_deg,dec_deg,tau_d,delta_au,r_au,elong_deg,alt_deg")
    pred_rows, state_rows = [], []
    worst_uv = 0.0
    ok = True
    for oi, ob in enumerate(OBJECTS):
        prepare(ob)
        plan = schedule(ob, oi, rng)
        # Every observation instant of the object, computed once.
        rec = {}
        for off, rows in plan.items():
            for site, utc1, utc2 in rows:
                inst = Instant(utc1, utc2, site)
                rho, h, tau = astrometric(ob, inst)
                delta = np.linalg.norm(rho)
                ra, dec = radec_deg(rho)
                elong = math.degrees(angle(rho, -inst.obs_helio))
                alt = 90 - math.degrees(angle(rho, inst.up))
                phase = angle(-h, -rho)
                mag = hg_mag(ob["h"], ob["g"], np.linalg.norm(h), delta, phase) if "h" in ob else None
                rec[(off, utc1 + utc2, site[0])] = dict(
                    inst=inst, t=fmt_iso(utc1, utc2, 2), site=site[0], ra=ra, dec=dec,
                    tau=tau, delta=delta, r=np.linalg.norm(h), elong=elong, alt=alt, mag=mag,
                    h=h)
                if elong < 60.0:
                    print("FAIL %s %s %s elongation %.1f" % (ob["name"], fmt_iso(utc1, utc2, 2), site[0], elong))
                    ok = False
        keys = sorted(rec, key=lambda k: k[1])
        # Geometry file: all instants of the object, in time order.
        geo = []
        for k in keys:
            r = rec[k]
            i = r["inst"]
            geo.append(",".join([
                r["t"], r["site"], "%.1f" % i.utc1, "%.16f" % i.utc2, "%.1f" % i.tt1,
                "%.16f" % i.tt2, "%.1f" % i.tdb1, "%.16f" % i.tdb2]
                + [f13(x) for x in i.obs_helio] + [fe(x) for x in i.obs_helio_v]
                + [fe(x) for x in i.sun_bary_v] + ["%.10e" % x for x in i.gcrs]
                + ["%.10f" % r["ra"], "%.10f" % r["dec"], fe(r["tau"]), f13(r["delta"]), f13(r["r"]), "%.4f" % r["elong"], "%.3f" % r["alt"]]))
        sizes["%s_geometry.csv" % ob["stem"]] = write("%s_geometry.csv" % ob["stem"], header(
            "observer geometry of %s (%s)" % (ob["name"], ob["kind"]), [
                "One row per observation instant of the object (every arc's rows are here),",
                "keyed by time (as written in the observation files) and site.",
                "utc/tt/tdb: two-part Julian dates. obs_*: O(t) - S(t) = epv00 heliocentric Earth",
                "+ site GCRS (au), its velocity (au/day); sun_v*: the Sun's barycentric velocity",
                "(epv00 pvb.v - pvh.v); geo_*: the site's GCRS position (au; zero for none).",
                "ra_deg, dec_deg: the noise-free astrometric place, as in the observation files.",
                "tau_d: light time (days); delta_au: |X(t-tau) - O(t)|;",
                "r_au: heliocentric distance at t - tau; elong_deg: Sun-observer-object angle;",
                "alt_deg: the object's geometric altitude (no refraction; information only).",
            ]) + geom_cols + "\n" + "\n".join(geo) + "\n")
        # Observation files, one per arc, and the truth state at mid-arc.
        for arc, offs, what in ARCS:
            ks = [k for k in keys if k[0] in offs]
            lines = []
            for k in ks:
                r = rec[k]
                row = "%s,%.10f,%.10f,%.1f,%s" % (r["t"], r["ra"], r["dec"], SIGMA_ARCSEC, r["site"])
                if r["mag"] is not None:
                    row += ",%.2f" % r["mag"]
                lines.append(row)
            cols = "time,ra_deg,dec_deg,sigma,site" + (",mag" if "h" in ob else "")
            name = "%s_%s.csv" % (ob["stem"], arc)
            sizes[name] = write(name, header(
                "noise-free observations of %s (%s), arc %s" % (ob["name"], ob["kind"], arc), [
                    "Arc: %s, %d observations; sites in sites.csv; elements in elements.csv." % (what, len(ks)),
                    "NOISE-FREE positions; sigma %.1f\" is the stated 1-sigma per coordinate." % SIGMA_ARCSEC,
                    "mag: noise-free H-G magnitude (G = 0.15)." if "h" in ob else "No magnitudes (comet).",
                    "Geometry of each row: %s_geometry.csv (same time and site)." % ob["stem"],
                ]) + cols + "\n" + "\n".join(lines) + "\n")
            mid = ks[(len(ks) - 1) // 2]
            inst = rec[mid]["inst"]
            pos, vel = helio_state(ob, inst.tdb1, inst.tdb2)
            state_rows.append(",".join([ob["name"], arc, str((len(ks) - 1) // 2), rec[mid]["t"], rec[mid]["site"],
                                        "%.1f" % inst.tdb1, "%.16f" % inst.tdb2]
                                       + ["%.16e" % x for x in list(pos) + list(vel)]))
            # Cross-check: universal variables from the mid-arc state reach
            # every light-time-retarded position of the arc.
            for k in ks:
                r = rec[k]
                i = r["inst"]
                dt = (i.tdb1 - inst.tdb1) + (i.tdb2 - r["tau"] - inst.tdb2)
                worst_uv = max(worst_uv, float(np.linalg.norm(universal(pos, vel, dt) - r["h"])))
            # And 30 days on.
            for dd in (30.0, 31.5):
                p30, _ = helio_state(ob, inst.tdb1 + dd + (rec[keys[-1]]["inst"].tdb1 - inst.tdb1), inst.tdb2)
                uv = universal(pos, vel, dd + (rec[keys[-1]]["inst"].tdb1 - inst.tdb1))
                worst_uv = max(worst_uv, float(np.linalg.norm(uv - p30)))
        # Predictions.
        last = rec[keys[-1]]["inst"]
        t_last = last.utc1 + last.utc2
        for nd in PREDICT_DAYS:
            target = t_last + nd
            for site in [None] + SITES:
                if site is None:
                    t = round(target * 1440.0) / 1440.0
                else:
                    off = PREDICT_LOCAL_HOUR / 24.0 - site[2] / 360.0
                    kday = round(target - 0.5 - off)
                    t = round((kday + 0.5 + off) * 1440.0) / 1440.0
                day0 = math.floor(t - 0.5) + 0.5
                utc1, utc2 = utc_from_centiseconds(day0, round((t - day0) * 8640000.0))
                inst = Instant(utc1, utc2, site)
                rho, h, tau = astrometric(ob, inst)
                ra, dec = radec_deg(rho)
                pred_rows.append(",".join([
                    ob["name"], str(nd), fmt_iso(utc1, utc2, 2), "geocentre" if site is None else site[0],
                    "%.10f" % ra, "%.10f" % dec, f13(np.linalg.norm(rho)), f13(np.linalg.norm(h)),
                    "%.4f" % math.degrees(angle(rho, -inst.obs_helio)),
                    "%.1f" % inst.tdb1, "%.16f" % inst.tdb2]))
        # Summary on stdout.
        ds = [r["delta"] for r in rec.values()]
        es = [r["elong"] for r in rec.values()]
        als = [r["alt"] for r in rec.values()]
        print("%-14s %3d instants  delta %.3f-%.3f au  elong %.1f-%.1f  alt %.1f-%.1f  last %s" % (
            ob["name"], len(rec), min(ds), max(ds), min(es), max(es), min(als), max(als), rec[keys[-1]]["t"]))
        if ob["stem"] == "neo1":
            ca_t, ca_d = close_approach(ob, t_last, t_last + 60.0)
            y, m, d, fd = erfa.jd2cal(ca_t, 0.0)
            ob["_ca"] = (ca_t, ca_d)
            print("  close approach %04d-%02d-%02d +%.3f d (TDB), %.5f au, %.1f days after the last observation" % (
                y, m, d, fd, ca_d, ca_t - t_last))
            if not (ca_d < 0.05 and ca_t - t_last < 35):
                ok = False
    print("universal-variable cross-check: worst %.2e au" % worst_uv)
    if worst_uv > 1e-11:
        ok = False
    if not ok:
        sys.exit("check failed; nothing more written")

    extra_ca = []
    for ob in OBJECTS:
        if "_ca" in ob:
            y, m, d, fd = erfa.jd2cal(ob["_ca"][0], 0.0)
            extra_ca.append("%s passes the Earth's centre at %.5f au on %04d-%02d-%02d %.3f d TDB"
                            % (ob["name"], ob["_ca"][1], y, m, d, fd))
            extra_ca.append("(two-body; the Earth's attraction is not modelled).")
    sizes["elements.csv"] = write("elements.csv", header("true orbital elements", [
        "Heliocentric osculating elements, ecliptic and equinox J2000 (eps0 = 84381.448\");",
        "epoch_tt, tp_tt: TT dates, propagated as TDB. Asteroid form (a_au, m_deg, epoch_tt)",
        "or comet form (q_au, tp_tt); the other pair empty. h, g: H-G magnitude law.",
        "These values, as written, ARE the truth of every other file here.",
    ] + ["%s: %s" % (ob["name"], ob["kind"]) for ob in OBJECTS] + extra_ca)
        + "name,epoch_tt,a_au,e,i_deg,node_deg,peri_deg,m_deg,q_au,tp_tt,h,g\n"
        + "\n".join(element_row(ob) for ob in OBJECTS) + "\n")
    sizes["sites.csv"] = write("sites.csv", header("sites", [
        "INVENTED sites, not observatories. Geodetic WGS84 latitude, east longitude (deg),",
        "height above the ellipsoid (m).",
    ]) + "name,lat_deg,lon_deg,height_m\n"
        + "".join("%s,%.2f,%.2f,%.0f\n" % s for s in SITES))
    sizes["predictions.csv"] = write("predictions.csv", header("truth places after the arcs", [
        "Per object (all its arcs end with the same observation): days_after = 1, 7, 30 days",
        "after the last observation; from each site at 22:00 local mean time (UTC = 22 h -",
        "lon/15, the evening nearest to last + days_after; whole minutes), and from the",
        "geocentre at last + days_after (whole minutes). Astrometric ICRS ra_deg, dec_deg",
        "(topocentric for a site); delta_au observer distance, r_au heliocentric distance,",
        "both at t - tau; elong_deg Sun-observer-object angle; tdb two-part.",
    ]) + "orbit,days_after,time_utc,site,ra_deg,dec_deg,delta_au,r_au,elong_deg,tdb_day,tdb_frac\n"
        + "\n".join(pred_rows) + "\n")
    sizes["states.csv"] = write("states.csv", header("true heliocentric states", [
        "For each object and arc: the true heliocentric ICRS state (x, y, z au; vx, vy, vz",
        "au/day) at the TDB instant of the arc's middle observation (0-based index",
        "(n - 1) / 2 in time order; its time and site given), from the elements by this",
        "script's own two-body solution. The state is the geometric one at that TDB",
        "instant (not light-time retarded).",
    ]) + "orbit,arc,obs_index,time_utc,site,tdb_day,tdb_frac,x_au,y_au,z_au,vx_au_d,vy_au_d,vz_au_d\n"
        + "\n".join(state_rows) + "\n")
    total = 0
    for name in sorted(sizes):
        total += sizes[name]
        print("wrote %s/%s (%d bytes)" % (OUT_DIR, name, sizes[name]))
    print("total %d bytes" % total)


def close_approach(ob, t0, t1):
    """Minimum geocentric distance between TDB t0 and t1 (geometric, no light
    time): a 0.05-day scan, then golden-section refinement."""
    def dist(t):
        pvh, _ = erfa.epv00(t, 0.0)
        h, _ = helio_state(ob, t, 0.0)
        return float(np.linalg.norm(h - np.array(pvh["p"])))
    ts = np.arange(t0, t1, 0.05)
    ds = [dist(t) for t in ts]
    k = int(np.argmin(ds))
    a, b = ts[max(k - 1, 0)], ts[min(k + 1, len(ts) - 1)]
    g = (math.sqrt(5) - 1) / 2
    for _ in range(80):
        c, d = b - g * (b - a), a + g * (b - a)
        if dist(c) < dist(d):
            b = d
        else:
            a = c
    t = 0.5 * (a + b)
    return t, dist(t)


if __name__ == "__main__":
    main()
