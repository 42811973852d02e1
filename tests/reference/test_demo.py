"""The demo field area: `cairn demo` builds it, and `cairn check` must find every
mistake planted in it with the right rule, and raise no flag on the clean readings.

The expected flags below are the scenario's own specification (demo_project/README.md):
which station and reading each planted mistake sits on, and which rule names it
(rule ids from the project's naming sheet). The fitted contacts must come back
within 2 degrees of the planes the scenario laid out. Counts are the issue's
"about 80 stations, 200 planar and 40 linear readings, 150 contact points"
(common practice, no published source).
"""
import json
import os
import shutil
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from refcheck import parse_args, Tally  # noqa: E402

args = parse_args(required=("cairn", "source"))
t = Tally("test_demo")


def run(*a):
    r = subprocess.run([args.cairn, *a], capture_output=True, text=True)
    if r.returncode != 0:
        print(r.stderr)
    return r


PLANTED = {
    ("reversed-dip", "RO-07", "RO-07a"),          # right-hand-rule slip
    ("declination-suspect", "MT-04", "MT-04a"),   # magnetic reading recorded as true
    ("declination-suspect", "MT-11", "MT-11a"),
    ("misfit", "BK-09", "BK-09n"),                # cross-bedding taken for bedding (notebook)
    ("weak-geometry", None, None),                # Brenn fault: points on one straight line
    ("not-planar", None, None),                   # Vell gneiss margin: folded
    ("facing-conflict", None, None),              # Tolm sandstone base: overturned limb
    ("daylighting", "BK-05", "BK-05a"),           # bedding under a steep slope face
    ("duplicate", "BK-16", "BK-16c"),             # a joint entered twice
    ("declination-suspect", None, None),          # BK's day 2: compass without declination (group flag)
}
# The diagnosis of each flag that has one (demo_project/README.md).
CAUSE = {
    ("reversed-dip", "RO-07", "RO-07a"): "right-hand-rule",
    ("declination-suspect", "MT-04", "MT-04a"): "declination-not-applied",
    ("declination-suspect", "MT-11", "MT-11a"): "declination-not-applied",
    ("declination-suspect", None, None): "declination-not-applied",
}
CONTACT_OF = {"weak-geometry": "Brenn fault", "not-planar": "Vell gneiss margin",
              "facing-conflict": "Tolm sandstone base"}
LAID_OUT = {"Skarra slate base": (40, 35), "Tolm unconformity": (200, 20), "Tolm sandstone base": (10, 58)}

