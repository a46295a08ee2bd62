#!/usr/bin/python3
"""Reference places of the Sun, the planets and invented element-set bodies
for package ephem (sun.go, place.go), computed with python3-erfa.

Run from the repository root:

    /usr/bin/python3 testdata/gen/erfa_places.py

It writes two files, each starting with a provenance header:

    testdata/erfa_places.txt     astrometric and apparent places, distances,
                                 elongation, phase angle, alt/az and the Moon
                                 separation, seen from invented sites and the
                                 geocentre
    testdata/erfa_sunbary.txt    the Sun's barycentric position and velocity
                                 (eraEpv00: barycentric minus heliocentric Earth)

Everything is computed from ERFA's routines and this script's own two-body
propagator; nothing of package ephem is used. Nothing needs the network
(astropy is not used at all).

Definitions (they are those of /work/shared/checks/references.md):

  time      UTC rows (1972-2100): TT = UTC + (TAI-UTC) + 32.184 s (eraUtctai,
            eraTaitt); past the leap-second table ERFA keeps the last value
            (37 s). UT1 = UTC + dut1 where dut1 is an arbitrary value in
            +-0.8 s per row (written in the row; it is NOT the real Earth
            rotation, the test passes the same value). TDB = TT + eraDtdb
            (geocentric, elong = u = v = 0).
            TT rows (1900-1971): geocentric only, keyed by TT; no UTC, no UT1.
  observer  O(t) = barycentric position of the observer at t: astrom.eb of
            eraApco13 (site; epv00 Earth + site with xp = yp = 0, i.e. no
            polar motion) or eraApcg13 (geocentre). Its barycentric velocity
            astrom.v (diurnal velocity included).
  Sun       barycentric S(t) = pvb - pvh of eraEpv00.
  planets   X = eraPlan94 heliocentric (J2000 mean equator, taken as ICRS
            axes) + S, at t - tau.  plan94 is good to about 1 arcsec.
  elements  heliocentric ecliptic J2000 from this script's two-body solver
            (GM = k^2, k = 0.01720209895, time in TDB days), rotated to ICRS
            axes by R1(-eps0), eps0 = 84381.448 arcsec (IAU 1976; no frame
            bias), + S(t - tau).
  astrometric  direction of X(t - tau) - O(t), tau iterated to 1e-13 d; no
            aberration, no deflection. ra_deg, dec_deg.
  apparent  eraAb(astrometric, astrom.v, astrom.em, astrom.bm1), then
            eraPnm06a(TT) (IAU 2006/2000A). raapp_deg, decapp_deg.
  distances delta_au = |X(t - tau) - O(t)|; r_au = |X_helio(t - tau)|;
            tau_d = light time.
  elong     angle at the observer between the astrometric directions of the
            Sun (its own light time) and of the body. For the Sun: 0.
  phase     angle at the body between -X_helio(t - tau) (towards the Sun) and
            O(t) - X(t - tau) (towards the observer). For the Sun: 0.
  alt/az    from the apparent place: h = eraGst06a(UT1, TT) + elong - raapp,
            eraHd2ae; azimuth from north through east; alt unrefracted.
            altref_deg adds the refraction of eraRefco (1010 hPa, 10 C,
            rh = 0, 0.55 um): dZ = A tan z + B tan^3 z, solved for the observed
            zenith distance by iteration; given only for unrefracted alt > 10
            deg, else nan. ERFA's refraction is about 4 % below Meeus'
            Saemundsson/Bennett formulas.
  moonsep   separation between the body's astrometric direction and the
            Moon's, the Moon from eraMoon98 (geocentric, GCRS axes; Meeus
            ch. 47, 2.9" RMS / 18" worst against ELP/MPP02) at t - tau_moon
            plus the Earth's barycentric position at t - tau_moon, minus O(t).
"""

import math
import os
import sys
import warnings

import erfa
import numpy as np

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
COMMAND = "/usr/bin/python3 testdata/gen/erfa_places.py"
VERSIONS = "python3-erfa %s (ERFA %s), numpy %s, Python %s" % (
    erfa.__version__,
    getattr(erfa.version, "erfa_version", "?"),
    np.__version__,
    sys.version.split()[0],
)

