#!/usr/bin/python3
"""Reference integrations of invented heliocentric orbits under the Sun and
the planets, for package ephem/nbody (reference_test.go).

Run from the repository root on a Debian machine with

    apt-get install python3-scipy python3-erfa python3-numpy \
        python3-casacore casacore-data-jpl-de405

as

    /usr/bin/python3 testdata/gen/nbody_reference.py

(under a minute on an idle core, two on a busy one). It writes ephem/nbody/testdata/reference_states.txt. A
re-run gives a byte-identical file. Nothing needs the network; astropy is
not used.

What it integrates
------------------
The heliocentric equations of motion of a massless body,

    r'' = -GM_S r / |r|^3
          + sum_j GM_j [ (r_j - r) / |r_j - r|^3  -  r_j / |r_j|^3 ]

(r heliocentric ICRS, au; time TDB days; the second term of the sum is the
indirect term, the acceleration of the Sun by body j), with scipy's
solve_ivp(method="DOP853") (Dormand & Prince 8(5,3); Hairer, Norsett &
Wanner, Solving ODEs I, 2nd ed., sec. II.10). The bodies j are Mercury,
Venus, the Earth, the Moon, Mars, Jupiter, Saturn, Uranus and Neptune as
point masses (Mars to Neptune: the planet systems, satellites included).

Gravitational parameters (au^3/day^2): the Sun GM_S = k^2 with the Gaussian
k = 0.01720209895 (IAU 1976); the planets from the header constants of JPL
DE405 (Standish 1998, JPL IOM 312.F-98-048), read with python3-casacore as
the keywords GM1, GM2, GM4 ... GM8 of the table
/usr/share/casacore/data/ephemerides/DE405 (as testdata/gen/de405_reference.py
reads it); the Earth GMB * EMRAT / (1 + EMRAT) and the Moon GMB / (1 + EMRAT)
(GMB the Earth-Moon system, EMRAT the Earth/Moon mass ratio). Pluto (GM9)
and the asteroids are left out, as in package nbody. The values are printed
in the header.

Positions of the bodies (model "nbody", the reference proper), all
heliocentric, ICRS axes, evaluated at the TDB instant (two-part date):
  Mercury, Venus, Mars ... Neptune: erfa.plan94 (Simon et al. 1994), which
      is referred to the mean equator and equinox of J2000; turned to the
      ICRS by the frame bias: v_ICRS = rb^T v_J2000 with rb from erfa.bp00
      (applied; it is about 0.02 arcsec, 1e-7 of a planet's position).
      plan94's Earth-Moon barycentre is not used.
  Earth: erfa.epv00 heliocentric (pvh), ICRS.
  Moon: Earth + erfa.moon98 (geocentric, GCRS = ICRS axes; Meeus ch. 47).
A second set of the same integrations ("nbody_de405") takes every body
from JPL DE405 instead (Chebyshev series evaluated by
de405_reference.Ephemeris; Earth = EMB - Moon / (1 + EMRAT); heliocentric =
barycentric - Sun), the most accurate planets available here: the two
differ only by the planets' source, and the difference says how far the
plan94 reference can be trusted. A third ("twobody") sets every planet's
mass to zero (the Sun alone), so that the size of the perturbations shows;
it is checked against this script's universal-variable Kepler solution
(orbit_synthetic.universal).

Integration
-----------
rtol = 2.5e-13, atol = 2.5e-15 (au, au/day), on each 5-day segment between
the output instants (the integration is restarted from the state at each
output instant, so no output is interpolated). scipy clips rtol below
100 eps = 2.2e-14, so the convergence check, with a run 10 times tighter
(rtol = 2.5e-14, atol = 2.5e-16), is the tightest the library allows; the
largest differences between the two runs are printed in the header, with
the reversibility (a year forward and back to the epoch).

Light time and the geocentric direction
---------------------------------------
For each output instant t (TDB): E(t) = erfa.epv00 heliocentric Earth at t
(the same Earth for every model), tau iterated to 1e-13 day from
tau = |r(t - tau) - E(t)| / c, with r(t - tau) from a short integration
from the state at t with the same tolerances; c = 299792.458 km/s,
1 au = 149597870.700 km (IAU 2012). The geocentric astrometric vector is
rho = r(t - tau) - E(t), heliocentric throughout (the Sun's barycentric
motion during tau, below 1e-7 au, is not added: a test must use the same
definition), given as RA and Dec (deg, 10 decimals) and |rho|.

Close approaches
----------------
Least distances (geometric, TDB) to the Earth, and to any planet whose
Hill sphere a_p (m_p / 3 M_S)^(1/3) (a_p the planet's heliocentric distance
at the instant, m_p/M_S = GM_p/GM_S) is entered, from the integrations'
dense output (scanned every 0.05 day, refined by golden section).

The orbits (invented; no real object)
-------------------------------------
  MB   a main-belt asteroid, a = 2.7 au.
  JFC  a Jupiter-family comet (q = 1.6, Q = 5.1 au) that passes Jupiter at
       0.308 au, inside its Hill sphere (0.355-0.370 au), 191 days after the
       epoch.
  NEO  a near-Earth asteroid that passes the Earth at 0.0125 au 150 days
       after the epoch (just outside the Earth's Hill sphere, 0.010 au).
Epoch 2027-05-15 0h TDB (JD 2461540.5); outputs every 5 days from one year
before to one year after it (146 instants plus the epoch). MB and JFC are
given by osculating heliocentric elements, ecliptic and equinox J2000
(eps0 = 84381.448", R1(-eps0) to ICRS, as package ephem); NEO by its
heliocentric ICRS state at the epoch, made by design_neo() (run with
--design to see how): a straight-line flyby of 0.0125 au at 9 km/s past the
epv00 Earth at JD 2461690.5, integrated back to the epoch with the planets (model nbody),
rounded to 1e-13 au and 1e-15 au/day.
"""

