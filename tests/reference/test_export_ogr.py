"""`cairn export` checked by outside readers: GDAL's ogrinfo and GeoPackage
validator, PROJ (pyproj), Python's json and sqlite3 modules.

An invented project is built with `cairn new` and `cairn import` from the CSV
text below, then exported three ways. The expected values come from that text
and from the standards, never from Cairn:
  - GeoPackage 1.3 (OGC 12-128r18): application_id 0x47504B47 and user_version
    10300 (Requirement 2), the spatial reference systems -1, 0 and 4326
    (Requirement 11), gpkg_contents / gpkg_geometry_columns rows per layer, and
    the GeoPackage binary geometry header of clause 2.1.3.1.1 ("GP", version 0,
    flags, srs_id, envelope) followed by an OGC WKB point (OGC 06-103r4 clause 8);
  - GDAL's validate_gpkg.py (shipped with Debian's python3-gdal, a dependency of
    gdal-bin), which implements the standard's requirements, and ogrinfo, which
    must open every output without a warning;
  - RFC 7946: a FeatureCollection of Features, longitude before latitude (3.1.1),
    no "crs" member (4);
  - PROJ through pyproj for UTM coordinates, for the identity of the SRS
    definitions (EPSG:32633) and, through pyproj.Geod (Karney 2013), for the grid
    azimuth of a true strike (the symbol rotation's convention);
  - declination as NOAA defines it (true = magnetic + declination) and the
    right-hand rule (dip direction = strike + 90) for the spot-checked values;
  - the day track (rows written into the project's track_points with Python's
    sqlite3, as the UI's logging would): one OGC LineString per person and
    day in the GeoPackage (OGC 06-103r4 clause 8, WKB type 2) and an RFC 7946
    LineString (3.1.4) in the GeoJSON, its vertices where PROJ puts the fixes,
    its length_m the geodesic length pyproj.Geod.line_length gives (Karney
    2013); a day of one fix has no line (a LineString needs two points,
    OGC 06-103r4 6.1.7);
  - CSV round trip: export, `cairn import` into a fresh project, export again:
    the files must be identical byte for byte (the issue's requirement).
"""
import json
import math
import os
import shutil
import sqlite3
import struct
import subprocess
import sys
import tempfile

import pyproj

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from refcheck import parse_args, Tally  # noqa: E402

args = parse_args(required=("cairn",))
t = Tally("test_export_ogr")

VALIDATOR = "/usr/lib/python3/dist-packages/osgeo_utils/samples/validate_gpkg.py"

UNITS = """unit,name,age_rank,colour
Gs,grey slate,1,
Wq,white quartzite,2,#56B4E9
"""
CONTACTS = """contact,lower_unit,upper_unit,type
slate-quartzite,Gs,Wq,depositional
"""
# Zone 33N has its central meridian at 15 E: these stations lie 1.2 degrees east
# of it, where grid north and true north differ by about 0.9 degrees.
STATIONS = """station,lat,lon,elevation,h_accuracy,source,unit,observer,time,notes
S1,46.5,16.2,1200,3,gps,Gs,AE,2025-06-14T09:30:00Z,spur
S2,46.504,16.205,1234.5,4,gps,Wq,AE,2025-06-14T10:10:00Z,"ridge, north side"
S3,46.508,16.199,1250,,map,,BS,2025-06-14T11:00:00Z,
"""
PLANES = """station,kind,strike,dip,north,declination,contact,quality,facing,ref,time,notes
S1,bedding,120,35,true,,slate-quartzite,4,upright,P1,2025-06-14T09:35:00Z,
S2,foliation,200,60,true,,,3,,P2,,
S3,bedding,30,20,magnetic,4,,,,P3,2025-06-14T11:05:00Z,dip slope
"""
LINES = """station,kind,trend,plunge,rake,plane_ref,north,declination,ref,time,notes
S1,lineation,45,10,,,true,,L1,,
S2,slickenline,,,30,P2,true,,L2,,
"""
# Five points near a plane dipping gently east, with elevations.
POINTS = """contact,lat,lon,elevation,h_accuracy,v_accuracy,source,time,notes
slate-quartzite,46.501,16.198,1210,3,5,gps,,
slate-quartzite,46.503,16.202,1190,3,5,gps,,
slate-quartzite,46.506,16.200,1205,3,5,gps,,
slate-quartzite,46.499,16.204,1180,3,5,gps,,
slate-quartzite,46.505,16.206,1178,3,5,gps,,
"""
KINDS = [("units", UNITS), ("contacts", CONTACTS), ("stations", STATIONS), ("planes", PLANES),
         ("lines", LINES), ("points", POINTS)]