C_AU_DAY = 299792.458 * 86400.0 / 149597870.7
GAUSS_K = 0.01720209895
GM = GAUSS_K * GAUSS_K
EPS0 = 84381.448 / 3600.0 * math.pi / 180.0
DEG = math.pi / 180.0

# Invented sites: name, latitude deg, east longitude deg, height m (WGS84).
SITES = [
    ("Nordhavn", 63.42, 10.40, 150.0),        # above 60 deg latitude
    ("Datumrock", -16.80, 179.93, 40.0),     # near the date line (east)
    ("Westpoint", -21.10, -179.85, 310.0),   # near the date line (west)
    ("Mesa Alta", 32.10, -105.70, 2200.0),
]

# Invented element sets (heliocentric ecliptic and equinox J2000).
# Mean-anomaly form: (name, "M", epoch_tt, a, e, i, node, peri, M0)
# Perihelion form:   (name, "Q", tp_tt, q, e, i, node, peri)
ELEMENTS = [
    ("Invented-E20", "M", 2461000.5, 2.41, 0.20, 7.3, 112.4, 205.8, 33.0),
    ("Invented-E60", "M", 2458500.5, 1.62, 0.60, 14.9, 301.2, 47.6, 288.0),
    ("Invented-E97", "Q", 2455310.25, 0.88, 0.97, 63.2, 18.7, 131.9),
    ("Invented-E100", "Q", 2468421.75, 1.21, 1.00, 122.5, 244.0, 310.4),
]

PLANETS = [(1, "Mercury"), (2, "Venus"), (4, "Mars"), (5, "Jupiter"),
           (6, "Saturn"), (7, "Uranus"), (8, "Neptune")]


# ---- two-body motion (this script's own, independent of package ephem) ----

def kepler_ellipse(e, m):
    """Eccentric anomaly for mean anomaly m (rad), Newton with a safe start."""
    m = math.remainder(m, 2 * math.pi)
    x = m + e * math.sin(m) if e < 0.8 else (math.pi if m >= 0 else -math.pi)
    for _ in range(100):
        f = x - e * math.sin(x) - m
        d = 1 - e * math.cos(x)
        dx = f / d
        x -= dx
        if abs(dx) < 1e-15:
            break
    return x


def plane_state(el, tdb):
    """Orbital-plane position (x to perihelion) at tdb (JD float)."""
    if el[1] == "M":
        _, _, epoch, a, e = el[:5]
        m0 = el[8] * DEG
        n = math.sqrt(GM / a ** 3)
        big_e = kepler_ellipse(e, m0 + n * (tdb - epoch))
        x = a * (math.cos(big_e) - e)
        y = a * math.sqrt(1 - e * e) * math.sin(big_e)
        return x, y
    _, _, tp, q, e = el[:5]
    dt = tdb - tp
    if e < 1:
        a = q / (1 - e)
        n = math.sqrt(GM / a ** 3)
        big_e = kepler_ellipse(e, n * dt)
        x = a * (math.cos(big_e) - e)
        y = a * math.sqrt(1 - e * e) * math.sin(big_e)
        return x, y
    # Parabola: Barker's equation s^3 + 3 s = 3 W, W = sqrt(GM/(2 q^3)) dt,
    # solved in closed form (Cardano).
    w = 3 * math.sqrt(GM / (2 * q ** 3)) * dt
    y3 = w / 2 + math.sqrt(w * w / 4 + 1)
    s = np.cbrt(y3) - 1 / np.cbrt(y3)
    nu = 2 * math.atan(s)
    r = q * (1 + s * s)
    return r * math.cos(nu), r * math.sin(nu)


