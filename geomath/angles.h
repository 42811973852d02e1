// Degree/radian helpers and azimuth arithmetic used throughout geomath.
#pragma once
#include <cmath>

namespace cairn::geo {

constexpr double kPi = 3.14159265358979323846;
constexpr double deg2rad(double d) { return d * kPi / 180.0; }
constexpr double rad2deg(double r) { return r * 180.0 / kPi; }

// Azimuth folded into [0, 360).
inline double wrap360(double az) {
  double a = std::fmod(az, 360.0);
  if (a < 0) a += 360.0;
  if (a >= 360.0) a -= 360.0;  // fmod of -tiny can round to 360
  return a;
}

// Signed smallest difference a - b of two azimuths, in (-180, 180].
inline double azimuth_difference(double a, double b) {
  double d = wrap360(a - b);
  return d > 180.0 ? d - 360.0 : d;
}

}  // namespace cairn::geo
