"""`cairn terrain` checked by outside tools: GDAL (Python bindings, gdallocationinfo,
gdaldem, gdal_contour), numpy and PROJ (pyproj).

A smooth invented topography is made with numpy and written as a GeoTIFF in UTM
zone 8N by GDAL's Python bindings; contact points without an elevation are put on
it (their UTM positions turned into latitude/longitude by pyproj). Expected values
come from those tools, never from Cairn:
  - elevations: bilinear interpolation between cell centres done in numpy (the
    standard bilinear formula, Press et al., "Numerical Recipes", 3rd ed., 3.6.1;
    cell centres as in GDAL's data model, "pixel is area"), and at cell centres
    the value `gdallocationinfo -valonly -geoloc` prints;
  - reprojection: the same topography warped by GDAL (gdal.Warp, bilinear) into
    geographic WGS84 (EPSG:4326) and into the neighbouring UTM zone 7N must give
    the same elevations as the zone-8N original, within the resampling error;
  - refusals: a GeoTIFF without a CRS is refused and nothing is stored;
  - slope, aspect and hillshade (Horn 1981) against GDAL's `gdaldem slope`,
    `gdaldem aspect` and `gdaldem hillshade` (Horn is gdaldem's default) on the
    same raster, border cells excluded as gdaldem leaves them without value;
  - the predicted outcrop trace against `gdal_contour -fl 0` on the difference
    raster terrain minus plane computed by numpy: every vertex of each within
    half a cell of the other's lines;
  - slopes from the ground in `cairn check --json`: a bedding reading under a
    face whose slope numpy gives as 50 degrees daylights by the Markland test
    (Hoek & Bray, "Rock Slope Engineering": dip directions within 20 degrees,
    friction angle < bedding dip < face dip) with "slope_source": "dem", one
    under a typed face says "reading", and a terrain of 20 m cells clears no
    station (the stated 5 m rule).
"""
import math
import os
import subprocess
import sys
import tempfile

import numpy as np
from osgeo import gdal, osr
import pyproj

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from refcheck import parse_args, Tally  # noqa: E402

gdal.UseExceptions()
args = parse_args(required=("cairn",))
t = Tally("test_terrain_gdal")

UNITS = """unit,name,age_rank,colour
Ls,lower slate,1,
Uq,upper quartzite,2,
"""
CONTACTS = """contact,lower_unit,upper_unit,type
slate-quartzite,Ls,Uq,depositional
"""
E0, N0 = 466000.0, 6783000.0   # south-west corner of the grid, zone 8N
CELL = 10.0
NX, NY = 600, 500
TO_LL = pyproj.Transformer.from_crs(32608, 4326, always_xy=True)
TO_UTM = pyproj.Transformer.from_crs(4326, 32608, always_xy=True)


def run(*a):
    r = subprocess.run([args.cairn, *a], capture_output=True, text=True)
    if r.returncode != 0:
        print(" ".join(a[:2]), "->", r.stderr.strip())
    return r


def topography():
    """Rows from the north, values at cell centres: hills on a gentle ramp."""
    e = E0 + (np.arange(NX) + 0.5) * CELL
    n = N0 + NY * CELL - (np.arange(NY) + 0.5) * CELL
    ee, nn = np.meshgrid(e, n)
    return (800 + 150 * np.sin((ee - E0) / 700.0) * np.cos((nn - N0) / 900.0) + 0.05 * (ee - E0)).astype(np.float32)


def write_tif(path, z, epsg=32608, crs=True):
    d = gdal.GetDriverByName("GTiff").Create(path, z.shape[1], z.shape[0], 1, gdal.GDT_Float32)
    d.SetGeoTransform((E0, CELL, 0, N0 + NY * CELL, 0, -CELL))
    if crs:
        s = osr.SpatialReference()
        s.ImportFromEPSG(epsg)
        d.SetProjection(s.ExportToWkt())
    d.GetRasterBand(1).SetNoDataValue(-9999)
    d.GetRasterBand(1).WriteArray(z)
    d = None