def element_helio_icrs(el, tdb):
    x, y = plane_state(el, tdb)
    i, node, peri = el[5] * DEG, el[6] * DEG, el[7] * DEG
    ci, si = math.cos(i), math.sin(i)
    cn, sn = math.cos(node), math.sin(node)
    cw, sw = math.cos(peri), math.sin(peri)
    # Rz(-node) Rx(-i) Rz(-peri) applied to (x, y, 0).
    xp = cw * x - sw * y
    yp = sw * x + cw * y
    x1, y1, z1 = xp, yp * ci, yp * si
    ex = cn * x1 - sn * y1
    ey = sn * x1 + cn * y1
    ez = z1
    # ecliptic J2000 -> equator: R1(-eps0)
    ce, se = math.cos(EPS0), math.sin(EPS0)
    return np.array([ex, ce * ey - se * ez, se * ey + ce * ez])


# ---- Sun, Earth, planets ----

def sun_bary(tdb):
    pvh, pvb = erfa.epv00(tdb, 0.0)
    return np.array(pvb["p"]) - np.array(pvh["p"]), np.array(pvb["v"]) - np.array(pvh["v"])


def earth_bary(tdb):
    _, pvb = erfa.epv00(tdb, 0.0)
    return np.array(pvb["p"])


def planet_helio(n, tdb):
    pv = erfa.plan94(tdb, 0.0, n)
    return np.array(pv["p"])


def sep(a, b):
    a = a / np.linalg.norm(a)
    b = b / np.linalg.norm(b)
    return math.atan2(np.linalg.norm(np.cross(a, b)), np.dot(a, b))


def light_time(helio, obs, tdb):
    """Iterate tau for the body whose heliocentric ICRS position is helio(t).
    Returns (vector X(t-tau) - O(t), helio position at t - tau, tau)."""
    tau = 0.0
    for _ in range(50):
        h = helio(tdb - tau)
        x = h + sun_bary(tdb - tau)[0]
        p = x - obs
        new = np.linalg.norm(p) / C_AU_DAY
        if abs(new - tau) < 1e-13:
            tau = new
            break
        tau = new
    h = helio(tdb - tau)
    p = h + sun_bary(tdb - tau)[0] - obs
    return p, h, tau


def moon_astrometric(obs, tdb):
    tau = 0.0
    for _ in range(10):
        pv = erfa.moon98(tdb - tau, 0.0)
        p = np.array(pv["p"]) + earth_bary(tdb - tau) - obs
        tau = np.linalg.norm(p) / C_AU_DAY
    return p


def refracted_alt(alt, refa, refb):
    """Observed altitude from the unrefracted one with ERFA's refraction model
    dZ = A tan Zobs + B tan^3 Zobs, Z = Zobs + dZ (iterated)."""
    z = math.pi / 2 - alt
    zo = z
    for _ in range(20):
        t = math.tan(zo)
        zo = z - (refa * t + refb * t ** 3)
    return math.pi / 2 - zo


def radec(p):
    ra, dec = erfa.c2s(p)
    return erfa.anp(ra) / DEG, dec / DEG


def place(target, obs, vel, em, bm1, tt, tdb, ut1, site):
    """One row's numbers for target = ("sun",), ("planet", n) or ("el", el)."""
    if target[0] == "sun":
        helio = lambda t: np.zeros(3)
    elif target[0] == "planet":
        helio = lambda t: planet_helio(target[1], t)
    else:
        helio = lambda t: element_helio_icrs(target[1], t)
    p, h, tau = light_time(helio, obs, tdb)
    delta = np.linalg.norm(p)
    r = np.linalg.norm(h)
    ra, dec = radec(p)
    ppr = erfa.ab(p / delta, vel, em, bm1)
    papp = erfa.pnm06a(tt[0], tt[1]) @ ppr
    raa, deca = radec(papp)
    if target[0] == "sun":
        elong = 0.0
        phase = 0.0
    else:
        psun, _, _ = light_time(lambda t: np.zeros(3), obs, tdb)
        elong = sep(psun, p)
        phase = sep(-h, -p)
    moon = moon_astrometric(obs, tdb)
    moonsep = sep(moon, p)
    az = alt = altref = float("nan")
    if site is not None:
        _, lat, lon, hm = site
        gst = erfa.gst06a(ut1[0], ut1[1], tt[0], tt[1])
        ha = gst + lon * DEG - raa * DEG
        a, e = erfa.hd2ae(ha, deca * DEG, lat * DEG)
        az, alt = a / DEG, e / DEG
        if alt > 10:
            refa, refb = erfa.refco(1010.0, 10.0, 0.0, 0.55)
            altref = refracted_alt(alt * DEG, refa, refb) / DEG
    return (ra, dec, raa, deca, delta, r, tau, elong / DEG, phase / DEG,
            az, alt, altref, moonsep / DEG)


