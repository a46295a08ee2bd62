#!/usr/bin/python3
"""Synthetic observations of invented objects whose truth is integrated
under the Sun and the planets, for the perturbed-orbit fit and its
search-region calibration (packages fit/orbit and fit).

Run from the repository root with Debian's interpreter:

    apt-get install python3-scipy python3-erfa python3-numpy \
        python3-casacore casacore-data-jpl-de405
    /usr/bin/python3 testdata/gen/nbody_synthetic.py

(about a minute on one core). A re-run gives byte-identical files. It writes,
into fit/orbit/testdata/nbody_synthetic/ (each file with a provenance
header):

    sites.csv              the two invented sites (arcfit's sites CSV; the
                           sites of fit/orbit/testdata/synthetic/)
    elements.csv           osculating elements of the truth at each object's
                           epoch (arcfit's elements CSV; information: the
                           truth is the integration from states.csv's epoch
                           state)
    <stem>_<arc>.csv       noise-free observations of one object over one arc
                           (arcfit's observation CSV); arcs 30d, 60d, 90d
    <stem>_geometry.csv    for every observation instant: time scales, the
                           observer's heliocentric position and velocity, the
                           Sun's barycentric velocity, light time (as in
                           fit/orbit/testdata/synthetic/)
    predictions.csv        truth places 30 and 90 days after the last
                           observation, from each site and the geocentre
    states.csv             the truth's heliocentric ICRS state at each
                           object's epoch (where the integration starts) and
                           at each arc's middle observation (TDB)
    predictions_twobody.csv  the places +30 and +90 days after the last
                           observation of a TWO-BODY propagation of each
                           arc's middle truth state, and their distance from
                           the truth: the size of the perturbation there
    twobody_fit.csv        this script's noise-free two-body least-squares
                           fit of each arc, its 3-sigma region at +30/+90 d
                           (sigma 0.5") and where the truth falls in it

The objects, their orbits and the sites are invented; nothing here is a
real object's orbit or measurement. All arcs of one object end on the same
night with the same last observation, so the predictions are per object.

Definitions: those of testdata/gen/orbit_synthetic.py (its docstring) for
time scales, sites, the observer, the astrometric place (barycentric, light
time iterated to 1e-13 day, the Sun's barycentric position from epv00 at
t - tau), magnitudes and the schedule's method; this script imports its
functions (Instant, sun_bary, utc_from_centiseconds, fmt_iso, hg_mag, ...)
so the two sets cannot drift apart. What differs is the orbit:

  orbit     the truth is the heliocentric equations of motion of
            testdata/gen/nbody_reference.py (Sun GM = k^2; Mercury ...
            Neptune, the Earth and the Moon as point masses with the DE405
            GMs from the casacore keywords; the indirect term), integrated
            by scipy's solve_ivp DOP853 at rtol 2.5e-13, atol 2.5e-15, with
            every body's position from JPL DE405 (that script's model
            "nbody_de405": its reference shows the plan94 planets are up to
            93,000 km (Jupiter) and 320,000 km (Saturn) from DE405 in
            2026-2028, enough to move an object passing Jupiter by
            arcseconds). The integration starts from the epoch state in
            states.csv (exact as written) and is restarted at every whole day
            from the epoch; an instant between two days is reached by a
            short integration from the nearest one, so no position is
            interpolated. Time TDB days; ICRS au. The osculating elements
            in elements.csv are this state's (ecliptic J2000, eps0 =
            84381.448", GM = k^2): a two-body propagation of them is NOT the
            truth.
  two-body  predictions_twobody.csv: the arc's middle truth state propagated
            about the Sun alone (orbit_synthetic.universal, universal
            variables), same place definitions.
  fit       twobody_fit.csv: weighted least squares (scipy least_squares,
            Levenberg-Marquardt) of the six components of a heliocentric
            state at the arc's middle observation under two-body motion, on
            the noise-free observations with sigma 0.5" per coordinate
            (residuals RA cos Dec and Dec on the tangent plane of each
            observed place); covariance (J^T J)^-1 from central differences;
            the geocentric prediction at +30/+90 days and its 2x2 covariance
            (the prediction's central-difference Jacobian). bias = fit minus
            truth on the tangent plane at the truth (arcsec east, north);
            mahalanobis = sqrt(bias^T C^-1 bias): the truth is outside the
            3-sigma ellipse when it exceeds 3; expected_miss = the
            probability that a noisy realisation's two-body prediction
            leaves the truth outside its 3-sigma ellipse, for Gaussian
            noise in the linear regime: P(noncentral chi^2(2, mahalanobis^2)
            > 9) (scipy.stats.ncx2). A correct model has mahalanobis 0 and
            misses with probability exp(-9/2) = 1.1 %.
  schedule  as orbit_synthetic.py, but 2-3 observations a night (seeded
            numpy default_rng), chosen from the object's geometric
            altitudes (positions interpolated from the daily truth states
            for the choice of times only; every written place is exact).
  sigma     0.5 arcsec per coordinate (stated; the positions carry no noise;
            tests add their own seeded noise).
"""

