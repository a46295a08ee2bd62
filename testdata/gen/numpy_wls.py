#!/usr/bin/python3
"""Weighted least-squares reference solutions for arcfit's sky-plane motion
models (package fit).

Run from the repository root:  /usr/bin/python3 testdata/gen/numpy_wls.py
It writes testdata/wls_reference.txt. Needs Debian's python3-numpy; no network.
The inputs come from numpy's default_rng with a fixed seed, so a re-run gives
a byte-identical file.

Each problem is an invented tangent-plane track: points with a time T (days
from the reference epoch), observed standard coordinates xi, eta (radians), the
1-sigma of each (radians), the correlation of the two errors, and the site's
geocentric position dotted with the plane's xi and eta axes (au). The model,
agreed for package fit (issue "Sky-plane motion models"), is

    xi_obs(T)  = sum_k a_k b_k(tau) - u * site_xi
    eta_obs(T) = sum_k c_k b_k(tau) - u * site_eta,       tau = T / timescale

with the basis b = 1, tau, tau^2, ... tau^degree for a polynomial and
b = 1, tau, max(0, tau - kappa_j) with kappa_j = knot_j / timescale for the
continuous piecewise-linear model, and u the inverse distance (au^-1) as one
more parameter when the parallax is fitted ("fit"), a given constant when it
is fixed ("fixed", the term moved to the observations' side), absent when it
is off ("off"). Parameter order: the xi coefficients, the eta coefficients, u.

The solution is computed independently of the Go code:
  * whitening: each point's 2x2 covariance C = [[sx^2, r sx sy], [r sx sy,
    sy^2]] is whitened with its symmetric inverse square root C^(-1/2) from
    numpy.linalg.eigh (the Go code may use a Cholesky factor instead; any S
    with S^T S = C^-1 gives the same solution, covariance, chi^2 and
    singular values, since the two differ by an orthogonal 2x2 per point);
  * solution: numpy.linalg.lstsq on the whitened design (LAPACK gelsd, SVD);
  * covariance: V diag(1/s^2) V^T from numpy.linalg.svd of the whitened
    design (the unscaled (A^T W A)^-1, never by inverting normal equations);
  * condition number: s_max / s_min of the whitened design, and of the same
    design with its columns scaled to unit 2-norm (equilibrated);
  * predictions: the geocentric track (xi, eta at T with u = 0) at a few times
    and its 2x2 covariance J Cov J^T, which do not depend on how the model is
    parameterised.
The problems are made with noise at 0.6 of the stated sigma, so chi^2/dof is
well below 1 and no covariance scaling is involved.
"""
import os
import sys

import numpy as np

SEED = 20270207
HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.normpath(os.path.join(HERE, ".."))
CMD = "/usr/bin/python3 testdata/gen/numpy_wls.py"
ARCSEC = np.pi / (180 * 3600)
EARTH_RADIUS_AU = 6378.137 / 149597870.7  # WGS84 equatorial radius, IAU 2012 au


def g(x):
    return repr(float(x))


def basis(model, degree, knots, tau, ts):
    if model == "piecewise":
        b = [1.0, tau] + [max(0.0, tau - k / ts) for k in knots]
    else:
        b = [tau ** k for k in range(degree + 1)]
    return np.array(b)


def invented_points(rng, nights, per_night, sites, dec0, corr):
    """Invented observation times and site vectors: per_night points on each
    night, spread over about 3 hours, from the invented sites (east
    longitude, geocentric latitude, in degrees) in turn."""
    pts = []
    for n, t0 in enumerate(nights):
        for j in range(per_night):
            site = sites[j % len(sites)]
            t = t0 + 0.125 * j / max(1, per_night - 1) + rng.uniform(-0.004, 0.004)
            # hour angle of the tangent point seen from the site: sidereal
            # rotation plus the site's longitude (an invented phase)
            h = 2 * np.pi * 1.00273781 * t + np.radians(site[0]) - 0.3
            lat = np.radians(site[1])
            r = EARTH_RADIUS_AU * 0.998
            # the site vector in the frame of the tangent point: east (xi)
            # and north (eta) components of the geocentric site position
            sxi = -r * np.cos(lat) * np.sin(h)
            seta = r * (np.sin(lat) * np.cos(dec0) - np.cos(lat) * np.sin(dec0) * np.cos(h))
            sx = rng.uniform(0.3, 1.5) * ARCSEC
            sy = rng.uniform(0.3, 1.5) * ARCSEC
            rho = rng.uniform(-0.4, 0.4) if corr else 0.0
            pts.append([t, sx, sy, rho, sxi, seta, n, j % len(sites)])
    return pts


def whitener(sx, sy, rho):
    c = np.array([[sx * sx, rho * sx * sy], [rho * sx * sy, sy * sy]])
    w, v = np.linalg.eigh(c)
    return v @ np.diag(1 / np.sqrt(w)) @ v.T


