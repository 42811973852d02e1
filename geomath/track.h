// The day track: the positions a mapper's receiver gave while the UI ran,
// thinned so that the project keeps a fix every few seconds only when the
// mapper has moved (and, standing still, one now and then so that the last
// position in the file is never old).
#pragma once
#include <optional>
#include <vector>

namespace cairn::geo {

struct TrackFix {
  double t = 0;             // seconds (any fixed origin)
  double lat = 0, lon = 0;  // WGS84 degrees
};

struct TrackRule {
  double min_interval_s = 5;   // never two kept fixes closer in time
  double min_distance_m = 10;  // kept when this far from the last kept fix (geodesic, WGS84) ...
  double max_silence_s = 300;  // ... or when the last kept fix is this old (standing still)
};

// Whether FIX is kept after LAST, the last fix kept (nothing: FIX is the first).
bool keep_fix(const std::optional<TrackFix>& last, const TrackFix& fix, const TrackRule& rule = {});

// The fixes kept of a whole sequence (in time order), by keep_fix.
std::vector<TrackFix> thin_track(const std::vector<TrackFix>& fixes, const TrackRule& rule = {});

// Geodesic distance on the WGS84 ellipsoid in metres (Karney 2013, GeographicLib).
double geodesic_distance(double lat1, double lon1, double lat2, double lon2);

}  // namespace cairn::geo
