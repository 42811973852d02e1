#!/usr/bin/python3
"""Roles of the survey store, enforced by PostgreSQL itself: a crew writes only
its own projects, a supervisor reads everything and writes only reviews and
sign-offs, a refused publish names project and reason and writes nothing, and
passwords come from the libpq password file, never from the command line.

Source: outside references, as follows:
  - PostgreSQL 15 documentation, "Row Security Policies" (rows another crew's
    role cannot see are not updated: UPDATE reports 0 rows; an INSERT against a
    WITH CHECK policy fails) and "Privileges" (permission denied, SQLSTATE 42501),
    exercised with psql, not through Cairn.
  - libpq documentation, "The Password File" (PGPASSFILE, mode 0600) and
    "Connection URIs"; SCRAM-SHA-256 authentication over TCP (pg_hba.conf).
Args: --cairn PATH --source DIR (unknown ones ignored).
"""
import os
import shutil
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from refcheck import Tally, parse_args  # noqa: E402
from survey_support import Store, cairn, server  # noqa: E402

args = parse_args(required=("cairn", "source"))
tally = Tally("test_survey_roles")
check = tally.check


def snapshot(store):
    """Row counts and a digest of every project table (as the owner sees them)."""
    tables = [r[0] for r in store.rows("SELECT table_name FROM information_schema.tables "
                                       "WHERE table_schema = 'cairn' AND table_type = 'BASE TABLE' ORDER BY 1")]
    return {t: store.value("SELECT count(*) || ':' || coalesce(md5(string_agg(x::text, ',' ORDER BY x::text)), '') "
                           "FROM cairn.%s x" % t) for t in tables}


