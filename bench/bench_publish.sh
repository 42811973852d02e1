#!/usr/bin/env bash
# Survey store publish throughput: a season file (STATIONS stations, three planar
# readings each, 2 x STATIONS contact points; default 100 000 / 300 000 / 200 000)
# published into an empty store and into a store that already holds it, against
# the floor measured in the same run: psql's \copy of the same rows into an empty
# store of the same layout. Target: publish within 3x of the floor.
#
#   bash bench/bench_publish.sh [STATIONS]      (needs build/app/cairn)
#
# Starts its own throwaway PostgreSQL cluster (tests/survey/pg_cluster.sh) and
# always stops it. Prints a Markdown table for bench/RESULTS.md.
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
cairn=${CAIRN:-$here/build/app/cairn}
n=${1:-100000}
work=$(mktemp -d "${TMPDIR:-/tmp}/cairn-bench-XXXXXX")
state=$work/pg.state
cleanup() {
  bash "$here/tests/survey/pg_cluster.sh" stop "$state" >/dev/null 2>&1 || true
  rm -rf "$work"
}
trap cleanup EXIT INT TERM
OWNER_PID=$$ bash "$here/tests/survey/pg_cluster.sh" start "$state" >/dev/null
# shellcheck disable=SC1090
. "$state"
psql_() { psql -X -q -v ON_ERROR_STOP=1 -h "$PGSOCK" -p "$PGPORT" -U postgres "$@"; }
url() { echo "postgresql://postgres@/$1?host=$PGSOCK&port=$PGPORT"; }
now() { date +%s.%N; }
secs() { /usr/bin/python3 -c "import sys; print('%.2f' % (float(sys.argv[2]) - float(sys.argv[1])))" "$1" "$2"; }

# ---- the season file, through `cairn import` (an invented area, 0.5 x 0.4 degrees) ----
/usr/bin/python3 - "$work" "$n" <<'PY'
import random, sys
work, n = sys.argv[1], int(sys.argv[2])
rnd = random.Random(15)
with open(work + "/units.csv", "w") as f:
    f.write("unit,name,age_rank\n")
    for i in range(6):
        f.write("U%d,Unit %d,%d\n" % (i, i, i + 1))
with open(work + "/contacts.csv", "w") as f:
    f.write("contact,lower_unit,upper_unit,type\n")
    for i in range(40):
        f.write("K%d,U%d,U%d,depositional\n" % (i, i % 5, i % 5 + 1))
with open(work + "/stations.csv", "w") as f:
    f.write("station,lat,lon,elevation,h_accuracy,notes\n")
    for i in range(n):
        f.write("S%d,%.7f,%.7f,%.1f,3,season bench\n" % (i, 61.0 + rnd.random() * 0.4, -135.9 + rnd.random() * 0.5,
                                                          800 + rnd.random() * 600))
with open(work + "/planes.csv", "w") as f:
    f.write("station,kind,strike,dip\n")
    for i in range(n):
        for k in ("bedding", "joint", "cleavage"):
            f.write("S%d,%s,%.0f,%.0f\n" % (i, k, rnd.random() * 359, rnd.random() * 89))
with open(work + "/points.csv", "w") as f:
    f.write("contact,lat,lon,elevation\n")
    for i in range(2 * n):
        f.write("K%d,%.7f,%.7f,%.1f\n" % (i % 40, 61.0 + rnd.random() * 0.4, -135.9 + rnd.random() * 0.5,
                                         800 + rnd.random() * 600))
PY
season=$work/season.cairn
t0=$(now)
"$cairn" new "$season" --name "Season bench" --utm 8N >/dev/null
for kind in units contacts stations planes; do "$cairn" import "$season" "$kind" "$work/$kind.csv" >/dev/null; done
"$cairn" import "$season" points "$work/points.csv" >/dev/null
t1=$(now)
echo "season file: $n stations, $((3 * n)) planar readings, $((2 * n)) contact points, built in $(secs "$t0" "$t1") s" >&2

psql_ -d postgres -c "CREATE DATABASE store1" -c "CREATE DATABASE floor1"
for db in store1 floor1; do
  psql_ -d $db -c "CREATE EXTENSION postgis"
  "$cairn" survey init "$(url $db)" >/dev/null
done

t0=$(now); "$cairn" publish "$season" "$(url store1)" >/dev/null; t1=$(now)
empty=$(secs "$t0" "$t1")
t0=$(now); "$cairn" publish "$season" "$(url store1)" >/dev/null; t1=$(now)
again=$(secs "$t0" "$t1")

# ---- the floor: the same rows with psql \copy into an empty store ----
tables=$(psql_ -d store1 -At -c "SELECT table_name FROM information_schema.tables WHERE table_schema = 'cairn'
  AND table_type = 'BASE TABLE' AND table_name NOT IN ('meta') ORDER BY table_name = 'projects' DESC, table_name")
rows=0
for t in $tables; do
  psql_ -d store1 -c "\\copy cairn.$t TO '$work/$t.copy'"
  rows=$((rows + $(wc -l <"$work/$t.copy")))
done
script=$work/floor.sql
: >"$script"
echo "BEGIN;" >>"$script"
echo "SET CONSTRAINTS ALL DEFERRED;" >>"$script"
for t in $tables; do echo "\\copy cairn.$t FROM '$work/$t.copy'" >>"$script"; done
echo "COMMIT;" >>"$script"
t0=$(now); psql_ -d floor1 -f "$script"; t1=$(now)
floor=$(secs "$t0" "$t1")

ratio=$(/usr/bin/python3 -c "import sys; print('%.1f' % (float(sys.argv[1]) / float(sys.argv[2])))" "$empty" "$floor")
cat <<TABLE
| what | seconds |
| --- | --- |
| season file: $n stations, $((3 * n)) planar readings, $((2 * n)) contact points ($rows store rows with audit) | |
| floor: \`psql \\copy\` of the same rows into an empty store | $floor |
| \`cairn publish\` into an empty store | $empty (${ratio}x the floor) |
| \`cairn publish\` into a store that already holds it | $again |
TABLE
