#!/usr/bin/python3
"""Generate arcfit's built-in demo scenario: an invented asteroid seen from two
invented sites on three nights of February 2027.

Run from the repository root with Debian's interpreter (the python3 first on
PATH may lack erfa):

    /usr/bin/python3 testdata/gen/demo_scenario.py

It writes, into fit/demo/data/ (embedded by package fit/demo):

    observations.csv  measured positions (noise added), arcfit's observation CSV
    sites.csv         the two invented sites, arcfit's sites CSV
    elements.csv      the invented orbital elements, arcfit's elements CSV
    truth.csv         noise-free positions at the observation times, then hourly
                      positions over the following 60 nights from each site

Everything here is invented: the object "Demo-1 (invented)", its elements, its
magnitude parameters, the two sites. Nothing is a real object's measurement.

Definitions (see shared/checks/references.md of the project):
  * Time. UTC -> TAI -> TT with erfa.utctai and erfa.taitt (TAI-UTC = 37 s, the
    last leap second being 2016 Dec 31; ERFA flags 2027 as a "dubious year"
    only because its table cannot know of leap seconds announced later; the
    warning is silenced). TDB = TT + erfa.dtdb for the site. UT1 is taken
    equal to UTC (|UT1-UTC| < 0.9 s moves the site by < 0.4 km, < 0.001" of
    parallax here). Polar motion zero.
  * Orbit. Two-body motion about the Sun, GM = k^2 with
    k = 0.01720209895 au^(3/2)/day (Gauss), time in TDB days; the elements are
    heliocentric, ecliptic and mean equinox J2000; the ecliptic-to-ICRS
    rotation is about x by the IAU 2006 obliquity at J2000,
    84381.406" (frame bias, about 0.02", ignored: far below the 0.5" noise).
    Kepler's equation is solved by Newton's method in this script.
  * Astrometric place. The direction of X(t - tau) - O(t) in ICRS axes, X the
    object's barycentric position (heliocentric plus the Sun's barycentric
    position, Sun = erfa.epv00 barycentric Earth minus heliocentric Earth, at
    t - tau), O the observer's barycentric position at t (erfa.epv00 Earth plus
    the site's GCRS position: erfa.gd2gc WGS84, rotated by the transpose of
    erfa.c2t06a). tau = |X(t - tau) - O(t)| / c, iterated to 1e-12 day. No
    aberration, no light deflection, no refraction.
  * Noise. Seeded Gaussian (numpy default_rng, seed below), sigma = 0.5" per
    coordinate, RA noise on the sky (divided by cos Dec). Magnitudes from the
    H-G law (Bowell et al. 1989, in Meeus, Astronomical Algorithms 2nd ed.,
    ch. 33: A1 = 3.33, B1 = 0.63, A2 = 1.87, B2 = 1.22) with 0.1 mag noise,
    band V.
  * One outlier, as real data have: observation OUTLIER_INDEX (0-based, in
    the plan's order) gets OUTLIER_EAST_ARCSEC, OUTLIER_NORTH_ARCSEC added on
    top of its noise (a measurement spoiled by a faint star in the image);
    the random draws are the same as without it.
  * Altitude and azimuth in truth.csv (checks only): erfa.atco13 on the
    topocentric astrometric place (parallax already in it, px = 0), refracted
    for 1010 hPa, 10 C, relative humidity 0, wavelength 0.55 um; azimuth from
    north through east. The Sun's altitude likewise, geometric (no refraction),
    from the geocentric Sun.
"""

import math
import os
import sys
import warnings

import erfa
import numpy as np

warnings.simplefilter("ignore")  # ERFA "dubious year" for 2027, see above

K_GAUSS = 0.01720209895          # au^(3/2)/day, Gauss's constant
GM_SUN = K_GAUSS * K_GAUSS       # au^3/day^2
AU_M = 149597870700.0            # m, IAU 2012 B2
C_AU_DAY = 299792458.0 * 86400.0 / AU_M
EPS0 = math.radians(84381.406 / 3600.0)  # IAU 2006 obliquity at J2000
SEED = 20270205
SIGMA_ARCSEC = 0.5
MAG_SIGMA = 0.1
OUTLIER_INDEX = 8
OUTLIER_EAST_ARCSEC, OUTLIER_NORTH_ARCSEC = 3.5, -2.0

