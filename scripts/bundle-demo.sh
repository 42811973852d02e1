#!/usr/bin/env bash
# Rebuilds the bundled demo project (demo_project/) with a built `cairn`:
#   bash scripts/bundle-demo.sh [path/to/cairn]
# The demo is deterministic; tests/reference/test_demo.py holds the bundled
# files to a fresh build. Only the project files, CSV, GPX, terrain and photos are copied: no
# SQLite -wal/-shm side files (every file is closed, hence checkpointed).
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
cairn=${1:-$here/build/app/cairn}
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
"$cairn" demo "$tmp/demo" >/dev/null
for f in "$tmp"/demo/*.cairn "$tmp"/demo/*.csv "$tmp"/demo/*.gpx "$tmp"/demo/*.tif; do
  cp "$f" "$here/demo_project/"
done
# The demo's photos (a dozen small JPEGs with EXIF, written by `cairn demo`).
rm -rf "$here/demo_project/photos"
mkdir -p "$here/demo_project/photos"
cp "$tmp"/demo/photos/*.JPG "$here/demo_project/photos/"
echo "demo_project/ rebuilt from $cairn"