def bilinear(z, e, n):
    """numpy bilinear between cell centres (Numerical Recipes 3.6.1)."""
    fx = (e - E0) / CELL - 0.5
    fy = (N0 + NY * CELL - n) / CELL - 0.5
    i0, j0 = int(math.floor(fx)), int(math.floor(fy))
    tx, ty = fx - i0, fy - j0
    q = z.astype(np.float64)
    return ((1 - tx) * (1 - ty) * q[j0, i0] + tx * (1 - ty) * q[j0, i0 + 1]
            + (1 - tx) * ty * q[j0 + 1, i0] + tx * ty * q[j0 + 1, i0 + 1])


def points_csv(utm_points):
    rows = ["contact,lat,lon,elevation,h_accuracy,v_accuracy,source,time,notes"]
    for e, n in utm_points:
        lon, lat = TO_LL.transform(e, n)
        rows.append("slate-quartzite,%.10f,%.10f,,3,,gps,," % (lat, lon))
    return "\n".join(rows) + "\n"


def listed_points(path):
    out = run("list", path, "points").stdout.strip().splitlines()
    head = out[0].split(",")
    rows = [dict(zip(head, line.split(","))) for line in out[1:]]
    return rows


def make_project(tmp, name, utm_points):
    path = os.path.join(tmp, name)
    ok = run("new", path, "--name", "Ground test", "--utm", "8N").returncode == 0
    for kind, text in (("units", UNITS), ("contacts", CONTACTS), ("points", points_csv(utm_points))):
        csv = os.path.join(tmp, name + "." + kind + ".csv")
        with open(csv, "w") as f:
            f.write(text)
        ok = ok and run("import", path, kind, csv).returncode == 0
    t.check(ok, "project %s made with cairn new / import" % name)
    return path


z = topography()
MAX_GRADIENT = float(np.max(np.hypot(*np.gradient(z.astype(np.float64), CELL))))
rng = np.random.default_rng(20261203)
# Random places well inside the grid, and a few exact cell centres.
pts = [(E0 + 1000 + rng.uniform(0, 4000), N0 + 1000 + rng.uniform(0, 3000)) for _ in range(25)]
centres = [(E0 + (i + 0.5) * CELL, N0 + NY * CELL - (j + 0.5) * CELL) for i, j in ((150, 100), (333, 250), (420, 377))]

with tempfile.TemporaryDirectory() as tmp:
    tif = os.path.join(tmp, "ground8n.tif")
    write_tif(tif, z)

    # ---- elevations from the terrain: numpy bilinear and gdallocationinfo ----
    proj = make_project(tmp, "a.cairn", pts + centres)
    r = run("terrain", proj, tif, "--vertical-accuracy", "1.5")
    t.check(r.returncode == 0 and "28 points" in r.stdout, "cairn terrain attaches and fills 28 points: " + r.stdout)
    rows = listed_points(proj)
    t.check(len(rows) == len(pts) + len(centres), "every point listed")
    worst = 0.0
    for row in rows:
        e, n = TO_UTM.transform(float(row["lon"]), float(row["lat"]))
        worst = max(worst, abs(float(row["elevation"]) - bilinear(z, e, n)))
        t.check(row["source"] == "dem" and float(row["v_accuracy"]) == 1.5,
                "a filled point says source dem and the terrain's accuracy")
    print("bilinear: worst difference from numpy %.2e m" % worst)
    t.check(worst < 1e-3, "elevations match numpy's bilinear within 1 mm (worst %.2e m)" % worst)
    for (e, n), row in zip(centres, rows[len(pts):]):
        v = subprocess.run(["gdallocationinfo", "-valonly", "-geoloc", tif, repr(e), repr(n)],
                           capture_output=True, text=True).stdout.strip()
        t.check(abs(float(row["elevation"]) - float(v)) < 1e-3,
                "at a cell centre the elevation is gdallocationinfo's %s (got %s)" % (v, row["elevation"]))

    # ---- reprojection: geographic and the neighbouring zone, checked against the zone-8N original ----
    for epsg, label in ((4326, "geographic WGS84"), (32607, "UTM zone 7N")):
        other = os.path.join(tmp, "ground_%d.tif" % epsg)
        gdal.Warp(other, tif, dstSRS="EPSG:%d" % epsg, resampleAlg="bilinear", dstNodata=-9999, errorThreshold=0)
        proj2 = make_project(tmp, "b%d.cairn" % epsg, pts)
        r = run("terrain", proj2, other)
        t.check(r.returncode == 0 and "reprojected" in r.stdout, "a terrain in %s is reprojected: %s" % (label, r.stdout.strip()))
        worst = 0.0
        for row in listed_points(proj2):
            e, n = TO_UTM.transform(float(row["lon"]), float(row["lat"]))
            worst = max(worst, abs(float(row["elevation"]) - bilinear(z, e, n)))
        print("%s: worst difference from the zone-8N terrain %.3f m" % (label, worst))
        # Resampling error: GDAL's bilinear warp (two passes here) may shift the
        # surface by a fraction of a cell; a tenth of a cell times the steepest
        # gradient of the surface (numpy) is the bound (common practice, no
        # published source).
        bound = 0.1 * CELL * MAX_GRADIENT
        t.check(worst < bound, "%s gives the zone-8N elevations within %.2f m (worst %.3f m)" % (label, bound, worst))

    # ---- refusals ----
    bare = os.path.join(tmp, "nocrs.tif")
    write_tif(bare, z, crs=False)
    proj3 = make_project(tmp, "c.cairn", pts[:3])
    r = run("terrain", proj3, bare)
    t.check(r.returncode != 0 and "no coordinate reference system" in r.stderr, "a raster without a CRS is refused")
    t.check("no terrain" in run("terrain", proj3).stdout, "after a refusal nothing is stored")
    t.check(all(row["elevation"] == "" for row in listed_points(proj3)), "after a refusal no elevation is filled")