# The invented object. Elements invented to resemble a typical main-belt
# asteroid near opposition in early February 2027.
NAME = "Demo-1 (invented)"
EPOCH_TT = 2461406.5             # 2027-01-01T00:00:00 TT
ELEM = dict(a_au=2.614, e=0.148, i_deg=7.86, node_deg=103.27,
            peri_deg=61.45, m_deg=330.21)
H_MAG, G_SLOPE = 15.5, 0.15

# The invented sites: name, geodetic latitude (deg), east longitude (deg),
# height above the WGS84 ellipsoid (m).
SITES = [
    ("Alder Ridge", 42.3150, -101.5280, 930.0),
    ("Birch Hollow", 44.0520, 2.9310, 610.0),
]

# Observation plan: (site index, UTC y, m, d, h, mi, s). Alder Ridge at
# 21:10-22:55 local mean time (UTC - 6h46m), Birch Hollow at about 20:10-21:10
# local mean time (UTC + 12m), the local dates 3, 5 and 7 February 2027.
PLAN = [
    (0, 2027, 2, 4, 3, 56, 12.4),
    (0, 2027, 2, 4, 4, 27, 48.9),
    (0, 2027, 2, 4, 5, 1, 5.2),
    (0, 2027, 2, 4, 5, 38, 40.7),
    (1, 2027, 2, 5, 19, 58, 31.0),
    (1, 2027, 2, 5, 20, 29, 2.6),
    (1, 2027, 2, 5, 20, 57, 44.8),
    (0, 2027, 2, 6, 4, 8, 20.3),
    (0, 2027, 2, 6, 4, 47, 9.5),
    (0, 2027, 2, 6, 5, 25, 57.1),
    (0, 2027, 2, 8, 3, 49, 3.8),
    (0, 2027, 2, 8, 4, 21, 36.0),
    (0, 2027, 2, 8, 4, 55, 14.2),
    (0, 2027, 2, 8, 5, 31, 50.6),
]
TRUTH_NIGHTS = 60

OUT_DIR = os.path.join("fit", "demo", "data")
COMMAND = "/usr/bin/python3 testdata/gen/demo_scenario.py"


def versions():
    return "python3-erfa %s, numpy %s, Python %s" % (
        erfa.__version__, np.__version__, sys.version.split()[0])


def kepler_e(m, e):
    """Eccentric anomaly E from mean anomaly m (rad), 0 <= e < 1, Newton."""
    m = math.remainder(m, 2 * math.pi)
    big_e = m if e < 0.8 else math.pi * (1 if m >= 0 else -1)
    for _ in range(50):
        f = big_e - e * math.sin(big_e) - m
        d = f / (1 - e * math.cos(big_e))
        big_e -= d
        if abs(d) < 1e-15:
            break
    return big_e


def helio_icrs(tdb):
    """Heliocentric ICRS position (au) of the object at TDB Julian date tdb."""
    a, e = ELEM["a_au"], ELEM["e"]
    inc = math.radians(ELEM["i_deg"])
    node = math.radians(ELEM["node_deg"])
    peri = math.radians(ELEM["peri_deg"])
    n = K_GAUSS / a ** 1.5  # = sqrt(GM/a^3)
    m = math.radians(ELEM["m_deg"]) + n * (tdb - EPOCH_TT)
    big_e = kepler_e(m, e)
    xp = a * (math.cos(big_e) - e)
    yp = a * math.sqrt(1 - e * e) * math.sin(big_e)
    # perifocal -> ecliptic J2000: Rz(-node) Rx(-i) Rz(-peri)
    cw, sw = math.cos(peri), math.sin(peri)
    cn, sn = math.cos(node), math.sin(node)
    ci, si = math.cos(inc), math.sin(inc)
    x1, y1 = cw * xp - sw * yp, sw * xp + cw * yp
    x2, y2, z2 = x1, ci * y1, si * y1
    xe, ye, ze = cn * x2 - sn * y2, sn * x2 + cn * y2, z2
    # ecliptic -> equatorial (ICRS axes, frame bias ignored)
    ce, se = math.cos(EPS0), math.sin(EPS0)
    return np.array([xe, ce * ye - se * ze, se * ye + ce * ze])


def sun_bary(tdb):
    pvh, pvb = erfa.epv00(tdb, 0.0)
    return pvb[0] - pvh[0]


