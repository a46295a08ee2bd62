#!/usr/bin/env python3
"""Reference tables for arcfit's two-body motion (package ephem).

Run from the top of the repository:

    /usr/bin/python3 testdata/gen/twobody_reference.py

It writes three files, each starting with a provenance header:

  testdata/twobody_states.csv  heliocentric ecliptic-J2000 states of invented
                               element sets (e = 0, 0.2, 0.6, 0.97, 0.999, 1.0,
                               1.3) at several times;
  testdata/twobody_kepler.csv  solutions of Kepler's equation, elliptic and
                               hyperbolic, on a grid of (e, M);
  testdata/twobody_earth.csv   the Earth's heliocentric position from ERFA
                               epv00 at 1990 Oct 6.0 TD, the date of Meeus'
                               Example 33.b.

This is an implementation independent of the Go code: it solves each conic's
equation of time (Kepler's, the hyperbolic Kepler equation, Barker's cubic) by
plain bisection in numpy float64 with the textbook formulas, and cross-checks
every trajectory against a direct numerical integration of the two-body
differential equation (fixed-step classical RK4 in the Sundman-regularised time
dt = r dtau, written here). The largest difference between the two is written
into the header of twobody_states.csv; the script fails if it exceeds 1e-10 au.
The element sets are invented for the tests; they describe no real object.
"""

import math
import os
import sys

import numpy as np
import erfa

K = 0.01720209895          # Gaussian gravitational constant (IAU 1976), au^1.5/day
MU = K * K                 # GM of the Sun, au^3/day^2, time in TDB days

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.normpath(os.path.join(HERE, ".."))
COMMAND = "/usr/bin/python3 testdata/gen/twobody_reference.py"
VERSIONS = "python %s, numpy %s, erfa (pyerfa) %s" % (
    sys.version.split()[0], np.__version__, erfa.__version__)

# Invented element sets: name, e, q (au), i, node, peri (deg, ecliptic and
# equinox J2000), perihelion time (JD, TT).
SETS = [
    ("Invented-e000", 0.0, 2.3, 5.1, 80.0, 30.0, 2461000.5),
    ("Invented-e020", 0.2, 1.9, 12.3, 141.2, 275.4, 2461123.25),
    ("Invented-e060", 0.6, 0.85, 33.0, 12.7, 97.1, 2460877.75),
    ("Invented-e097", 0.97, 0.42, 128.5, 301.9, 63.3, 2461401.125),
    ("Invented-e0999", 0.999, 0.73, 71.2, 225.0, 150.6, 2461250.5),
    ("Invented-e100", 1.0, 1.21, 99.4, 18.8, 332.0, 2461333.0),
    ("Invented-e130", 1.3, 2.05, 4.7, 260.3, 12.9, 2460990.0),
]
# Offsets from the perihelion time, days.
OFFSETS = [-400.0, -60.0, -7.25, 0.0, 3.5, 30.0, 250.0, 1500.0]


def bisect(f, lo, hi):
    """Root of an increasing f on [lo, hi] by bisection to the float64 limit."""
    flo = f(lo)
    if flo > 0:
        raise ValueError("bad bracket")
    for _ in range(2000):
        mid = 0.5 * (lo + hi)
        if mid <= lo or mid >= hi:
            break
        if f(mid) > 0:
            hi = mid
        else:
            lo = mid
    return 0.5 * (lo + hi)


def kepler_elliptic(e, m):
    """E - e sin E = m, by bisection; m reduced to [-pi, pi] first."""
    k = round(m / (2 * math.pi))
    mr = m - 2 * math.pi * k
    E = bisect(lambda x: x - e * math.sin(x) - mr, mr - 1.0 - 1e-9, mr + 1.0 + 1e-9)
    return E + 2 * math.pi * k


def kepler_hyperbolic(e, m):
    """e sinh H - H = m, by bisection."""
    lim = math.asinh(abs(m) / (e - 1.0)) + 1.0
    return bisect(lambda x: e * math.sinh(x) - x - m, -lim, lim)


def barker(w):
    """s^3 + 3 s - w = 0, by bisection."""
    lim = abs(w) + 1.0
    return bisect(lambda s: s * s * s + 3 * s - w, -lim, lim)