EXPECTED = {"stations": 3, "planar_readings": 3, "linear_readings": 2, "contact_points": 5,
            "fitted_contacts": 1}
# The day track: (initials, time, lat, lon, elevation). AE walks four fixes and BS
# three on 14 June; AE has a single fix on 15 June (no line).
FIXES = [("AE", "2025-06-14T09:20:00Z", 46.4990, 16.1990, 1190.0),
         ("AE", "2025-06-14T09:25:00Z", 46.4995, 16.1996, None),
         ("AE", "2025-06-14T09:28:30Z", 46.5000, 16.2000, 1200.0),
         ("AE", "2025-06-14T10:05:00Z", 46.5040, 16.2050, 1234.0),
         ("BS", "2025-06-14T10:40:00Z", 46.5070, 16.1980, None),
         ("BS", "2025-06-14T10:50:00Z", 46.5076, 16.1986, None),
         ("BS", "2025-06-14T11:00:00Z", 46.5080, 16.1990, 1250.0),
         ("AE", "2025-06-15T08:00:00Z", 46.5100, 16.2100, None)]
TRACK_LINES = 2


def run(*a, env=None):
    r = subprocess.run([args.cairn, *a], capture_output=True, text=True, env=env)
    if r.returncode != 0:
        print("cairn", " ".join(a), "->", r.returncode, r.stderr)
    return r


def make_project(path, tmp):
    ok = run("new", path, "--name", "Quartz Gully", "--utm", "33N").returncode == 0
    for kind, text in KINDS:
        csv = os.path.join(tmp, kind + "-in.csv")
        with open(csv, "w") as f:
            f.write(text)
        ok = run("import", path, kind, csv).returncode == 0 and ok
    db = sqlite3.connect(path)
    people = dict(db.execute("SELECT initials, uuid FROM people"))
    device = db.execute("SELECT uuid FROM devices LIMIT 1").fetchone()[0]
    for who, time, lat, lon, ele in FIXES:
        db.execute("INSERT INTO track_points (person, device, time, lat, lon, elevation) VALUES (?,?,?,?,?,?)",
                   (people[who], device, time, lat, lon, ele))
    db.commit()
    db.close()
    return ok


def ogrinfo(*a):
    return subprocess.run(["ogrinfo", "-ro", *a], capture_output=True, text=True)


def quiet(r, what):
    """ogrinfo: opened, exit 0, nothing on stderr, no warning or error anywhere."""
    text = r.stdout + r.stderr
    t.check(r.returncode == 0, what + ": ogrinfo exit 0")
    t.check(r.stderr.strip() == "", what + ": ogrinfo stderr empty (got %r)" % r.stderr[:300])
    t.check("warning" not in text.lower() and "error" not in text.lower(), what + ": no warning or error")


def feature_counts(summary):
    """Layer name -> Feature Count, from `ogrinfo -so -al`."""
    counts, layer = {}, None
    for line in summary.splitlines():
        if line.startswith("Layer name: "):
            layer = line[len("Layer name: "):].strip()
        elif line.startswith("Feature Count: ") and layer:
            counts[layer] = int(line.split(":")[1])
    return counts


