#!/usr/bin/env bash
# Installs Cairn's build (and, with --test, test) dependencies from Debian's packages.
# Only what is missing is installed; running it twice is cheap.
set -euo pipefail
want=(cmake g++ make pkg-config libeigen3-dev libgeographiclib-dev libsqlite3-dev
      libsdl2-dev libimgui-dev libstb-dev libgps-dev libgtest-dev fonts-dejavu-core libexpat1-dev)
if [ "${1:-}" = "--test" ]; then
  # Outside references for the tests: numpy, PROJ (pyproj), GDAL's ogrinfo,
  # a virtual display for the UI, headless Chromium for the report, gpsd for GPS replay,
  # clang with its libFuzzer and sanitizer runtimes for scripts/ci-sanitize.sh.
  want+=(xvfb xauth python3 python3-numpy python3-pyproj gdal-bin chromium
         mesa-utils libgl1-mesa-dri gpsd gpsd-clients dpkg-dev git
         clang libclang-rt-14-dev ccache)
fi
missing=()
for p in "${want[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
  SUDO=""; [ "$(id -u)" -ne 0 ] && SUDO="sudo"
  echo "Installing: ${missing[*]}"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}"
fi
