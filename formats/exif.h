// A photo's EXIF time and GPS position, read and written through Debian's
// libexif (libexif-dev); Cairn has no EXIF parser of its own.
//
// Tags read (EXIF 2.32, CIPA DC-008-2019): DateTimeOriginal (0x9003,
// "YYYY:MM:DD hh:mm:ss", the camera's clock), OffsetTimeOriginal (0x9011,
// "+hh:mm", when the camera wrote one), SubSecTimeOriginal (0x9291, digits of
// the fraction of a second), and in the GPS IFD GPSLatitudeRef/GPSLatitude,
// GPSLongitudeRef/GPSLongitude (three rationals: degrees, minutes, seconds)
// and GPSAltitudeRef/GPSAltitude (0 above, 1 below sea level).
//
// Photo files are untrusted: a file over kMaxPhotoBytes or one that does not
// start as a JPEG (FF D8 FF) is refused; every tag's format and count is
// checked, a rational with a zero denominator or a value out of range is
// dropped with a note, never guessed.
#pragma once
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "geomath/result.h"

namespace cairn::formats {

// Largest photo file Cairn reads (64 MiB: a camera JPEG is a few MiB).
constexpr size_t kMaxPhotoBytes = size_t{64} << 20;

struct PhotoExif {
  // DateTimeOriginal as ISO 8601 ("2026-07-14T10:32:05[.25][+02:00]"): the
  // camera's clock; with the offset only when OffsetTimeOriginal was there.
  std::string time;
  std::optional<double> lat, lon;  // WGS84 decimal degrees, north and east positive
  std::optional<double> altitude;  // metres above sea level
  // Why a tag that was present was not used ("GPSLatitude: zero denominator").
  std::vector<std::string> notes;
};

// Whether DATA starts as a JPEG file does (SOI marker then a marker: FF D8 FF).
bool looks_like_jpeg(std::string_view data);

// The EXIF of a JPEG file's bytes. Fails (naming NAME) for a file that is
// not a JPEG or is too large; a JPEG without EXIF gives an empty PhotoExif.
Result<PhotoExif> read_exif(std::string_view data, const std::string& name);

// What write_exif_jpeg puts in: DateTimeOriginal, and GPS tags when lat/lon are given.
struct ExifToWrite {
  std::string time;  // "YYYY-MM-DDThh:mm:ss" (camera clock, no offset)
  std::optional<double> lat, lon, altitude;
};

// JPEG bytes with an APP1 EXIF segment built by libexif inserted after the
// SOI marker (the JPEG must have no EXIF yet). Fails for a bad time or a JPEG
// that does not start with SOI.
Result<std::string> write_exif_jpeg(std::string_view jpeg, const ExifToWrite& w);

}  // namespace cairn::formats
