#include "formats/iso8601.h"

#include <fmt/format.h>

#include <cctype>
#include <cstdio>

#include "geomath/magnetic.h"

namespace cairn::formats {

namespace {

// Reads exactly n digits at s[i..]; advances i.
bool digits(std::string_view s, size_t& i, int n, int& v) {
  if (i + static_cast<size_t>(n) > s.size()) return false;
  v = 0;
  for (int k = 0; k < n; ++k) {
    const char c = s[i + static_cast<size_t>(k)];
    if (!std::isdigit(static_cast<unsigned char>(c))) return false;
    v = v * 10 + (c - '0');
  }
  i += static_cast<size_t>(n);
  return true;
}

bool expect(std::string_view s, size_t& i, char c) {
  if (i < s.size() && s[i] == c) {
    ++i;
    return true;
  }
  return false;
}

}  // namespace

Result<FieldTime> parse_iso8601(std::string_view in) {
  auto bad = [&] {
    return Result<FieldTime>::failure("'" + std::string(in) +
                                      "' is not an ISO 8601 date or date and time (YYYY-MM-DD or "
                                      "YYYY-MM-DDThh:mm[:ss][Z|+hh:mm])");
  };
  std::string_view s = in;
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.front()))) s.remove_prefix(1);
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.back()))) s.remove_suffix(1);
  FieldTime t;
  size_t i = 0;
  int year = 0, month = 0, day = 0;
  if (!digits(s, i, 4, year) || !expect(s, i, '-') || !digits(s, i, 2, month) || !expect(s, i, '-') ||
      !digits(s, i, 2, day))
    return bad();
  if (!geo::valid_date(year, month, day))
    return Result<FieldTime>::failure("'" + std::string(in) + "' is not a calendar date");
  t.day = geo::calendar_day(year, month, day);
  // "%F" of date::format, written directly: it goes through an iostream, and a
  // merge validates every time stamp of a season with this function.
  t.text = fmt::format("{:04d}-{:02d}-{:02d}", year, month, day);
  if (i == s.size()) return t;
  if (!(expect(s, i, 'T') || expect(s, i, 't') || expect(s, i, ' '))) return bad();
  int hh = 0, mm = 0, ss = 0;
  if (!digits(s, i, 2, hh) || !expect(s, i, ':') || !digits(s, i, 2, mm)) return bad();
  std::string fraction;
  if (expect(s, i, ':')) {
    if (!digits(s, i, 2, ss)) return bad();
    if (i < s.size() && (s[i] == '.' || s[i] == ',')) {  // ISO 8601 allows either mark
      ++i;
      while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) fraction += s[i++];
      if (fraction.empty()) return bad();
    }
  }
  // 24:00 and leap seconds are legal ISO 8601 but never a field time.
  if (hh > 23 || mm > 59 || ss > 59)
    return Result<FieldTime>::failure("'" + std::string(in) + "' is not a time of day");
  t.text += fmt::format("T{:02d}:{:02d}:{:02d}", hh, mm, ss);
  if (!fraction.empty()) t.text += "." + fraction;
  // Milliseconds of the fraction (further digits are kept in the text only).
  int ms = 0;
  for (size_t k = 0; k < 3; ++k) ms = ms * 10 + (k < fraction.size() ? fraction[k] - '0' : 0);
  t.time_of_day =
      std::chrono::hours{hh} + std::chrono::minutes{mm} + std::chrono::seconds{ss} + std::chrono::milliseconds{ms};
  if (i == s.size()) return t;
  if (expect(s, i, 'Z') || expect(s, i, 'z')) {
    if (i != s.size()) return bad();
    t.text += "Z";
    t.utc_offset = std::chrono::minutes{0};
    return t;
  }
  if (i < s.size() && (s[i] == '+' || s[i] == '-')) {
    const char sign = s[i++];
    int oh = 0, om = 0;
    if (!digits(s, i, 2, oh)) return bad();
    if (i < s.size()) {
      expect(s, i, ':');
      if (!digits(s, i, 2, om)) return bad();
    }
    if (i != s.size()) return bad();
    if (oh > 14 || om > 59)  // offsets in use run from -12:00 to +14:00
      return Result<FieldTime>::failure("'" + std::string(in) + "' has an impossible UTC offset");
    t.utc_offset = std::chrono::minutes{(sign == '-' ? -1 : 1) * (oh * 60 + om)};
    t.text += (oh == 0 && om == 0) ? std::string("Z") : fmt::format("{}{:02d}:{:02d}", sign, oh, om);
    return t;
  }
  return bad();
}

FieldTime today_utc() {
  FieldTime t;
  t.day = date::year_month_day{date::floor<date::days>(std::chrono::system_clock::now())};
  t.text = date::format("%F", t.day);
  return t;
}

}  // namespace cairn::formats