with server() as state, tempfile.TemporaryDirectory() as tmp:
    demo = os.path.join(args.source, "demo_project")
    tablet = os.path.join(tmp, "tablet-a.cairn")
    shutil.copy(os.path.join(demo, "tablet-a.cairn"), tablet)
    s = Store(state, "survey_roles")
    rc, out, err = cairn(args.cairn, "survey", "init", s.url())
    check(rc == 0, "survey init: " + err)
    for role in ("crew_north", "crew_south", "boss"):
        s.psql("DROP ROLE IF EXISTS %s" % role, check=False)
        s.psql("CREATE ROLE %s LOGIN" % role)
    s.psql("GRANT cairn_supervisor TO boss")

    # A second project, for the other crew (two stations, invented).
    other = os.path.join(tmp, "ridge.cairn")
    cairn(args.cairn, "new", other, "--name", "Ridge traverse", "--utm", "8N")
    csv = os.path.join(tmp, "stations.csv")
    with open(csv, "w") as f:
        f.write("station,lat,lon,elevation\nR1,61.30,-135.40,900\nR2,61.31,-135.41,910\n")
    rc, out, err = cairn(args.cairn, "import", other, "stations", csv)
    check(rc == 0, "import the second project's stations: " + err)

    project = "Auska valley"
    rc, out, err = cairn(args.cairn, "survey", "crew", s.url(), "crew_north", "--project", project)
    check(rc == 0, "crew_north joins the crew of %s: %s" % (project, err))
    rc, out, err = cairn(args.cairn, "survey", "crew", s.url(), "crew_south", "--project", "Ridge traverse")
    check(rc == 0, "crew_south joins the crew of Ridge traverse: " + err)
    rc, out, err = cairn(args.cairn, "survey", "crew", s.url(), "nobody_here", "--project", project)
    check(rc != 0 and "nobody_here" in err, "a role that does not exist is named: " + err)
    check(s.value("SELECT pg_has_role('crew_north', 'cairn_crew', 'MEMBER')") == "t",
          "crew_north is a member of cairn_crew (pg_has_role)")

    # ---- publish by the right and the wrong crew ----
    before = snapshot(s)
    rc, out, err = cairn(args.cairn, "publish", tablet, s.url("crew_south"))
    check(rc == 1, "crew_south may not publish %s (exit %d)" % (project, rc))
    check(project in err and "crew_south" in err and "crew" in err,
          "the refusal names project, role and reason: " + err)
    check(snapshot(s) == before, "a refused publish writes nothing")
    rc, out, err = cairn(args.cairn, "publish", tablet, s.url("crew_north"))
    check(rc == 0, "crew_north publishes its project: " + err)
    rc, out, err = cairn(args.cairn, "publish", other, s.url("crew_south"))
    check(rc == 0, "crew_south publishes its project: " + err)
    n_auska = s.value("SELECT count(*) FROM public.stations WHERE project_name = 'Auska valley'")
    check(int(n_auska) > 0, "the store has the demo's stations")

    # ---- plain SQL by another crew: row-level security ----
    check(s.value("SELECT count(*) FROM public.stations WHERE project_name = 'Auska valley'", user="crew_south") == "0",
          "crew_south cannot see another crew's stations")
    check(s.value("SELECT count(*) FROM public.stations", user="crew_south") == "2",
          "crew_south sees its own two stations")
    before = snapshot(s)
    rc, out, err = s.psql("UPDATE cairn.planes SET dip = 0 WHERE project = (SELECT uuid FROM cairn.projects "
                          "WHERE name = 'Auska valley')", user="crew_south", check=False)
    check(rc == 0 and snapshot(s) == before, "crew_south's UPDATE of another project's readings changes nothing")
    auska = s.value("SELECT uuid FROM cairn.projects WHERE name = 'Auska valley'")
    rc, out, err = s.psql("INSERT INTO cairn.people (project, uuid, name, initials, created, updated, device) VALUES "
                          "('%s', 'x', 'Intruder', 'IX', 'a', 'a', 'd')" % auska, user="crew_south", check=False)
    check(rc != 0 and "row-level security" in err, "crew_south cannot insert into another project: " + err)
    rc, out, err = s.psql("DELETE FROM cairn.stations WHERE project = '%s'" % auska, user="crew_south", check=False)
    check(rc == 0 and s.value("SELECT count(*) FROM public.stations WHERE project_name = 'Auska valley'") == n_auska,
          "crew_south's DELETE reaches no other project's stations")

    # ---- supervisor: reads all, reviews, cannot edit a reading ----
    check(s.value("SELECT count(*) FROM public.stations", user="boss") == str(int(n_auska) + 2),
          "a supervisor reads every project")
    rc, out, err = s.psql("UPDATE cairn.planes SET dip = 1", user="boss", check=False)
    check(rc != 0 and "permission denied" in err, "a supervisor cannot edit a reading: " + err)
    rc, out, err = s.psql("INSERT INTO cairn.flag_reviews (project, uuid, flag_key, rule, status, comment, created, "
                          "updated, device) VALUES ('%s', 'r1', 'misfit|S1||', 'misfit', 'accepted', 'real structure', "
                          "'2025-07-01T10:00:00.000Z', '2025-07-01T10:00:00.000Z', 'boss-laptop')" % auska,
                          user="boss", check=False)
    check(rc == 0, "a supervisor can write a review: " + err)
    rc, out, err = s.psql("INSERT INTO cairn.day_signoffs (project, uuid, day, person, created, updated, device) "
                          "SELECT '%s', 'd1', '2025-07-01', uuid, 'a', 'a', 'boss' FROM cairn.people "
                          "WHERE project = '%s' LIMIT 1" % (auska, auska), user="boss", check=False)
    check(rc == 0, "a supervisor can sign off a day: " + err)
    before = snapshot(s)
    rc, out, err = cairn(args.cairn, "publish", other, s.url("boss"))
    check(rc == 1 and "Ridge traverse" in err, "a supervisor's publish is refused, naming the project: " + err)
    check(snapshot(s) == before, "the supervisor's refused publish wrote nothing")

    # ---- taking a role out of a crew ----
    rc, out, err = cairn(args.cairn, "survey", "crew", s.url(), "crew_north", "--project", project, "--remove")
    check(rc == 0, "crew_north leaves the crew: " + err)
    rc, out, err = cairn(args.cairn, "publish", tablet, s.url("crew_north"))
    check(rc == 1, "after --remove crew_north's publish is refused")
    rc, out, err = s.psql("SELECT count(*) FROM public.stations", user="crew_north", check=False)
    check((rc == 0 and out.strip() == "0") or (rc != 0 and "permission denied" in err),
          "after --remove crew_north sees nothing: " + out + err)

    # ---- passwords: never in the URL, from the password file ----
    secret = "s3cret-Pw"
    url = "postgresql://crew_south:%s@127.0.0.1:%s/%s" % (secret, state["PGPORT"], s.name)
    rc, out, err = cairn(args.cairn, "publish", other, url)
    check(rc != 0 and secret not in err and secret not in out and "password" in err,
          "a password in the URL is refused without being echoed: " + err)
    s.psql("ALTER ROLE crew_south PASSWORD '%s'" % secret)
    passfile = os.path.join(tmp, "pgpass")
    with open(passfile, "w") as f:
        f.write("127.0.0.1:%s:%s:crew_south:%s\n" % (state["PGPORT"], s.name, secret))
    os.chmod(passfile, 0o600)
    env = dict(os.environ, PGPASSFILE=passfile)
    env.pop("PGPASSWORD", None)
    url = "postgresql://crew_south@127.0.0.1:%s/%s" % (state["PGPORT"], s.name)
    r = subprocess.run([args.cairn, "publish", other, url], capture_output=True, text=True, env=env)
    check(r.returncode == 0 and "nothing new" in r.stdout,
          "over TCP with SCRAM the password comes from PGPASSFILE: " + r.stdout + r.stderr)
    r = subprocess.run([args.cairn, "publish", other, url], capture_output=True, text=True,
                       env=dict(env, PGPASSFILE=os.path.join(tmp, "none")))
    check(r.returncode != 0 and secret not in r.stderr, "without the password file the connection is refused: " + r.stderr)
    for role in ("crew_north", "crew_south", "boss"):
        s.psql("DROP OWNED BY %s" % role, check=False)

sys.exit(tally.finish())
