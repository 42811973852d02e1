// Helpers shared by the stereonet, statistics and density tests. They are written out
// here from the standard definitions (direction of a trend/plunge in East-North-Up,
// angle between axes) so that expected values do not go through the code under test.
#pragma once
#include <algorithm>
#include <cmath>
#include <random>

#include "geomath/orientation.h"

namespace cairn::geo::test {

constexpr double kPi = 3.14159265358979323846;
inline double rad(double d) { return d * kPi / 180.0; }
inline double deg(double r) { return r * 180.0 / kPi; }

// Unit vector of trend/plunge: x east, y north, z up; plunge downward.
inline Vec3 dir(double trend, double plunge) {
  return Vec3(std::sin(rad(trend)) * std::cos(rad(plunge)), std::cos(rad(trend)) * std::cos(rad(plunge)),
              -std::sin(rad(plunge)));
}

// Trend/plunge of a vector, taken downward.
inline Line as_line(const Vec3& v) {
  const Vec3 d = v.z() > 0 ? Vec3(-v) : v;
  return Line{std::fmod(deg(std::atan2(d.x(), d.y())) + 360.0, 360.0),
              deg(std::asin(std::min(1.0, -d.z() / d.norm())))};
}

// Acute angle between two axes, degrees.
inline double axial_angle(const Vec3& a, const Vec3& b) {
  return deg(std::atan2(a.cross(b).norm(), std::abs(a.dot(b))));
}

// Uniform double in [0, 1) from the top 53 bits (the same on every platform, unlike
// the standard library's distributions).
inline double uniform(std::mt19937_64& rng) { return static_cast<double>(rng() >> 11) * 0x1.0p-53; }

}  // namespace cairn::geo::test
