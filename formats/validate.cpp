#include "formats/validate.h"

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>
#include <cstdio>

#include "formats/ids.h"
#include "formats/iso8601.h"
#include "geomath/decimal.h"

namespace cairn::formats {

std::string format_number(double v) {
  // %.15g prints any decimal of up to 15 significant digits back exactly
  // (DBL_DIG = 15), so a typed value survives list -> import -> list unchanged.
  std::string s = geo::format_decimal("%.15g", v);
  if (s == "-0") s = "0";
  return s;
}

Check check_number_text(std::string_view text, const std::string& what, double* out) {
  auto v = parse_decimal(text);
  if (!v) return Broken{"number", what + " '" + std::string(text) + "' is not a number"};
  *out = *v;
  return std::nullopt;
}

Check check_integer_text(std::string_view text, const std::string& what, int* out) {
  auto v = parse_decimal(text);
  if (!v || *v != std::floor(*v) || std::abs(*v) > 1e9)
    return Broken{"integer", what + " '" + std::string(text) + "' is not a whole number"};
  *out = static_cast<int>(*v);
  return std::nullopt;
}

Check check_latitude(double v) {
  if (std::isfinite(v) && v >= -90 && v <= 90) return std::nullopt;
  return Broken{"lat-range", "latitude " + format_number(v) + " is outside -90..90 degrees"};
}

Check check_longitude(double v) {
  if (std::isfinite(v) && v >= -180 && v <= 180) return std::nullopt;
  return Broken{"lon-range", "longitude " + format_number(v) + " is outside -180..180 degrees"};
}

Check check_elevation(double v) {
  if (std::isfinite(v) && v >= -500 && v <= 9000) return std::nullopt;
  return Broken{"elevation-range", "elevation " + format_number(v) + " m is outside -500..9000 m"};
}

Check check_accuracy(double v, const std::string& what) {
  if (std::isfinite(v) && v >= 0) return std::nullopt;
  return Broken{"accuracy-range", what + " " + format_number(v) + " m is negative"};
}

Check check_quality(int v) {
  if (v >= 1 && v <= 5) return std::nullopt;
  return Broken{"quality-range", "quality " + std::to_string(v) + " is outside 1..5"};
}

Check check_age_rank(int v) {
  if (v >= 1) return std::nullopt;
  return Broken{"age-rank", "age_rank " + std::to_string(v) + " is below 1 (1 = oldest)"};
}

Check check_colour(const std::string& v) {
  bool ok = v.size() == 7 && v[0] == '#';
  for (size_t i = 1; ok && i < v.size(); ++i) ok = std::isxdigit(static_cast<unsigned char>(v[i])) != 0;
  if (ok) return std::nullopt;
  return Broken{"colour", "colour '" + v + "' is not of the form #RRGGBB"};
}

Check check_sha256(const std::string& v) {
  bool ok = v.size() == 64;
  for (char c : v) ok = ok && ((c >= '0' && c <= '9') || (c >= 'a' && c <= 'f'));
  if (ok) return std::nullopt;
  return Broken{"sha256", "SHA-256 '" + v + "' is not 64 lower-case hexadecimal digits"};
}

Check check_time(const std::string& v, std::string* normalised) {
  auto t = parse_iso8601(v);
  if (!t) return Broken{"time", t.error()};
  if (normalised) *normalised = t->text;
  return std::nullopt;
}

Check check_direction(double v, const std::string& what) {
  if (std::isfinite(v) && v >= 0 && v <= 360) return std::nullopt;
  return Broken{"angle", what + " " + format_number(v) + " is outside 0..360"};
}

Check check_inclination(double v, const std::string& what) {
  if (std::isfinite(v) && v >= 0 && v <= 90) return std::nullopt;
  return Broken{"angle", what + " " + format_number(v) + " is outside 0..90"};
}

Check check_rake(double v) {
  if (std::isfinite(v) && v >= 0 && v <= 180) return std::nullopt;
  return Broken{"angle", "rake " + format_number(v) + " is outside 0..180"};
}

Check check_declination(double v) {
  if (std::isfinite(v) && std::abs(v) <= 180) return std::nullopt;
  return Broken{"declination-range", "declination " + format_number(v) + " is outside -180..180 degrees"};
}

Check check_uuid(const std::string& v, const std::string& what) {
  if (is_uuid(v)) return std::nullopt;
  return Broken{"uuid", what + " '" + v.substr(0, 80) + "' is not a UUID"};
}

Check check_photo_path(const std::string& v) {
  const auto bad = [&](const std::string& why) {
    return Broken{"photo-path",
                  "photo path '" + v.substr(0, 200) + "' " + why + "; photos are named relative to the project folder"};
  };
  if (v.empty()) return bad("is empty");
  if (v.front() == '/') return bad("is absolute");
  if (v.find('\\') != std::string::npos) return bad("contains a backslash");
  if (v.size() >= 2 && v[1] == ':') return bad("names a drive");
  size_t i = 0;
  while (i <= v.size()) {
    const size_t j = std::min(v.find('/', i), v.size());
    if (v.compare(i, j - i, "..") == 0) return bad("climbs out of the project folder");
    i = j + 1;
  }
  return std::nullopt;
}

std::string default_unit_colour(int age_rank) {
  // Okabe & Ito (2008), "Color Universal Design": orange, sky blue, bluish
  // green, yellow, blue, vermillion, reddish purple (black left out: it hides linework).
  static const char* const kPalette[] = {"#E69F00", "#56B4E9", "#009E73", "#F0E442", "#0072B2", "#D55E00", "#CC79A7"};
  const int n = static_cast<int>(sizeof kPalette / sizeof kPalette[0]);
  const int i = ((age_rank - 1) % n + n) % n;
  return kPalette[i];
}

}  // namespace cairn::formats
