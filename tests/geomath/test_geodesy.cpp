// geomath/geodesy: the parts not covered by tests/reference/test_utm_pyproj.py
// (which checks the projection itself against PROJ).
//
// Outside sources: the UTM zone rules (NGA / DMA TM 8358.2: 6-degree zones
// from 180 W, Norway 32V and Svalbard exceptions, latitude limits -80..84;
// value from memory); the grid-to-true correction is hand-worked from the
// definition of meridian convergence (grid north lies gamma clockwise from true
// north, GeographicLib's documented convention) and of the point scale factor.
#include <gtest/gtest.h>

#include <cmath>

#include "geomath/angles.h"
#include "geomath/geodesy.h"

using namespace cairn::geo;

TEST(Geodesy, ZoneRules) {
  // Zone = floor((lon + 180) / 6) + 1, with the Norway and Svalbard exceptions.
  EXPECT_EQ(utm_zone_for(LatLon{46.5, 7.1})->zone, 32);
  EXPECT_EQ(utm_zone_for(LatLon{10, -177})->zone, 1);
  EXPECT_EQ(utm_zone_for(LatLon{10, 179})->zone, 60);
  EXPECT_EQ(utm_zone_for(LatLon{60, 5})->zone, 32);   // Norway: 31 -> 32
  EXPECT_EQ(utm_zone_for(LatLon{78, 10})->zone, 33);  // Svalbard: 32 -> 33
  EXPECT_EQ(utm_zone_for(LatLon{78, 22})->zone, 35);  // Svalbard: 34 -> 35
  EXPECT_FALSE(utm_zone_for(LatLon{-33, 18})->northp);
  EXPECT_TRUE(utm_zone_for(LatLon{0, 18})->northp);
}

TEST(Geodesy, RefusesOutOfRangeNamingTheValue) {
  auto north = to_utm(LatLon{84.5, 10});
  ASSERT_FALSE(north.ok());
  EXPECT_EQ(north.error(), "latitude 84.5 is outside UTM's range (-80 to 84 degrees)");
  auto south = to_utm(LatLon{-80.25, 10});
  ASSERT_FALSE(south.ok());
  EXPECT_EQ(south.error(), "latitude -80.25 is outside UTM's range (-80 to 84 degrees)");
  auto lon = to_utm(LatLon{10, -181});
  ASSERT_FALSE(lon.ok());
  EXPECT_EQ(lon.error(), "longitude -181 is outside -180..180");
  auto nan = to_utm(LatLon{NAN, 0});
  ASSERT_FALSE(nan.ok());
  EXPECT_EQ(nan.error(), "latitude is not a finite number");
  auto zone = to_utm(LatLon{10, 10}, UtmZone{0, true});
  ASSERT_FALSE(zone.ok());
  EXPECT_EQ(zone.error(), "UTM zone 0 is outside 1..60");
  EXPECT_FALSE(utm_zone_for(std::vector<LatLon>{}).ok());
}

TEST(Geodesy, ParseZone) {
  auto a = parse_utm_zone("33");
  ASSERT_TRUE(a.ok());
  EXPECT_EQ(a->zone, 33);
  EXPECT_FALSE(a->northp.has_value());
  auto b = parse_utm_zone("7s");
  ASSERT_TRUE(b.ok());
  EXPECT_EQ(b->zone, 7);
  EXPECT_EQ(b->northp, false);
  EXPECT_EQ(parse_utm_zone("60N")->northp, true);
  for (const char* bad : {"", "0", "61", "33X", "N", "3 3", "-5", "033N"}) {
    auto r = parse_utm_zone(bad);
    EXPECT_FALSE(r.ok()) << bad;
    if (!r.ok()) {
      EXPECT_NE(r.error().find("is not a UTM zone"), std::string::npos) << r.error();
    }
  }
}

TEST(Geodesy, GridPlaneToTrue) {
  // No convergence, unit scale: unchanged.
  const Plane p{30, 40};
  const Plane same = grid_plane_to_true(p, GridFactors{0, 1});
  EXPECT_NEAR(azimuth_difference(same.strike, 30), 0, 1e-12);
  EXPECT_NEAR(same.dip, 40, 1e-12);
  // Grid north 2 degrees east of true north: every azimuth gains 2 degrees.
  const Plane rot = grid_plane_to_true(p, GridFactors{2.0, 1});
  EXPECT_NEAR(azimuth_difference(rot.strike, 32), 0, 1e-12);
  EXPECT_NEAR(rot.dip, 40, 1e-12);
  const Plane rot2 = grid_plane_to_true(Plane{359, 10}, GridFactors{-1.5, 1});
  EXPECT_NEAR(azimuth_difference(rot2.strike, 357.5), 0, 1e-12);
  // Scale 0.9996 (UTM central meridian): grid distances are 0.9996 of ground,
  // so the gradient per ground metre is 0.9996 of that per grid metre.
  const Plane sc = grid_plane_to_true(p, GridFactors{0, 0.9996});
  EXPECT_NEAR(std::tan(deg2rad(sc.dip)), 0.9996 * std::tan(deg2rad(40)), 1e-12);
}

TEST(Geodesy, RoundTrip) {
  for (LatLon p : {LatLon{46.5, 7.1}, LatLon{-41.3, 174.8}, LatLon{83.9, -20}, LatLon{-79.9, 0.5}}) {
    auto u = to_utm(p);
    ASSERT_TRUE(u.ok()) << u.error();
    auto b = from_utm(*u);
    ASSERT_TRUE(b.ok()) << b.error();
    EXPECT_NEAR(b->lat, p.lat, 1e-10);
    EXPECT_NEAR(b->lon, p.lon, 1e-10);
  }
  // Forced into the other hemisphere: the northing is continued across the
  // equator (negative, or above 10,000 km) and still round-trips.
  auto s = to_utm(LatLon{0.5, 30}, UtmZone{36, false});
  ASSERT_TRUE(s.ok()) << s.error();
  EXPECT_GT(s->northing, 10000000.0);
  auto back = from_utm(*s);
  ASSERT_TRUE(back.ok());
  EXPECT_NEAR(back->lat, 0.5, 1e-10);
}
