#include "geomath/track.h"

#include <GeographicLib/Geodesic.hpp>

namespace cairn::geo {

double geodesic_distance(double lat1, double lon1, double lat2, double lon2) {
  double s12 = 0;
  GeographicLib::Geodesic::WGS84().Inverse(lat1, lon1, lat2, lon2, s12);
  return s12;
}

bool keep_fix(const std::optional<TrackFix>& last, const TrackFix& fix, const TrackRule& rule) {
  if (!last) return true;
  const double dt = fix.t - last->t;
  if (dt < rule.min_interval_s) return false;
  if (dt >= rule.max_silence_s) return true;
  return geodesic_distance(last->lat, last->lon, fix.lat, fix.lon) >= rule.min_distance_m;
}

std::vector<TrackFix> thin_track(const std::vector<TrackFix>& fixes, const TrackRule& rule) {
  std::vector<TrackFix> kept;
  for (const auto& f : fixes) {
    const std::optional<TrackFix> last = kept.empty() ? std::nullopt : std::optional<TrackFix>(kept.back());
    if (keep_fix(last, f, rule)) kept.push_back(f);
  }
  return kept;
}

}  // namespace cairn::geo
