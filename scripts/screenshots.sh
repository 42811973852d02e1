#!/usr/bin/env bash
# Regenerates the README's screenshots (assets/screenshots/*.png) from a fresh
# `cairn demo`, under xvfb-run, at 1280x800 and 96 dpi:
#   bash scripts/screenshots.sh [path/to/cairn]
# Each picture is the UI's own frame (`cairn gui --screenshot`, or the
# `screenshot` command of an event script after a few taps); nothing is edited
# by hand.
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
cairn=${1:-$here/build/app/cairn}
out=$here/assets/screenshots
command -v xvfb-run >/dev/null || { echo "xvfb-run is missing: bash scripts/install-deps.sh --test" >&2; exit 1; }
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
"$cairn" demo "$tmp/demo" >/dev/null
cd "$tmp/demo"
gui() { "$here/tests/tools/xvfb-do" 1400x1000x24 "$cairn" gui camp.cairn --no-gps --size 1280x800 --dpi 96 "$@"; }
shot() {  # shot NAME [gui options...] < event script
  local name=$1; shift
  { cat; printf 'wait 3\nscreenshot %s\nwait 3\n' "$out/$name.png"; } > "$tmp/$name.txt"
  gui --script "$tmp/$name.txt" "$@"
  echo "wrote assets/screenshots/$name.png"
}
printf 'wait-idle\n' | shot logbook --view logbook
printf 'wait-idle\nwait-for "HAZARD"\n' | shot crosscheck-hazard --view crosscheck --flag daylighting
printf 'wait-idle\ntap "key 0"\ntap "key 3"\ntap "key 5"\ntap "key /"\ntap "key 6"\ntap "key 0"\ntap "Tolm unconformity"\n' |
  shot reading-pad --view pad --station MT-02 --person MT
printf 'wait-idle\nwait-for "day track"\n' | shot plan-track --view plan
printf 'wait-idle\ntap "Kamb contours"\ntap "statistics"\nwait 5\n' | shot net-night --view net --night
