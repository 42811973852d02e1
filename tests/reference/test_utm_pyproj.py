#!/usr/bin/python3
"""geomath/geodesy (WGS84 <-> UTM through GeographicLib) against PROJ (pyproj).

Outside references:
  - PROJ through pyproj: EPSG:326zz (UTM north) and EPSG:327zz (UTM south),
    forward and inverse; agreement within 1 mm.
  - pyproj.Geod (geodesics on WGS84) and finite differences of the PROJ
    projection for the meridian convergence and point scale factor.
  - UTM zone rules (NGA / DMA TM 8358.2: 6-degree zones from 180W, with the
    Norway 32V and Svalbard 31X/33X/35X/37X exceptions; value from memory),
    computed here independently of GeographicLib.
  - `cairn fit` on lat/lon points laid out with geodesics on a known plane must
    give that plane against true north (hand-built; PROJ for the layout).
Args: --cairn PATH --tools DIR --source DIR (unknown ones ignored).
"""
import json
import math
import os
import subprocess
import sys
import tempfile

import numpy as np
from pyproj import Geod, Transformer

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from refcheck import Tally, parse_args  # noqa: E402

args = parse_args(required=("cairn", "tools"))
probe = os.path.join(args.tools, "geo_probe")
tally = Tally("test_utm_pyproj")
check = tally.check


def run_probe(lines, *opts):
    r = subprocess.run([probe, *opts], input="".join(l + "\n" for l in lines), capture_output=True, text=True)
    if r.returncode != 0:
        raise SystemExit("geo_probe failed: " + r.stderr)
    return r.stdout.splitlines()


def expected_zone(lat, lon):
    """UTM zone by the published rules, written out here (not GeographicLib's)."""
    if lon == 180:
        lon = -180
    zone = int(math.floor((lon + 180) / 6)) + 1
    if 56 <= lat < 64 and 3 <= lon < 12:
        zone = 32  # Norway
    if 72 <= lat < 84 and 0 <= lon < 42:  # Svalbard
        if lon < 9:
            zone = 31
        elif lon < 21:
            zone = 33
        elif lon < 33:
            zone = 35
        else:
            zone = 37
    return zone


_transformers = {}


def proj_utm(zone, north):
    key = (zone, north)
    if key not in _transformers:
        epsg = (32600 if north else 32700) + zone
        _transformers[key] = Transformer.from_crs("EPSG:4326", "EPSG:%d" % epsg, always_xy=True)
    return _transformers[key]


# --- forward against PROJ, several zones and both hemispheres -----------------
points = [
    (46.5, 7.1), (51.4778, -0.0015), (-33.9, 18.4), (35.68, 139.77), (-41.3, 174.8),
    (0.0001, -78.5), (-0.0001, -78.5), (64.1, -21.9), (-54.8, -68.3), (19.4, -99.1),
    (83.9, 10.0), (-79.9, 100.0), (60.0, 5.0), (61.0, 3.5), (78.2, 15.6), (74.0, 25.0),
    (71.0, 40.0), (-23.5, 179.99), (12.0, -179.99), (45.0, 2.9999), (45.0, 3.0),
]
out = run_probe(["%.10f %.10f" % p for p in points])
check(len(out) == len(points), "one answer per point")
for (lat, lon), line in zip(points, out):
    parts = line.split()
    if parts[0] == "error:":
        check(False, "%.4f %.4f converts (%s)" % (lat, lon, line))
        continue
    zone, hemi, e, n = int(parts[0]), parts[1], float(parts[2]), float(parts[3])
    check(zone == expected_zone(lat, lon), "%.4f %.4f: zone %d vs rule %d" % (lat, lon, zone, expected_zone(lat, lon)))
    check(hemi == ("N" if lat >= 0 else "S"), "%.4f %.4f: hemisphere" % (lat, lon))
    pe, pn = proj_utm(zone, hemi == "N").transform(lon, lat)
    check(abs(e - pe) < 1e-3 and abs(n - pn) < 1e-3,
          "%.4f %.4f: %.4f %.4f vs PROJ %.4f %.4f (1 mm)" % (lat, lon, e, n, pe, pn))
print("checked %d points against PROJ EPSG:326xx/327xx" % len(points))

# --- forced zone and hemisphere (a neighbouring zone; northing continued across the equator) ---
forced = [((46.5, 7.1), "31N"), ((46.5, 12.5), "32N"), ((-0.5, 30.0), "36N"), ((0.5, 30.0), "36S"), ((60.0, 5.0), "31N")]
for (lat, lon), spec in forced:
    line = run_probe(["%.10f %.10f" % (lat, lon)], "--zone", spec)[0]
    parts = line.split()
    zone, north = int(spec[:-1]), spec[-1] == "N"
    pe, pn = proj_utm(zone, north).transform(lon, lat)
    ok = parts[0] != "error:" and int(parts[0]) == zone and abs(float(parts[2]) - pe) < 1e-3 and abs(float(parts[3]) - pn) < 1e-3
    check(ok, "%.2f %.2f forced into %s: %s vs PROJ %.4f %.4f" % (lat, lon, spec, line, pe, pn))

