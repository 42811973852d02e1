#!/usr/bin/python3
"""cairn pull against a real survey store, and a publish killed mid-way.

Source: outside references, as follows:
  - The stations inside a W,S,E,N box, computed here from the project file's
    latitudes and longitudes (Python's sqlite3), against the pulled file; the
    box also checked by PostGIS (ST_MakeEnvelope / ST_Intersects).
  - A pulled file published back: the store's rows, compared with psql, must
    not change (no duplicates); UUID sets from Python.
  - PostgreSQL 15 documentation, "Transactions" / "Reliability and the
    Write-Ahead Log": a transaction whose client is killed (SIGKILL) before
    COMMIT leaves nothing; the store's rows are compared with psql before and after.
Args: --cairn PATH --source DIR (unknown ones ignored).
"""
import json
import os
import shutil
import signal
import sqlite3
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from refcheck import Tally, parse_args  # noqa: E402
from survey_support import Store, cairn, server  # noqa: E402

args = parse_args(required=("cairn", "source"))
tally = Tally("test_survey_pull")
check = tally.check


def file_rows(path, sql):
    db = sqlite3.connect("file:%s?mode=ro" % path, uri=True)
    try:
        return db.execute(sql).fetchall()
    finally:
        db.close()


def snapshot(store):
    tables = [r[0] for r in store.rows("SELECT table_name FROM information_schema.tables "
                                       "WHERE table_schema = 'cairn' AND table_type = 'BASE TABLE' ORDER BY 1")]
    return {t: store.value("SELECT count(*) || ':' || coalesce(md5(string_agg(x::text, ',' ORDER BY x::text)), '') "
                           "FROM cairn.%s x" % t) for t in tables}


