#!/usr/bin/python3
"""`cairn fit` against numpy as the independent reference for best-fit planes.

Outside references:
  - numpy.linalg.svd: the total-least-squares plane through centred points is
    spanned by the two largest right singular vectors; the normal is the third
    (Eckart-Young; the standard TLS construction). Normals must agree within
    1e-9 rad, dip and dip direction within 1e-6 degrees.
  - Fernández (2005, J. Struct. Geol. 27, 855-858): M = ln(l1/l3),
    K = ln(l1/l2)/ln(l2/l3) from the normalised eigenvalues (l = s^2 / sum s^2).
  - Strike-line fact of the trade (common practice): strike lines 100 m apart in
    elevation and 538.5 m apart horizontally give a true dip of
    atan(100/538.5) = 10.52 degrees.
Args: --cairn PATH --tools DIR --source DIR (unknown ones ignored).
"""
import json
import math
import os
import subprocess
import sys
import tempfile

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from refcheck import Tally, parse_args  # noqa: E402

args = parse_args(required=("cairn",))
tally = Tally("test_fit_numpy")
check = tally.check


def run_fit(path, *extra):
    return subprocess.run([args.cairn, "fit", path, *extra], capture_output=True, text=True)


def write_csv(path, header, rows, fmt="%.4f"):
    with open(path, "w") as f:
        f.write(",".join(header) + "\n")
        for r in rows:
            f.write(",".join(fmt % v for v in r) + "\n")


def read_csv_numbers(path):
    # Read back exactly the numbers written (the same decimal strings cairn parses).
    with open(path) as f:
        header = f.readline().strip().split(",")
        rows = [[float(x) for x in line.strip().split(",")] for line in f if line.strip()]
    return header, np.array(rows)


def svd_plane(xyz):
    """numpy reference: centroid, upward unit normal, normalised eigenvalues (descending)."""
    c = xyz.mean(axis=0)
    _, s, vt = np.linalg.svd(xyz - c)
    n = vt[2]
    if n[2] < 0:
        n = -n
    lam = s**2 / np.sum(s**2)
    return c, n, lam


def angle_between(a, b):
    return math.atan2(np.linalg.norm(np.cross(a, b)), abs(float(np.dot(a, b))))


def azdiff(a, b):
    d = (a - b) % 360.0
    return d - 360.0 if d > 180.0 else d


def dip_and_direction(n):
    dip = math.degrees(math.atan2(math.hypot(n[0], n[1]), n[2]))
    dipdir = math.degrees(math.atan2(n[0], n[1])) % 360.0
    return dip, dipdir


tmp = tempfile.mkdtemp(prefix="cairn-fit-numpy-")
rng = np.random.default_rng(20240501)