# --- inverse against PROJ, and round trip ---------------------------------------
inv_lines = []
for (lat, lon), line in zip(points, out):
    p = line.split()
    inv_lines.append("%s %s %s %s" % (p[0], p[1], p[2], p[3]))
back = run_probe(inv_lines, "--inverse")
for (lat, lon), fwd, line in zip(points, inv_lines, back):
    blat, blon = map(float, line.split())
    # Round trip through the printed (1 micrometre) grid coordinates: within 1e-9 degrees.
    dlon = (blon - lon + 180) % 360 - 180
    check(abs(blat - lat) < 1e-9 and abs(dlon) < 1e-9, "round trip %.4f %.4f -> %.10f %.10f" % (lat, lon, blat, blon))
    z, h, e, n = fwd.split()
    plon, plat = proj_utm(int(z), h == "N").transform(float(e), float(n), direction="INVERSE")
    # 1e-8 degrees is about 1 mm.
    check(abs(plat - blat) < 1e-8 and abs(((plon - blon + 180) % 360) - 180) < 1e-8,
          "inverse of %s vs PROJ" % fwd)

# --- convergence and scale factor against PROJ finite differences and geodesics ---
geod = Geod(ellps="WGS84")
fac_points = [(61.0, 7.5), (46.5, 7.1), (-33.9, 18.4), (10.0, -75.0), (70.0, 29.5)]
fac = run_probe(["%.10f %.10f" % p for p in fac_points], "--factors")
for (lat, lon), line in zip(fac_points, fac):
    z, h, gamma, k = line.split()
    tr = proj_utm(int(z), h == "N")
    # Grid azimuth of true north: project a short geodesic north (central difference).
    lon1, lat1, _ = geod.fwd(lon, lat, 0.0, -5.0)
    lon2, lat2, _ = geod.fwd(lon, lat, 0.0, 5.0)
    e1, n1 = tr.transform(lon1, lat1)
    e2, n2 = tr.transform(lon2, lat2)
    true_north_in_grid = math.degrees(math.atan2(e2 - e1, n2 - n1))
    # Grid north lies `gamma` clockwise from true north, so true north lies at -gamma in the grid.
    check(abs(float(gamma) + true_north_in_grid) < 1e-6,
          "%.2f %.2f: convergence %s vs PROJ %.8f" % (lat, lon, gamma, -true_north_in_grid))
    k_ref = math.hypot(e2 - e1, n2 - n1) / 10.0
    check(abs(float(k) - k_ref) < 1e-8, "%.2f %.2f: scale %s vs PROJ/geodesic %.10f" % (lat, lon, k, k_ref))

# --- refusals, each naming what is wrong -------------------------------------------
bad = run_probe(["85 10", "-80.5 10", "46 200", "nan 10", "-91 0"])
check("outside UTM's range" in bad[0] and "85" in bad[0], "lat 85 refused: " + bad[0])
check("outside UTM's range" in bad[1], "lat -80.5 refused: " + bad[1])
check("longitude 200" in bad[2], "lon 200 refused: " + bad[2])
check("not a finite number" in bad[3], "NaN refused: " + bad[3])
check("outside -90..90" in bad[4], "lat -91 refused: " + bad[4])
far = run_probe(["46.5 7.1"], "--zone", "45N")[0]
check(far.startswith("error:") and "zone 45" in far, "a zone far away refused: " + far)
inv_bad = run_probe(["61 N 500000 5000000", "33 N -5000 5000000"], "--inverse")
check(inv_bad[0].startswith("error:") and "outside 1..60" in inv_bad[0], "zone 61 refused: " + inv_bad[0])
check(inv_bad[1].startswith("error:"), "easting -5000 refused: " + inv_bad[1])

# --- zone chosen from a set: the zone of the mean position -------------------------
check(run_probe(["59.0 8.0", "61.0 10.0"], "--set")[0] == "32 N", "set around 60N 9E: zone 32 (Norway rule)")
check(run_probe(["-10.0 179.5", "-10.2 -179.9"], "--set")[0] == "60 S", "set across the antimeridian: zone 60 S")
check(run_probe(["-0.2 20.0", "0.1 20.0"], "--set")[0] == "34 S", "set across the equator: hemisphere of the mean")

# --- cairn fit on lat/lon points: a known plane against true north ------------------
# Points laid out on the ground with geodesics (pyproj) around 61N 7.5E, where
# the grid of zone 32 is rotated about -1.3 degrees from true north.
lat0, lon0 = 61.0, 7.5
dipdir, dip = 140.0, 25.0
rng = np.random.default_rng(11)
rows = []
for _ in range(12):
    east, north = rng.uniform(-250, 250, 2)
    az = math.degrees(math.atan2(east, north))
    dist = math.hypot(east, north)
    lo, la, _ = geod.fwd(lon0, lat0, az, dist)
    along = east * math.sin(math.radians(dipdir)) + north * math.cos(math.radians(dipdir))
    rows.append((la, lo, 900.0 - math.tan(math.radians(dip)) * along))
