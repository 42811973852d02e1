#include "geomath/decimal.h"

#include <charconv>
#include <cmath>

#include <fmt/printf.h>

namespace cairn::geo {

std::optional<double> parse_decimal(std::string_view t) {
  auto blank = [](char c) { return c == ' ' || c == '\t'; };
  while (!t.empty() && blank(t.front())) t.remove_prefix(1);
  while (!t.empty() && blank(t.back())) t.remove_suffix(1);
  bool negative = false;
  if (!t.empty() && (t.front() == '+' || t.front() == '-')) {
    negative = t.front() == '-';
    t.remove_prefix(1);
  }
  // Only digits and one point: this refuses exponents, hex, inf/nan and commas
  // before from_chars sees them.
  int digits = 0, points = 0;
  for (char c : t) {
    if (c >= '0' && c <= '9')
      ++digits;
    else if (c == '.')
      ++points;
    else
      return std::nullopt;
  }
  if (digits == 0 || points > 1) return std::nullopt;
  double v = 0;
  auto [p, ec] = std::from_chars(t.data(), t.data() + t.size(), v, std::chars_format::fixed);
  if (ec != std::errc() || p != t.data() + t.size() || !std::isfinite(v)) return std::nullopt;
  return negative ? -v : v;
}

}  // namespace cairn::geo

namespace cairn::geo {

std::string format_decimal(const char* spec, double v) { return fmt::sprintf(spec, v); }

}  // namespace cairn::geo