with tempfile.TemporaryDirectory() as tmp:
    d1, d2 = os.path.join(tmp, "one"), os.path.join(tmp, "two")
    t.check(run("demo", d1).returncode == 0, "cairn demo builds the area")
    t.check(run("demo", d1).returncode != 0, "cairn demo refuses to overwrite without --force")
    camp = os.path.join(d1, "camp.cairn")
    for name in ("tablet-a.cairn", "tablet-b.cairn", "camp.cairn", "notebook.csv", "handheld.gpx"):
        t.check(os.path.exists(os.path.join(d1, name)), "demo writes " + name)

    def count(kind):
        out = run("list", camp, kind).stdout.strip().splitlines()
        return len(out) - 1

    n = {k: count(k) for k in ("units", "contacts", "stations", "planes", "lines", "points")}
    print("demo counts:", n)
    t.check(n["units"] == 6, "six units")
    t.check(n["contacts"] == 5, "five contacts")
    t.check(70 <= n["stations"] <= 90, "about 80 stations")
    t.check(180 <= n["planes"] <= 220, "about 200 planar readings")
    t.check(35 <= n["lines"] <= 45, "about 40 linear readings")
    t.check(135 <= n["points"] <= 165, "about 150 contact points")

    r = run("check", camp, "--json")
    t.check(r.returncode == 0, "cairn check exits 0")
    rep = json.loads(r.stdout)
    found = set()
    for f in rep["flags"]:
        key = (f["rule"], f["station"], f["ref"])
        found.add(key)
        if f["rule"] in CONTACT_OF:
            t.check(f["contact"] == CONTACT_OF[f["rule"]], "%s names %s" % (f["rule"], CONTACT_OF[f["rule"]]))
    for f in rep["flags"]:
        key = (f["rule"], f["station"], f["ref"])
        if key in CAUSE:
            t.check(f.get("cause") == CAUSE[key], "%s: cause %s (got %s)" % (key, CAUSE[key], f.get("cause")))
    # The group flag: BK's whole second day (2026-07-07), the bedding readings
    # BK-01a .. BK-12a, turned by about the area's 18 degree east declination.
    groups = [f for f in rep["flags"] if "refs" in f]
    t.check(len(groups) == 1, "one group flag (%d)" % len(groups))
    for g in groups:
        t.check(g["observer"] == "BK" and g["day"] == "2026-07-07", "group flag names BK and 2026-07-07")
        t.check(sorted(g["refs"]) == ["BK-%02da" % i for i in range(1, 13)], "group flag lists BK-01a .. BK-12a")
        lo, hi = g["rotation_interval"]
        t.check(lo <= 17.9 <= hi and lo < g["rotation"] < hi, "rotation interval %s contains 17.9" % ((lo, hi),))
    for p in sorted(PLANTED, key=str):
        t.check(p in found, "planted mistake found: %s" % (p,))
    for f in sorted(found - PLANTED, key=str):
        t.check(False, "flag on a clean reading: %s" % (f,))
    hazards = [f for f in rep["flags"] if f["severity"] == "hazard"]
    t.check(all(f["caution"] and "not a slope-stability assessment" in f["caution"] for f in hazards),
            "hazard flags carry the slope caution")
    for f in rep["fits"]:
        if f["contact"] in LAID_OUT:
            s, dip = LAID_OUT[f["contact"]]
            ds = abs((f["strike"] - s + 180) % 360 - 180)
            t.check(ds < 2 and abs(f["dip"] - dip) < 2, "%s fits its laid-out plane (%s)" % (f["contact"], f))

    # Where next: the predicted elevations of a contact at two stations differ as its
    # fitted plane says. Positions projected by PROJ (pyproj, UTM zone 8N), fitted
    # plane turned back from true to grid north with PROJ's meridian convergence
    # and scale factor.
    import csv
    import io
    import math
    from pyproj import Proj, Transformer
    st = {row["station"]: row for row in csv.DictReader(io.StringIO(run("list", camp, "stations").stdout))}
    to_utm = Transformer.from_crs("EPSG:4326", "EPSG:32608", always_xy=True)
    wn = [w for w in rep["where_next"] if w["contact"] == "Skarra slate base"]
    t.check(len(wn) == n["stations"], "where next covers every station for a usable contact")
    fit = [f for f in rep["fits"] if f["contact"] == "Skarra slate base"][0]
    a, b = wn[0], wn[-1]
    (ea, na), (eb, nb) = [to_utm.transform(float(st[w["station"]]["lon"]), float(st[w["station"]]["lat"]))
                          for w in (a, b)]
    lat = (float(st[a["station"]]["lat"]) + float(st[b["station"]]["lat"])) / 2
    lon = (float(st[a["station"]]["lon"]) + float(st[b["station"]]["lon"])) / 2
    fac = Proj("EPSG:32608").get_factors(lon, lat)
    gamma, k = fac.meridian_convergence, fac.meridional_scale
    dd_grid = math.radians(fit["dip_direction"] - gamma)
    tan_grid = math.tan(math.radians(fit["dip"])) / k
    expect = -tan_grid * ((eb - ea) * math.sin(dd_grid) + (nb - na) * math.cos(dd_grid))
    got = b["elevation"] - a["elevation"]
    print("where next: %.3f vs %.3f m" % (got, expect))
    t.check(abs(got - expect) < 0.5, "where next follows the fitted plane (%.2f vs %.2f m)" % (got, expect))
    t.check(all(w["half_width95"] is not None and w["half_width95"] > 0 for w in wn), "where next has 95% intervals")

    # Deterministic: a second build holds the same records.
    run("demo", d2)
    for kind in ("stations", "planes", "lines", "points"):
        a = run("list", camp, kind).stdout
        b = run("list", os.path.join(d2, "camp.cairn"), kind).stdout
        t.check(a == b, "demo is deterministic (%s)" % kind)
    # The bundled project files hold the same records as a fresh build (read through
    # a copy, so the bundled files are not touched).
    bundled = os.path.join(tmp, "bundled")
    shutil.copytree(os.path.join(args.source, "demo_project"), bundled)
    for f in ("camp.cairn", "tablet-a.cairn", "tablet-b.cairn"):
        for kind in ("units", "contacts", "stations", "planes", "lines", "points"):
            a = run("list", os.path.join(d1, f), kind).stdout
            b = run("list", os.path.join(bundled, f), kind).stdout
            t.check(a == b and a, "bundled demo_project/%s is the current demo (%s)" % (f, kind))
    for name in ("notebook.csv", "handheld.gpx"):
        with open(os.path.join(d1, name)) as fa, open(os.path.join(args.source, "demo_project", name)) as fb:
            t.check(fa.read() == fb.read(), "bundled demo_project/%s is the current demo" % name)

    # The demo's photos: a dozen JPEGs under 10 KB each, the same bytes as the
    # bundled ones, their EXIF time read by exiftool (outside reader); the camp
    # file has 11 of them recorded and the planted evening photo left unmatched.
    photos = sorted(os.listdir(os.path.join(d1, "photos")))
    t.check(len(photos) == 12, "demo writes 12 photos (got %d)" % len(photos))
    for name in photos:
        path = os.path.join(d1, "photos", name)
        t.check(os.path.getsize(path) < 10240, "%s is under 10 KB" % name)
        with open(path, "rb") as fa, open(os.path.join(args.source, "demo_project", "photos", name), "rb") as fb:
            t.check(fa.read() == fb.read(), "bundled demo_project/photos/%s is the current demo" % name)
    if shutil.which("exiftool"):
        r = subprocess.run(["exiftool", "-j", "-DateTimeOriginal", os.path.join(d1, "photos")],
                           capture_output=True, text=True)
        times = [x.get("DateTimeOriginal", "") for x in json.loads(r.stdout)]
        t.check(len(times) == 12 and all(len(x) == 19 for x in times), "exiftool reads every photo's time")
    r = run("photos", camp, os.path.join(d1, "photos"), "--person", "RO", "--clock-offset", "+00:02:10", "--json")
    plan = json.loads(r.stdout)
    status = [p["status"] for p in plan["photos"]]
    t.check(status.count("recorded") == 11, "camp.cairn holds 11 photos (%s)" % status)
    unmatched = [p["path"] for p in plan["photos"] if p["status"] == "unmatched"]
    t.check(unmatched == ["photos/IMG_0112.JPG"], "the evening photo is the one unmatched (%s)" % unmatched)

sys.exit(t.finish())