# --- random noisy planar point sets, several orientations --------------------
# (dip direction, dip, number of points, noise sigma in metres)
cases = [
    (30.0, 40.0, 12, 0.3),
    (200.0, 85.0, 20, 0.5),  # steep
    (300.0, 89.0, 15, 0.2),  # nearly vertical
    (110.0, 0.8, 25, 0.05),  # near-horizontal
    (45.0, 2.0, 9, 0.02),    # gentle
    (250.0, 60.0, 40, 1.5),
    (5.0, 25.0, 6, 0.1),
    (359.0, 15.0, 30, 0.8),
]
for k, (dipdir, dip, npts, sigma) in enumerate(cases):
    dd, dp = math.radians(dipdir), math.radians(dip)
    normal = np.array([math.sin(dd) * math.sin(dp), math.cos(dd) * math.sin(dp), math.cos(dp)])
    u = np.array([math.cos(dd), -math.sin(dd), 0.0])  # strike direction (horizontal)
    v = np.cross(normal, u)  # down-dip or up-dip in-plane direction
    origin = np.array([500000.0 + 1000 * k, 5200000.0 - 700 * k, 800.0])
    a = rng.uniform(-300, 300, npts)
    b = rng.uniform(-200, 200, npts)
    pts = origin + np.outer(a, u) + np.outer(b, v) + np.outer(rng.normal(0, sigma, npts), normal)
    path = os.path.join(tmp, "case%d.csv" % k)
    write_csv(path, ["easting", "northing", "elevation"], pts)
    _, xyz = read_csv_numbers(path)
    c_ref, n_ref, lam_ref = svd_plane(xyz)
    dip_ref, dipdir_ref = dip_and_direction(n_ref)

    r = run_fit(path, "--json")
    check(r.returncode == 0, "case %d: cairn fit exits 0 (%s)" % (k, r.stderr.strip()))
    if r.returncode != 0:
        continue
    j = json.loads(r.stdout)
    n = np.array(j["normal"])
    ang = angle_between(n / np.linalg.norm(n), n_ref)
    check(ang < 1e-9, "case %d: normal within 1e-9 rad of numpy svd (%.3g rad)" % (k, ang))
    check(abs(j["dip"] - dip_ref) < 1e-6, "case %d: dip %.9f vs numpy %.9f" % (k, j["dip"], dip_ref))
    check(abs(azdiff(j["dip_direction"], dipdir_ref)) < 1e-6,
          "case %d: dip direction %.9f vs numpy %.9f" % (k, j["dip_direction"], dipdir_ref))
    check(abs(azdiff(j["strike"], dipdir_ref - 90.0)) < 1e-6,
          "case %d: right-hand-rule strike = dip direction - 90" % k)
    # JSON numbers carry 12 significant digits: 1e-5 m at UTM northings.
    check(np.allclose(j["centroid"], c_ref, rtol=0, atol=1e-4), "case %d: centroid" % k)
    check(j["weighted"] is False and j["cone_source"] == "residuals",
          "case %d: unweighted fit, cone from the residuals" % k)
    # Residuals: signed distances along the upward normal.
    res_ref = (xyz - c_ref) @ n_ref
    res = np.array([p["residual"] for p in j["points"]])
    check(len(res) == npts, "case %d: %d points reported" % (k, npts))
    check(np.allclose(res, res_ref, rtol=0, atol=1e-6), "case %d: residuals match numpy" % k)
    check(abs(j["rms"] - math.sqrt(np.mean(res_ref**2))) < 1e-6, "case %d: rms" % k)
    worst = int(np.argmax(np.abs(res_ref)))
    check(j["worst"]["point"] == worst + 1, "case %d: worst point %d" % (k, worst + 1))
    # Fernández (2005) from numpy's singular values.
    lam = np.array(j["eigenvalues"])
    check(np.allclose(lam, lam_ref, rtol=1e-7, atol=1e-15), "case %d: normalised eigenvalues" % k)
    M_ref = math.log(lam_ref[0] / lam_ref[2])
    K_ref = math.log(lam_ref[0] / lam_ref[1]) / math.log(lam_ref[1] / lam_ref[2])
    check(abs(j["M"] - M_ref) < 1e-6 * max(1, abs(M_ref)), "case %d: M %.9g vs %.9g" % (k, j["M"], M_ref))
    check(abs(j["K"] - K_ref) < 1e-6 * max(1, abs(K_ref)), "case %d: K %.9g vs %.9g" % (k, j["K"], K_ref))
    check(j["cone95"] is not None and j["cone95"] > 0, "case %d: a 95%% cone is given" % k)
    check(isinstance(j["verdict"], str) and j["verdict"] != "", "case %d: a verdict" % k)
    # Strike-line spacing for the default 100 m interval: interval / tan(dip).
    check(abs(j["strike_line_spacing"] - 100.0 / math.tan(math.radians(dip_ref))) < 1e-6 * max(1, j["strike_line_spacing"]),
          "case %d: strike-line spacing" % k)
print("checked %d random planes against numpy.linalg.svd" % len(cases))

