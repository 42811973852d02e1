#!/usr/bin/python3
"""Reference checks of the stereonet and orientation statistics against numpy and PROJ.

geomath's results come from tests/tools/net_probe; the expected values are computed
here, independently, with:
  - numpy.linalg.eigh for the orientation tensor T = (1/N) sum v v^T (Scheidegger 1965)
    and its eigenvalues and eigenvectors;
  - the closed-form definitions of Fisher (1953): R, k = (N-1)/(N-R),
    cos a95 = 1 - (N-R)/R ((1/p)^(1/(N-1)) - 1), p = 0.05, for axes taken in the sense of
    the principal eigenvector (common practice, no single published source);
  - Woodcock (1977): K = ln(l1/l2)/ln(l2/l3), C = ln(l1/l3);
  - PROJ (through pyproj) for the nets: the south polar aspect of the Lambert
    azimuthal equal-area (+proj=laea) and stereographic (+proj=stere) projections
    (Snyder 1987, USGS PP 1395), with the downward vertical as the south pole,
    longitude = trend, latitude = -plunge, and R chosen so the primitive has radius 1;
  - Kamb (1959) counting, A = 9/(N+9), counted with numpy.arccos.
"""
import argparse
import math
import subprocess
import sys

import numpy as np
import pyproj

FAILS = []


def check(ok, what):
    if not ok:
        FAILS.append(what)
        print("FAIL:", what)


def vectors(lines):
    t = np.radians(lines[:, 0])
    p = np.radians(lines[:, 1])
    return np.column_stack([np.sin(t) * np.cos(p), np.cos(t) * np.cos(p), -np.sin(p)])


def as_line(v):
    v = v / np.linalg.norm(v)
    if v[2] > 0:
        v = -v
    return (math.degrees(math.atan2(v[0], v[1])) % 360.0, math.degrees(math.asin(-v[2])))


def run(tools, args, lines):
    text = "".join("%.17g %.17g\n" % (t, p) for t, p in lines)
    out = subprocess.run([tools + "/net_probe"] + args, input=text, capture_output=True,
                         text=True, check=True).stdout
    rows = {}
    for row in out.splitlines():
        key, *vals = row.split()
        rows.setdefault(key, []).append([float(x) for x in vals])
    return rows


def angle(a, b):
    """Acute angle between two axes, degrees."""
    a = np.asarray(a, float) / np.linalg.norm(a)
    b = np.asarray(b, float) / np.linalg.norm(b)
    return math.degrees(math.atan2(np.linalg.norm(np.cross(a, b)), abs(np.dot(a, b))))


def line_angle(l1, l2):
    return angle(vectors(np.array([l1]))[0], vectors(np.array([l2]))[0])


def datasets(rng):
    """Invented data: clusters, a partial girdle, a spread; (trend, plunge) rows."""
    sets = {}
    # Cluster about an axis: a normal scatter of the direction, folded down.
    for name, mu, sd, n in [("cluster", (135.0, 40.0), 8.0, 60), ("near_horizontal", (80.0, 4.0), 6.0, 40)]:
        m = vectors(np.array([mu]))[0]
        v = m + np.radians(sd) * rng.standard_normal((n, 3))
        sets[name] = np.array([as_line(x) for x in v])
    # Poles around a fold axis plunging 25 towards 310.
    axis = vectors(np.array([(310.0, 25.0)]))[0]
    a = np.cross(axis, [0, 0, 1.0]); a /= np.linalg.norm(a)
    b = np.cross(axis, a)
    phi = np.radians(rng.uniform(-70, 70, 80))
    off = np.radians(rng.normal(0, 4, 80))
    g = (np.cos(off)[:, None] * (np.cos(phi)[:, None] * a + np.sin(phi)[:, None] * b)
         + np.sin(off)[:, None] * axis)
    sets["girdle"] = np.array([as_line(x) for x in g])
    sets["spread"] = np.column_stack([rng.uniform(0, 360, 50), np.degrees(np.arcsin(rng.uniform(0, 1, 50)))])
    return sets


def check_tensor(tools, name, lines):
    v = vectors(lines)
    T = v.T @ v / len(v)
    w, e = np.linalg.eigh(T)  # ascending
    w, e = w[::-1], e[:, ::-1]
    got = run(tools, ["tensor"], lines)
    lam = got["eigenvalues"][0]
    for i in range(3):
        check(abs(lam[i] - w[i]) < 1e-12, "%s: eigenvalue %d %r vs numpy %r" % (name, i + 1, lam[i], w[i]))
        vec = got["vector%d" % (i + 1)][0]
        check(vec[2] <= 0, "%s: eigenvector %d points down" % (name, i + 1))
        check(angle(vec, e[:, i]) < 1e-7, "%s: eigenvector %d off numpy by %g deg" % (name, i + 1, angle(vec, e[:, i])))
        ax = got["axis%d" % (i + 1)][0]
        check(angle(vectors(np.array([ax]))[0], e[:, i]) < 1e-7, "%s: axis %d as a line" % (name, i + 1))
    K = math.log(w[0] / w[1]) / math.log(w[1] / w[2])
    C = math.log(w[0] / w[2])
    k, c = got["woodcock"][0]
    check(abs(k - K) < 1e-9 * max(1, K), "%s: Woodcock K %r vs %r" % (name, k, K))
    check(abs(c - C) < 1e-9 * max(1, C), "%s: Woodcock C %r vs %r" % (name, c, C))
    return e


