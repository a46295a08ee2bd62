#!/usr/bin/python3
"""The general-purpose side of bench/compare.sh, and its report.

  peers.py fit FILE REPS          numpy.linalg.lstsq on the weighted design
  peers.py ephem PREFIX REPS      python3-ephem: the element-set positions
  peers.py sunmoon PREFIX REPS    astropy get_body: the Sun and the Moon
  peers.py report DIR             the table of both sides, from DIR/*.json

The inputs are those the arcfit side (bench/peers, Go) wrote: the fit's
observations (FILE), the tables' instants and element set (PREFIX.spec.json).
Each case runs in its own process, so its peak memory (ru_maxrss) is its own;
the clock runs around the computation only (not the interpreter's start-up,
the imports or the reading of the inputs), REPS times, and the median is
reported with the CPU time (time.process_time) of the same repetitions.
Results go to stdout as one JSON object; positions to PREFIX.peer.f64.

Run with Debian's Python (/usr/bin/python3) and its python3-numpy,
python3-ephem and python3-astropy; astropy is kept offline (no IERS or
leap-second downloads) and uses its builtin solar-system ephemeris.
"""
import json
import math
import os
import resource
import sys
import time
import warnings

ARCSEC = math.pi / (180 * 3600)


def maxrss_kb():
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss  # kB on Linux


def timed(reps, f):
    wall, cpu, out = [], [], None
    for _ in range(reps):
        t0, c0 = time.perf_counter(), time.process_time()
        out = f()
        wall.append(time.perf_counter() - t0)
        cpu.append(time.process_time() - c0)
    return wall, cpu, out


