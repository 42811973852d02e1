#!/usr/bin/env bash
# Installs what is missing, builds Release, and runs Cairn on the bundled demo project:
# the touch UI when a display exists; otherwise the cross-check summary.
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
bash "$here/scripts/install-deps.sh"
cmake -S "$here" -B "$here/build" -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build "$here/build" -j"$(nproc)" --target cairn
cairn="$here/build/app/cairn"
# Work on a copy, so the bundled files stay as shipped; an existing copy (with the
# user's edits) is kept.
work="$here/build/demo"
if [ ! -f "$work/camp.cairn" ]; then
  if [ -f "$here/demo_project/camp.cairn" ]; then
    mkdir -p "$work"
    cp "$here"/demo_project/*.cairn "$here"/demo_project/*.csv "$here"/demo_project/*.gpx "$work"/
    if [ -d "$here/demo_project/photos" ]; then cp -r "$here/demo_project/photos" "$work"/; fi
  else
    "$cairn" demo "$work" --force >/dev/null
  fi
fi
if [ -n "${DISPLAY:-}${WAYLAND_DISPLAY:-}" ] && "$cairn" help gui >/dev/null 2>&1; then
  exec "$cairn" gui "$work/camp.cairn"
fi
"$cairn" check "$work/camp.cairn" --min-severity query
echo
echo "No display here. On a machine with a screen, open the touch UI with:"
echo "  $cairn gui $work/camp.cairn"