# ---- the demo: its terrain as a GeoTIFF that GDAL reads, attached to every file ----
with tempfile.TemporaryDirectory() as tmp:
    d = os.path.join(tmp, "demo")
    t.check(run("demo", d).returncode == 0, "cairn demo builds the area")
    ds = gdal.Open(os.path.join(d, "terrain.tif"))
    srs = osr.SpatialReference(wkt=ds.GetProjection())
    t.check(srs.GetAuthorityCode(None) == "32608", "the demo's terrain.tif is in EPSG:32608 (GDAL)")
    digests = set()
    for f in ("tablet-a.cairn", "tablet-b.cairn", "camp.cairn"):
        out = run("terrain", os.path.join(d, f)).stdout
        t.check("terrain terrain.tif" in out, "demo %s carries the terrain" % f)
        digests |= {ln.split("digest ")[1] for ln in out.splitlines() if "digest " in ln}
    t.check(len(digests) == 1, "every demo file holds the same terrain (merge found them identical)")

    # ---- cairn check says where each contact's elevations came from ----
    import json
    rep = json.loads(run("check", os.path.join(d, "camp.cairn"), "--json").stdout)
    listed = run("list", os.path.join(d, "camp.cairn"), "points").stdout.splitlines()
    dem_listed = sum(1 for ln in listed[1:] if ",dem," in ln)
    dem_fits = sum(f["elevation_sources"].get("dem", 0) for f in rep["fits"])
    t.check(dem_listed >= 1 and dem_fits == dem_listed,
            "the fits count the points whose elevation came from the terrain (%d, listed %d)" % (dem_fits, dem_listed))

    # ---- export: predicted_traces and trace_bands, read by GDAL/OGR and PROJ ----
    # GeoPackage 1.3 (OGC 12-128r18) through GDAL's validate_gpkg.py and ogrinfo;
    # RFC 7946 MultiLineString / MultiPolygon in longitude/latitude, checked
    # against the GeoPackage's UTM vertices turned into lon/lat by pyproj.
    from osgeo import ogr
    camp = os.path.join(d, "camp.cairn")
    gpkg, gjson = os.path.join(tmp, "demo.gpkg"), os.path.join(tmp, "demo.geojson")
    t.check(run("export", camp, gpkg).returncode == 0 and run("export", camp, gjson).returncode == 0,
            "cairn export writes the demo as GeoPackage and GeoJSON")
    for path in (gpkg, gjson):
        r = subprocess.run(["ogrinfo", "-ro", "-al", "-q", path], capture_output=True, text=True)
        t.check(r.returncode == 0 and "Warning" not in r.stderr + r.stdout and "ERROR" not in r.stderr,
                "ogrinfo reads %s without warnings: %s" % (os.path.basename(path), r.stderr[:200]))
    validator = "/usr/lib/python3/dist-packages/osgeo_utils/samples/validate_gpkg.py"
    r = subprocess.run(["/usr/bin/python3", validator, gpkg], capture_output=True, text=True)
    t.check(r.returncode == 0, "validate_gpkg.py accepts the export with the terrain layers: " + r.stdout[-300:] + r.stderr[-300:])
    ds = ogr.Open(gpkg)
    want = {"predicted_traces": (ogr.wkbMultiLineString, "interval"), "trace_bands": (ogr.wkbMultiPolygon, "confidence")}
    utm_traces = {}
    for name, (gtype, field) in want.items():
        lyr = ds.GetLayerByName(name)
        t.check(lyr is not None and lyr.GetFeatureCount() >= 4, "%s has a feature per fitted contact" % name)
        if lyr is None:
            continue
        t.check(lyr.GetGeomType() == gtype, "%s is %s" % (name, ogr.GeometryTypeToName(gtype)))
        t.check(lyr.GetSpatialRef().GetAuthorityCode(None) == "32608", "%s is in the project's UTM zone" % name)
        defn = lyr.GetLayerDefn()
        names = [defn.GetFieldDefn(i).GetName() for i in range(defn.GetFieldCount())]
        t.check(names == ["contact", field], "%s fields are contact, %s (%s)" % (name, field, names))
        for f in lyr:
            g = f.GetGeometryRef()
            if name == "trace_bands":
                t.check(abs(f.GetField("confidence") - 0.95) < 1e-12, "a trace band says confidence 0.95")
                t.check(g.GetGeometryCount() > 0 and g.GetArea() > 0, "a trace band has an area")
            else:
                utm_traces[f.GetField("contact")] = [g.GetGeometryRef(k).GetPoints() for k in range(g.GetGeometryCount())]
    with open(gjson) as fh:
        import json
        feats = [x for x in json.load(fh)["features"] if x["properties"]["layer"] == "predicted_traces"]
    worst = 0.0
    for x in feats:
        t.check(x["geometry"]["type"] == "MultiLineString", "GeoJSON trace is a MultiLineString (RFC 7946 3.1.5)")
        ours = utm_traces.get(x["properties"]["contact"], [])
        for part, upart in zip(x["geometry"]["coordinates"], ours):
            for (lon, lat), (e, n) in zip(part, upart):
                le, la = TO_LL.transform(e, n)
                worst = max(worst, abs(le - lon), abs(la - lat))
    t.check(feats and worst < 2e-7, "GeoJSON traces are the GeoPackage's in lon/lat (pyproj, worst %.1e deg)" % worst)

    # ---- the report's Plan shows the ground; its SVG stays well-formed XML (Python's parser) ----
    import re
    import xml.etree.ElementTree as ET
    html = os.path.join(tmp, "report.html")
    t.check(run("report", camp, "-o", html).returncode == 0, "cairn report writes the demo's report")
    with open(html) as fh:
        text = fh.read()
    m = re.search(r'<figure class="plan">(.*?)<figcaption>(.*?)</figcaption>', text, re.S)
    t.check(m is not None and "trace bands" in m.group(2) and "terrain contours" in m.group(2),
            "the report's Plan caption names the terrain contours and the trace bands")
    if m:
        try:
            root = ET.fromstring(m.group(1))
            ok = sum(1 for _ in root.iter()) > 1000
        except ET.ParseError as e:
            ok = False
            print(e)
        t.check(ok, "the Plan's SVG with the ground parses as XML")