def plane_state(e, q, dt):
    """Position and velocity in the orbital plane (x towards perihelion)."""
    if e < 1.0:
        a = q / (1.0 - e)
        n = K / a ** 1.5
        E = kepler_elliptic(e, n * dt)
        b = a * math.sqrt(1.0 - e * e)
        x = a * (math.cos(E) - e)
        y = b * math.sin(E)
        edot = n / (1.0 - e * math.cos(E))
        vx = -a * math.sin(E) * edot
        vy = b * math.cos(E) * edot
    elif e == 1.0:
        w = 3.0 * K / math.sqrt(2.0 * q ** 3) * dt
        s = barker(w)
        nu = 2.0 * math.atan(s)
        r = q * (1.0 + s * s)
        x, y = r * math.cos(nu), r * math.sin(nu)
        p = 2.0 * q
        vx = -math.sqrt(MU / p) * math.sin(nu)
        vy = math.sqrt(MU / p) * (1.0 + math.cos(nu))
    else:
        a = q / (e - 1.0)
        n = K / a ** 1.5
        H = kepler_hyperbolic(e, n * dt)
        b = a * math.sqrt(e * e - 1.0)
        x = a * (e - math.cosh(H))
        y = b * math.sinh(H)
        hdot = n / (e * math.cosh(H) - 1.0)
        vx = -a * math.sinh(H) * hdot
        vy = b * math.cosh(H) * hdot
    return np.array([x, y, 0.0]), np.array([vx, vy, 0.0])


def rotation(i, node, peri):
    """Orbital plane -> ecliptic J2000: Rz(node) Rx(i) Rz(peri), active."""
    def rz(a):
        c, s = math.cos(a), math.sin(a)
        return np.array([[c, -s, 0], [s, c, 0], [0, 0, 1.0]])

    def rx(a):
        c, s = math.cos(a), math.sin(a)
        return np.array([[1.0, 0, 0], [0, c, -s], [0, s, c]])
    return rz(node) @ rx(i) @ rz(peri)


def state(el, dt):
    _, e, q, i, node, peri, _ = el
    R = rotation(math.radians(i), math.radians(node), math.radians(peri))
    p, v = plane_state(e, q, dt)
    return R @ p, R @ v


def deriv(y):
    """d/dtau of (x, v, t) with dt = r dtau."""
    x, v = y[0:3], y[3:6]
    r = math.sqrt(x @ x)
    out = np.empty(7)
    out[0:3] = r * v
    out[3:6] = -MU * x / (r * r)
    out[6] = r
    return out


def rk4_check(el, span):
    """Integrate from perihelion over +-span days; return the largest
    position and velocity differences from the bisection solution."""
    p0, v0 = state(el, 0.0)
    worst_p = worst_v = 0.0
    for sign in (1.0, -1.0):
        y = np.concatenate([p0, v0, [0.0]])
        h = sign * 2.0e-3       # tau step, days/au
        steps = 0
        while abs(y[6]) < span:
            k1 = deriv(y)
            k2 = deriv(y + 0.5 * h * k1)
            k3 = deriv(y + 0.5 * h * k2)
            k4 = deriv(y + h * k3)
            y = y + h / 6.0 * (k1 + 2 * k2 + 2 * k3 + k4)
            steps += 1
            if steps % 200 == 0:
                p, v = state(el, y[6])
                worst_p = max(worst_p, float(np.max(np.abs(p - y[0:3]))))
                worst_v = max(worst_v, float(np.max(np.abs(v - y[3:6]))))
    return worst_p, worst_v