import importlib.util
import math
import os
import subprocess
import sys
import warnings

import erfa
import numpy as np
import scipy
from scipy.optimize import least_squares
from scipy.stats import chi2, ncx2

COMMAND = "/usr/bin/python3 testdata/gen/nbody_synthetic.py"
OUT_DIR = os.path.join("fit", "orbit", "testdata", "nbody_synthetic")
DEBS = ["python3-scipy", "python3-numpy", "python3-erfa", "python3-casacore",
        "casacore-data-jpl-de405"]


def load_sibling(name):
    spec = importlib.util.spec_from_file_location(
        name, os.path.join(os.path.dirname(os.path.abspath(__file__)), name + ".py"))
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


osyn = load_sibling("orbit_synthetic")
nref = load_sibling("nbody_reference")
warnings.simplefilter("ignore", erfa.ErfaWarning)  # "dubious year" for 2027-2028

T0 = nref.EPOCH            # time origin of the integrator (days from it, TDB)
C_AU_DAY = osyn.C_AU_DAY
SIGMA_ARCSEC = osyn.SIGMA_ARCSEC
SITES = osyn.SITES
SEED = 20271115
ARCSEC = math.pi / 180.0 / 3600.0

# Invented objects. Each: osculating heliocentric elements (ecliptic J2000,
# deg) at its epoch (TDB, a 0h date), or an ICRS state; end: the local date
# of the evening of the last night of every arc. The orientations were
# chosen by trying values (see the README) so that each object is well
# placed at night over its arcs and the planets matter by the predictions.
OBJECTS = [
    dict(name="Invented-MB2", stem="mb2", kind="outer main-belt asteroid passing Jupiter's longitude",
         epoch=2461437.5, elements=(3.1500, 0.0900, 4.00, 100.00, 150.00, 247.00),
         h=14.0, g=0.15, end=(2027, 3, 14)),
    dict(name="Invented-JF2", stem="jf2", kind="Jupiter-family comet near Jupiter",
         epoch=2461800.5, elements=(3.6000, 0.4500, 3.00, 120.00, 230.00, 192.00),
         end=(2028, 4, 15)),
    dict(name="Invented-NEO2", stem="neo2", kind="near-Earth asteroid, Earth approach after the arcs",
         epoch=2461640.5, h=20.5, g=0.15, end=(2027, 9, 25),
         state=[1.2512705440363, -0.515074725387, -0.0965258273306,
                0.000488461680813, 0.015126850431797, 0.005520444549197]),
]

# Arcs: name, night offsets from the end night (days), what it is.
ARCS = [
    ("30d", [-30, -26, -21, -16, -11, -6, -3, 0], "8 nights over 30 days"),
    ("60d", [-60, -52, -44, -36, -28, -21, -14, -7, -3, 0], "10 nights over 60 days"),
    ("90d", [-90, -80, -70, -60, -50, -40, -30, -21, -14, -7, -3, 0], "12 nights over 90 days"),
]
PREDICT_DAYS = [30, 90]
PREDICT_LOCAL_HOUR = 22.0


# ---------------------------------------------------------------------------
# The truth
# ---------------------------------------------------------------------------

class Truth:
    """The n-body truth of one object: states at every whole day from its
    epoch, and exact states in between by short integrations."""

    def __init__(self, model, y0, epoch, lo, hi):
        self.model = model
        self.e0 = epoch - T0                      # epoch, days from T0 (exact)
        self.grid = {0: np.array(y0)}
        for sign, n in ((1, int(math.ceil(hi - epoch)) + 2), (-1, int(math.ceil(epoch - lo)) + 2)):
            y = np.array(y0)
            for k in range(1, n + 1):
                y, _ = nref.step(model, y, self.e0 + sign * (k - 1), self.e0 + sign * k,
                                 nref.RTOL, nref.ATOL)
                self.grid[sign * k] = y
        self.cache = {}

    def state(self, t):
        """State at t days from T0 (TDB)."""
        k = int(round(t - self.e0))
        tk = self.e0 + k
        if t == tk:
            return self.grid[k]
        if t not in self.cache:
            self.cache[t] = nref.step(self.model, self.grid[k], tk, t, nref.RTOL, nref.ATOL)[0]
        return self.cache[t]

    def approx(self, t):
        """Position by cubic Hermite interpolation of the daily states (for
        choosing observation times only)."""
        k = int(math.floor(t - self.e0))
        y0, y1 = self.grid[k], self.grid[k + 1]
        s = t - (self.e0 + k)
        h00 = 2 * s ** 3 - 3 * s ** 2 + 1
        h10 = s ** 3 - 2 * s ** 2 + s
        h01 = -2 * s ** 3 + 3 * s ** 2
        h11 = s ** 3 - s ** 2
        return h00 * y0[:3] + h10 * y0[3:] + h01 * y1[:3] + h11 * y1[3:]