def utc_instants():
    """200 UTC instants, 1972-2100, with fractions spread through the day."""
    first = 2441317.5  # 1972 January 1
    last = 2488069.5   # 2100 January 1
    out = []
    for i in range(200):
        t = first + (last - first) * (i + 0.5) / 200
        day = math.floor(t - 0.5) + 0.5
        frac = ((t - day) + i * 0.3819660113) % 1.0
        out.append((day, frac))
    return out


def tt_instants():
    """40 TT instants, 1900-1971 (geocentric only)."""
    first = 2415020.5
    last = 2441316.5
    out = []
    for i in range(40):
        t = first + (last - first) * (i + 0.5) / 40
        day = math.floor(t - 0.5) + 0.5
        frac = ((t - day) + i * 0.618034) % 1.0
        out.append((day, frac))
    return out


def element_instants(el):
    """Instants for the comet-like sets: within +-700 d of perihelion."""
    tp = el[2]
    out = []
    for i in range(40):
        t = tp - 700 + 1400 * (i + 0.5) / 40
        day = math.floor(t - 0.5) + 0.5
        out.append((day, t - day))
    return out


def dut1_of(i):
    return round(0.8 * math.sin(1.7 * i + 0.3), 4)


def targets_for(instant_kind, el_filter=None):
    ts = [("sun", "Sun", ("sun",))]
    ts += [("planet", name, ("planet", n)) for n, name in PLANETS]
    ts += [("el", el[0], ("el", el)) for el in ELEMENTS if el[1] == "M"]
    return ts


def fmt(v):
    if isinstance(v, float) and math.isnan(v):
        return "nan"
    return "%.12g" % v