def write_states():
    rows = []
    worst_p = worst_v = 0.0
    for el in SETS:
        span = max(abs(o) for o in OFFSETS)
        wp, wv = rk4_check(el, span)
        worst_p, worst_v = max(worst_p, wp), max(worst_v, wv)
        print("%s: RK4 vs bisection %.2e au, %.2e au/day" % (el[0], wp, wv), file=sys.stderr)
        for off in OFFSETS:
            p, v = state(el, off)
            rows.append((el, el[6] + off, p, v))
    if worst_p > 1e-10:
        sys.exit("RK4 cross-check failed: %.3g au" % worst_p)
    path = os.path.join(OUT, "twobody_states.csv")
    with open(path, "w") as f:
        f.write("# Two-body reference states of invented element sets (arcfit, package ephem).\n")
        f.write("# Made by: %s\n" % COMMAND)
        f.write("# With: %s\n" % VERSIONS)
        f.write("# Method: an independent implementation in the generator: Kepler's equation (e < 1),\n")
        f.write("#   the hyperbolic Kepler equation (e > 1) and Barker's cubic (e = 1) solved by plain\n")
        f.write("#   bisection in float64 with the textbook formulas; plane -> ecliptic by Rz(node) Rx(i) Rz(peri).\n")
        f.write("# Cross-check: fixed-step RK4 integration of the two-body equations in Sundman time\n")
        f.write("#   (dt = r dtau, dtau = 2e-3 day/au) over +-%g days from perihelion agrees with the\n" % max(abs(o) for o in OFFSETS))
        f.write("#   bisection solution to %.2e au in position and %.2e au/day in velocity (largest difference).\n" % (worst_p, worst_v))
        f.write("# Definitions: GM = k^2, k = 0.01720209895 au^1.5/day (IAU 1976), time in TT (= TDB for two-body\n")
        f.write("#   purposes); positions heliocentric, ecliptic and equinox J2000, au; velocities au/day.\n")
        f.write("# The element sets are invented: they describe no real object.\n")
        f.write("name,e,q_au,i_deg,node_deg,peri_deg,tp_tt,t_tt,x_au,y_au,z_au,vx_au_d,vy_au_d,vz_au_d\n")
        for el, t, p, v in rows:
            name, e, q, i, node, peri, tp = el
            f.write("%s,%.17g,%.17g,%.17g,%.17g,%.17g,%.17g,%.17g,%.17g,%.17g,%.17g,%.17g,%.17g,%.17g\n" % (
                name, e, q, i, node, peri, tp, t, p[0], p[1], p[2], v[0], v[1], v[2]))
    print("wrote", path, file=sys.stderr)


def write_kepler():
    path = os.path.join(OUT, "twobody_kepler.csv")
    ms = [1e-8, 1e-4, 0.01, 0.2, 1.0, 2.5, 3.14159, -0.7, 40.0]
    es = [0.0, 0.1, 0.5, 0.9, 0.99, 0.999, 0.9999, 0.999999]
    hm = [1e-6, 0.1, 1.0, 10.0, 1000.0, -3.0]
    he = [1.000001, 1.01, 1.3, 3.0, 20.0]
    with open(path, "w") as f:
        f.write("# Solutions of Kepler's equation (arcfit, package ephem).\n")
        f.write("# Made by: %s\n" % COMMAND)
        f.write("# With: %s\n" % VERSIONS)
        f.write("# Method: plain bisection in float64 (an implementation independent of the Go code) on\n")
        f.write("#   E - e sin E = M (kind 'elliptic') and e sinh H - H = M (kind 'hyperbolic'), M in radians.\n")
        f.write("kind,e,m_rad,anomaly_rad\n")
        for e in es:
            for m in ms:
                f.write("elliptic,%.17g,%.17g,%.17g\n" % (e, m, kepler_elliptic(e, m)))
        for e in he:
            for m in hm:
                f.write("hyperbolic,%.17g,%.17g,%.17g\n" % (e, m, kepler_hyperbolic(e, m)))
    print("wrote", path, file=sys.stderr)


def write_earth():
    # Meeus, Astronomical Algorithms 2nd ed., Example 33.b: 1990 Oct 6.0 TD.
    jd = 2448170.5
    pvh, pvb = erfa.epv00(jd, 0.0)
    path = os.path.join(OUT, "twobody_earth.csv")
    with open(path, "w") as f:
        f.write("# The Earth's heliocentric position for Meeus' Example 33.b (arcfit, package ephem).\n")
        f.write("# Made by: %s\n" % COMMAND)
        f.write("# With: %s\n" % VERSIONS)
        f.write("# Method: erfa.epv00(%.1f, 0.0), heliocentric part (pvh); TDB taken equal to Meeus' TD.\n" % jd)
        f.write("# Axes: BCRS (ICRS) equatorial, au and au/day. epv00 is good to a few km (about 1e-7 au).\n")
        f.write("tdb_jd,x_au,y_au,z_au,vx_au_d,vy_au_d,vz_au_d\n")
        p = pvh["p"]
        v = pvh["v"]
        f.write("%.17g,%.17g,%.17g,%.17g,%.17g,%.17g,%.17g\n" % (jd, p[0], p[1], p[2], v[0], v[1], v[2]))
    print("wrote", path, file=sys.stderr)


if __name__ == "__main__":
    write_states()
    write_kepler()
    write_earth()