def attribute(dump, name):
    """Values of one attribute in an `ogrinfo -al` feature dump: '  name (Type) = value'."""
    out = []
    for line in dump.splitlines():
        s = line.strip()
        if s.startswith(name + " (") and " = " in s:
            out.append(s.split(" = ", 1)[1])
    return out


def grid_azimuth(lat, lon, true_azimuth, utm):
    """Azimuth from grid north of a short step along a true azimuth (pyproj.Geod, PROJ)."""
    lon2, lat2, _ = pyproj.Geod(ellps="WGS84").fwd(lon, lat, true_azimuth, 50.0)
    e1, n1 = utm.transform(lon, lat)
    e2, n2 = utm.transform(lon2, lat2)
    return math.degrees(math.atan2(e2 - e1, n2 - n1)) % 360.0


with tempfile.TemporaryDirectory() as tmp:
    project = os.path.join(tmp, "gully.cairn")
    t.check(make_project(project, tmp), "the project is built with cairn new and cairn import")
    check = run("check", project, "--json")
    flags_expected = len(json.loads(check.stdout)["flags"]) if check.returncode == 0 else -1
    utm = pyproj.Transformer.from_crs("EPSG:4326", "EPSG:32633", always_xy=True)

    # ---- GeoPackage -------------------------------------------------------------
    gpkg = os.path.join(tmp, "gully.gpkg")
    r = run("export", project, gpkg)
    t.check(r.returncode == 0 and os.path.isfile(gpkg), "cairn export writes the GeoPackage")
    db = sqlite3.connect(gpkg)
    t.check(db.execute("PRAGMA application_id").fetchone()[0] == 0x47504B47,
            "application_id is 0x47504B47 'GPKG' (OGC 12-128r18 Requirement 2)")
    t.check(db.execute("PRAGMA user_version").fetchone()[0] == 10300,
            "user_version is 10300 for GeoPackage 1.3 (OGC 12-128r18 Requirement 2)")
    srs = {row[0]: row for row in db.execute(
        "SELECT srs_id, organization, organization_coordsys_id, definition FROM gpkg_spatial_ref_sys")}
    t.check({-1, 0, 4326} <= set(srs), "srs -1, 0 and 4326 present (OGC 12-128r18 Requirement 11)")
    t.check(32633 in srs and srs[32633][1] == "EPSG" and srs[32633][2] == 32633, "the project's UTM zone is EPSG:32633")
    if 32633 in srs:
        crs = pyproj.CRS.from_wkt(srs[32633][3])
        t.check(crs.equals(pyproj.CRS.from_epsg(32633), ignore_axis_order=True),
                "the UTM WKT is EPSG:32633 to PROJ")
    if 4326 in srs:
        t.check(pyproj.CRS.from_wkt(srs[4326][3]).equals(pyproj.CRS.from_epsg(4326), ignore_axis_order=True),
                "the 4326 WKT is EPSG:4326 to PROJ")
    contents = {row[0]: row for row in db.execute("SELECT table_name, data_type, srs_id FROM gpkg_contents")}
    geomcols = {row[0]: row for row in db.execute(
        "SELECT table_name, column_name, geometry_type_name, srs_id, z, m FROM gpkg_geometry_columns")}
    for layer in list(EXPECTED) + ["flags"]:
        t.check(layer in contents and contents[layer][1] == "features" and contents[layer][2] == 32633,
                "gpkg_contents lists %s as features in 32633" % layer)
        t.check(geomcols.get(layer) == (layer, "geom", "POINT", 32633, 0, 0),
                "gpkg_geometry_columns: %s geom POINT 32633" % layer)

    # The binary geometry of S2 (OGC 12-128r18 clause 2.1.3.1.1, OGC 06-103r4 clause 8).
    blob = db.execute("SELECT geom FROM stations WHERE code = 'S2'").fetchone()[0]
    magic, version, flags, srs_id = struct.unpack_from("<2sBBi", blob, 0)
    t.check(magic == b"GP" and version == 0, "geometry header: magic 'GP', version 0")
    envelope_code = (flags >> 1) & 0x7
    t.check(flags & 1 == 1 and envelope_code == 1 and flags & 0x30 == 0 and flags & 0xC0 == 0,
            "flags: little-endian, envelope [minx,maxx,miny,maxy], standard, not empty (got %#x)" % flags)
    t.check(srs_id == 32633, "geometry srs_id is 32633")
    minx, maxx, miny, maxy = struct.unpack_from("<4d", blob, 8)
    order, wkb_type, x, y = struct.unpack_from("<BI2d", blob, 40)
    t.check(order == 1 and wkb_type == 1 and len(blob) == 40 + 21, "WKB: little-endian Point")
    e, n = utm.transform(16.205, 46.504)
    t.check(abs(x - e) < 1e-3 and abs(y - n) < 1e-3, "S2 easting/northing agree with PROJ within 1 mm")
    t.check(minx == maxx == x and miny == maxy == y, "the envelope of a point is the point")
    db.close()

    v = subprocess.run(["/usr/bin/python3", VALIDATOR, gpkg], capture_output=True, text=True)
    t.check(v.returncode == 0 and v.stdout.strip() == "" and v.stderr.strip() == "",
            "GDAL's validate_gpkg.py finds nothing wrong (got %r)" % (v.stdout + v.stderr)[:400])
    # The validator can fail: a copy with a wrong user_version must be refused.
    bad = os.path.join(tmp, "bad.gpkg")
    shutil.copy(gpkg, bad)
    b = sqlite3.connect(bad)
    b.execute("PRAGMA application_id = 0")
    b.commit()
    b.close()
    v = subprocess.run(["/usr/bin/python3", VALIDATOR, bad], capture_output=True, text=True)
    t.check(v.returncode != 0 or (v.stdout + v.stderr).strip() != "", "validate_gpkg.py refuses a broken copy")

    summary = ogrinfo("-so", "-al", gpkg)
    quiet(summary, "GeoPackage")
    counts = feature_counts(summary.stdout)
    for layer, n_expected in EXPECTED.items():
        t.check(counts.get(layer) == n_expected, "ogrinfo: %s has %d features (got %s)" % (layer, n_expected, counts.get(layer)))
    t.check(counts.get("flags") == flags_expected, "ogrinfo: flags layer as many as cairn check lists (consistency)")

    # The day track: one LineString per person and day.
    t.check(counts.get("day_tracks") == TRACK_LINES, "ogrinfo: day_tracks has %d lines (got %s)"
            % (TRACK_LINES, counts.get("day_tracks")))
    t.check("Geometry: Line String" in summary.stdout.split("Layer name: day_tracks")[-1].split("Layer name:")[0],
            "ogrinfo: day_tracks is a Line String layer")
    geod = pyproj.Geod(ellps="WGS84")
    for who in ("AE", "BS"):
        mine = [f for f in FIXES if f[0] == who and f[1].startswith("2025-06-14")]
        d = ogrinfo("-where", "person = '%s'" % who, gpkg, "day_tracks")
        quiet(d, "day_tracks " + who)
        t.check(attribute(d.stdout, "fixes") == [str(len(mine))], "%s: %d fixes" % (who, len(mine)))
        t.check(attribute(d.stdout, "day") == ["2025-06-14"] and attribute(d.stdout, "start") == [mine[0][1]]
                and attribute(d.stdout, "end") == [mine[-1][1]], "%s: day, first and last time" % who)
        want = geod.line_length([f[3] for f in mine], [f[2] for f in mine])
        got = attribute(d.stdout, "length_m")
        t.check(len(got) == 1 and abs(float(got[0]) - want) < 1e-3,
                "%s: length_m %s is pyproj.Geod's %.4f m within 1 mm" % (who, got, want))
        wkt = [line.strip() for line in d.stdout.splitlines() if line.strip().startswith("LINESTRING")]
        ok = len(wkt) == 1
        if ok:
            pts = [tuple(map(float, p.split())) for p in wkt[0][len("LINESTRING ("):-1].split(",")]
            ok = len(pts) == len(mine)
            for (x, y), f in zip(pts, mine):
                e, n = utm.transform(f[3], f[2])
                ok = ok and abs(x - e) < 1e-3 and abs(y - n) < 1e-3
        t.check(ok, "%s: the line's vertices are the fixes in time order, where PROJ puts them (1 mm)" % who)
    full = ogrinfo("-al", gpkg)
    quiet(full, "GeoPackage features")
    s2 = ogrinfo("-where", "code = 'S2'", gpkg, "stations")
    t.check(attribute(s2.stdout, "elevation") == ["1234.5"], "S2 elevation 1234.5 (from the CSV)")
    t.check(attribute(s2.stdout, "notes") == ["ridge, north side"], "S2 notes as typed")
    t.check(attribute(s2.stdout, "observer") == ["AE"], "S2 observer AE")
    p3 = ogrinfo("-where", "ref = 'P3'", gpkg, "planar_readings")
    # NOAA: true = magnetic + declination: 30 + 4 = 34; right-hand rule: dip direction 124.
    t.check([float(x) for x in attribute(p3.stdout, "strike")] == [34.0], "P3 strike 34 (30 magnetic + 4 east)")
    t.check([float(x) for x in attribute(p3.stdout, "dip_direction")] == [124.0], "P3 dip direction 124")
    t.check(attribute(p3.stdout, "north") == ["magnetic"], "P3 north magnetic")
    p1 = ogrinfo("-where", "ref = 'P1'", gpkg, "planar_readings")
    rot = [float(x) for x in attribute(p1.stdout, "symbol_rotation")]
    want = grid_azimuth(46.5, 16.2, 120.0, utm)
    t.check(len(rot) == 1 and abs(rot[0] - want) < 0.01,
            "P1 symbol_rotation %s = grid azimuth of strike 120 at S1 per PROJ %.4f" % (rot, want))
    t.check(abs(want - 120.0) > 0.5, "the check is sharp: grid and true north differ here")
    l2 = ogrinfo("-where", "ref = 'L1'", gpkg, "linear_readings")
    rot = [float(x) for x in attribute(l2.stdout, "symbol_rotation")]
    t.check(len(rot) == 1 and abs(rot[0] - grid_azimuth(46.5, 16.2, 45.0, utm)) < 0.01, "L1 symbol rotation from its trend")
    fc = ogrinfo(gpkg, "fitted_contacts")
    t.check(attribute(fc.stdout, "contact") == ["slate-quartzite"], "fitted_contacts names the contact")
    t.check(attribute(fc.stdout, "points") == ["5"], "fitted_contacts: 5 points")
    t.check(attribute(fc.stdout, "lower_unit") == ["Gs"] and attribute(fc.stdout, "upper_unit") == ["Wq"],
            "fitted_contacts: units below and above")

    # ---- GeoJSON ------------------------------------------------------------------
    geojson = os.path.join(tmp, "gully.geojson")
    r = run("export", project, geojson)
    t.check(r.returncode == 0, "cairn export writes the GeoJSON")
    with open(geojson) as f:
        doc = json.load(f)
    t.check(doc.get("type") == "FeatureCollection", "RFC 7946 3.3: a FeatureCollection")
    t.check("crs" not in doc, "RFC 7946 4: no crs member")
    feats = doc.get("features", [])
    t.check(all(x.get("type") == "Feature" for x in feats), "RFC 7946 3.2: every member is a Feature")
    by_layer = {}
    for x in feats:
        by_layer.setdefault(x["properties"]["layer"], []).append(x)
    for layer, n_expected in EXPECTED.items():
        t.check(len(by_layer.get(layer, [])) == n_expected, "GeoJSON: %d %s" % (n_expected, layer))
    s2f = [x for x in by_layer.get("stations", []) if x["properties"]["code"] == "S2"]
    t.check(len(s2f) == 1 and s2f[0]["geometry"]["type"] == "Point", "S2 is a Point")
    if s2f:
        lon, lat = s2f[0]["geometry"]["coordinates"]
        t.check(abs(lon - 16.205) < 1e-7 and abs(lat - 46.504) < 1e-7, "RFC 7946 3.1.1: longitude first")
    p1f = [x for x in by_layer.get("planar_readings", []) if x["properties"]["ref"] == "P1"]
    t.check(len(p1f) == 1 and abs(p1f[0]["properties"]["symbol_rotation"] - 120.0) < 1e-9,
            "GeoJSON symbol_rotation is from true north (the layer's own north)")
    summary = ogrinfo("-so", "-al", geojson)
    quiet(summary, "GeoJSON")
    total = sum(feature_counts(summary.stdout).values())
    t.check(total == len(feats) and total == sum(EXPECTED.values()) + flags_expected + TRACK_LINES,
            "ogrinfo: the GeoJSON holds every feature (%d)" % total)
    tracks = by_layer.get("day_tracks", [])
    ae = [x for x in tracks if x["properties"]["person"] == "AE"]
    t.check(len(ae) == 1 and ae[0]["geometry"]["type"] == "LineString"
            and [tuple(c) for c in ae[0]["geometry"]["coordinates"]]
            == [(f[3], f[2]) for f in FIXES if f[0] == "AE" and f[1].startswith("2025-06-14")],
            "GeoJSON: AE's day track is a LineString of longitude, latitude (RFC 7946 3.1.4, 3.1.1)")
    quiet(ogrinfo("-al", geojson), "GeoJSON features")
    gs2 = ogrinfo("-al", "-where", "code = 'S2'", geojson)
    t.check(attribute(gs2.stdout, "elevation") == ["1234.5"], "ogrinfo reads S2's elevation from the GeoJSON")

    # ---- CSV: export, import into a fresh file, export again ------------------------
    first, second = os.path.join(tmp, "csv1"), os.path.join(tmp, "csv2")
    t.check(run("export", project, first).returncode == 0, "cairn export writes a CSV folder")
    fresh = os.path.join(tmp, "fresh.cairn")
    ok = run("new", fresh, "--name", "Quartz Gully again", "--utm", "33N").returncode == 0
    for kind, _ in KINDS:
        ok = run("import", fresh, kind, os.path.join(first, kind + ".csv")).returncode == 0 and ok
    t.check(ok, "every exported CSV imports into a fresh project")
    t.check(run("export", fresh, second).returncode == 0, "the fresh project exports")
    for kind, _ in KINDS:
        a = open(os.path.join(first, kind + ".csv"), "rb").read()
        b = open(os.path.join(second, kind + ".csv"), "rb").read()
        t.check(a == b and len(a) > 0, "%s.csv identical after export, import, export" % kind)
    with open(os.path.join(first, "planes.csv")) as f:
        header = f.readline().strip().split(",")
    t.check(header[:4] == ["station", "kind", "strike", "dip"], "planes.csv starts with the import columns")

    # ---- refusals -----------------------------------------------------------------
    r = run("export", project, os.path.join(tmp, "out.shp"))
    t.check(r.returncode == 2 and "name a .gpkg or .geojson file" in r.stderr, "an unknown format is refused")
    r = run("export", project, os.path.join(tmp, "no", "such", "dir", "x.gpkg"))
    t.check(r.returncode != 0 and not os.path.exists(os.path.join(tmp, "no")), "nothing is written on failure")

sys.exit(t.finish())