class Instant:
    """One UTC instant with its TT and TDB, for one site."""

    def __init__(self, utc1, utc2, site):
        self.utc1, self.utc2 = utc1, utc2
        tai1, tai2 = erfa.utctai(utc1, utc2)
        self.tt1, self.tt2 = erfa.taitt(tai1, tai2)
        _, lat, lon, h = site
        elong, phi = math.radians(lon), math.radians(lat)
        self.itrs = erfa.gd2gc(1, elong, phi, h) / AU_M  # au
        u = math.hypot(self.itrs[0], self.itrs[1]) * AU_M / 1000.0
        v = self.itrs[2] * AU_M / 1000.0
        ut_frac = ((utc1 - 0.5) % 1.0 + utc2) % 1.0  # UT1 ~ UTC
        self.tdb = (self.tt1 + self.tt2) + erfa.dtdb(
            self.tt1, self.tt2, ut_frac, elong, u, v) / 86400.0
        c2t = erfa.c2t06a(self.tt1, self.tt2, utc1, utc2, 0.0, 0.0)
        self.gcrs = c2t.T @ self.itrs
        pvh, pvb = erfa.epv00(self.tdb, 0.0)
        self.earth_helio = pvh[0]
        self.obs_bary = pvb[0] + self.gcrs


def astrometric(inst):
    """Topocentric astrometric ICRS (ra, dec rad, delta au, r au, xhelio)."""
    tau = 0.0
    for _ in range(20):
        t = inst.tdb - tau
        xh = helio_icrs(t)
        rho = xh + sun_bary(t) - inst.obs_bary
        new = np.linalg.norm(rho) / C_AU_DAY
        if abs(new - tau) < 1e-12:
            tau = new
            break
        tau = new
    t = inst.tdb - tau
    xh = helio_icrs(t)
    rho = xh + sun_bary(t) - inst.obs_bary
    ra, dec = erfa.c2s(rho)
    return erfa.anp(ra), dec, np.linalg.norm(rho), np.linalg.norm(xh), rho


def vmag(r, delta, rho, inst):
    """H-G apparent magnitude (Meeus ch. 33, Bowell et al. 1989)."""
    # phase angle: Sun-object-observer
    obj_to_sun = -helio_icrs_from(rho, inst)
    obj_to_obs = -rho
    cb = np.dot(obj_to_sun, obj_to_obs) / (np.linalg.norm(obj_to_sun) *
                                          np.linalg.norm(obj_to_obs))
    beta = math.acos(max(-1.0, min(1.0, cb)))
    t = math.tan(beta / 2)
    phi1 = math.exp(-3.33 * t ** 0.63)
    phi2 = math.exp(-1.87 * t ** 1.22)
    return (H_MAG + 5 * math.log10(r * delta)
            - 2.5 * math.log10((1 - G_SLOPE) * phi1 + G_SLOPE * phi2)), beta


def helio_icrs_from(rho, inst):
    # object heliocentric ~ rho + observer heliocentric (light-time shift of the
    # Sun, < 1e-7 au, is irrelevant for a phase angle)
    return rho + inst.earth_helio + inst.gcrs


def sun_dir(inst):
    """Observer-to-Sun vector (au), geocentric Sun shifted to the site."""
    return -(inst.earth_helio + inst.gcrs)


def altaz(inst, site, ra, dec, refract):
    _, lat, lon, h = site
    phpa = 1010.0 if refract else 0.0
    aob, zob, _, _, _, _ = erfa.atco13(
        ra, dec, 0.0, 0.0, 0.0, 0.0, inst.utc1, inst.utc2, 0.0,
        math.radians(lon), math.radians(lat), h, 0.0, 0.0,
        phpa, 10.0, 0.0, 0.55)
    return 90.0 - math.degrees(zob), math.degrees(aob)


def elongation(rho, inst):
    s = sun_dir(inst)
    c = np.dot(rho, s) / (np.linalg.norm(rho) * np.linalg.norm(s))
    return math.degrees(math.acos(max(-1.0, min(1.0, c))))


