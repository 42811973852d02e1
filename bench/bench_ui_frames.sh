#!/usr/bin/env bash
# How long the touch UI takes to build a frame (CPU) with many readings on the
# Net and Plan screens. Target: well under 16 ms with 50 000 readings. Needs a
# built `cairn` and xvfb-run; run by hand, never from the tests:
#
#   bash bench/bench_ui_frames.sh [READINGS]     (default 50000)
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
cairn="$here/build/app/cairn"
n=${1:-50000}
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
/usr/bin/python3 - "$work" "$n" <<'PY'
import random, sys
work, n = sys.argv[1], int(sys.argv[2])
rng = random.Random(1)
stations = max(1, n // 5)
with open(work + "/stations.csv", "w") as f:
    f.write("station,lat,lon,elevation,h_accuracy,v_accuracy,time\n")
    for i in range(stations):
        f.write("B%05d,%.6f,%.6f,%.1f,3,5,2026-07-%02dT%02d:%02d:00-07:00\n" % (
            i, 61.15 + rng.random() * 0.1, -135.7 + rng.random() * 0.2, 900 + rng.random() * 300,
            6 + i % 4, 8 + (i // 60) % 10, i % 60))
with open(work + "/planes.csv", "w") as f:
    f.write("station,kind,strike,dip,ref\n")
    for i in range(n):
        f.write("B%05d,%s,%d,%d,r%d\n" % (i % stations, rng.choice(["bedding", "joint", "cleavage"]),
                                        rng.randrange(360), rng.randrange(91), i))
PY
"$cairn" new "$work/big.cairn" --name "frame benchmark" --utm 8N >/dev/null
"$cairn" import "$work/big.cairn" stations "$work/stations.csv" >/dev/null
"$cairn" import "$work/big.cairn" planes "$work/planes.csv" >/dev/null
for view in net plan; do
  printf '%-5s ' "$view"
  xvfb-run -a -s "-screen 0 1280x800x24" "$cairn" gui "$work/big.cairn" --view "$view" --size 1280x800 \
    --frames 120 --screenshot "$work/$view.png" --frame-stats 2>&1 | grep "frame build" || true
done
