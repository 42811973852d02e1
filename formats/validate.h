// Boundary rules shared by the record API (storage/repository.h) and the
// importers (storage/import.h). Each rule has a stable id; the ids and their
// messages are listed in storage/SCHEMA.md and tested in tests/storage.
#pragma once
#include <optional>
#include <string>
#include <string_view>
#include "geomath/decimal.h"

namespace cairn::formats {

// A broken rule: its id and a sentence naming the value.
struct Broken {
  std::string rule;
  std::string message;
};
using Check = std::optional<Broken>;

// Shortest decimal text of a number as it appears in messages and CSV ("30", "40.5").
std::string format_number(double v);

// The one number reader (geomath/decimal.h has its rules).
using geo::parse_decimal;
// Rule "number": `what` is the quantity ("latitude").
Check check_number_text(std::string_view text, const std::string& what, double* out);
// Rule "integer": a whole number.
Check check_integer_text(std::string_view text, const std::string& what, int* out);

Check check_latitude(double v);                           // "lat-range": -90..90 (WGS84)
Check check_longitude(double v);                          // "lon-range": -180..180
Check check_elevation(double v);                          // "elevation-range": -500..9000 m
Check check_accuracy(double v, const std::string& what);  // "accuracy-range": >= 0
Check check_quality(int v);                               // "quality-range": 1..5
Check check_age_rank(int v);                              // "age-rank": >= 1
Check check_colour(const std::string& v);                 // "colour": #RRGGBB
Check check_sha256(const std::string& v);                 // "sha256": 64 lower-case hex digits
// "time": ISO 8601; on success *normalised receives parse_iso8601's text.
Check check_time(const std::string& v, std::string* normalised);
// "angle": a direction (strike, trend) 0..360, an inclination (dip, plunge)
// 0..90, a rake 0..180 degrees; `what` names it ("strike").
Check check_direction(double v, const std::string& what);
Check check_inclination(double v, const std::string& what);
Check check_rake(double v);
Check check_declination(double v);  // "declination-range": -180..180
// "uuid": a canonical lower-case UUID (RFC 9562, section 4); `what` names the field.
Check check_uuid(const std::string& v, const std::string& what);
// "photo-path": a photo's path relative to the project folder that stays in
// it: not empty, not absolute, no ".." part, no backslash or drive letter.
Check check_photo_path(const std::string& v);

// The Okabe-Ito colour-blind-safe palette (Okabe & Ito, 2008), without its
// black, cycled by age rank: the default colour of a unit.
std::string default_unit_colour(int age_rank);

}  // namespace cairn::formats