def toff(tdb1, tdb2):
    """Days from T0 of the two-part TDB date."""
    return (tdb1 - T0) + tdb2


def astrometric(posfn, inst):
    """(rho = X(t - tau) - O(t), heliocentric position at t - tau, tau), as
    orbit_synthetic.astrometric, for a position function of t (days from
    T0)."""
    tau = 0.0
    for _ in range(30):
        h = posfn(toff(inst.tdb1, inst.tdb2 - tau))
        rho = h + osyn.sun_bary(inst.tdb1, inst.tdb2 - tau) - inst.obs_bary
        new = np.linalg.norm(rho) / C_AU_DAY
        done = abs(new - tau) < 1e-13
        tau = new
        if done:
            break
    h = posfn(toff(inst.tdb1, inst.tdb2 - tau))
    rho = h + osyn.sun_bary(inst.tdb1, inst.tdb2 - tau) - inst.obs_bary
    return rho, h, tau


# ---------------------------------------------------------------------------
# Schedule (orbit_synthetic.schedule with the truth's positions)
# ---------------------------------------------------------------------------

def night_sample(truth, site, local_date_jd, nstep=145):
    lon = site[2]
    start = local_date_jd + 18.0 / 24.0 - lon / 360.0
    mid = start + 0.25
    tai = erfa.utctai(mid, 0.0)
    tt = erfa.taitt(*tai)
    npb = erfa.pnm06a(*tt)
    gst0 = erfa.gst06a(mid, 0.0, tt[0], tt[1])
    up_itrs = osyn.geodetic_up(site)
    r = osyn.site_itrs(site)
    out = []
    for k in range(nstep):
        t = start + k * 5.0 / 1440.0
        gst = gst0 + osyn.ERA_RATE * (t - mid)
        c2t = erfa.c2teqx(npb, gst, np.eye(3))
        up = c2t.T @ up_itrs
        pvh, _ = erfa.epv00(t + 69.184 / 86400.0, 0.0)
        obs = np.array(pvh["p"]) + c2t.T @ r
        h = truth.approx(t + 69.184 / 86400.0 - T0)
        rho = h - obs
        sun = -obs
        sa = 90 - math.degrees(osyn.angle(sun, up))
        oa = 90 - math.degrees(osyn.angle(rho, up))
        out.append((t, sa, oa, math.degrees(osyn.angle(rho, sun))))
    return out


def schedule(ob, truth, oi, rng):
    end = osyn.date_jd(ob["end"])
    offsets = sorted({o for _, offs, _ in ARCS for o in offs})
    plan = {}
    for n, off in enumerate(offsets):
        day = end + off
        best = []
        for si, site in enumerate(SITES):
            samp = night_sample(truth, site, day)
            dark = [s for s in samp if s[1] < -12.0]
            if not dark:
                continue
            top = max(dark, key=lambda s: s[2])
            good = [s for s in dark if s[2] > 20.0]
            best.append((top[2], si, top, good, dark))
        if not best:
            raise SystemExit("%s: no dark sky on offset %d" % (ob["name"], off))
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
            span = min(1.0 / 24.0, t_hi - t_lo)
            centre = min(max(top[0], t_lo + span / 2), t_hi - span / 2)
            count = int(rng.integers(2, 4))
            for k in range(count):
                frac = (k + 0.5) / count - 0.5
                t = centre + frac * span + rng.normal(0.0, 1.5) / 1440.0
                day0 = math.floor(t - 0.5) + 0.5
                cs = round((t - day0) * 8640000.0)
                utc1, utc2 = osyn.utc_from_centiseconds(day0, cs)
                rows.append((SITES[si], utc1, utc2))
        rows.sort(key=lambda r: (r[1] + r[2]))
        plan[off] = rows
    return plan


def prediction_instants(t_last):
    """(days_after, site or None, utc1, utc2) for every prediction, as
    orbit_synthetic.py chooses them."""
    out = []
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
            utc1, utc2 = osyn.utc_from_centiseconds(day0, round((t - day0) * 8640000.0))
            out.append((nd, site, utc1, utc2))
    return out


