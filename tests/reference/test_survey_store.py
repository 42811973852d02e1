#!/usr/bin/python3
"""The survey store (cairn survey init, cairn publish) against a real PostgreSQL
+ PostGIS server, PROJ and GDAL.

Source: outside references, as follows:
  - PostGIS ST_X / ST_Y of every station layer feature against the latitude and
    longitude in the project files (read with Python's sqlite3, SQLite's own reader).
  - PostGIS ST_Transform to the project's UTM zone against PROJ (pyproj,
    EPSG:326zz / 327zz); agreement within 1 mm.
  - GDAL's ogrinfo lists the six layers with their feature counts and writes no
    warning (GDAL PostgreSQL driver documentation).
  - Counts: the set union of record UUIDs of the published files (Python sets),
    and live records as the newest version of each UUID (the demo's files merge
    without conflicts), not Cairn's own numbers.
  - Order independence and idempotence: the store's rows, compared as text by
    psql, after publishing the demo's two tablets and camp file in several
    orders, and after publishing again.
Args: --cairn PATH --source DIR (unknown ones ignored).
"""
import json
import os
import shutil
import sqlite3
import subprocess
import sys
import tempfile

from pyproj import Transformer

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from refcheck import Tally, parse_args  # noqa: E402
from survey_support import Store, cairn, server  # noqa: E402

args = parse_args(required=("cairn", "source"))
tally = Tally("test_survey_store")
check = tally.check

RECORD_TABLES = ["devices", "people", "units", "contacts", "stations", "planes", "lines", "points", "photos", "audit"]


def file_rows(path, table):
    db = sqlite3.connect("file:%s?mode=ro" % path, uri=True)
    db.row_factory = sqlite3.Row
    try:
        return [dict(r) for r in db.execute("SELECT * FROM %s" % table)]
    finally:
        db.close()


def dump(store):
    """Every row of the store's project tables as text, for comparing stores.
    Left out: the store's own bookkeeping (merges log, publishes, its device
    row, times a conflict was found, time of the check)."""
    out = {}
    for t in RECORD_TABLES + ["conflicts", "conflict_values", "key_clashes", "fits", "flags"]:
        cols = [r[0] for r in store.rows(
            "SELECT column_name FROM information_schema.columns WHERE table_schema = 'cairn' AND table_name = '%s' "
            "AND column_name NOT IN ('project', 'found_at', 'checked') ORDER BY ordinal_position" % t)]
        where = " WHERE name <> 'survey store'" if t == "devices" else ""
        sel = ", ".join('"%s"::text' % c for c in cols)
        rows = store.rows("SELECT %s FROM cairn.%s%s ORDER BY 1, 2" % (sel, t, where))
        out[t] = sorted("|".join(r) for r in rows)
    return out


