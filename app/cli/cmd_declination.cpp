// `cairn declination LAT LON`: the magnetic declination to set on a compass,
// from the World Magnetic Model shipped with Cairn.
#include <cmath>
#include <ostream>
#include <stdexcept>
#include <string>

#include <fmt/format.h>

#include "app/cli/command.h"
#include "app/cli/magnetic_source.h"
#include "geomath/magnetic.h"
#include "formats/iso8601.h"
#include "geomath/decimal.h"

namespace cairn::cli {
namespace {

using Date = geo::CalendarDate;

std::string iso(const Date& d) { return fmt::format("{:04d}-{:02d}-{:02d}", d.year, d.month, d.day); }

// A whole string as a finite number, or nothing.
bool parse_number(const std::string& s, double& v) {
  const auto parsed = geo::parse_decimal(s);
  if (parsed) v = *parsed;
  return parsed.has_value();
}

double parse_coordinate(const std::string& s, const char* what, double lo, double hi) {
  double v = 0;
  if (!parse_number(s, v))
    throw std::invalid_argument(std::string(what) + " '" + s + "' is not a number (decimal degrees)");
  if (v < lo || v > hi)
    throw std::invalid_argument(std::string(what) + " " + s + " is outside " + std::to_string(int(lo)) + ".." +
                                std::to_string(int(hi)) + " degrees");
  return v;
}

// --date YYYY-MM-DD or a decimal year such as 2027.5.
void parse_date(const std::string& s, Date& date, double& t) {
  if (s.size() == 10 && s[4] == '-' && s[7] == '-') {
    const auto day = formats::parse_iso8601(s);  // the one calendar (geomath/calendar.h)
    if (!day) throw std::invalid_argument("date " + s + " does not exist");
    date = {static_cast<int>(day->day.year()), static_cast<int>(static_cast<unsigned>(day->day.month())),
            static_cast<int>(static_cast<unsigned>(day->day.day()))};
    t = geo::decimal_year(day->day);
    return;
  }
  double v = 0;
  if (!parse_number(s, v)) throw std::invalid_argument("date '" + s + "' is neither YYYY-MM-DD nor a decimal year");
  if (v < 1900.0 || v >= 2101.0) throw std::invalid_argument("date " + s + " is not a year between 1900 and 2100");
  t = v;
  date = geo::calendar_date(v);
}

Date today() {
  const auto d = formats::today_utc().day;
  return {static_cast<int>(d.year()), static_cast<int>(static_cast<unsigned>(d.month())),
          static_cast<int>(static_cast<unsigned>(d.day()))};
}

std::string fixed(double v, int decimals) {
  std::string s = fmt::format("{:.{}f}", v, decimals);
  if (s.find_first_not_of("-0.") == std::string::npos && s[0] == '-') s.erase(0, 1);  // no "-0.0"
  return s;
}

// "14.2° E" / "3.5° W": the way a declination is set on a compass dial.
std::string east_west(double decl) {
  std::string mag = fixed(std::abs(decl), 1);
  if (mag == "0.0") return "0.0°";
  return mag + "° " + (decl > 0 ? "E" : "W");
}

struct DeclinationArgs {
  std::string lat, lon;
  bool json = false;
  std::optional<std::string> date, height;
};

int run(const DeclinationArgs& a, std::ostream& out, std::ostream& err) {
  const std::vector<std::string> args{a.lat, a.lon};
  const bool json = a.json;
  const auto& date_opt = a.date;
  const auto& height_opt = a.height;

  const double lat = parse_coordinate(args[0], "latitude", -90.0, 90.0);
  const double lon = parse_coordinate(args[1], "longitude", -180.0, 360.0);
  double height = 0;
  if (height_opt && !parse_number(*height_opt, height))
    throw std::invalid_argument("height '" + *height_opt + "' is not a number (metres above the WGS84 ellipsoid)");
  Date date{};
  double t = 0;
  if (date_opt) {
    parse_date(*date_opt, date, t);
  } else {
    date = today();
    t = geo::decimal_year(date.year, date.month, date.day);
  }

  const auto& model = wmm();
  if (!model.in_validity(t))
    err << "warning: " << iso(date) << " is outside the validity of " << model.name() << " ("
        << fixed(model.valid_from(), 1) << "-" << fixed(model.valid_to(), 1)
        << "); the declination may be off by more than the model's stated error\n";
  // WMM Technical Report (value from memory): the model is specified from 1 km
  // below the ellipsoid to 850 km above it.
  if (height < -1000.0 || height > 850000.0)
    err << "warning: height " << fixed(height, 0) << " m is outside the model's range (-1 km to 850 km)\n";

  const geo::MagneticField f = model.evaluate(lat, lon, height, t);

  // WMM Technical Report (2020 and later; value from memory): where the
  // horizontal intensity H is below 2000 nT a compass is unreliable
  // ("blackout zone"), below 6000 nT it needs caution.
  if (f.H < 2000.0)
    err << "warning: horizontal field " << fixed(f.H, 0)
        << " nT is below 2000 nT; a magnetic compass is unreliable here\n";
  else if (f.H < 6000.0)
    err << "warning: horizontal field " << fixed(f.H, 0)
        << " nT is below 6000 nT; use a magnetic compass with caution here\n";

  if (json) {
    out << "{\"declination\": " << fixed(f.declination, 4) << ", \"inclination\": " << fixed(f.inclination, 4)
        << ", \"date\": \"" << iso(date) << "\", \"decimal_year\": " << fixed(t, 4)
        << ", \"height_m\": " << fixed(height, 1) << ", \"model\": \"" << model.name() << "\"}\n";
    return 0;
  }
  out << "declination  " << fixed(f.declination, 2) << "°  (" << east_west(f.declination)
      << ", east positive: set this on the compass)\n"
      << "inclination  " << fixed(f.inclination, 2) << "°  (" << (f.inclination >= 0 ? "down" : "up") << ")\n"
      << "date         " << iso(date) << "  (decimal year " << fixed(t, 4) << ")\n"
      << "height       " << fixed(height, 1) << " m above the WGS84 ellipsoid\n"
      << "model        " << model.name() << "\n";
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<DeclinationArgs>();
  positional(app, "LAT", a->lat, "latitude, decimal degrees (WGS84)");
  positional(app, "LON", a->lon, "longitude, decimal degrees (WGS84)");
  option(app, "--date", a->date, "YYYY-MM-DD or YEAR.FRACTION (default: today)");
  option(app, "--height", a->height, "metres above the WGS84 ellipsoid (default 0)");
  flag(app, "--json", a->json, "print JSON");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"declination",
                      "magnetic declination to set on a compass at a place and date (World Magnetic Model)", define});

}  // namespace cairn::cli