with server() as state, tempfile.TemporaryDirectory() as tmp:
    camp = os.path.join(tmp, "camp.cairn")
    shutil.copy(os.path.join(args.source, "demo_project", "camp.cairn"), camp)
    s = Store(state, "survey_pull")
    cairn(args.cairn, "survey", "init", s.url())
    rc, out, err = cairn(args.cairn, "publish", camp, s.url())
    check(rc == 0, "publish the camp file: " + err)
    project = file_rows(camp, "SELECT name FROM project")[0][0]

    # ---- pull by box: exactly the stations inside ----
    stations = file_rows(camp, "SELECT uuid, lat, lon FROM stations")
    lats = sorted(r[1] for r in stations)
    lons = sorted(r[2] for r in stations)
    # A box around the south-west part of the area, edges between stations.
    south, north = lats[0] - 0.01, (lats[len(lats) // 2] + lats[len(lats) // 2 + 1]) / 2
    west, east = lons[0] - 0.01, (lons[len(lons) // 2] + lons[len(lons) // 2 + 1]) / 2
    inside = {r[0] for r in stations if west <= r[2] <= east and south <= r[1] <= north}
    check(0 < len(inside) < len(stations), "the box holds some stations, not all (%d of %d)" % (len(inside), len(stations)))
    bbox = "%.9f,%.9f,%.9f,%.9f" % (west, south, east, north)
    part = os.path.join(tmp, "part.cairn")
    rc, out, err = cairn(args.cairn, "pull", s.url(), part, "--project", project, "--bbox", bbox, "--json")
    check(rc == 0, "pull --bbox: " + err)
    got = {r[0] for r in file_rows(part, "SELECT uuid FROM stations")}
    check(got == inside, "pull --bbox gives exactly the stations inside the box (%d, expected %d)" % (len(got), len(inside)))
    gis = {r[0] for r in s.rows("SELECT uuid FROM public.stations WHERE ST_Intersects(geom, ST_MakeEnvelope(%s, 4326))"
                                % bbox)}
    live_inside = {r[0] for r in file_rows(camp, "SELECT uuid, lat, lon FROM stations WHERE deleted IS NULL")
                   if r[0] in inside}
    check(gis == live_inside, "PostGIS ST_Intersects with the box finds the same live stations")
    readings = {r[0] for r in file_rows(camp, "SELECT uuid FROM planes WHERE station IN (%s)" %
                                        ",".join("'%s'" % u for u in inside))}
    check({r[0] for r in file_rows(part, "SELECT uuid FROM planes")} == readings,
          "the pulled file has every planar reading of those stations")
    check(file_rows(part, "PRAGMA integrity_check")[0][0] == "ok", "the pulled file passes SQLite's integrity_check")
    check(file_rows(part, "PRAGMA foreign_key_check") == [], "the pulled file has no dangling reference (foreign_key_check)")
    check(file_rows(part, "SELECT name, utm_zone FROM project") == file_rows(camp, "SELECT name, utm_zone FROM project"),
          "the pulled file has the project's name and zone")
    rc, out, err = cairn(args.cairn, "pull", s.url(), part, "--project", project)
    check(rc != 0 and "exists" in err, "pull never overwrites a file: " + err)
    rc, out, err = cairn(args.cairn, "pull", s.url(), os.path.join(tmp, "x.cairn"), "--project", project,
                         "--bbox", "10,20,30")
    check(rc == 2 and "bbox" in err, "a malformed box is refused: " + err)
    rc, out, err = cairn(args.cairn, "pull", s.url(), os.path.join(tmp, "y.cairn"), "--project", "No such project")
    check(rc != 0 and "No such project" in err, "an unknown project is named: " + err)

    # ---- --since: nothing is newer than the newest record ----
    newest = file_rows(camp, "SELECT max(updated) FROM stations")[0][0]
    later = os.path.join(tmp, "later.cairn")
    rc, out, err = cairn(args.cairn, "pull", s.url(), later, "--project", project, "--since", "2999-01-01")
    check(rc == 0 and file_rows(later, "SELECT count(*) FROM stations")[0][0] == 0,
          "pull --since a future date takes no station: " + err)
    rc, out, err = cairn(args.cairn, "pull", s.url(), os.path.join(tmp, "all.cairn"), "--project", project,
                         "--since", newest[:10])
    n = file_rows(os.path.join(tmp, "all.cairn"), "SELECT count(*) FROM stations")[0][0]
    expect = len({r[0] for r in file_rows(camp, "SELECT s.uuid FROM stations s WHERE s.updated >= '%s' OR EXISTS "
                                          "(SELECT 1 FROM planes p WHERE p.station = s.uuid AND p.updated >= '%s') OR "
                                          "EXISTS (SELECT 1 FROM lines l WHERE l.station = s.uuid AND l.updated >= '%s')"
                                          % ((newest[:10],) * 3))})
    check(rc == 0 and n == expect, "pull --since the last day takes the stations changed that day (%d, %d)" % (n, expect))

    # ---- a pulled file publishes back without duplicates ----
    records = ("people", "units", "contacts", "stations", "planes", "lines", "points", "photos", "audit", "conflicts")
    before = snapshot(s)
    rc, out, err = cairn(args.cairn, "publish", part, s.url(), "--json")
    rep = json.loads(out) if rc == 0 else {}
    # The pulled file is a new tablet: its device is registered, no record is written.
    check(set(rep.get("tables", {"x": 0})) <= {"devices", "merges"} and rep["tables"]["devices"]["written"] == 1,
          "publishing the pulled file back registers its device only: " + out + err)
    after = snapshot(s)
    check(all(after[t] == before[t] for t in records), "the store's records are unchanged")
    before = snapshot(s)
    rc, out, err = cairn(args.cairn, "publish", part, s.url(), "--json")
    check(rc == 0 and json.loads(out)["changed"] is False, "publishing it again changes nothing: " + out + err)
    check(snapshot(s) == before, "the store's rows are unchanged")
    csv = os.path.join(tmp, "planes.csv")
    code = file_rows(part, "SELECT code FROM stations WHERE deleted IS NULL ORDER BY code LIMIT 1")[0][0]
    with open(csv, "w") as f:
        f.write("station,kind,strike,dip,ref\n%s,joint,123,45,J-new\n" % code)
    rc, out, err = cairn(args.cairn, "import", part, "planes", csv)
    check(rc == 0, "a reading added to the pulled file: " + err)
    n_before = int(s.value("SELECT count(*) FROM cairn.planes"))
    rc, out, err = cairn(args.cairn, "publish", part, s.url(), "--json")
    rep = json.loads(out) if rc == 0 else {}
    check(rep.get("tables", {}).get("planes", {}).get("written") == 1, "publishing it back writes that one reading: " + out)
    check(int(s.value("SELECT count(*) FROM cairn.planes")) == n_before + 1, "one more planar reading, no duplicates")
    dup = s.value("SELECT count(*) FROM (SELECT uuid FROM cairn.planes GROUP BY project, uuid HAVING count(*) > 1) d")
    check(dup == "0", "no UUID twice in the store")

    # ---- a publish killed before COMMIT leaves the store as it was ----
    tablet = os.path.join(tmp, "tablet-b.cairn")
    shutil.copy(os.path.join(args.source, "demo_project", "tablet-b.cairn"), tablet)
    fresh = Store(state, "survey_kill")
    cairn(args.cairn, "survey", "init", fresh.url())
    # A copy: opening the demo's own file would leave its -wal and -shm in the source tree.
    first = os.path.join(tmp, "tablet-a.cairn")
    shutil.copy(os.path.join(args.source, "demo_project", "tablet-a.cairn"), first)
    cairn(args.cairn, "publish", first, fresh.url())
    before = snapshot(fresh)
    p = subprocess.Popen([args.cairn, "publish", tablet, fresh.url()], stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                         text=True, env=dict(os.environ, CAIRN_PUBLISH_STALL="60", TMPDIR=tmp))
    # (TMPDIR: the killed process cannot remove its scratch folder; this test's does.)
    line = p.stderr.readline()
    check("about to commit" in line, "the publish reached the point before COMMIT: " + line)
    pending = fresh.value("SELECT count(*) FROM pg_stat_activity WHERE datname = 'survey_kill' AND "
                          "state = 'idle in transaction'")
    check(pending == "1", "its transaction is open on the server, rows written")
    p.send_signal(signal.SIGKILL)
    p.wait()
    # The server notices the closed connection and rolls back: at once on an idle
    # machine, later on a loaded one (a CI run with its other tests), so up to 30 s.
    for _ in range(300):
        if fresh.value("SELECT count(*) FROM pg_stat_activity WHERE datname = 'survey_kill' AND "
                       "state = 'idle in transaction'") == "0":
            break
        time.sleep(0.1)
    check(snapshot(fresh) == before, "after SIGKILL the store is as it was")
    rc, out, err = cairn(args.cairn, "publish", tablet, fresh.url())
    check(rc == 0, "publishing again afterwards works: " + err)
    check(snapshot(fresh) != before, "and changes the store")

sys.exit(tally.finish())
