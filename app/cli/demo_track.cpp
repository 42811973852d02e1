#include "app/cli/demo_track.h"

#include <algorithm>
#include <cmath>
#include <map>

#include <fmt/format.h>

#include "formats/iso8601.h"
#include "geomath/track.h"
#include "storage/project.h"
#include "storage/track.h"

namespace cairn::cli::demo {

namespace {

constexpr double kPi = 3.14159265358979323846;

// Seconds since 1970 (UTC) of a station's time with its offset (nothing when
// it has no time of day or no offset).
std::optional<double> utc_seconds(const std::string& text) {
  const auto t = formats::parse_iso8601(text);
  if (!t || !t->time_of_day || !t->utc_offset) return std::nullopt;
  const auto ms = date::sys_days(t->day).time_since_epoch() + *t->time_of_day - *t->utc_offset;
  return std::chrono::duration<double>(ms).count();
}

// "YYYY-MM-DDThh:mm:ssZ" of seconds since 1970 (UTC).
std::string utc_text(double s) {
  const date::sys_seconds at{std::chrono::seconds(std::llround(s))};
  const auto day = date::floor<date::days>(at);
  const date::year_month_day ymd(day);
  const long in_day = static_cast<long>((at - day).count());
  return fmt::format("{:04d}-{:02d}-{:02d}T{:02d}:{:02d}:{:02d}Z", static_cast<int>(ymd.year()),
                     static_cast<unsigned>(ymd.month()), static_cast<unsigned>(ymd.day()), in_day / 3600,
                     in_day / 60 % 60, in_day % 60);
}

struct Stop {
  double t;  // seconds since 1970, UTC
  double lat, lon;
  std::optional<double> elevation;
};

}  // namespace

size_t add_demo_tracks(store::Project& p, const Tablet& tablet) {
  // (observer, field day as written) -> the stations visited, in time order.
  std::map<std::pair<std::string, std::string>, std::vector<Stop>> walks;
  for (const auto& s : tablet.stations) {
    const auto t = utc_seconds(s.time);
    if (!t || s.observer.empty()) continue;
    walks[{s.observer, s.time.substr(0, 10)}].push_back({*t, s.lat, s.lon, s.elevation});  // the local field day
  }
  size_t kept = 0;
  p.write([&] {
    for (auto& [key, stops] : walks) {
      std::sort(stops.begin(), stops.end(), [](const Stop& a, const Stop& b) { return a.t < b.t; });
      // A fix every 5 s from the first station to the last: a while at each
      // station (a third of the time to the next, at most ten minutes), then a
      // walk that swings up to 12 m off the straight line; the receiver's own
      // scatter, about 2 m, on every fix.
      std::vector<geo::TrackFix> fixes;
      std::vector<std::optional<double>> heights;
      for (size_t i = 0; i + 1 < stops.size(); ++i) {
        const Stop &a = stops[i], &b = stops[i + 1];
        const double dwell = std::min(600.0, (b.t - a.t) / 3);
        const double m_lat = 111320.0, m_lon = 111320.0 * std::cos(a.lat * kPi / 180);
        const double de = (b.lon - a.lon) * m_lon, dn = (b.lat - a.lat) * m_lat, len = std::hypot(de, dn);
        for (double t = a.t; t < b.t; t += 5) {
          const double u = t < a.t + dwell ? 0 : (t - a.t - dwell) / std::max(1.0, b.t - a.t - dwell);
          const double swing = len > 0 ? 12 * std::sin(kPi * u) * std::sin(3 * kPi * u) / len : 0;
          const double jitter_e = 2 * std::sin(t * 0.37), jitter_n = 2 * std::cos(t * 0.23);
          const double e = u * de - swing * dn + jitter_e, n = u * dn + swing * de + jitter_n;
          fixes.push_back({t, a.lat + n / m_lat, a.lon + e / m_lon});
          heights.push_back(a.elevation && b.elevation
                                ? std::optional<double>(*a.elevation + u * (*b.elevation - *a.elevation))
                                : std::nullopt);
        }
      }
      if (!stops.empty()) {
        fixes.push_back({stops.back().t, stops.back().lat, stops.back().lon});
        heights.push_back(stops.back().elevation);
      }
      // The UI's rule (geomath/track.h) decides which fixes are kept.
      std::optional<geo::TrackFix> last;
      for (size_t i = 0; i < fixes.size(); ++i) {
        if (!geo::keep_fix(last, fixes[i])) continue;
        last = fixes[i];
        store::add_track_point(p, {key.first, utc_text(fixes[i].t), fixes[i].lat, fixes[i].lon, heights[i], 4.0});
        ++kept;
      }
    }
  });
  return kept;
}

}  // namespace cairn::cli::demo