def solve(prob, rng):
    model, degree, knots, ts = prob["model"], prob["degree"], prob["knots"], prob["timescale"]
    par = prob["parallax"]
    pts = prob["points"]
    nb = len(basis(model, degree, knots, 0.0, ts))
    npar = 2 * nb + (1 if par == "fit" else 0)
    ua, ue = prob["truth_xi"], prob["truth_eta"]
    u_true = prob["u_true"]
    rows, rhs = [], []
    obs = []
    for (t, sx, sy, rho, sxi, seta, n, k) in pts:
        tau = t / ts
        b = basis(model, degree, knots, tau, ts)
        xi = float(np.dot(ua, b)) - u_true * sxi
        eta = float(np.dot(ue, b)) - u_true * seta
        # noise at 0.6 sigma with the stated correlation
        c = np.array([[sx * sx, rho * sx * sy], [rho * sx * sy, sy * sy]])
        e = np.linalg.cholesky(c) @ rng.standard_normal(2) * 0.6
        xi += e[0]
        eta += e[1]
        obs.append((xi, eta))
        ax = np.zeros(npar)
        ay = np.zeros(npar)
        ax[:nb] = b
        ay[nb:2 * nb] = b
        yx, yy = xi, eta
        if par == "fit":
            ax[-1] = -sxi
            ay[-1] = -seta
        elif par == "fixed":
            yx += prob["u_fixed"] * sxi
            yy += prob["u_fixed"] * seta
        s = whitener(sx, sy, rho)
        a2 = s @ np.vstack([ax, ay])
        y2 = s @ np.array([yx, yy])
        rows.extend(a2)
        rhs.extend(y2)
    a = np.array(rows)
    y = np.array(rhs)
    x, _, rank, sv = np.linalg.lstsq(a, y, rcond=None)
    assert rank == npar, "rank-deficient problem " + prob["name"]
    _, s, vt = np.linalg.svd(a, full_matrices=False)
    cov = vt.T @ np.diag(1 / s ** 2) @ vt
    # the same design with its columns scaled to unit 2-norm (equilibrated)
    se = np.linalg.svd(a / np.linalg.norm(a, axis=0), compute_uv=False)
    r = y - a @ x
    chi2 = float(r @ r)
    dof = a.shape[0] - npar
    preds = []
    for t in prob["pred_times"]:
        b = basis(model, degree, knots, t / ts, ts)
        j = np.zeros((2, npar))
        j[0, :nb] = b
        j[1, nb:2 * nb] = b
        p = j @ x
        pc = j @ cov @ j.T
        preds.append((t, p[0], p[1], pc[0, 0], pc[0, 1], pc[1, 1]))
    return obs, x, cov, chi2, dof, (s[0] / s[-1], se[0] / se[-1]), preds


def problems(rng):
    probs = []
    dec0 = np.radians(23.0)
    # 1: straight motion, one night, geocentric (site vectors zero), no parallax
    sites = [(0.0, 0.0)]
    pts = invented_points(rng, [0.0], 9, sites, dec0, False)
    for p in pts:
        p[4] = p[5] = 0.0
        p[0] -= 0.06
    probs.append(dict(name="poly1_geocentric", model="poly", degree=1, knots=[],
                      timescale=0.0625, parallax="off", u_true=0.0, points=pts, sites=sites,
                      truth_xi=[1.2e-4, 2.1e-4], truth_eta=[-3.0e-5, -6.4e-5],
                      pred_times=[-0.2, 0.0, 0.9]))
    # 2: quadratic, three nights, two sites, correlated errors, parallax fitted
    sites = [(-101.5, 42.1), (2.9, 43.9)]
    pts = invented_points(rng, [-2.0, -0.05, 1.9], 8, sites, dec0, True)
    probs.append(dict(name="poly2_two_sites", model="poly", degree=2, knots=[],
                      timescale=2.0, parallax="fit", u_true=0.78, points=pts, sites=sites,
                      truth_xi=[2.0e-4, -6.9e-3, 4.1e-5], truth_eta=[-1.1e-4, -2.3e-3, -2.2e-5],
                      pred_times=[-2.5, 0.0, 3.05, 5.0]))
    # 3: cubic, four nights, three sites, parallax fitted
    sites = [(-70.3, -30.2), (116.6, 31.5), (15.0, 47.0)]
    pts = invented_points(rng, [-3.0, -1.05, 1.0, 2.95], 8, sites, np.radians(-12.0), True)
    probs.append(dict(name="poly3_three_sites", model="poly", degree=3, knots=[],
                      timescale=3.0, parallax="fit", u_true=2.4, points=pts, sites=sites,
                      truth_xi=[-3.0e-4, 1.05e-2, 2.0e-4, -1.5e-5],
                      truth_eta=[5.0e-4, 4.4e-3, -9.0e-5, 6.0e-6],
                      pred_times=[-3.5, 0.5, 4.0]))
    # 4: continuous piecewise-linear with two knots, two sites, parallax fitted
    sites = [(-101.5, 42.1), (2.9, 43.9)]
    pts = invented_points(rng, [-2.0, 0.0, 2.0], 8, sites, dec0, True)
    probs.append(dict(name="piecewise_two_knots", model="piecewise", degree=1, knots=[-1.0, 1.0],
                      timescale=2.0, parallax="fit", u_true=0.6, points=pts, sites=sites,
                      truth_xi=[1.0e-4, -7.0e-3, 3.0e-4, 2.0e-4],
                      truth_eta=[-2.0e-4, -2.5e-3, -1.0e-4, 1.5e-4],
                      pred_times=[-1.5, 0.5, 3.1]))
    # 5: quadratic with the inverse distance given (fixed), correlated errors
    sites = [(-101.5, 42.1), (2.9, 43.9)]
    pts = invented_points(rng, [-1.0, 0.0, 1.0], 6, sites, dec0, True)
    probs.append(dict(name="poly2_fixed_distance", model="poly", degree=2, knots=[],
                      timescale=1.0, parallax="fixed", u_fixed=0.8, u_true=0.8, points=pts, sites=sites,
                      truth_xi=[0.0, 4.0e-3, -3.0e-5], truth_eta=[0.0, 1.0e-3, 1.2e-5],
                      pred_times=[-1.2, 2.0]))
    return probs