def fmt_iso(utc1, utc2, ndp):
    y, m, d, hmsf = erfa.d2dtf("UTC", ndp, utc1, utc2)
    h, mi, s, f = hmsf
    if ndp > 0:
        return "%04d-%02d-%02dT%02d:%02d:%02d.%0*dZ" % (y, m, d, h, mi, s, ndp, f)
    return "%04d-%02d-%02dT%02d:%02d:%02dZ" % (y, m, d, h, mi, s)


def fmt_ra(ra):
    sign, (h, m, s, f) = erfa.a2tf(3, ra)
    return "%02d:%02d:%02d.%03d" % (h, m, s, f)


def fmt_dec(dec):
    sign, (d, m, s, f) = erfa.a2af(2, dec)
    return "%s%02d:%02d:%02d.%02d" % (sign.decode() if isinstance(sign, bytes)
                                      else sign, d, m, s, f)


def header(kind, extra):
    lines = [
        "# arcfit demo scenario: %s. INVENTED DATA, not a real object or site." % kind,
        "# Object: %s, invented elements (elements.csv); sites invented (sites.csv)." % NAME,
        "# Generated by: %s" % COMMAND,
        "# With: %s." % versions(),
        "# Astrometric ICRS place, topocentric: X(t-tau) - O(t), light time iterated;",
        "# two-body orbit, GM = k^2, k = 0.01720209895; ecliptic J2000 -> ICRS by",
        "# obliquity 84381.406\" (IAU 2006); Earth erfa.epv00; site erfa.gd2gc +",
        "# erfa.c2t06a (UT1 = UTC, no polar motion); TT, TDB by erfa.utctai/taitt/dtdb.",
    ]
    return "\n".join(lines + ["# " + e for e in extra]) + "\n"


def write(name, text):
    path = os.path.join(OUT_DIR, name)
    tmp = path + ".tmp"
    with open(tmp, "w", newline="\n") as f:
        f.write(text)
    os.replace(tmp, path)
    print("wrote %s (%d bytes)" % (path, len(text.encode())))


