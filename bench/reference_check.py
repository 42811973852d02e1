#!/usr/bin/python3
"""The numpy reference `cairn check` is timed against in bench/run (issue 16).

It does the core of the check on a season from bench/season.py, the way a
careful numpy script would: per contact, a total-least-squares plane through
the points (weighted by each point's precision along the normal, iterated;
Fernandez 2005, Jones et al. 2016), its 95% cone from 1 000 Monte Carlo
realisations of the points (a parametric bootstrap with the points' stated
accuracies), and every bedding reading's pole compared with the fitted pole
within the Rayleigh tolerance sqrt(s_r^2 + (cone95/k95)^2) * sqrt(-2 ln(1-c))
(Mardia & Jupp, Directional Statistics, 2000), c = 0.99 and a 3 degree
reading sigma, as geomath/crosscheck.cpp documents. Grid convergence and the
right-hand-rule diagnosis are left out: they cost nothing next to the cones.

Usage: reference_check.py SEASON_DIR
Prints the counts (contacts fitted, readings compared, readings outside the
tolerance) and the seconds taken. Debian's /usr/bin/python3 with numpy.
"""
import csv
import sys
import time

import numpy as np

DRAWS = 1000
SEED = 16
K95 = np.sqrt(-2.0 * np.log(0.05))
CONF = 0.99
READING_SIGMA = 3.0


def read_csv(path):
    with open(path, newline="") as f:
        return list(csv.DictReader(f))


def tls_normals(pts, w):
    """Normals (upward) of weighted TLS planes; pts (..., N, 3), w (..., N)."""
    ws = w.sum(axis=-1, keepdims=True)
    c = (pts * w[..., None]).sum(axis=-2) / ws
    d = pts - c[..., None, :]
    scatter = np.einsum("...ni,...nj->...ij", d * w[..., None], d)
    _, vecs = np.linalg.eigh(scatter)
    n = vecs[..., :, 0]
    n = np.where(n[..., 2:3] < 0, -n, n)
    return n, c


def fit(pts, h, v):
    """Weighted TLS fit, iterated on the weights (sigma_n depends on the normal)."""
    w = np.ones(len(pts))
    for _ in range(3):
        n, c = tls_normals(pts, w)
        sn2 = h * h * (n[0] ** 2 + n[1] ** 2) + v * v * n[2] ** 2
        w = 1.0 / sn2
    return n, c, w


def cone95(pts, h, v, w, n, rng):
    noise = rng.standard_normal((DRAWS, len(pts), 3))
    sig = np.stack([h, h, v], axis=1)
    sim = pts[None, :, :] + noise * sig[None, :, :]
    ns, _ = tls_normals(sim, np.broadcast_to(w, (DRAWS, len(pts))))
    ang = np.degrees(np.arccos(np.clip(np.abs(ns @ n), -1, 1)))
    return float(np.percentile(ang, 95))


def pole_of(strike, dip):
    """Upward normal (E, N, U) of a plane given by strike (RHR) and dip, degrees."""
    dd = np.radians(strike + 90.0)
    d = np.radians(dip)
    return np.stack([np.sin(dd) * np.sin(d), np.cos(dd) * np.sin(d), np.cos(d)], axis=-1)


def main():
    folder = sys.argv[1]
    t0 = time.perf_counter()
    points = read_csv(f"{folder}/points.csv")
    planes = read_csv(f"{folder}/planes.csv")
    by_contact = {}
    for p in points:
        by_contact.setdefault(p["contact"], []).append(
            (float(p["easting"]), float(p["northing"]), float(p["elevation"]), float(p["h_accuracy"]),
             float(p["v_accuracy"])))
    rng = np.random.default_rng(SEED)
    fits = {}
    for name, rows in by_contact.items():
        a = np.array(rows)
        pts = a[:, :3] - a[:, :3].mean(axis=0)
        n, _, w = fit(pts, a[:, 3], a[:, 4])
        fits[name] = (n, cone95(pts, a[:, 3], a[:, 4], w, n, rng))
    beds = [r for r in planes if r["kind"] in ("bedding", "contact") and r["contact"] in fits]
    strike = np.array([float(r["strike"]) for r in beds])
    dip = np.array([float(r["dip"]) for r in beds])
    poles = pole_of(strike, dip)
    fitted = np.array([fits[r["contact"]][0] for r in beds])
    cones = np.array([fits[r["contact"]][1] for r in beds])
    misfit = np.degrees(np.arccos(np.clip(np.abs((poles * fitted).sum(axis=1)), -1, 1)))
    tol = np.hypot(READING_SIGMA, cones / K95) * np.sqrt(-2.0 * np.log(1.0 - CONF))
    outside = int((misfit > tol).sum())
    dt = time.perf_counter() - t0
    print(f"{len(fits)} contacts fitted, {len(beds)} readings compared, {outside} outside the tolerance, "
          f"{dt:.3f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