# ---------------------------------------------------------------------------
# Two-body fit (diagnostic of the design)
# ---------------------------------------------------------------------------

def tangent_basis(u):
    ra, dec = math.atan2(u[1], u[0]), math.asin(max(-1.0, min(1.0, u[2])))
    east = np.array([-math.sin(ra), math.cos(ra), 0.0])
    north = np.array([-math.sin(dec) * math.cos(ra), -math.sin(dec) * math.sin(ra), math.cos(dec)])
    return east, north


def offsets_arcsec(v, u0, basis):
    """Gnomonic offsets (arcsec, east and north) of direction v from u0."""
    e, n = basis
    w = v / np.dot(v, u0)
    return np.array([np.dot(w, e), np.dot(w, n)]) / ARCSEC


def twobody_pos(x, tmid):
    return lambda t: osyn.universal(x[:3], x[3:], t - tmid)


def twobody_fit(obs, insts, tmid, x0):
    """Noise-free two-body fit: (state, covariance, rms arcsec)."""
    refs = []
    for (ra, dec) in obs:
        u = unit(ra, dec)
        refs.append((u, tangent_basis(u)))

    def resid(x):
        out = []
        for inst, (u0, b) in zip(insts, refs):
            rho, _, _ = astrometric(twobody_pos(x, tmid), inst)
            out.extend(offsets_arcsec(rho, u0, b) / SIGMA_ARCSEC)
        return np.array(out)

    sol = least_squares(resid, x0, method="lm", x_scale="jac", xtol=1e-15, ftol=1e-15, gtol=1e-15,
                        max_nfev=2000)
    x = sol.x
    jac = central_jacobian(resid, x)
    cov = np.linalg.inv(jac.T @ jac)
    r = resid(x)
    return x, cov, math.sqrt(np.mean(r * r)) * SIGMA_ARCSEC


def steps_for(x):
    return np.array([1e-7] * 3 + [1e-9] * 3) * np.maximum(1.0, np.abs(x) / np.array([1, 1, 1, 0.01, 0.01, 0.01]))


def central_jacobian(f, x):
    h = steps_for(x)
    cols = []
    for i in range(len(x)):
        xp, xm = x.copy(), x.copy()
        xp[i] += h[i]
        xm[i] -= h[i]
        cols.append((f(xp) - f(xm)) / (2 * h[i]))
    return np.array(cols).T


def unit(ra_deg, dec_deg):
    ra, dec = math.radians(ra_deg), math.radians(dec_deg)
    return np.array([math.cos(dec) * math.cos(ra), math.cos(dec) * math.sin(ra), math.sin(dec)])


# ---------------------------------------------------------------------------
# Output
# ---------------------------------------------------------------------------

def versions():
    try:
        out = subprocess.run(["dpkg-query", "-W"] + DEBS, capture_output=True, text=True,
                             check=True).stdout
        pk = "; ".join(" ".join(l.split()) for l in out.strip().splitlines())
    except (OSError, subprocess.CalledProcessError):
        pk = "dpkg-query unavailable"
    return "%s (scipy %s, numpy %s, pyerfa %s, Python %s)" % (
        pk, scipy.__version__, np.__version__, erfa.__version__, sys.version.split()[0])


