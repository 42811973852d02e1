// The day track's thinning against a case worked by hand.
//
// Source: along the equator the geodesic between two points is the equator
// itself, so its length is a * dlon (in radians), a = 6 378 137 m the WGS84
// semi-major axis (NIMA TR8350.2, WGS84 definition; Karney 2013 for the
// geodesic). 0.0001 degrees of longitude is 6378137 * 0.0001 * pi / 180 =
// 11.131949 m; 0.00005 degrees 5.565975 m; 0.00008 degrees 8.905559 m;
// 0.00011 degrees 12.245144 m.
#include <gtest/gtest.h>

#include <cmath>

#include "geomath/track.h"

using namespace cairn::geo;

TEST(Track, DistanceAlongTheEquatorIsTheSemiMajorAxisTimesTheLongitudeDifference) {
  EXPECT_NEAR(geodesic_distance(0, 0, 0, 0.0001), 11.131949, 1e-6);  // worked by hand, above
  EXPECT_NEAR(geodesic_distance(0, 0.0001, 0, 0.00021), 12.245144, 1e-6);
}

TEST(Track, ThinningKeepsAFixAfterFiveSecondsAndTenMetresOrAfterFiveMinutesStandingStill) {
  // Rule: 5 s apart at least, kept when 10 m from the last kept fix or 300 s after it.
  const std::vector<TrackFix> walk{
      {0, 0, 0},          // first: kept
      {2, 0, 0.0001},     // 11.13 m but only 2 s later: dropped
      {5, 0, 0.00005},    // 5.57 m from the fix at t=0: dropped
      {10, 0, 0.0001},    // 11.13 m: kept
      {15, 0, 0.00018},   // 8.91 m from t=10: dropped
      {20, 0, 0.00021},   // 12.25 m from t=10: kept
      {100, 0, 0.00021},  // standing still, 80 s: dropped
      {319, 0, 0.00021},  // 299 s: dropped
      {320, 0, 0.00021},  // 300 s: kept (the last position is never older than five minutes)
  };
  const auto kept = thin_track(walk, TrackRule{5, 10, 300});
  std::vector<double> times;
  for (const auto& f : kept) times.push_back(f.t);
  EXPECT_EQ(times, (std::vector<double>{0, 10, 20, 320}));
}