import importlib.util
import math
import os
import subprocess
import sys
import time
import warnings

import casacore
import casacore.tables as ctables
import erfa
import numpy as np
import scipy
from scipy.integrate import solve_ivp

warnings.simplefilter("ignore", erfa.ErfaWarning)  # "dubious year" for 2026-2028

ROOT = os.path.normpath(os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", ".."))
OUT = os.path.join(ROOT, "ephem", "nbody", "testdata", "reference_states.txt")
COMMAND = "/usr/bin/python3 testdata/gen/nbody_reference.py"
DE405_PATH = "/usr/share/casacore/data/ephemerides/DE405"
DEBS = ["python3-scipy", "python3-numpy", "python3-erfa", "python3-casacore",
        "casacore-data-jpl-de405"]


def load_sibling(name):
    spec = importlib.util.spec_from_file_location(
        name, os.path.join(os.path.dirname(os.path.abspath(__file__)), name + ".py"))
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


de405ref = load_sibling("de405_reference")
orbitsyn = load_sibling("orbit_synthetic")
warnings.simplefilter("ignore", erfa.ErfaWarning)

K_GAUSS = 0.01720209895
GM_SUN = K_GAUSS * K_GAUSS
AU_KM = 149597870.700
C_AU_DAY = 299792.458 * 86400.0 / AU_KM
EPS0 = math.radians(84381.448 / 3600.0)
ECL_TO_ICRS = np.array([[1.0, 0.0, 0.0],
                        [0.0, math.cos(EPS0), -math.sin(EPS0)],
                        [0.0, math.sin(EPS0), math.cos(EPS0)]])

RTOL, ATOL = 2.5e-13, 2.5e-15
RTOL_CHECK, ATOL_CHECK = 2.5e-14, 2.5e-16

EPOCH = 2461540.5          # 2027-05-15 0h TDB
STEP = 5.0
NSTEP = 73                 # 73 x 5 = 365 days each way
NEO_CA = 2461690.5         # design instant of the NEO's flyby

BODIES = ["Mercury", "Venus", "Earth", "Moon", "Mars", "Jupiter", "Saturn", "Uranus", "Neptune"]
PLAN94_NUMBER = {"Mercury": 1, "Venus": 2, "Mars": 4, "Jupiter": 5, "Saturn": 6,
                 "Uranus": 7, "Neptune": 8}


def read_gms():
    """GM of each body (au^3/day^2) from the DE405 keywords, with the keyword
    text for the header."""
    tb = ctables.table(DE405_PATH, ack=False)
    kw = tb.getkeywords()
    tb.close()
    gmb, emrat = float(kw["GMB"]), float(kw["EMRAT"])
    gm = {
        "Mercury": float(kw["GM1"]), "Venus": float(kw["GM2"]),
        "Earth": gmb * emrat / (1.0 + emrat), "Moon": gmb / (1.0 + emrat),
        "Mars": float(kw["GM4"]), "Jupiter": float(kw["GM5"]), "Saturn": float(kw["GM6"]),
        "Uranus": float(kw["GM7"]), "Neptune": float(kw["GM8"]),
    }
    src = {"Mercury": "GM1", "Venus": "GM2", "Earth": "GMB*EMRAT/(1+EMRAT)",
           "Moon": "GMB/(1+EMRAT)", "Mars": "GM4", "Jupiter": "GM5", "Saturn": "GM6",
           "Uranus": "GM7", "Neptune": "GM8"}
    info = dict(GMS=float(kw["GMS"]), GMB=gmb, EMRAT=emrat, DENUM=float(kw["DENUM"]))
    return gm, src, info


# ---------------------------------------------------------------------------
# Sources of the bodies' positions
# ---------------------------------------------------------------------------

class ErfaBodies:
    """plan94 planets (frame bias applied), epv00 Earth, moon98 Moon."""
    name = "nbody"

    def __init__(self):
        self.rbt = np.array(erfa.bp00(2451545.0, 0.0)[0]).T
        self.nums = np.array([PLAN94_NUMBER[b] for b in BODIES if b in PLAN94_NUMBER])
        self.calls = 0

    def positions(self, d1, d2):
        """Heliocentric ICRS positions (au) of BODIES at TDB d1 + d2, (9, 3)."""
        self.calls += 1
        pv = erfa.plan94(d1, d2, self.nums)            # 7 pv records, J2000 mean
        pl = pv["p"] @ self.rbt.T                      # rows turned by rb^T
        earth = erfa.epv00(d1, d2)[0]["p"]
        moon = earth + erfa.moon98(d1, d2)["p"]
        return np.array([pl[0], pl[1], earth, moon, pl[2], pl[3], pl[4], pl[5], pl[6]])


class DE405Bodies:
    """Every body from JPL DE405 (Debian's casacore table)."""
    name = "nbody_de405"

    def __init__(self):
        self.e = de405ref.Ephemeris("DE405")
        self.items = [de405ref.MERCURY, de405ref.VENUS, None, None, de405ref.MARS,
                      de405ref.JUPITER, de405ref.SATURN, de405ref.URANUS, de405ref.NEPTUNE]
        self.calls = 0

    def item(self, it, d1, d2):
        """Position (km) of JPL item it at TDB d1 + d2 (d1 a 0h date), with
        the record and sub-interval chosen here from the exact day count so
        that rounding at a boundary cannot pick a neighbour."""
        e = self.e
        mjd_day = d1 - 2400000.5                   # an integer
        i = int((mjd_day - e.mjd[0]) // 32.0)
        while i > 0 and (mjd_day - e.mjd[i]) + d2 < 0.0:
            i -= 1
        while i + 1 < len(e.mjd) and (mjd_day - e.mjd[i]) + d2 >= 32.0:
            i += 1
        dt = (mjd_day - e.mjd[i]) + d2
        nsub = e.ptr[2, it]
        j = min(max(int(dt // (32.0 / nsub)), 0), nsub - 1)
        return e.item(it, d1, d2, sub=j, row=i)[0]

    def positions(self, d1, d2):
        self.calls += 1
        e = self.e
        f = math.floor(d2)
        d1, d2 = d1 + f, d2 - f                    # d1 stays a 0h date
        sun = self.item(de405ref.SUN, d1, d2)
        emb = self.item(de405ref.EMB, d1, d2)
        moon = self.item(de405ref.MOON, d1, d2)
        earth = emb - moon / (1.0 + e.emrat)
        out = []
        for b, it in zip(BODIES, self.items):
            if b == "Earth":
                p = earth
            elif b == "Moon":
                p = earth + moon
            else:
                p = self.item(it, d1, d2)
            out.append((p - sun) / e.au)
        return np.array(out)


def earth_epv00(d1, d2):
    return np.array(erfa.epv00(d1, d2)[0]["p"])


# ---------------------------------------------------------------------------
# Equations of motion and integration
# ---------------------------------------------------------------------------

class Model:
    """A force model: a body source (None: two-body) and the GMs."""

    def __init__(self, source, gm, name):
        self.source = source
        self.gm = np.array([gm[b] for b in BODIES])[:, None]
        self.name = name
        self.nfev = 0

    def rhs(self, t, y):
        """t: days from EPOCH (TDB)."""
        self.nfev += 1
        r = y[:3]
        a = -GM_SUN * r / np.dot(r, r) ** 1.5
        if self.source is not None:
            p = self.source.positions(EPOCH, t)
            d = p - r
            a = a + np.sum(self.gm * (d / (np.sum(d * d, axis=1) ** 1.5)[:, None]
                                      - p / (np.sum(p * p, axis=1) ** 1.5)[:, None]), axis=0)
        return np.concatenate([y[3:], a])


def step(model, y, t0, t1, rtol, atol, dense=False):
    sol = solve_ivp(model.rhs, (t0, t1), y, method="DOP853", rtol=rtol, atol=atol,
                    dense_output=dense)
    if not sol.success:
        raise RuntimeError("solve_ivp: %s" % sol.message)
    return sol.y[:, -1], sol


def integrate_grid(model, y0, rtol, atol, dense=False):
    """States at EPOCH + k STEP, k = -NSTEP..NSTEP: {k: y}; and the dense
    solutions of the segments (if asked)."""
    out = {0: np.array(y0)}
    sols = []
    for sign in (1, -1):
        y = np.array(y0)
        for k in range(1, NSTEP + 1):
            y, sol = step(model, y, sign * (k - 1) * STEP, sign * k * STEP, rtol, atol, dense)
            out[sign * k] = y
            if dense:
                sols.append(sol)
    return out, sols


def retarded(model, y, t, earth, rtol, atol):
    """(r(t - tau), tau): the light-time-retarded heliocentric position."""
    tau = np.linalg.norm(y[:3] - earth) / C_AU_DAY
    for _ in range(20):
        yr, _ = step(model, y, t, t - tau, rtol, atol)
        new = np.linalg.norm(yr[:3] - earth) / C_AU_DAY
        if abs(new - tau) < 1e-13:
            yr, _ = step(model, y, t, t - new, rtol, atol)
            return yr[:3], new
        tau = new
    raise RuntimeError("light time did not converge")


def places(model, states, rtol, atol):
    """Per grid index: (earth, rho, tau)."""
    out = {}
    for k, y in states.items():
        t = k * STEP
        earth = earth_epv00(EPOCH, t)
        r, tau = retarded(model, y, t, earth, rtol, atol)
        out[k] = (earth, r - earth, tau)
    return out


def angle_arcsec(a, b):
    return math.degrees(math.atan2(np.linalg.norm(np.cross(a, b)), np.dot(a, b))) * 3600.0


# ---------------------------------------------------------------------------
# Orbits
# ---------------------------------------------------------------------------

def elements_state(a, e, i, node, peri, m):
    """Heliocentric ICRS state from elliptic elements (deg), ecliptic J2000."""
    big_e = orbitsyn.kepler_elliptic(math.radians(m), e)
    p, q = orbitsyn.plane_to_ecliptic(dict(i=i, node=node, peri=peri))
    n = math.sqrt(GM_SUN / a ** 3)
    b = a * math.sqrt(1 - e * e)
    c, s = math.cos(big_e), math.sin(big_e)
    edot = n / (1 - e * c)
    x, y, vx, vy = a * (c - e), b * s, -a * s * edot, b * c * edot
    return np.concatenate([ECL_TO_ICRS @ (x * p + y * q), ECL_TO_ICRS @ (vx * p + vy * q)])


def state_elements(y):
    """Osculating heliocentric ecliptic J2000 elements (a, e, i, node, peri,
    M deg, q) of an ICRS state (for the header)."""
    r = ECL_TO_ICRS.T @ y[:3]
    v = ECL_TO_ICRS.T @ y[3:]
    h = np.cross(r, v)
    rn = np.linalg.norm(r)
    ev = np.cross(v, h) / GM_SUN - r / rn
    e = np.linalg.norm(ev)
    a = 1.0 / (2.0 / rn - np.dot(v, v) / GM_SUN)
    i = math.degrees(math.acos(h[2] / np.linalg.norm(h)))
    node = math.degrees(math.atan2(h[0], -h[1])) % 360
    nv = np.array([math.cos(math.radians(node)), math.sin(math.radians(node)), 0.0])
    peri = math.degrees(math.atan2(np.dot(np.cross(nv, ev), h) / np.linalg.norm(h), np.dot(nv, ev))) % 360
    nu = math.atan2(np.dot(np.cross(ev, r), h) / np.linalg.norm(h), np.dot(ev, r))
    big_e = 2 * math.atan(math.sqrt((1 - e) / (1 + e)) * math.tan(nu / 2))
    m = math.degrees(big_e - e * math.sin(big_e)) % 360
    return a, e, i, node, peri, m, a * (1 - e)


ORBITS = [
    dict(name="MB", kind="main-belt asteroid (invented)",
         elements=(2.7031, 0.1236, 7.84, 118.327, 54.913, 211.406)),
    dict(name="JFC", kind="Jupiter-family comet passing Jupiter (invented)",
         elements=(3.35, 0.5224, 4.20, 131.00, 212.00, 152.00)),
    # The epoch state (ICRS au, au/day) printed by --design (design_neo), as written.
    dict(name="NEO", kind="near-Earth asteroid with a close approach to the Earth (invented)",
         state=[-0.7951582047551, 0.0868549497766, 0.1515353179221,
                -0.000753878812866, -0.015663787775335, -0.012229467005168]),
]


def design_neo(model):
    """The NEO's epoch state: a flyby past the epv00 Earth at NEO_CA, miss
    0.0125 au on the straight-line asymptote, relative speed 9 km/s, relative
    velocity (0.45 radial, -0.35 along-track, 0.82 normal) in the Earth's
    orbital frame; integrated back to the epoch with the planets."""
    pvh = erfa.epv00(NEO_CA, 0.0)[0]
    e, ve = np.array(pvh["p"]), np.array(pvh["v"])
    ur = e / np.linalg.norm(e)
    un = np.cross(e, ve)
    un /= np.linalg.norm(un)
    ut = np.cross(un, ur)
    w = 0.45 * ur - 0.35 * ut + 0.82 * un
    w /= np.linalg.norm(w)
    vrel = w * 9.0 * 86400.0 / AU_KM
    bdir = ut - np.dot(ut, w) * w
    bdir /= np.linalg.norm(bdir)
    y = np.concatenate([e + 0.0125 * bdir, ve + vrel])
    y0, _ = step(model, y, NEO_CA - EPOCH, 0.0, RTOL, ATOL)
    return np.concatenate([np.round(y0[:3], 13), np.round(y0[3:], 15)])


def initial_state(ob):
    if "elements" in ob:
        return elements_state(*ob["elements"])
    return np.array(ob["state"])


# ---------------------------------------------------------------------------
# Close approaches
# ---------------------------------------------------------------------------

def approaches(model, sols, gm):
    """Least distances to the Earth (< 0.05 au) and inside Hill spheres:
    [(body, (t, distance), hill)], t in days from EPOCH."""
    src = model.source
    segs = sorted((min(s.t[0], s.t[-1]), max(s.t[0], s.t[-1]), s) for s in sols)

    def pos(t):
        for a, b, s in segs:
            if a <= t <= b:
                return s.sol(t)[:3]
        raise ValueError("t = %r outside the integration" % t)

    n = int(round((segs[-1][1] - segs[0][0]) / 0.05)) + 1
    ts = np.minimum(segs[0][0] + 0.05 * np.arange(n), segs[-1][1])
    ys = np.array([pos(t) for t in ts])
    ps = np.array([src.positions(EPOCH, t) for t in ts])
    d = np.linalg.norm(ps - ys[:, None, :], axis=2)         # (n, 9)
    found = []
    for j, b in enumerate(BODIES):
        if b == "Moon":
            continue
        for k in range(1, len(ts) - 1):
            if d[k, j] <= d[k - 1, j] and d[k, j] < d[k + 1, j]:
                hill = np.linalg.norm(ps[k, j]) * (gm[b] / (3 * GM_SUN)) ** (1 / 3.0)
                if (b == "Earth" and d[k, j] < 0.05) or d[k, j] < hill:
                    found.append((b, refine(src, pos, j, ts[k - 1], ts[k + 1]), hill))
    found.sort(key=lambda f: f[1][0])
    return found


def refine(src, pos, j, a, b):
    """Golden-section search for the least distance to body j in [a, b]."""
    def dist(t):
        return np.linalg.norm(src.positions(EPOCH, t)[j] - pos(t))
    g = (math.sqrt(5) - 1) / 2
    for _ in range(60):
        c, d = b - g * (b - a), a + g * (b - a)
        if dist(c) < dist(d):
            b = d
        else:
            a = c
    t = 0.5 * (a + b)
    return t, dist(t)


# ---------------------------------------------------------------------------
# Main
# ---------------------------------------------------------------------------

def deb_versions():
    try:
        out = subprocess.run(["dpkg-query", "-W"] + DEBS, capture_output=True, text=True,
                             check=True).stdout
        return [" ".join(l.split()) for l in out.strip().splitlines()]
    except (OSError, subprocess.CalledProcessError):
        return ["dpkg-query unavailable"]


def radec(v):
    ra, dec = erfa.c2s(v)
    return math.degrees(erfa.anp(ra)), math.degrees(dec)


def main():
    t_start = time.time()
    gm, gm_src, info = read_gms()
    erfa_src, de_src = ErfaBodies(), DE405Bodies()
    m94 = Model(erfa_src, gm, "nbody")
    if "--design" in sys.argv:
        print("NEO_STATE =", repr(list(design_neo(m94))))
        return
    models = [m94, Model(de_src, gm, "nbody_de405"), Model(None, gm, "twobody")]
    log, rows, enc_rows = [], [], []
    summary = []
    for ob in ORBITS:
        y0 = initial_state(ob)
        res = {}
        for m in models:
            m.nfev = 0
            st, sols = integrate_grid(m, y0, RTOL, ATOL, dense=(m.source is not None))
            pl = places(m, st, RTOL, ATOL)
            res[m.name] = (st, pl, sols, m.nfev)
        # Convergence: both n-body models 10 times tighter.
        conv = {}
        for m in models[:2]:
            st_c, _ = integrate_grid(m, y0, RTOL_CHECK, ATOL_CHECK)
            pl_c = places(m, st_c, RTOL_CHECK, ATOL_CHECK)
            st, pl = res[m.name][0], res[m.name][1]
            conv[m.name] = (max(np.linalg.norm(st[k][:3] - st_c[k][:3]) for k in st),
                            max(np.linalg.norm(st[k][3:] - st_c[k][3:]) for k in st),
                            max(angle_arcsec(pl[k][1], pl_c[k][1]) for k in st))
        st, pl = res["nbody"][0], res["nbody"][1]
        conv_r = max(c[0] for c in conv.values())
        conv_a = max(c[2] for c in conv.values())
        # Reversibility: a year forward, then back to the epoch, in one run each way.
        y1, _ = step(m94, y0, 0.0, NSTEP * STEP, RTOL, ATOL)
        yb, _ = step(m94, y1, NSTEP * STEP, 0.0, RTOL, ATOL)
        rev = np.linalg.norm(yb[:3] - y0[:3])
        # One-run vs 5-day segments (restart) at +1 year.
        seg = np.linalg.norm(y1[:3] - st[NSTEP][:3])
        # Two-body against the universal-variable solution.
        st2 = res["twobody"][0]
        kep = max(np.linalg.norm(orbitsyn.universal(y0[:3], y0[3:], k * STEP) - st2[k][:3]) for k in st2)
        # plan94 vs DE405 bodies; n-body vs two-body.
        st5, pl5 = res["nbody_de405"][0], res["nbody_de405"][1]
        pert5_a = {sg: angle_arcsec(pl5[sg * NSTEP][1], res["twobody"][1][sg * NSTEP][1]) for sg in (1, -1)}
        src_r = {s: np.linalg.norm(st[s * NSTEP][:3] - st5[s * NSTEP][:3]) for s in (1, -1)}
        src_a = {s: angle_arcsec(pl[s * NSTEP][1], pl5[s * NSTEP][1]) for s in (1, -1)}
        src_aw = max(angle_arcsec(pl[k][1], pl5[k][1]) for k in st)
        pl2 = res["twobody"][1]
        pert_r = {s: np.linalg.norm(st[s * NSTEP][:3] - st2[s * NSTEP][:3]) for s in (1, -1)}
        pert_a = {s: angle_arcsec(pl[s * NSTEP][1], pl2[s * NSTEP][1]) for s in (1, -1)}
        el = state_elements(y0)
        log.append("%s: %s. Epoch state's osculating elements (ecliptic J2000): a %.6f au, e %.6f, "
                   "i %.4f, node %.4f, peri %.4f, M %.4f deg, q %.6f au."
                   % (ob["name"], ob["kind"], *el))
        for mname, (cr, cv, ca) in conv.items():
            log.append("  convergence of %s (rtol %.1e vs %.1e): position %.2e au, velocity %.2e au/d, "
                       "direction %.2e arcsec (worst over the 147 instants)." % (mname, RTOL, RTOL_CHECK, cr, cv, ca))
        log.append("  nbody: reversibility +1 yr and back %.2e au; one 365-d run vs 73 segments at +1 yr "
                   "%.2e au; twobody vs universal variables %.2e au." % (rev, seg, kep))
        log.append("  planets' source, nbody (plan94/epv00/moon98) - nbody_de405: position %.2e au "
                   "(%.0f km) at +1 yr, %.2e au (%.0f km) at -1 yr; direction %.4f\" at +1 yr, "
                   "%.4f\" at -1 yr, worst %.4f\"."
                   % (src_r[1], src_r[1] * AU_KM, src_r[-1], src_r[-1] * AU_KM, src_a[1], src_a[-1], src_aw))
        log.append("  perturbations, nbody - twobody: position %.3e au at +1 yr, %.3e au at -1 yr; "
                   "direction %.2f\" at +1 yr, %.2f\" at -1 yr (nbody_de405 - twobody %.2f\", %.2f\")."
                   % (pert_r[1], pert_r[-1], pert_a[1], pert_a[-1], pert5_a[1], pert5_a[-1]))
        log.append("  function evaluations: nbody %d, nbody_de405 %d, twobody %d."
                   % (res["nbody"][3], res["nbody_de405"][3], res["twobody"][3]))
        summary.append((ob["name"], conv_r, conv_a, rev, src_a, pert_a))
        for mname in ("nbody", "nbody_de405"):
            m = m94 if mname == "nbody" else models[1]
            for b, (t, d), hill in approaches(m, res[mname][2], gm):
                enc_rows.append(("encounter", ob["name"], mname, b, t, d, hill))
        for mname in ("nbody", "nbody_de405", "twobody"):
            st_m, pl_m = res[mname][0], res[mname][1]
            for k in sorted(st_m):
                y = st_m[k]
                earth, rho, tau = pl_m[k]
                ra, dec = radec(rho)
                rows.append("state %-11s %-3s %.1f %6.1f  %s  %s  %.16e %.10f %.10f %.15f"
                            % (mname, ob["name"], EPOCH + k * STEP, k * STEP,
                               " ".join("%.16e" % v for v in y),
                               " ".join("%.16e" % v for v in earth), tau, ra, dec,
                               np.linalg.norm(rho)))
        print("%s done (%.0f s)" % (ob["name"], time.time() - t_start), file=sys.stderr)
    enc_rows.sort(key=lambda e: (e[1], e[2], e[4]))
    enc_text = []
    for _, name, mname, b, t, d, hill in enc_rows:
        day = math.floor(t + EPOCH - 0.5) + 0.5
        enc_text.append("encounter %-11s %-3s %-7s %.1f %.10f %.12f %.6f"
                        % (mname, name, b, day, (EPOCH - day) + t, d, hill))
    worst = {b: 0.0 for b in BODIES}
    for k in range(-NSTEP, NSTEP + 1):
        d = np.linalg.norm(erfa_src.positions(EPOCH, k * STEP) - de_src.positions(EPOCH, k * STEP), axis=1)
        for b, v in zip(BODIES, d):
            worst[b] = max(worst[b], v * AU_KM)
    src_diff = ", ".join("%s %.0f" % (b, worst[b]) for b in BODIES)
    write(gm, gm_src, info, log, rows, enc_text, time.time() - t_start, summary, src_diff)


def write(gm, gm_src, info, log, rows, enc_text, elapsed, summary, src_diff):
    hdr = [
        "# reference_states.txt: heliocentric states of three invented orbits integrated under the Sun and",
        "# the planets (scipy DOP853), with their geocentric astrometric directions; the same with DE405",
        "# planets, and two-body. INVENTED orbits (no real object).",
        "# Made by: %s" % COMMAND,
        "# Packages (dpkg-query -W):",
    ] + ["#   %s" % v for v in deb_versions()] + [
        "#   (scipy %s, numpy %s, pyerfa %s / ERFA %s, python-casacore %s, Python %s)" % (
            scipy.__version__, np.__version__, erfa.__version__, erfa.version.erfa_version,
            getattr(casacore, "__version__", "?"), sys.version.split()[0]),
        "# Equations: heliocentric, r'' = -GM_S r/|r|^3 + sum_j GM_j [(r_j - r)/|r_j - r|^3 - r_j/|r_j|^3],",
        "#   j = Mercury, Venus, Earth, Moon, Mars, Jupiter, Saturn, Uranus, Neptune (point masses; Mars to",
        "#   Neptune the planet systems); the second term is the indirect term. Time TDB days, ICRS au.",
        "# GM (au^3/day^2): Sun k^2, k = 0.01720209895 (Gaussian, IAU 1976): %.16e" % GM_SUN,
        "#   (DE405 GMS = %.16e); from the keywords of %s (DENUM %.0f):" % (info["GMS"], DE405_PATH, info["DENUM"]),
    ] + ["#   %-8s %.16e  %s" % (b, gm[b], gm_src[b]) for b in BODIES] + [
        "#   (GMB = %.16e, EMRAT = %.8f)" % (info["GMB"], info["EMRAT"]),
        "# Bodies' positions (heliocentric, ICRS, at the TDB instant):",
        "#   model nbody:       planets erfa.plan94 (J2000 mean equator/equinox -> ICRS by rb^T, rb of",
        "#                      erfa.bp00: the ~0.02\" frame bias, applied), Earth erfa.epv00 (pvh),",
        "#                      Moon = Earth + erfa.moon98 (GCRS). plan94's Earth-Moon barycentre unused.",
        "#   model nbody_de405: every body from JPL DE405 (casacore table, Chebyshev series evaluated",
        "#                      by testdata/gen/de405_reference.py's reader); Earth = EMB - Moon/(1+EMRAT).",
        "#   model twobody:     the planets' masses set to zero (Sun only).",
        "# Integrator: scipy.integrate.solve_ivp(method=\"DOP853\", rtol=%.1e, atol=%.1e) on each 5-day" % (RTOL, ATOL),
        "#   segment (restarted at every output instant: no interpolated output). Convergence: both n-body",
        "#   models again with rtol=%.1e, atol=%.1e (10x tighter; scipy's floor for rtol is 100 eps)." % (RTOL_CHECK, ATOL_CHECK),
        "# Bodies' sources compared, nbody - nbody_de405 heliocentric positions, worst over the 147 output",
        "#   instants (km): " + src_diff,
        "#   So nbody_de405 is the accurate reference; nbody (plan94) is good where Jupiter and Saturn",
        "#   matter little (see the per-orbit 'planets' source' lines below).",
        "# Geocentric astrometric direction: rho = r(t - tau) - E(t), E = erfa.epv00 heliocentric Earth at",
        "#   t (the same for every model), heliocentric (no barycentric correction), tau = |rho|/c iterated",
        "#   to 1e-13 d, r(t - tau) by integration from the state at t; c = 299792.458 km/s,",
        "#   1 au = 149597870.700 km. No aberration, no deflection.",
        "# Encounters: least geometric distance to the Earth (< 0.05 au) or inside a planet's Hill sphere",
        "#   a_p (GM_p/(3 GM_S))^(1/3), a_p the planet's heliocentric distance then; from the dense output.",
        "# Orbits, checks and figures (from this run):",
    ] + ["#   " + s for s in log] + [
        "# Rows:",
        "#   state MODEL ORBIT tdb_jd dt_days  x y z vx vy vz  ex ey ez  tau_d ra_deg dec_deg delta_au",
        "#     (tdb_jd the TDB Julian date, exact; dt_days = tdb_jd - epoch, the epoch is the dt_days = 0 row; state",
        "#      heliocentric ICRS au, au/day; ex ey ez the Earth E(t), au; ra/dec of rho, deg; delta |rho|)",
        "#   encounter MODEL ORBIT BODY tdb_day tdb_frac distance_au hill_au",
    ]
    tmp = OUT + ".tmp"
    os.makedirs(os.path.dirname(OUT), exist_ok=True)
    with open(tmp, "w", newline="\n") as f:
        f.write("\n".join(hdr + enc_text + rows) + "\n")
    os.replace(tmp, OUT)
    print("wrote %s (%d state rows, %d encounters) in %.0f s" % (OUT, len(rows), len(enc_text), elapsed))
    for name, conv_r, conv_a, rev, src_a, pert_a in summary:
        print("%-3s convergence %.1e au %.1e\"  reversibility %.1e au  plan94-DE405 %.4f\"/%.4f\"  "
              "n-body - two-body %.1f\"/%.1f\"" % (name, conv_r, conv_a, rev, src_a[1], src_a[-1], pert_a[1], pert_a[-1]))


if __name__ == "__main__":
    main()