with server() as state, tempfile.TemporaryDirectory() as tmp:
    demo = os.path.join(args.source, "demo_project")
    files = {}
    for name in ("tablet-a.cairn", "tablet-b.cairn", "camp.cairn"):
        files[name] = os.path.join(tmp, name)
        shutil.copy(os.path.join(demo, name), files[name])

    # ---- init: new, then again (nothing to do) ----
    s1 = Store(state, "survey_order1")
    rc, out, err = cairn(args.cairn, "survey", "init", s1.url())
    check(rc == 0 and "set up" in out, "survey init sets up a store: %s %s" % (out, err))
    rc, out, err = cairn(args.cairn, "survey", "init", s1.url())
    check(rc == 0 and "already up to date" in out, "survey init again changes nothing: %s %s" % (out, err))
    version = sqlite3.connect(files["camp.cairn"]).execute("PRAGMA user_version").fetchone()[0]
    check(s1.value("SELECT value FROM cairn.meta WHERE key = 'project_schema'") == str(version),
          "the store follows the project file schema version (SQLite PRAGMA user_version)")

    # ---- publish in one order, twice ----
    def publish(store, name):
        rc, out, err = cairn(args.cairn, "publish", files[name], store.url(), "--json")
        if not check(rc == 0, "publish %s: %s" % (name, err)):
            return {}
        return json.loads(out)

    for name in ("tablet-a.cairn", "tablet-b.cairn", "camp.cairn"):
        publish(s1, name)
    first = dump(s1)
    for name in ("tablet-a.cairn", "tablet-b.cairn", "camp.cairn"):
        rep = publish(s1, name)
        check(rep.get("changed") is False, "publishing %s again changes nothing" % name)
    check(dump(s1) == first, "the store's rows are the same after publishing every file again")
    check(s1.value("SELECT count(*) FROM cairn.publishes") == "3" or
          int(s1.value("SELECT count(*) FROM cairn.publishes")) <= 3,
          "a publish that changes nothing writes no log row")

    # ---- other orders give the same store ----
    for i, order in enumerate([("camp.cairn", "tablet-b.cairn", "tablet-a.cairn"),
                               ("tablet-b.cairn", "camp.cairn", "tablet-a.cairn")]):
        s = Store(state, "survey_order%d" % (i + 2))
        cairn(args.cairn, "survey", "init", s.url())
        for name in order:
            publish(s, name)
        other = dump(s)
        for t in first:
            check(other[t] == first[t], "order %s gives the same %s" % (" ".join(order), t))

    # ---- counts match the project files ----
    for t in RECORD_TABLES:
        uuids = set()
        for f in files.values():
            uuids |= {r["uuid"] for r in file_rows(f, t)}
        where = " WHERE name <> 'survey store'" if t == "devices" else ""
        n = int(s1.value("SELECT count(*) FROM cairn.%s%s" % (t, where)))
        check(n == len(uuids), "%s: store holds %d rows, the files %d distinct UUIDs" % (t, n, len(uuids)))

    newest = {}
    for f in files.values():
        for r in file_rows(f, "stations"):
            if r["uuid"] not in newest or r["updated"] > newest[r["uuid"]]["updated"]:
                newest[r["uuid"]] = r
    live = {u: r for u, r in newest.items() if r["deleted"] is None}

    # ---- PostGIS agrees with the files: ST_X/ST_Y against lat/lon ----
    rows = s1.rows("SELECT uuid, ST_X(geom), ST_Y(geom), ST_SRID(geom), utm_epsg, utm_easting, utm_northing "
                   "FROM public.stations")
    check(len(rows) == len(live), "the stations layer has every live station (%d, files %d)" % (len(rows), len(live)))
    worst = 0.0
    for u, x, y, srid, epsg, e, n in rows:
        f = live.get(u)
        if not check(f is not None and srid == "4326", "station %s is live in the files, SRID 4326" % u):
            continue
        worst = max(worst, abs(float(x) - f["lon"]), abs(float(y) - f["lat"]))
    check(worst < 1e-12, "ST_X/ST_Y equal the files' lon/lat (worst %.3g degrees)" % worst)

    # ---- ST_Transform against PROJ ----
    zone = file_rows(files["camp.cairn"], "project")[0]["utm_zone"]
    expect_epsg = (32600 if zone.endswith("N") else 32700) + int(zone[:-1])
    worst = 0.0
    tr = Transformer.from_crs("EPSG:4326", "EPSG:%d" % expect_epsg, always_xy=True)
    for u, x, y, srid, epsg, e, n in rows:
        check(epsg == str(expect_epsg), "station %s in the project's zone %s (EPSG:%d)" % (u, zone, expect_epsg))
        pe, pn = tr.transform(live[u]["lon"], live[u]["lat"])
        worst = max(worst, abs(pe - float(e)), abs(pn - float(n)))
    check(worst < 0.001, "ST_Transform to UTM agrees with PROJ within 1 mm (worst %.3g m)" % worst)

    # ---- ogrinfo lists the layers with their counts, without warnings ----
    r = subprocess.run(["ogrinfo", "-ro", "-so", "-al", "PG:" + s1.url()], capture_output=True, text=True)
    check(r.returncode == 0, "ogrinfo opens the store: " + r.stderr)
    check(r.stderr.strip() == "", "ogrinfo writes no warning: " + r.stderr)
    counts = {}
    layer = None
    for line in r.stdout.splitlines():
        if line.startswith("Layer name: "):
            layer = line[len("Layer name: "):].strip()
        elif line.startswith("Feature Count: ") and layer:
            counts[layer] = int(line[len("Feature Count: "):])
    for name in ("stations", "planar_readings", "linear_readings", "contact_points", "fitted_contacts", "flags"):
        check(name in counts, "ogrinfo lists layer %s" % name)
    check(counts.get("stations") == len(live), "ogrinfo: stations %s features, files %d live" %
          (counts.get("stations"), len(live)))
    for layer, table in (("planar_readings", "planes"), ("linear_readings", "lines"), ("contact_points", "points")):
        newest = {}
        for f in files.values():
            for row in file_rows(f, table):
                if row["uuid"] not in newest or row["updated"] > newest[row["uuid"]]["updated"]:
                    newest[row["uuid"]] = row
        n = sum(1 for row in newest.values() if row["deleted"] is None)
        check(counts.get(layer) == n, "ogrinfo: %s %s features, files %d live" % (layer, counts.get(layer), n))
    contacts = {r["uuid"] for f in files.values() for r in file_rows(f, "contacts") if r["deleted"] is None}
    check(counts.get("fitted_contacts") == len(contacts),
          "ogrinfo: one fitted contact per live contact (%s, files %d)" % (counts.get("fitted_contacts"), len(contacts)))
    r = subprocess.run(["ogrinfo", "-ro", "-q", "PG:" + s1.url(), "-sql",
                        "SELECT count(*) AS n FROM stations WHERE geom IS NULL"], capture_output=True, text=True)
    check("n (Integer64) = 0" in r.stdout or "n (Integer) = 0" in r.stdout, "every station has a geometry: " + r.stdout)

sys.exit(tally.finish())