def header(title, extra):
    lines = [
        "# arcfit perturbed-orbit reference: %s. INVENTED objects and sites." % title,
        "# Generated by: %s" % COMMAND,
        "# With: %s" % versions(),
        "# Definitions (full text in the script's docstring): astrometric ICRS place,",
        "# direction of X(t-tau) - O(t), light time iterated, no aberration or deflection;",
        "# TRUTH = n-body integration (scipy DOP853, rtol 2.5e-13; Sun k^2, Mercury...Neptune,",
        "# Earth and Moon as point masses with DE405 GMs, indirect term; bodies' positions from",
        "# JPL DE405) from the epoch state of states.csv; Earth and Sun for the observer",
        "# erfa.epv00; site erfa.gd2gc (WGS84) turned by (R3(gst06a) pnm06a)^T, UT1 = UTC, no",
        "# polar motion; TT by erfa.utctai/taitt; TDB = TT + erfa.dtdb (site arguments);",
        "# as testdata/gen/orbit_synthetic.py.",
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


NEO_CA = 2461719.5     # design instant of Invented-NEO2's flyby (2027-11-10 0h TDB)


def design_neo(model, epoch):
    """Invented-NEO2's epoch state: a straight-line flyby past the epv00
    Earth at NEO_CA, 0.035 au on the asymptote, 6 km/s relative, relative
    velocity along (-0.4 radial, +0.7 along-track, -0.5 normal) of the
    Earth's orbital frame (chosen among a grid of directions for elongations
    above 115 deg over the arcs); integrated back to the epoch with the
    planets (DE405), rounded to 1e-13 au and 1e-15 au/day."""
    pvh = erfa.epv00(NEO_CA, 0.0)[0]
    e, ve = np.array(pvh["p"]), np.array(pvh["v"])
    ur = e / np.linalg.norm(e)
    un = np.cross(e, ve)
    un /= np.linalg.norm(un)
    ut = np.cross(un, ur)
    w = -0.4 * ur + 0.7 * ut - 0.5 * un
    w /= np.linalg.norm(w)
    bdir = np.cross(w, un)
    bdir /= np.linalg.norm(bdir)
    y = np.concatenate([e + 0.035 * bdir, ve + w * 6.0 * 86400.0 / nref.AU_KM])
    y0, _ = nref.step(model, y, NEO_CA - T0, epoch - T0, nref.RTOL, nref.ATOL)
    return np.concatenate([np.round(y0[:3], 13), np.round(y0[3:], 15)])


def epoch_state(ob):
    if ob.get("state") is not None:
        return np.array(ob["state"])
    return nref.elements_state(*ob["elements"])


def element_row(ob, y):
    a, e, i, node, peri, m, q = nref.state_elements(y)
    h = "%.1f" % ob["h"] if "h" in ob else ""
    g = "%.2f" % ob["g"] if "g" in ob else ""
    return "%s,%.1f,%.10f,%.10f,%.8f,%.8f,%.8f,%.8f,,,%s,%s" % (
        ob["name"], ob["epoch"], a, e, i, node, peri, m, h, g)


def close_approaches(truth, t0, t1, src, gm):
    """Least distances (t days from T0, body, au) to the Earth below 0.1 au
    and to Jupiter below 1.5 au between t0 and t1 (from the daily states,
    refined by golden section on exact states)."""
    out = []
    for j, b, lim in ((2, "Earth", 0.1), (5, "Jupiter", 1.5)):
        def dist(t):
            return float(np.linalg.norm(truth.state(t)[:3] - src.positions(T0, t)[j]))
        ts = np.arange(math.ceil(t0), math.floor(t1) + 1.0) + (truth.e0 % 1.0)
        ds = [np.linalg.norm(truth.approx(t) - src.positions(T0, t)[j]) for t in ts[:-1]]
        for k in range(1, len(ds) - 1):
            if ds[k] <= ds[k - 1] and ds[k] < ds[k + 1] and ds[k] < lim:
                a, bb = ts[k - 1], ts[k + 1]
                g = (math.sqrt(5) - 1) / 2
                for _ in range(50):
                    c, d = bb - g * (bb - a), a + g * (bb - a)
                    if dist(c) < dist(d):
                        bb = d
                    else:
                        a = c
                t = 0.5 * (a + bb)
                out.append((t, b, dist(t)))
    return sorted(out)


def main():
    if not os.path.isdir(os.path.join("fit", "orbit")):
        sys.exit("run from the repository root: fit/orbit not found")
    os.makedirs(OUT_DIR, exist_ok=True)
    design = "--design" in sys.argv
    gm, _, _ = nref.read_gms()
    src = nref.ErfaBodies() if design else nref.DE405Bodies()
    model = nref.Model(src, gm, "truth")
    if "--design-neo" in sys.argv:
        print("state=%r" % list(design_neo(nref.Model(nref.DE405Bodies(), gm, "truth"), OBJECTS[2]["epoch"])))
        return
    rng = np.random.default_rng(SEED)
    geom_cols = ("time,site,utc_day,utc_frac,tt_day,tt_frac,tdb_day,tdb_frac,"
                 "obs_x_au,obs_y_au,obs_z_au,obs_vx_au_d,obs_vy_au_d,obs_vz_au_d,"
                 "sun_vx_au_d,sun_vy_au_d,sun_vz_au_d,geo_x_au,geo_y_au,geo_z_au,"
                 "ra_deg,dec_deg,tau_d,delta_au,r_au,elong_deg,alt_deg")
    sizes, pred_rows, state_rows, tb_rows, fit_rows, notes = {}, [], [], [], [], []
    ok = True
    only = sys.argv[sys.argv.index("--only") + 1] if "--only" in sys.argv else None
    for oi, ob in enumerate(OBJECTS):
        if only and ob["stem"] != only:
            continue
        y0 = epoch_state(ob)
        end = osyn.date_jd(ob["end"])
        lo = end - max(max(-o for o in offs) for _, offs, _ in ARCS) - 3
        hi = end + max(PREDICT_DAYS) + 3
        truth = Truth(model, y0, ob["epoch"], lo, hi)
        state_rows.append(",".join([ob["name"], "epoch", "", "", "", "%.1f" % ob["epoch"], "%.16f" % 0.0]
                                   + ["%.16e" % v for v in y0]))
        plan = schedule(ob, truth, oi, rng)
        rec = {}
        for off, rows in plan.items():
            for site, utc1, utc2 in rows:
                inst = osyn.Instant(utc1, utc2, site)
                rho, h, tau = astrometric(lambda t: truth.state(t)[:3], inst)
                delta = np.linalg.norm(rho)
                ra, dec = osyn.radec_deg(rho)
                elong = math.degrees(osyn.angle(rho, -inst.obs_helio))
                alt = 90 - math.degrees(osyn.angle(rho, inst.up))
                phase = osyn.angle(-h, -rho)
                mag = osyn.hg_mag(ob["h"], ob["g"], np.linalg.norm(h), delta, phase) if "h" in ob else None
                rec[(off, utc1 + utc2, site[0])] = dict(
                    inst=inst, t=osyn.fmt_iso(utc1, utc2, 2), site=site[0], ra=ra, dec=dec,
                    tau=tau, delta=delta, r=np.linalg.norm(h), elong=elong, alt=alt, mag=mag, h=h)
                if elong < 60.0:
                    print("FAIL %s %s %s elongation %.1f" % (ob["name"], rec[(off, utc1 + utc2, site[0])]["t"], site[0], elong))
                    ok = False
        keys = sorted(rec, key=lambda k: k[1])
        geo = []
        for k in keys:
            r = rec[k]
            i = r["inst"]
            geo.append(",".join([
                r["t"], r["site"], "%.1f" % i.utc1, "%.16f" % i.utc2, "%.1f" % i.tt1,
                "%.16f" % i.tt2, "%.1f" % i.tdb1, "%.16f" % i.tdb2]
                + [f13(x) for x in i.obs_helio] + [fe(x) for x in i.obs_helio_v]
                + [fe(x) for x in i.sun_bary_v] + ["%.10e" % x for x in i.gcrs]
                + ["%.10f" % r["ra"], "%.10f" % r["dec"], fe(r["tau"]), f13(r["delta"]), f13(r["r"]),
                   "%.4f" % r["elong"], "%.3f" % r["alt"]]))
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

        last = rec[keys[-1]]["inst"]
        t_last = last.utc1 + last.utc2
        preds = prediction_instants(t_last)
        truth_pred = {}
        for nd, site, utc1, utc2 in preds:
            inst = osyn.Instant(utc1, utc2, site)
            rho, h, tau = astrometric(lambda t: truth.state(t)[:3], inst)
            ra, dec = osyn.radec_deg(rho)
            sname = "geocentre" if site is None else site[0]
            truth_pred[(nd, sname)] = (inst, rho)
            pred_rows.append(",".join([
                ob["name"], str(nd), osyn.fmt_iso(utc1, utc2, 2), sname,
                "%.10f" % ra, "%.10f" % dec, f13(np.linalg.norm(rho)), f13(np.linalg.norm(h)),
                "%.4f" % math.degrees(osyn.angle(rho, -inst.obs_helio)),
                "%.1f" % inst.tdb1, "%.16f" % inst.tdb2]))

        print("%-14s %3d instants  delta %.3f-%.3f au  elong %.1f-%.1f  alt %.1f-%.1f  last %s" % (
            ob["name"], len(rec), min(r["delta"] for r in rec.values()), max(r["delta"] for r in rec.values()),
            min(r["elong"] for r in rec.values()), max(r["elong"] for r in rec.values()),
            min(r["alt"] for r in rec.values()), max(r["alt"] for r in rec.values()), rec[keys[-1]]["t"]))
        for nd in PREDICT_DAYS:
            inst, rho = truth_pred[(nd, "geocentre")]
            print("  +%d d: geocentric delta %.3f au, elongation %.1f deg" % (
                nd, np.linalg.norm(rho), math.degrees(osyn.angle(rho, -inst.obs_helio))))
        t_first = min(r["inst"].tdb1 - T0 + r["inst"].tdb2 for r in rec.values())
        cas = close_approaches(truth, t_first, toff(last.tdb1, last.tdb2) + max(PREDICT_DAYS), src, gm)
        for t, b, d in cas:
            y, m, dd, fd = erfa.jd2cal(T0, t)
            note = "%s passes %s at %.5f au on %04d-%02d-%02d %.3f d TDB (%.1f days after the last observation)" % (
                ob["name"], b, d, y, m, dd, fd, t - toff(last.tdb1, last.tdb2))
            print("  " + note)
            notes.append(note)

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
                    "Arc: %s, %d observations; sites in sites.csv; truth in states.csv." % (what, len(ks)),
                    "NOISE-FREE positions; sigma %.1f\" is the stated 1-sigma per coordinate." % SIGMA_ARCSEC,
                    "mag: noise-free H-G magnitude (G = 0.15)." if "h" in ob else "No magnitudes (comet).",
                    "Geometry of each row: %s_geometry.csv (same time and site)." % ob["stem"],
                ]) + cols + "\n" + "\n".join(lines) + "\n")
            mid = ks[(len(ks) - 1) // 2]
            inst = rec[mid]["inst"]
            tmid = toff(inst.tdb1, inst.tdb2)
            xmid = truth.state(tmid)
            state_rows.append(",".join([ob["name"], arc, str((len(ks) - 1) // 2), rec[mid]["t"], rec[mid]["site"],
                                        "%.1f" % inst.tdb1, "%.16f" % inst.tdb2]
                                       + ["%.16e" % v for v in xmid]))
            # Two-body propagation of the mid-arc truth state.
            for nd, site, utc1, utc2 in preds:
                sname = "geocentre" if site is None else site[0]
                pinst, trho = truth_pred[(nd, sname)]
                rho, _, _ = astrometric(twobody_pos(xmid, tmid), pinst)
                ra, dec = osyn.radec_deg(rho)
                sep = math.degrees(osyn.angle(rho, trho)) * 3600.0
                tb_rows.append(",".join([ob["name"], arc, str(nd), osyn.fmt_iso(utc1, utc2, 2), sname,
                                         "%.10f" % ra, "%.10f" % dec, "%.3f" % sep]))
            # Noise-free two-body fit and where the truth falls in its region.
            insts = [rec[k]["inst"] for k in ks]
            obs = [(rec[k]["ra"], rec[k]["dec"]) for k in ks]
            x, cov, rms = twobody_fit(obs, insts, tmid, xmid)
            for nd in PREDICT_DAYS:
                pinst, trho = truth_pred[(nd, "geocentre")]
                u0 = trho / np.linalg.norm(trho)
                basis = tangent_basis(u0)

                def pred(xx):
                    rho, _, _ = astrometric(twobody_pos(xx, tmid), pinst)
                    return offsets_arcsec(rho, u0, basis)
                bias = pred(x)
                gj = central_jacobian(pred, x)
                cp = gj @ cov @ gj.T   # arcsec^2 (residuals were in units of sigma)
                w, v = np.linalg.eigh(cp)
                smaj, smin = math.sqrt(max(w[1], 0.0)), math.sqrt(max(w[0], 0.0))
                pa = math.degrees(math.atan2(v[0, 1], v[1, 1])) % 180.0
                mah = math.sqrt(float(bias @ np.linalg.solve(cp, bias)))
                miss = float(ncx2.sf(9.0, 2, mah * mah)) if mah > 1e-6 else float(chi2.sf(9.0, 2))
                fit_rows.append(",".join([ob["name"], arc, str(len(ks)), "%.4f" % rms, str(nd),
                                          "%.3f" % bias[0], "%.3f" % bias[1], "%.3f" % smaj, "%.3f" % smin,
                                          "%.1f" % pa, "%.2f" % mah, "%.4f" % miss]))
                sep = [r.split(",")[-1] for r in tb_rows
                       if r.split(",")[:3] == [ob["name"], arc, str(nd)] and r.split(",")[4] == "geocentre"][0]
                print("  %s +%2d d: two-body fit rms %.3f\", bias %.2f\" (E %.2f, N %.2f), 1-sigma %.2f\" x %.2f\", "
                      "mahalanobis %.1f, expected two-body miss %.3f; mid-arc truth two-body %s\"" % (
                          arc, nd, rms, math.hypot(*bias), bias[0], bias[1], smaj, smin, mah, miss, sep))
    if not ok:
        sys.exit("check failed; nothing more written")
    if design:
        print("design run (plan94 planets): nothing more written")
        return

    sizes["elements.csv"] = write("elements.csv", header("osculating elements of the truth", [
        "Heliocentric OSCULATING elements of the truth's epoch state (states.csv, obs_index",
        "'epoch'), ecliptic and equinox J2000 (eps0 = 84381.448\"), GM = k^2; epoch_tt is the",
        "TDB epoch. INFORMATION ONLY: a two-body propagation of these elements is not the",
        "truth; the truth is the n-body integration from the epoch state.",
    ] + ["%s: %s" % (ob["name"], ob["kind"]) for ob in OBJECTS] + notes)
        + "name,epoch_tt,a_au,e,i_deg,node_deg,peri_deg,m_deg,q_au,tp_tt,h,g\n"
        + "\n".join(element_row(ob, epoch_state(ob)) for ob in OBJECTS) + "\n")
    sizes["sites.csv"] = write("sites.csv", header("sites", [
        "INVENTED sites, not observatories (those of fit/orbit/testdata/synthetic/).",
        "Geodetic WGS84 latitude, east longitude (deg), height above the ellipsoid (m).",
    ]) + "name,lat_deg,lon_deg,height_m\n"
        + "".join("%s,%.2f,%.2f,%.0f\n" % s for s in SITES))
    sizes["predictions.csv"] = write("predictions.csv", header("truth places after the arcs", [
        "Per object (all its arcs end with the same observation): days_after = 30 and 90 days",
        "after the last observation; from each site at 22:00 local mean time (UTC = 22 h -",
        "lon/15, the evening nearest to last + days_after; whole minutes), and from the",
        "geocentre at last + days_after (whole minutes). Astrometric ICRS ra_deg, dec_deg",
        "(topocentric for a site); delta_au observer distance, r_au heliocentric distance,",
        "both at t - tau; elong_deg Sun-observer-object angle; tdb two-part. N-body truth.",
    ]) + "orbit,days_after,time_utc,site,ra_deg,dec_deg,delta_au,r_au,elong_deg,tdb_day,tdb_frac\n"
        + "\n".join(pred_rows) + "\n")
    sizes["states.csv"] = write("states.csv", header("truth heliocentric states", [
        "For each object: the epoch state where the truth's integration starts (arc 'epoch',",
        "tdb_day + tdb_frac its TDB epoch; THIS state, as written, defines the truth), and",
        "for each arc the truth at the TDB instant of the arc's middle observation (0-based",
        "index (n - 1) / 2 in time order; its time and site given). Heliocentric ICRS x, y, z",
        "(au), vx, vy, vz (au/day); geometric (not light-time retarded).",
    ]) + "orbit,arc,obs_index,time_utc,site,tdb_day,tdb_frac,x_au,y_au,z_au,vx_au_d,vy_au_d,vz_au_d\n"
        + "\n".join(state_rows) + "\n")
    sizes["predictions_twobody.csv"] = write("predictions_twobody.csv", header(
        "two-body propagations of the mid-arc truth", [
            "For each object, arc and prediction of predictions.csv (same times and sites): the",
            "place given by a TWO-BODY propagation (Sun only, GM = k^2, universal variables) of",
            "the arc's middle truth state (states.csv), same place definitions; sep_arcsec its",
            "angular distance from the n-body truth place: the planets' perturbation there.",
        ]) + "orbit,arc,days_after,time_utc,site,ra_deg,dec_deg,sep_arcsec\n" + "\n".join(tb_rows) + "\n")
    sizes["twobody_fit.csv"] = write("twobody_fit.csv", header(
        "noise-free two-body fits and their 3-sigma regions", [
            "For each object and arc: a two-body least-squares fit (6 state components at the",
            "middle observation; scipy least_squares 'lm') of the noise-free observations,",
            "sigma 0.5\"; rms_arcsec its residual rms (the perturbation it cannot absorb). For the",
            "geocentric prediction days_after the last observation (predictions.csv):",
            "bias_e/n_arcsec = fitted minus truth on the tangent plane at the truth (east, north);",
            "sigma_major/minor_arcsec, pa_deg (from north through east) the 1-sigma ellipse of",
            "the linear covariance (3-sigma region: 3 times these); mahalanobis the truth's",
            "distance in that metric (outside the 3-sigma ellipse above 3); expected_miss the",
            "fraction of noisy realisations whose 3-sigma ellipse misses the truth (linear,",
            "Gaussian: P(noncentral chi2(2, mahalanobis^2) > 9); a correct model gives 0.0111).",
        ]) + "orbit,arc,n_obs,rms_arcsec,days_after,bias_e_arcsec,bias_n_arcsec,sigma_major_arcsec,"
        "sigma_minor_arcsec,pa_deg,mahalanobis,expected_miss\n" + "\n".join(fit_rows) + "\n")
    total = 0
    for name in sorted(sizes):
        total += sizes[name]
        print("wrote %s/%s (%d bytes)" % (OUT_DIR, name, sizes[name]))
    print("total %d bytes" % total)


if __name__ == "__main__":
    main()