def main():
    rng = np.random.default_rng(SEED)
    path = os.path.join(OUT, "wls_reference.txt")
    with open(path, "w") as f:
        f.write("# Weighted least-squares reference solutions (arcfit, package fit).\n")
        f.write("# generated by: %s\n" % CMD)
        f.write("# packages: numpy %s; python %s\n" % (np.__version__, sys.version.split()[0]))
        f.write("# random inputs: numpy.random.default_rng(%d); invented tracks, no real object\n" % SEED)
        f.write("# method (see the script's docstring): whitening by each point's C^(-1/2)\n")
        f.write("#   (numpy.linalg.eigh); solution numpy.linalg.lstsq (LAPACK gelsd);\n")
        f.write("#   covariance V diag(1/s^2) V^T from numpy.linalg.svd of the whitened design\n")
        f.write("#   (unscaled); cond = s_max/s_min of the whitened design, cond_equilibrated the\n")
        f.write("#   same after scaling its columns to unit 2-norm; chi2 of the whitened residuals,\n")
        f.write("#   dof = 2n - p.\n")
        f.write("# model: xi_obs = sum a_k b_k(tau) - u site_xi, eta_obs = sum c_k b_k(tau) - u site_eta,\n")
        f.write("#   tau = t_days / timescale_days; poly basis tau^k, k = 0..degree; piecewise basis\n")
        f.write("#   1, tau, max(0, tau - knot/timescale); params: a..., c..., u (when parallax = fit);\n")
        f.write("#   parallax = fixed: u = u_fixed given, not fitted; off: no term.\n")
        f.write("# units: t in days from the reference epoch; xi, eta, sigmas radians; site_xi,\n")
        f.write("#   site_eta au; u au^-1; covariances radians^2 (params in their own units).\n")
        f.write("# records (one per line, space-separated):\n")
        f.write("#   problem NAME model poly|piecewise degree D knots K1,K2|- timescale DAYS parallax fit|fixed|off u_fixed U\n")
        f.write("#   site NAME lon_deg lat_deg   (an invented site: east longitude, geocentric latitude)\n")
        f.write("#   point t xi eta sigma_xi sigma_eta corr site_xi site_eta night site\n")
        f.write("#   param I VALUE          (I from 0)\n")
        f.write("#   cov I J VALUE          (upper triangle, I <= J)\n")
        f.write("#   chi2 VALUE dof N cond VALUE cond_equilibrated VALUE\n")
        f.write("#   pred t xi eta cov_xixi cov_xieta cov_etaeta   (geocentric track, u = 0)\n")
        f.write("#   end\n")
        for prob in problems(rng):
            obs, x, cov, chi2, dof, cond, preds = solve(prob, rng)
            knots = ",".join(g(k) for k in prob["knots"]) or "-"
            f.write("problem %s model %s degree %d knots %s timescale %s parallax %s u_fixed %s\n"
                    % (prob["name"], prob["model"], prob["degree"], knots, g(prob["timescale"]),
                       prob["parallax"], g(prob.get("u_fixed", 0.0))))
            for k, (lon, lat) in enumerate(prob["sites"]):
                f.write("site S%d %s %s\n" % (k, g(lon), g(lat)))
            for (t, sx, sy, rho, sxi, seta, n, k), (xi, eta) in zip(prob["points"], obs):
                f.write("point %s %s %s %s %s %s %s %s %d S%d\n"
                        % (g(t), g(xi), g(eta), g(sx), g(sy), g(rho), g(sxi), g(seta), n, k))
            for i, v in enumerate(x):
                f.write("param %d %s\n" % (i, g(v)))
            for i in range(len(x)):
                for j in range(i, len(x)):
                    f.write("cov %d %d %s\n" % (i, j, g(cov[i, j])))
            f.write("chi2 %s dof %d cond %s cond_equilibrated %s\n" % (g(chi2), dof, g(cond[0]), g(cond[1])))
            for p in preds:
                f.write("pred %s\n" % " ".join(g(v) for v in p))
            f.write("end\n")
    print("wrote", path)


if __name__ == "__main__":
    main()
