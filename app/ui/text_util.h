// Small text helpers shared by the screens.
#pragma once
#include <ctime>
#include <optional>
#include <string>

#include "geomath/decimal.h"

namespace cairn::ui {

inline std::string fmt_opt(const char* f, const std::optional<double>& v, const char* none = "-") {
  return v ? geo::format_decimal(f, *v) : std::string(none);
}

// Now as local ISO 8601 with its UTC offset ("2025-06-14T09:32:10+02:00"):
// a field day is the local date.
inline std::string now_local_iso() {
  std::time_t t = std::time(nullptr);
  std::tm lt{};
  localtime_r(&t, &lt);
  char buf[40];
  std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%S%z", &lt);
  std::string s = buf;  // ...+0200 -> ...+02:00
  if (s.size() >= 5) s.insert(s.size() - 2, ":");
  return s;
}

// "41.23456° N, 12.34567° E"
inline std::string lat_lon_text(double lat, double lon) {
  return geo::format_decimal("%.5f\xC2\xB0 ", lat < 0 ? -lat : lat) + (lat < 0 ? "S" : "N") + ", " +
         geo::format_decimal("%.5f\xC2\xB0 ", lon < 0 ? -lon : lon) + (lon < 0 ? "W" : "E");
}

}  // namespace cairn::ui