# ---- slopes from the ground in cairn check ----
def write_grid(path, arr, cell, west, north):
    d = gdal.GetDriverByName("GTiff").Create(path, arr.shape[1], arr.shape[0], 1, gdal.GDT_Float32)
    d.SetGeoTransform((west, cell, 0, north, 0, -cell))
    s_ = osr.SpatialReference()
    s_.ImportFromEPSG(32608)
    d.SetProjection(s_.ExportToWkt())
    d.GetRasterBand(1).WriteArray(arr)
    d = None


with tempfile.TemporaryDirectory() as tmp:
    W, N, C = 466000.0, 6784000.0, 2.0
    cols = np.arange(150)
    face = np.tile((2000 - math.tan(math.radians(50)) * (cols + 0.5) * C).astype(np.float32), (150, 1))
    gy, gx = np.gradient(face.astype(np.float64), C)
    t.check(abs(math.degrees(math.atan(math.hypot(gx[75, 75], gy[75, 75]))) - 50) < 1e-3,
            "numpy gives the test face a slope of 50 degrees")
    steep = os.path.join(tmp, "face.tif")
    write_grid(steep, face, C, W, N)
    proj = os.path.join(tmp, "face.cairn")
    run("new", proj, "--name", "Face", "--utm", "8N")
    lonA, latA = TO_LL.transform(W + 150, N - 150)
    lonB, latB = TO_LL.transform(W + 160, N - 120)
    files = {
        "units": UNITS, "contacts": CONTACTS,
        "stations": "station,lat,lon,source\nF1,%.9f,%.9f,gps\nF2,%.9f,%.9f,gps\n" % (latA, lonA, latB, lonB),
        "planes": "station,kind,strike,dip,north\nF1,bedding,000,40,true\nF2,bedding,000,40,true\nF2,slope,000,55,true\n",
    }
    for kind, text in files.items():
        path = os.path.join(tmp, kind + ".csv")
        with open(path, "w") as f:
            f.write(text)
        t.check(run("import", proj, kind, path).returncode == 0, "face project: import " + kind)
    t.check(run("terrain", proj, steep).returncode == 0, "the 2 m face terrain attaches")
    import json
    rep = json.loads(run("check", proj, "--json").stdout)
    day = {f["station"]: f for f in rep["flags"] if f["rule"] == "daylighting"}
    t.check("F1" in day and day["F1"].get("slope_source") == "dem",
            "bedding 000/40 under the terrain's 50 degree east face daylights, slope_source dem")
    t.check("F2" in day and day["F2"].get("slope_source") == "reading",
            "under a typed face the flag says slope_source reading")
    t.check(all(f.get("caution") for f in day.values()), "daylighting flags carry the safety caution")
    t.check(rep["terrain"]["too_coarse_to_clear"] is False, "2 m cells are fine enough to screen")
    coarse = os.path.join(tmp, "coarse.tif")
    write_grid(coarse, np.full((40, 40), 900, np.float32), 20.0, W - 200, N + 200)
    t.check(run("terrain", proj, coarse).returncode == 0, "a 20 m flat terrain replaces it")
    rep = json.loads(run("check", proj, "--json").stdout)
    t.check(rep["terrain"]["too_coarse_to_clear"] is True and "F1" in rep["terrain"]["not_cleared"],
            "a 20 m terrain gives no all-clear: F1 is listed as not cleared")
    t.check("F2" not in rep["terrain"]["not_cleared"], "a station with a typed face is screened by its reading")


