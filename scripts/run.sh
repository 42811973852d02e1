#!/usr/bin/env bash
# Installs what is missing, builds Release, and runs Cairn on the bundled demo project:
# the touch UI when a display exists; otherwise the cross-check summary.
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
bash "$here/scripts/install-deps.sh"
cmake -S "$here" -B "$here/build" -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build "$here/build" -j"$(nproc)" --target cairn
cairn="$here/build/app/cairn"
demo="$here/demo_project/camp.cairn"
if [ -f "$demo" ]; then
  if [ -n "${DISPLAY:-}${WAYLAND_DISPLAY:-}" ]; then
    exec "$cairn" gui "$demo"
  fi
  "$cairn" check "$demo"
  echo
  echo "No display here. To open the touch UI on a machine with a screen: $cairn gui $demo"
else
  "$cairn" fit "$here/demo_project/examples/strike_lines.csv"
fi