def main():
    if not os.path.isdir(OUT_DIR):
        sys.exit("run from the repository root: %s not found" % OUT_DIR)
    rng = np.random.default_rng(SEED)
    sigma_rad = math.radians(SIGMA_ARCSEC / 3600.0)

    obs_rows, truth_rows = [], []
    ok = True
    print("check: site, time, elongation > 120 deg, altitude > 30 deg")
    for k_obs, (si, y, mo, d, h, mi, s) in enumerate(PLAN):
        site = SITES[si]
        utc1, utc2 = erfa.dtf2d("UTC", y, mo, d, h, mi, s)
        inst = Instant(utc1, utc2, site)
        ra, dec, delta, r, rho = astrometric(inst)
        mag, beta = vmag(r, delta, rho, inst)
        elong = elongation(rho, inst)
        alt, az = altaz(inst, site, ra, dec, True)
        sun_alt, _ = altaz(inst, site, *erfa.c2s(sun_dir(inst)), False)
        good = elong > 120 and alt > 30 and sun_alt < -18
        ok = ok and good
        print("  %-12s %s  elong %6.2f  alt %5.2f  sun %6.2f  delta %.4f au  %s" % (
            site[0], fmt_iso(utc1, utc2, 1), elong, alt, sun_alt, delta,
            "ok" if good else "FAIL"))
        n1, n2 = rng.standard_normal(2)
        if k_obs == OUTLIER_INDEX:
            n1 += OUTLIER_EAST_ARCSEC / SIGMA_ARCSEC
            n2 += OUTLIER_NORTH_ARCSEC / SIGMA_ARCSEC
        ra_m = erfa.anp(ra + n1 * sigma_rad / math.cos(dec))
        dec_m = dec + n2 * sigma_rad
        mag_m = mag + MAG_SIGMA * rng.standard_normal()
        t_iso = fmt_iso(utc1, utc2, 2)
        obs_rows.append("%s,%s,%s,%.1f,%s,%.2f,V" % (
            t_iso, fmt_ra(ra_m), fmt_dec(dec_m), SIGMA_ARCSEC, site[0], mag_m))
        truth_rows.append("%s,%s,obs,%.9f,%.9f,%.9f,%.9f,%.3f,%.3f,%.3f,%.3f,%.2f" % (
            t_iso, site[0], math.degrees(ra), math.degrees(dec), delta, r,
            elong, alt, az, sun_alt, mag))

    # Hourly positions over the following nights, each site, Sun below -6 deg.
    last_utc = erfa.dtf2d("UTC", *PLAN[-1][1:4], 0, 0, 0.0)
    start = last_utc[0] + last_utc[1] + 1.0  # 0h UTC of the day after
    for site in SITES:
        for k in range(TRUTH_NIGHTS * 24):
            utc1, utc2 = start, k / 24.0
            inst = Instant(utc1, utc2, site)
            sun_alt, _ = altaz(inst, site, *erfa.c2s(sun_dir(inst)), False)
            if sun_alt >= -6.0:
                continue
            ra, dec, delta, r, rho = astrometric(inst)
            mag, _ = vmag(r, delta, rho, inst)
            alt, az = altaz(inst, site, ra, dec, True)
            truth_rows.append("%s,%s,hourly,%.9f,%.9f,%.9f,%.9f,%.3f,%.3f,%.3f,%.3f,%.2f" % (
                fmt_iso(utc1, utc2, 0), site[0], math.degrees(ra),
                math.degrees(dec), delta, r, elongation(rho, inst), alt, az,
                sun_alt, mag))

    obs_text = header("observations", [
        "Noise: seeded Gaussian, seed %d, sigma %.1f\" per coordinate (RA on the sky);" % (SEED, SIGMA_ARCSEC),
        "one outlier: row %d of the data has %+.1f\" east, %+.1f\" north on top of its noise." % (
            OUTLIER_INDEX + 1, OUTLIER_EAST_ARCSEC, OUTLIER_NORTH_ARCSEC),
        "mag: H-G law (H %.1f, G %.2f) plus %.1f mag noise, band V." % (H_MAG, G_SLOPE, MAG_SIGMA),
        "Columns: time UTC; ra hours:min:s, dec deg:min:s astrometric ICRS; sigma arcsec.",
    ]) + "time,ra,dec,sigma,site,mag,band\n" + "\n".join(obs_rows) + "\n"

    sites_text = (
        "# arcfit demo scenario: sites. INVENTED SITES, not real observatories.\n"
        "# Generated by: %s\n"
        "# Geodetic WGS84 latitude, east longitude (deg), height above the ellipsoid (m).\n"
        % COMMAND
        + "name,lat_deg,lon_deg,height_m\n"
        + "".join("%s,%.4f,%.4f,%.0f\n" % s for s in SITES))

    elem_text = (
        "# arcfit demo scenario: orbital elements. INVENTED OBJECT, not a real asteroid.\n"
        "# Generated by: %s\n"
        "# Heliocentric, ecliptic and mean equinox J2000; epoch TT (propagated as TDB,\n"
        "# TDB - TT < 2 ms); GM = k^2, k = 0.01720209895. H, G: the H-G magnitude law.\n"
        % COMMAND
        + "name,epoch_tt,a_au,e,i_deg,node_deg,peri_deg,m_deg,h,g\n"
        + "%s,%.1f,%.3f,%.3f,%.2f,%.2f,%.2f,%.2f,%.1f,%.2f\n" % (
            NAME, EPOCH_TT, ELEM["a_au"], ELEM["e"], ELEM["i_deg"],
            ELEM["node_deg"], ELEM["peri_deg"], ELEM["m_deg"], H_MAG, G_SLOPE))

    truth_text = header("noise-free truth", [
        "kind obs: at each observation time (noise-free); kind hourly: every hour",
        "of the %d days after the last observation while the Sun's centre is below -6 deg" % TRUTH_NIGHTS,
        "at the site (geometric). alt_deg, az_deg: erfa.atco13, refracted for 1010 hPa,",
        "10 C, rh 0, 0.55 um, azimuth N through E; sun_alt_deg unrefracted; elong_deg the",
        "Sun-observer-object angle; v_mag H-G law without noise; delta_au observer",
        "distance, r_au heliocentric distance.",
    ]) + ("time_utc,site,kind,ra_deg,dec_deg,delta_au,r_au,elong_deg,alt_deg,"
          "az_deg,sun_alt_deg,v_mag\n") + "\n".join(truth_rows) + "\n"

    if not ok:
        sys.exit("check failed: an observation is not well placed; change PLAN")
    write("observations.csv", obs_text)
    write("sites.csv", sites_text)
    write("elements.csv", elem_text)
    write("truth.csv", truth_text)


if __name__ == "__main__":
    main()
