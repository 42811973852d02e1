#!/usr/bin/env bash
# Installs Cairn's build (and, with --test, test) dependencies from Debian's packages.
# Only what is missing is installed; running it twice is cheap.
set -euo pipefail
want=(cmake g++ make pkg-config libeigen3-dev libgeographiclib-dev libsqlite3-dev
      libsdl2-dev libimgui-dev libstb-dev libgps-dev libgtest-dev fonts-dejavu-core libgdal-dev zlib1g-dev
      libfmt-dev nlohmann-json3-dev libcli11-dev libhowardhinnant-date-dev libexpat1-dev libpq-dev libexif-dev)
if [ "${1:-}" = "--test" ]; then
  # Outside references for the tests: numpy, PROJ (pyproj), GDAL's ogrinfo, gdaldem,
  # gdal_contour, gdallocationinfo and its Python bindings,
  # a virtual display for the UI, headless Chromium for the report, gpsd for GPS replay,
  # PostgreSQL + PostGIS for a throwaway survey store (tests/survey/pg_cluster.sh),
  # xmllint for GPX output (and the GPX 1.1 schema check), the sqlite3 shell to count what a
  # project file holds, clang with its libFuzzer and sanitizer runtimes for
  # scripts/ci-sanitize.sh, exiftool for the photos' EXIF and Pillow to make test photos,
  # /usr/bin/time for bench/run (peak memory).
  want+=(xvfb xauth python3 python3-numpy python3-pyproj gdal-bin python3-gdal chromium
         mesa-utils libgl1-mesa-dri gpsd gpsd-clients dpkg-dev git clang-format
         postgresql-15 postgresql-15-postgis-3 libxml2-utils sqlite3 clang libclang-rt-14-dev ccache
         libimage-exiftool-perl python3-pil time)
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
