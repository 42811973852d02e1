#!/usr/bin/env bash
# Regenerates the seed corpus of fuzz_exif (tests/fuzz/corpus/exif): tiny JPEGs
# made by Pillow (Debian's python3-pil) with EXIF tags written by exiftool
# (libimage-exiftool-perl). Run from anywhere; needs both tools.
# Source: the tags are those of the EXIF standard (CIPA DC-008, Exif 2.32), written
# by exiftool, a reference library the project did not write.
set -euo pipefail
out="$(cd "$(dirname "$0")" && pwd)/corpus/exif"
mkdir -p "$out"
mk() {
  /usr/bin/python3 -c "from PIL import Image; Image.new('RGB',(8,8),(120,90,60)).save('$out/$1', quality=50)"
  shift_name="$1"; shift
  [ $# -gt 0 ] && exiftool -q -overwrite_original "$@" "$out/$shift_name"
  return 0
}
mk full.jpg '-DateTimeOriginal=2026:07:14 10:32:05' -SubSecTimeOriginal=25 -OffsetTimeOriginal=+02:00 \
  -GPSLatitude=12.5 -GPSLatitudeRef=S -GPSLongitude=70.25 -GPSLongitudeRef=W -GPSAltitude=123.5 '-GPSAltitudeRef#=1'
mk intel.jpg -ExifByteOrder=II '-DateTimeOriginal=2026:07:14 09:00:00' -GPSLatitude=46.5 -GPSLatitudeRef=N \
  -GPSLongitude=14.25 -GPSLongitudeRef=E
mk plain.jpg