def main():
    warnings.simplefilter("ignore")  # ERFA's "dubious year" past the leap-second table
    rows = []
    all_sites = [None] + SITES

    def do_utc(i, day, frac, targets):
        dut1 = dut1_of(i)
        tai = erfa.utctai(day, frac)
        tt = erfa.taitt(*tai)
        ut1 = erfa.utcut1(day, frac, dut1)
        tdb = (tt[0], tt[1] + erfa.dtdb(tt[0], tt[1], 0.0, 0.0, 0.0, 0.0) / 86400.0)
        tdbf = tdb[0] + tdb[1]
        for site in all_sites:
            if site is None:
                astrom = erfa.apcg13(tdb[0], tdb[1])
                sname = "geocentre"
            else:
                astrom, _ = erfa.apco13(day, frac, dut1, site[2] * DEG, site[1] * DEG,
                                        site[3], 0.0, 0.0, 0.0, 0.0, 0.0, 0.0)
                sname = site[0]
            obs = np.array(astrom["eb"])
            vel = np.array(astrom["v"])
            for kind, name, tgt in targets:
                vals = place(tgt, obs, vel, float(astrom["em"]), float(astrom["bm1"]),
                             tt, tdbf, ut1, site)
                rows.append(("utc", name, sname.replace(" ", "_"), day, frac, dut1,
                             tt[0], tt[1], tdb[0], tdb[1]) + vals)

    base = targets_for("utc")
    for i, (day, frac) in enumerate(utc_instants()):
        do_utc(i, day, frac, base)
    for k, el in enumerate(ELEMENTS):
        if el[1] != "Q":
            continue
        for i, (day, frac) in enumerate(element_instants(el)):
            do_utc(1000 * (k + 1) + i, day, frac, [("el", el[0], ("el", el))])

    for i, (day, frac) in enumerate(tt_instants()):
        tt = (day, frac)
        tdb = (day, frac + erfa.dtdb(day, frac, 0.0, 0.0, 0.0, 0.0) / 86400.0)
        astrom = erfa.apcg13(tdb[0], tdb[1])
        obs = np.array(astrom["eb"])
        vel = np.array(astrom["v"])
        for kind, name, tgt in base:
            vals = place(tgt, obs, vel, float(astrom["em"]), float(astrom["bm1"]),
                         tt, tdb[0] + tdb[1], None, None)
            rows.append(("tt", name, "geocentre", float("nan"), float("nan"), 0.0,
                         tt[0], tt[1], tdb[0], tdb[1]) + vals)

    with open(os.path.join(OUT, "erfa_places.txt"), "w") as f:
        f.write("# Reference places for package ephem (sun.go, place.go).\n")
        f.write("# Made by: %s\n" % COMMAND)
        f.write("# With: %s\n" % VERSIONS)
        f.write("# Definitions: see the docstring of testdata/gen/erfa_places.py (astrometric =\n")
        f.write("#   direction of X(t-tau) - O(t), barycentric, ICRS axes, no aberration or deflection;\n")
        f.write("#   apparent = eraAb with the observer's barycentric velocity, then eraPnm06a;\n")
        f.write("#   Sun = epv00 pvb - pvh; planets = plan94 + Sun; elements = own two-body,\n")
        f.write("#   GM = k^2, ecliptic J2000 -> ICRS by R1(-84381.448\"); alt unrefracted from\n")
        f.write("#   eraGst06a and eraHd2ae (no polar motion); altref with eraRefco 1010 hPa 10 C rh 0;\n")
        f.write("#   Moon from eraMoon98. dut1 is an arbitrary test value, not the real UT1-UTC.)\n")
        f.write("# Sites (invented; lat deg, east lon deg, height m, WGS84):\n")
        for s in SITES:
            f.write("#   site %s %.6f %.6f %.1f\n" % (s[0].replace(" ", "_"), s[1], s[2], s[3]))
        f.write("# Element sets (invented; ecliptic J2000; angles deg):\n")
        for el in ELEMENTS:
            if el[1] == "M":
                f.write("#   elements %s M epoch_tt=%.5f a=%.6f e=%.6f i=%.6f node=%.6f peri=%.6f m=%.6f\n" % ((el[0],) + el[2:]))
            else:
                f.write("#   elements %s Q tp_tt=%.5f q=%.6f e=%.6f i=%.6f node=%.6f peri=%.6f\n" % ((el[0],) + el[2:]))
        f.write("# Rows with key 'tt' (1900-1971) are geocentric and keyed by TT: no UTC, no UT1.\n")
        f.write("# columns: key body site utc_day utc_frac dut1_s tt_day tt_frac tdb_day tdb_frac "
                "ra_deg dec_deg raapp_deg decapp_deg delta_au r_au tau_d elong_deg phase_deg "
                "az_deg alt_deg altref_deg moonsep_deg\n")
        for r in rows:
            f.write(" ".join([r[0], r[1], r[2]] + [fmt(v) for v in r[3:]]) + "\n")

    with open(os.path.join(OUT, "erfa_sunbary.txt"), "w") as f:
        f.write("# The Sun's barycentric position (au) and velocity (au/day), ICRS axes, from\n")
        f.write("# eraEpv00: the Earth's barycentric minus heliocentric vectors, at 400 TDB dates\n")
        f.write("# 1900-2100. epv00 is a fit to JPL DE405 (a few km RMS for the Earth).\n")
        f.write("# Made by: %s\n" % COMMAND)
        f.write("# With: %s\n" % VERSIONS)
        f.write("# columns: tdb_day tdb_frac x y z vx vy vz\n")
        first, last = 2415020.5, 2488069.5
        for i in range(400):
            t = first + (last - first) * i / 399
            day = math.floor(t - 0.5) + 0.5
            frac = ((t - day) + i * 0.29) % 1.0
            p, v = sun_bary(day + frac)
            f.write("%.1f %.12f %s\n" % (day, frac, " ".join("%.15e" % x for x in list(p) + list(v))))


if __name__ == "__main__":
    main()
