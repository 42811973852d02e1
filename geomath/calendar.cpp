#include "geomath/calendar.h"

#include <cmath>
#include <stdexcept>
#include <string>

namespace cairn::geo {

using namespace date;

bool valid_date(int y, int m, int d) {
  if (y < 1 || y > 9999 || m < 1 || m > 12 || d < 1 || d > 31) return false;
  return year_month_day{year{y}, month{static_cast<unsigned>(m)}, day{static_cast<unsigned>(d)}}.ok();
}

year_month_day calendar_day(int y, int m, int d) {
  if (!valid_date(y, m, d))
    throw std::domain_error("no such date: " + std::to_string(y) + "-" + std::to_string(m) + "-" + std::to_string(d));
  return year_month_day{year{y}, month{static_cast<unsigned>(m)}, day{static_cast<unsigned>(d)}};
}

double decimal_year(const year_month_day& ymd) {
  const year y = ymd.year();
  const auto day_index = (sys_days{ymd} - sys_days{y / January / 1}).count();  // day_of_year - 1
  return static_cast<int>(y) + static_cast<double>(day_index) / (y.is_leap() ? 366.0 : 365.0);
}

double decimal_year(int y, int m, int d) { return decimal_year(calendar_day(y, m, d)); }

CalendarDate calendar_date(double t) {
  if (!std::isfinite(t) || t < 1.0 || t >= 10000.0)
    throw std::domain_error("decimal year " + std::to_string(t) + " is outside years 1..9999");
  const year y{static_cast<int>(std::floor(t))};
  // Whole days since 1 January; the tiny bias keeps e.g. 2025 + 182/365 on day 183.
  const int index = static_cast<int>(std::floor((t - static_cast<int>(y)) * (y.is_leap() ? 366 : 365) + 1e-9));
  const year_month_day ymd{sys_days{y / January / 1} + days{index}};
  return {static_cast<int>(ymd.year()), static_cast<int>(static_cast<unsigned>(ymd.month())),
          static_cast<int>(static_cast<unsigned>(ymd.day()))};
}

}  // namespace cairn::geo