def check_fisher(tools, name, lines):
    v = vectors(lines)
    n = len(v)
    w, e = np.linalg.eigh(v.T @ v / n)
    e1 = e[:, 2]
    flipped = np.where((v @ e1)[:, None] < 0, -v, v)
    s = flipped.sum(axis=0)
    R = np.linalg.norm(s)
    kappa = (n - 1) / (n - R)
    cosa = 1 - (n - R) / R * ((1 / 0.05) ** (1 / (n - 1)) - 1)
    got = run(tools, ["fisher"], lines)
    check(got["n"][0][0] == n, "%s: Fisher N" % name)
    check(abs(got["resultant"][0][0] - R) < 1e-10, "%s: Fisher R %r vs %r" % (name, got["resultant"][0][0], R))
    check(abs(got["kappa"][0][0] / kappa - 1) < 1e-9, "%s: Fisher kappa %r vs %r" % (name, got["kappa"][0][0], kappa))
    if cosa >= -1:
        a95 = math.degrees(math.acos(cosa))
        check("alpha95" in got and abs(got["alpha95"][0][0] - a95) < 1e-8,
              "%s: alpha95 %r vs %r" % (name, got.get("alpha95"), a95))
    else:
        check("alpha95" not in got, "%s: alpha95 should be undefined" % name)
    check(angle(got["mean_vector"][0], s) < 1e-8, "%s: Fisher mean direction" % name)
    check(line_angle(got["mean"][0], as_line(s)) < 1e-8, "%s: Fisher mean line" % name)


def check_girdle(tools, name, lines, e):
    got = run(tools, ["girdle"], lines)
    beta = got["beta"][0]
    check(angle(vectors(np.array([beta]))[0], e[:, 2]) < 1e-7, "%s: beta is numpy's smallest eigenvector" % name)
    # Girdle as the plane whose pole is beta: dip = 90 - plunge, dip direction = trend + 180,
    # strike by the right-hand rule = dip direction - 90.
    strike, dip = got["girdle"][0]
    check(abs(dip - (90 - beta[1])) < 1e-7, "%s: girdle dip" % name)
    if dip > 1e-6:
        check(abs(((strike - (beta[0] + 90)) + 180) % 360 - 180) < 1e-7, "%s: girdle strike" % name)
    check(0 < got["beta_cone"][0][0] < 90, "%s: beta cone in range" % name)


def check_projection(tools, lines):
    for kind, proj in [("area", pyproj.Proj("+proj=laea +lat_0=-90 +lon_0=0 +R=%r" % (1 / math.sqrt(2)))),
                       ("angle", pyproj.Proj("+proj=stere +lat_0=-90 +lat_ts=-90 +lon_0=0 +R=0.5"))]:
        got = np.array(run(tools, ["project", kind], lines)["point"])
        x, y = proj(lines[:, 0], -lines[:, 1])
        err = np.max(np.hypot(got[:, 0] - x, got[:, 1] - y))
        check(err < 1e-9, "projection %s: max difference from PROJ %g" % (kind, err))
        # Horizontal lines land on the primitive.
        edge = np.array(run(tools, ["project", kind], np.array([[t, 0.0] for t in range(0, 360, 15)]))["point"])
        check(np.max(np.abs(np.hypot(edge[:, 0], edge[:, 1]) - 1)) < 1e-12, "projection %s: primitive radius" % kind)


def check_kamb(tools, lines, grid="15"):
    v = vectors(lines)
    n = len(v)
    for kind, method, a in [("area", "kamb", 9 / (n + 9)), ("angle", "percent", 0.01)]:
        got = run(tools, ["kamb", kind, method, grid], lines)
        theta = math.degrees(math.acos(1 - a))
        check(abs(got["cone"][0][0] - theta) < 1e-10, "kamb %s cone" % kind)
        nodes = np.array(got["node"])
        x, y = nodes[:, 2], nodes[:, 3]
        r = np.hypot(x, y)
        chi = 2 * np.arcsin(np.minimum(1, r / math.sqrt(2))) if kind == "area" else 2 * np.arctan(r)
        az = np.arctan2(x, y)
        d = np.column_stack([np.sin(chi) * np.sin(az), np.sin(chi) * np.cos(az), -np.cos(chi)])
        ang = np.degrees(np.arccos(np.clip(np.abs(d @ v.T), 0, 1)))
        counts = (ang <= theta).sum(axis=1)
        check(np.array_equal(counts, nodes[:, 4].astype(int)), "kamb %s %s counts vs numpy" % (kind, method))
        sigma = math.sqrt(n * a * (1 - a))
        want = counts / sigma if method == "kamb" else 100.0 * counts / n
        check(np.max(np.abs(want - nodes[:, 5])) < 1e-10, "kamb %s %s values" % (kind, method))


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--cairn")
    ap.add_argument("--tools", required=True)
    ap.add_argument("--source")
    ap.add_argument("--build")
    args = ap.parse_args()
    rng = np.random.default_rng(1959)
    sets = datasets(rng)
    for name, lines in sets.items():
        e = check_tensor(args.tools, name, lines)
        check_fisher(args.tools, name, lines)
        if name == "girdle":
            check_girdle(args.tools, name, lines, e)
    check_projection(args.tools, np.vstack(list(sets.values())))
    check_kamb(args.tools, sets["cluster"])
    # The Net's finer grid for few poles (121 nodes a side): every node's count against numpy.
    check_kamb(args.tools, sets["cluster"][:30], grid="121")
    if FAILS:
        print("%d reference checks failed" % len(FAILS))
        return 1
    print("all stereonet and statistics reference checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