def read_band(path):
    ds = gdal.Open(path)
    b = ds.GetRasterBand(1)
    a = b.ReadAsArray().astype(np.float64)
    nd = b.GetNoDataValue()
    if nd is not None:
        a[a == nd] = np.nan
    return a


def segment_distance(p, lines):
    """Shortest distance from point p to any segment of the polylines (numpy)."""
    best = math.inf
    for line in lines:
        a = np.array(line[:-1]), np.array(line[1:])
        if len(line) < 2:
            continue
        d = a[1] - a[0]
        L2 = np.maximum((d ** 2).sum(axis=1), 1e-300)
        tt = np.clip(((p - a[0]) * d).sum(axis=1) / L2, 0, 1)
        q = a[0] + tt[:, None] * d
        best = min(best, float(np.sqrt(((q - p) ** 2).sum(axis=1)).min()))
    return best


if args.tools:
    probe = os.path.join(args.tools, "terrain_probe")
    with tempfile.TemporaryDirectory() as tmp:
        tif = os.path.join(tmp, "ground8n.tif")
        write_tif(tif, z)
        # ---- slope, aspect, hillshade vs gdaldem (Horn 1981 is gdaldem's default) ----
        r = subprocess.run([probe, "grids", "32608", tif, os.path.join(tmp, "ours")], capture_output=True, text=True)
        t.check(r.returncode == 0, "terrain_probe grids runs: " + r.stderr)
        for what, extra in (("slope", []), ("aspect", []), ("hillshade", [])):
            ref = os.path.join(tmp, "gdal_%s.tif" % what)
            subprocess.run(["gdaldem", what, tif, ref, "-q", "-alg", "Horn"] + extra, check=True)
            ours = read_band(os.path.join(tmp, "ours_%s.tif" % what))
            theirs = read_band(ref)
            inner = (slice(1, -1), slice(1, -1))
            o, g = ours[inner], theirs[inner]
            both = ~np.isnan(o) & ~np.isnan(g)
            t.check(both.sum() > 0.99 * o.size, "%s: values on the interior cells (%d of %d)" % (what, both.sum(), o.size))
            if what == "slope":
                d = np.abs(o - g)[both].max()
                t.check(d < 1e-3, "slope matches gdaldem within 0.001 degree (worst %.2e)" % d)
            elif what == "aspect":
                # gdaldem sums the window in single precision: on nearly flat cells that
                # alone turns the aspect by tenths of a degree, so compare where the slope
                # is at least 5 degrees (from gdaldem's own slope raster).
                steep = both & (read_band(os.path.join(tmp, "gdal_slope.tif"))[inner] >= 5.0)
                d = np.abs((o - g + 180) % 360 - 180)[steep].max()
                t.check(d < 1e-2, "aspect matches gdaldem within 0.01 degree where slope >= 5 (worst %.2e)" % d)
            else:
                # gdaldem writes 1 + 254 * illumination, rounded to a byte (0 = nodata).
                d = np.abs(1 + 254 * o - g)[both].max()
                t.check(d <= 1.0, "hillshade matches gdaldem within one grey level (worst %.2f)" % d)
            t.check(np.isnan(ours[0, :]).all() and np.isnan(ours[:, -1]).all(),
                    "%s: border cells have no value, as gdaldem without -compute_edges" % what)

        # ---- the outcrop trace vs gdal_contour -fl 0 on numpy's difference raster ----
        # A plane striking 040 and dipping 12 degrees (RHR; dip direction 130) through the grid's middle.
        strike, dip = math.radians(40.0), math.radians(12.0)
        dipdir = strike + math.pi / 2
        normal = np.array([math.sin(dip) * math.sin(dipdir), math.sin(dip) * math.cos(dipdir), math.cos(dip)])
        pe, pn, pz = E0 + 3000.0, N0 + 2500.0, 900.0
        e = E0 + (np.arange(NX) + 0.5) * CELL
        n = N0 + NY * CELL - (np.arange(NY) + 0.5) * CELL
        ee, nn = np.meshgrid(e, n)
        plane = pz - (normal[0] * (ee - pe) + normal[1] * (nn - pn)) / normal[2]
        diff = z.astype(np.float64) - plane
        dtif = os.path.join(tmp, "diff.tif")
        write_tif(dtif, diff.astype(np.float64).astype(np.float32))
        gj = os.path.join(tmp, "zero.geojson")
        subprocess.run(["gdal_contour", "-q", "-fl", "0", "-f", "GeoJSON", dtif, gj], check=True)
        with open(gj) as f:
            import json
            feats = json.load(f)["features"]
        theirs = []
        for ft in feats:
            geom = ft["geometry"]
            parts = [geom["coordinates"]] if geom["type"] == "LineString" else geom["coordinates"]
            theirs += [[tuple(c[:2]) for c in part] for part in parts]
        r = subprocess.run([probe, "trace", "32608", tif, repr(pe), repr(pn), repr(pz)] + [repr(float(v)) for v in normal],
                           capture_output=True, text=True)
        t.check(r.returncode == 0, "terrain_probe trace runs: " + r.stderr)
        ours = [[tuple(map(float, ln.split())) for ln in block.splitlines() if ln.strip()]
                for block in r.stdout.split("\n\n") if block.strip()]
        nv = sum(len(l) for l in ours)
        t.check(nv > 100 and len(theirs) > 0, "both traces have vertices (ours %d, gdal_contour %d lines)" % (nv, len(theirs)))
        worst = max(segment_distance(np.array(p), theirs) for l in ours for p in l)
        t.check(worst <= CELL / 2, "every vertex of our trace lies within half a cell of gdal_contour's (worst %.3f m)" % worst)
        # gdal_contour carries its lines on to the raster's outer edge, half a cell
        # beyond the outermost cell centres where ours stop: compare inside those centres.
        inside = lambda p: e[0] <= p[0] <= e[-1] and n[-1] <= p[1] <= n[0]
        worst2 = max(segment_distance(np.array(p), ours) for l in theirs for p in l if inside(p))
        t.check(worst2 <= CELL / 2, "every vertex of gdal_contour's trace lies within half a cell of ours (worst %.3f m)" % worst2)

sys.exit(t.finish())