# --- the strike-line fact of the trade ----------------------------------------
strike = 35.0
s = np.array([math.sin(math.radians(strike)), math.cos(math.radians(strike)), 0])
d = np.array([math.sin(math.radians(strike + 90)), math.cos(math.radians(strike + 90)), 0])
o = np.array([402000.0, 6120000.0, 700.0])
four = [o, o + 420 * s, o + 538.5 * d + 80 * s + [0, 0, -100], o + 538.5 * d + 310 * s + [0, 0, -100]]
path = os.path.join(tmp, "strike_lines.csv")
write_csv(path, ["easting", "northing", "elevation"], four, fmt="%.6f")
r = run_fit(path, "--json", "--interval", "100")
check(r.returncode == 0, "strike-line example: exit 0")
if r.returncode == 0:
    j = json.loads(r.stdout)
    check(abs(j["dip"] - 10.52) < 0.01, "strike lines 100 m apart in elevation, 538.5 m horizontally: dip %.4f ~ 10.52" % j["dip"])
    check(abs(azdiff(j["strike"], strike)) < 0.1, "strike %.4f within 0.1 of the lines' 035" % j["strike"])
    check(abs(j["strike_line_spacing"] - 538.5) < 0.01, "spacing back to 538.5 m (%.4f)" % j["strike_line_spacing"])
r = run_fit(path)
check(r.returncode == 0 and "10.5" in r.stdout and "N35E" in r.stdout,
      "text report shows dip 10.5 and quadrant strike N35E")

# --- the bundled example: equal accuracies, so the weighted fit equals numpy's ---
if args.source:
    example = os.path.join(args.source, "demo_project", "examples", "strike_lines.csv")
    r = run_fit(example, "--json")
    check(r.returncode == 0, "bundled example fits")
    if r.returncode == 0:
        j = json.loads(r.stdout)
        header, data = read_csv_numbers(example)
        xyz = data[:, [header.index("easting"), header.index("northing"), header.index("elevation")]]
        _, n_ref, _ = svd_plane(xyz)
        n = np.array(j["normal"])
        check(angle_between(n, n_ref) < 1e-9, "bundled example: normal matches numpy (equal weights)")
        check(j["cone_source"] == "accuracies" and j["weighted"] is True, "bundled example: cone from accuracies")

# --- refusals -------------------------------------------------------------------
path = os.path.join(tmp, "collinear.csv")
write_csv(path, ["easting", "northing", "elevation"],
          [(500000 + 30 * i, 4000000 + 40 * i, 200 - 10 * i) for i in range(5)], fmt="%.1f")
r = run_fit(path, "--json")
check(r.returncode != 0, "collinear points: non-zero exit")
check("geometry too weak" in r.stderr and "collinear" in r.stderr, "collinear points: clear refusal (%s)" % r.stderr.strip())
check(r.stdout == "", "collinear points: nothing on stdout")

path = os.path.join(tmp, "two.csv")
write_csv(path, ["easting", "northing", "elevation"], [(0, 0, 0), (10, 0, 0)])
r = run_fit(path)
check(r.returncode != 0 and "at least 3" in r.stderr, "two points refused")

path = os.path.join(tmp, "unknown.csv")
with open(path, "w") as f:
    f.write("easting,northing,elevation,colour\n1,2,3,red\n")
r = run_fit(path)
check(r.returncode != 0 and "unknown column 'colour'" in r.stderr, "unknown column named: %s" % r.stderr.strip())

path = os.path.join(tmp, "bad.csv")
with open(path, "w") as f:
    f.write("easting,northing,elevation\n0,0,0\n10,0,1\n5,abc,2\n")
r = run_fit(path)
check(r.returncode != 0 and (path + ":4: column northing: 'abc' is not a number") in r.stderr,
      "bad value names FILE:LINE: column: %s" % r.stderr.strip())

sys.exit(tally.finish())