tmp = tempfile.mkdtemp(prefix="cairn-utm-pyproj-")
csv = os.path.join(tmp, "latlon.csv")
with open(csv, "w") as f:
    f.write("lat,lon,elevation\n")
    for la, lo, z in rows:
        f.write("%.10f,%.10f,%.4f\n" % (la, lo, z))
r = subprocess.run([args.cairn, "fit", csv, "--json"], capture_output=True, text=True)
check(r.returncode == 0, "cairn fit on lat/lon points: exit 0 (%s)" % r.stderr.strip())
if r.returncode == 0:
    j = json.loads(r.stdout)
    check(j["utm"] is not None and j["utm"]["zone"] == 32 and j["utm"]["hemisphere"] == "N",
          "zone 32N chosen from the data (Norway rule)")
    check(j["north"] == "true", "azimuths reported against true north")
    # Hand-built plane: a 500 m patch on the ellipsoid departs from a plane by
    # millimetres (earth curvature, r^2/2R), so 0.01 degree is ample.
    check(abs(j["dip"] - dip) < 0.01, "lat/lon fit: dip %.5f vs built %.1f" % (j["dip"], dip))
    dd = (j["dip_direction"] - dipdir + 180) % 360 - 180
    check(abs(dd) < 0.01, "lat/lon fit: dip direction %.5f vs built %.1f (true north)" % (j["dip_direction"], dipdir))
    # Independent recomputation: PROJ-projected points, numpy SVD, then the grid
    # normal rotated by PROJ's convergence and scaled by its scale factor.
    tr = proj_utm(32, True)
    xyz = np.array([(*tr.transform(lo, la), z) for la, lo, z in
                    [(float(a), float(b), float(c)) for a, b, c in
                     (l.split(",") for l in open(csv).read().splitlines()[1:])]])
    c = xyz.mean(axis=0)
    n = np.linalg.svd(xyz - c)[2][2]
    n = n if n[2] > 0 else -n
    clon, clat = tr.transform(c[0], c[1], direction="INVERSE")
    lon1, lat1, _ = geod.fwd(clon, clat, 0.0, -5.0)
    lon2, lat2, _ = geod.fwd(clon, clat, 0.0, 5.0)
    e1, n1 = tr.transform(lon1, lat1)
    e2, n2 = tr.transform(lon2, lat2)
    gamma = -math.degrees(math.atan2(e2 - e1, n2 - n1))
    k = math.hypot(e2 - e1, n2 - n1) / 10.0
    check(abs(j["utm"]["convergence"] - gamma) < 1e-6, "convergence at the centroid %.8f vs PROJ %.8f" % (j["utm"]["convergence"], gamma))
    tan_dip = k * math.hypot(n[0], n[1]) / n[2]
    ref_dip = math.degrees(math.atan(tan_dip))
    ref_dipdir = (math.degrees(math.atan2(n[0], n[1])) + gamma) % 360
    check(abs(j["dip"] - ref_dip) < 1e-6, "dip %.9f vs PROJ+numpy %.9f" % (j["dip"], ref_dip))
    check(abs((j["dip_direction"] - ref_dipdir + 180) % 360 - 180) < 1e-6,
          "dip direction %.9f vs PROJ+numpy %.9f" % (j["dip_direction"], ref_dipdir))

# --utm override, and its refusal for easting/northing input
r = subprocess.run([args.cairn, "fit", csv, "--json", "--utm", "31N"], capture_output=True, text=True)
check(r.returncode == 0 and json.loads(r.stdout)["utm"]["zone"] == 31, "--utm 31N overrides the zone")
if r.returncode == 0:
    j31 = json.loads(r.stdout)
    check(abs(j31["dip"] - dip) < 0.01 and abs((j31["dip_direction"] - dipdir + 180) % 360 - 180) < 0.01,
          "the same plane against true north from another zone's grid")
r = subprocess.run([args.cairn, "fit", csv, "--utm", "99"], capture_output=True, text=True)
check(r.returncode != 0 and "99" in r.stderr, "--utm 99 refused: " + r.stderr.strip())
polar = os.path.join(tmp, "polar.csv")
with open(polar, "w") as f:
    f.write("lat,lon,elevation\n80,10,0\n84.5,10,0\n80,11,5\n")
r = subprocess.run([args.cairn, "fit", polar], capture_output=True, text=True)
check(r.returncode != 0 and (polar + ":3:") in r.stderr and "UTM" in r.stderr, "latitude 84.5 refused with its line: " + r.stderr.strip())

sys.exit(tally.finish())