def median(v):
    s = sorted(v)
    n = len(s)
    return s[n // 2] if n % 2 else 0.5 * (s[n // 2 - 1] + s[n // 2])


def emit(case, n, wall, cpu, rss_import, **extra):
    r = {"case": case, "n": n, "reps": len(wall), "median_s": median(wall), "min_s": min(wall),
         "times_s": wall, "cpu_median_s": median(cpu), "cpu_times_s": cpu,
         "max_rss_kb": maxrss_kb(), "rss_after_imports_kb": rss_import}
    r.update(extra)
    json.dump(r, sys.stdout)
    sys.stdout.write("\n")


def blas_info():
    """The OpenBLAS kernel and thread count numpy runs with, when it is OpenBLAS."""
    import ctypes
    for name in ("libblas.so.3", "libopenblas.so.0"):
        try:
            lib = ctypes.CDLL(name)
            lib.openblas_get_corename.restype = ctypes.c_char_p
            return "OpenBLAS %s, %d threads" % (lib.openblas_get_corename().decode(), lib.openblas_get_num_threads())
        except (OSError, AttributeError):
            continue
    return "BLAS of unknown kind"


def cmd_fit(path, reps):
    import numpy as np
    rss_import = maxrss_kb()
    with open(path, "rb") as f:
        if f.read(8) != b"ARCFITB1":
            sys.exit("peers.py: %s is not a fit input file" % path)
        n = int(np.frombuffer(f.read(8), "<i8")[0])
        scale = float(np.frombuffer(f.read(8), "<f8")[0])
        t, xi, eta, sx, se = np.frombuffer(f.read(), "<f8").reshape(5, n)
    lstsq_times = []

    def solve():
        # The weighted design of arcfit's poly2 fit with the parallax off:
        # for point i a xi row [1, tau, tau^2, 0, 0, 0]/sigma_xi and an eta
        # row [0, 0, 0, 1, tau, tau^2]/sigma_eta, tau = T/scale (2n x 6).
        tau = t / scale
        a = np.zeros((2 * n, 6))
        a[0::2, 0] = 1 / sx
        a[0::2, 1] = tau / sx
        a[0::2, 2] = tau * tau / sx
        a[1::2, 3] = 1 / se
        a[1::2, 4] = tau / se
        a[1::2, 5] = tau * tau / se
        b = np.empty(2 * n)
        b[0::2] = xi / sx
        b[1::2] = eta / se
        t0 = time.perf_counter()
        c, _, rank, sv = np.linalg.lstsq(a, b, rcond=None)
        lstsq_times.append(time.perf_counter() - t0)
        return c, rank, sv

    wall, cpu, (c, rank, sv) = timed(reps, solve)
    emit("fit-poly2", n, wall, cpu, rss_import, params=[float(v) for v in c],
         lstsq_median_s=median(lstsq_times), rank=int(rank), cond=float(sv[0] / sv[-1]),
         blas=blas_info(), numpy=np.__version__,
         note="build the weighted 2n x 6 design, then numpy.linalg.lstsq (LAPACK gelsd)")


def read_spec(prefix):
    with open(prefix + ".spec.json") as f:
        return json.load(f)


def cmd_ephem(prefix, reps):
    import numpy as np
    import ephem
    rss_import = maxrss_kb()
    sp = read_spec(prefix)
    rows = sp["rows"]
    dublin = 2415020.0  # ephem.Date counts days from 1899 Dec 31 12h (JD 2415020.0)
    body = ephem.EllipticalBody()
    body._inc, body._Om, body._om = sp["i_deg"], sp["node_deg"], sp["peri_deg"]
    body._a, body._e, body._M = sp["a_au"], sp["e"], sp["m_deg"]
    # The epoch of M is a TT instant; libastro compares it with its own
    # ephemeris time (UT + its delta T), so it is given as is.
    body._epoch_M = ephem.Date(sp["epoch_tt"] - dublin)
    body._epoch = ephem.Date("2000/1/1 12:00")  # equinox J2000 of the elements
    body._H, body._G = sp["h"], sp["g"]
    d0, step = sp["from_jd_utc"] - dublin, sp["step_days"]
    ra, dec = np.empty(rows), np.empty(rows)

    def table():
        for k in range(rows):
            body.compute(d0 + k * step)  # UTC; a_ra, a_dec: astrometric geocentric, J2000
            ra[k], dec[k] = body.a_ra, body.a_dec

    wall, cpu, _ = timed(reps, table)
    np.concatenate([np.degrees(ra), np.degrees(dec)]).astype("<f8").tofile(prefix + ".peer.f64")
    emit("elements-table", rows, wall, cpu, rss_import, ephem=ephem.__version__,
         note="ephem.EllipticalBody.compute(date) per row, geocentric; a_ra, a_dec")


def cmd_sunmoon(prefix, reps):
    import numpy as np
    from astropy.utils import iers
    import astropy.utils.data
    iers.conf.auto_download = False
    iers.conf.auto_max_age = None
    astropy.utils.data.conf.allow_internet = False
    import astropy
    from astropy.time import Time
    from astropy.coordinates import get_body, solar_system_ephemeris
    solar_system_ephemeris.set("builtin")
    warnings.simplefilter("ignore")  # ERFA's "dubious year" past its leap-second table
    rss_import = maxrss_kb()
    sp = read_spec(prefix)
    rows = sp["rows"]
    jd1 = np.full(rows, sp["from_jd_utc"])
    jd2 = np.arange(rows) * sp["step_days"]

    def tables():
        t = Time(jd1, jd2, format="jd", scale="utc")  # new each time: no cached conversions
        out = []
        for name in ("sun", "moon"):
            c = get_body(name, t)  # GCRS: light time, aberration, deflection
            out += [c.ra.deg, c.dec.deg]
        return out

    wall, cpu, out = timed(reps, tables)
    np.concatenate(out).astype("<f8").tofile(prefix + ".peer.f64")
    emit("sun-moon-tables", rows, wall, cpu, rss_import, astropy=astropy.__version__,
         note="astropy.coordinates.get_body('sun'|'moon', Time array), builtin ephemeris, geocentric GCRS")


def sep_arcsec(ra1, dec1, ra2, dec2):
    import numpy as np
    r1, d1, r2, d2 = (np.radians(x) for x in (ra1, dec1, ra2, dec2))
    x = np.cos(d1) * np.cos(d2) * np.sin(r1 - r2)
    y = np.cos(d2) * np.sin(d1) - np.sin(d2) * np.cos(d1) * np.cos(r1 - r2)
    z = np.sin(d2) * np.sin(d1) + np.cos(d2) * np.cos(d1) * np.cos(r1 - r2)
    return np.degrees(np.arctan2(np.hypot(x, y), z)) * 3600


def cmd_report(d):
    import numpy as np

    def load(name):
        with open(os.path.join(d, name)) as f:
            return json.load(f)

    def mem(r):
        return "%.0f MB" % (r["max_rss_kb"] / 1024)

    lines = []
    head = "| comparison | arcfit wall (CPU) | peer wall (CPU) | ratio peer/arcfit, wall (CPU) | arcfit peak RSS | peer peak RSS | agreement |"
    lines += [head, "|" + "---|" * 7]

    def row(label, g, p, agree, pt=None, pc=None):
        pt = p["median_s"] if pt is None else pt
        pc = p["cpu_median_s"] if pc is None else pc
        lines.append("| %s | %s (%s) | %s (%s) | %.2f (%.2f) | %s | %s | %s |" % (
            label, fmt_s(g["median_s"]), fmt_s(g["cpu_median_s"]), fmt_s(pt), fmt_s(pc),
            pt / g["median_s"], pc / g["cpu_median_s"], mem(g), mem(p) + " (%.0f MB after imports)" % (p["rss_after_imports_kb"] / 1024),
            agree))

    notes = []
    for n in ("1000", "1000000"):
        g, p = load("go_fit_%s.json" % n), load("py_fit_%s.json" % n)
        gc, pc = np.array(g["params"]), np.array(p["params"])
        rel = float(np.max(np.abs(gc - pc) / np.abs(pc)))
        ok = "OK" if rel <= 1e-9 else "DIFFERENT"
        row("poly2 fit, %s obs (numpy: design + lstsq)" % f"{int(n):,}", g, p,
            "coefficients within %.1e relative (want 1e-9): %s" % (rel, ok))
        lines.append("| poly2 fit, %s obs (numpy: lstsq alone) | | %s | %.2f | | | |" % (
            f"{int(n):,}", fmt_s(p["lstsq_median_s"]), p["lstsq_median_s"] / g["median_s"]))
        notes.append("%s, %s" % (p["numpy"], p["blas"]))
    g, p = load("go_ephem.json"), load("py_ephem.json")
    rows = g["n"]
    ga = np.fromfile(os.path.join(d, "ephem.f64"), "<f8").reshape(2, rows)
    pa = np.fromfile(os.path.join(d, "ephem.peer.f64"), "<f8").reshape(2, rows)
    s = sep_arcsec(ga[0], ga[1], pa[0], pa[1])
    ok = "OK" if s.max() <= 1.0 else "DIFFERENT"
    row("element-set table, %s rows (python3-ephem %s)" % (f"{rows:,}", p["ephem"]), g, p,
        "astrometric RA/Dec: median %.3f″, worst %.3f″ (want ≤ 1″, the peer's precision): %s" % (np.median(s), s.max(), ok))
    g, p = load("go_sunmoon.json"), load("py_sunmoon.json")
    rows = g["n"]
    ga = np.fromfile(os.path.join(d, "sunmoon.f64"), "<f8").reshape(8, rows)
    pa = np.fromfile(os.path.join(d, "sunmoon.peer.f64"), "<f8").reshape(4, rows)
    ss = sep_arcsec(ga[2], ga[3], pa[0], pa[1])
    sm = sep_arcsec(ga[6], ga[7], pa[2], pa[3])
    # Wants: "a few arcseconds" for both (the Moon series of arcfit, Meeus
    # ch. 47, is good to about 10″; its Sun to 0.05″ of ERFA's epv00). The
    # peer's Sun carries up to about 0.6″ of its own: astropy applies its
    # light-deflection step to the Sun's own light (against ERFA's
    # aberration alone, ab, arcfit's apparent Sun agrees to 0.02″).
    ok = "OK" if ss.max() <= 3.0 and sm.max() <= 10.0 else "DIFFERENT"
    row("Sun + Moon tables, %s instants each (astropy %s get_body)" % (f"{rows:,}", p["astropy"]), g, p,
        "GCRS RA/Dec: Sun median %.3f″, worst %.3f″ (want ≤ 3″), Moon median %.3f″, worst %.3f″ (want ≤ 10″): %s" % (
            np.median(ss), ss.max(), np.median(sm), sm.max(), ok))
    print("\n".join(lines))
    print()
    print("ratio: the peer's median time over arcfit's (above 1: arcfit is faster); wall = elapsed time of the")
    print("computation alone, CPU = process CPU time of the same repetitions (all threads); inputs, start-up")
    print("and imports excluded on both sides. arcfit's table runs %d worker(s); numpy: %s." % (g["workers"], notes[-1]))


def fmt_s(v):
    if v < 1e-3:
        return "%.0f µs" % (v * 1e6)
    if v < 1:
        return "%.1f ms" % (v * 1e3)
    return "%.2f s" % v


def main():
    a = sys.argv[1:]
    if len(a) == 3 and a[0] in ("fit", "ephem", "sunmoon"):
        {"fit": cmd_fit, "ephem": cmd_ephem, "sunmoon": cmd_sunmoon}[a[0]](a[1], int(a[2]))
    elif len(a) == 2 and a[0] == "report":
        cmd_report(a[1])
    else:
        sys.exit(__doc__)


if __name__ == "__main__":
    main()
