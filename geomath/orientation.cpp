#include "geomath/orientation.h"

#include <Eigen/Geometry>
#include <algorithm>
#include <cmath>

#include "geomath/angles.h"

namespace cairn::geo {

namespace {
// Two directions closer than this to parallel (sine of the angle) define no plane or line.
constexpr double kParallelSine = 1e-6;
double clamp1(double x) { return std::max(-1.0, std::min(1.0, x)); }
}  // namespace

double Plane::dip_direction() const { return wrap360(strike + 90.0); }

Plane plane_from_dip_direction(double dip_direction, double dip) { return Plane{wrap360(dip_direction - 90.0), dip}; }

Vec3 line_vector(const Line& l) {
  const double t = deg2rad(l.trend), p = deg2rad(l.plunge);
  return Vec3(std::sin(t) * std::cos(p), std::cos(t) * std::cos(p), -std::sin(p));
}

Line line_from_vector(const Vec3& v_in) {
  Vec3 v = v_in.normalized();
  if (v.z() > 0) v = -v;
  const double horiz = std::hypot(v.x(), v.y());
  const double plunge = rad2deg(std::atan2(-v.z(), horiz));
  // A vertical line has no trend of its own; 0 by convention.
  const double trend = horiz < 1e-12 ? 0.0 : wrap360(rad2deg(std::atan2(v.x(), v.y())));
  return Line{trend, plunge};
}

Vec3 pole_vector(const Plane& p) { return line_vector(pole(p)); }

Line pole(const Plane& p) { return Line{wrap360(p.dip_direction() + 180.0), 90.0 - p.dip}; }

Vec3 plane_normal_up(const Plane& p) { return -pole_vector(p); }

Plane plane_from_normal(const Vec3& n_in) {
  Vec3 n = n_in.normalized();
  if (n.z() < 0) n = -n;  // upward normal points in the dip direction horizontally
  const double dip = rad2deg(std::acos(clamp1(n.z())));
  const double horiz = std::hypot(n.x(), n.y());
  // A horizontal plane has no dip direction of its own; strike 0 by convention.
  const double dipdir = horiz < 1e-12 ? 90.0 : rad2deg(std::atan2(n.x(), n.y()));
  return plane_from_dip_direction(dipdir, dip);
}

Plane plane_from_pole(const Line& pl) { return plane_from_normal(line_vector(pl)); }

Vec3 dip_vector(const Plane& p) { return line_vector(Line{p.dip_direction(), p.dip}); }

Vec3 strike_vector(const Plane& p) {
  const double s = deg2rad(p.strike);
  return Vec3(std::sin(s), std::cos(s), 0.0);
}

double angle_between_planes(const Plane& a, const Plane& b) { return angle_between_lines(pole(a), pole(b)); }

double angle_between_lines(const Line& a, const Line& b) {
  const Vec3 u = line_vector(a), v = line_vector(b);
  // atan2 of |cross| and |dot| is accurate at both small and right angles.
  return rad2deg(std::atan2(u.cross(v).norm(), std::abs(u.dot(v))));
}

Result<Plane> plane_through_lines(const Line& a, const Line& b) {
  const Vec3 n = line_vector(a).cross(line_vector(b));
  if (n.norm() < kParallelSine)
    return Result<Plane>::failure("the two lines are parallel, so they do not define a plane");
  return plane_from_normal(n);
}

Result<Line> intersection_line(const Plane& a, const Plane& b) {
  const Vec3 d = pole_vector(a).cross(pole_vector(b));
  if (d.norm() < kParallelSine)
    return Result<Line>::failure("the two planes are parallel, so they have no line of intersection");
  return line_from_vector(d);
}

double apparent_dip(const Plane& p, double azimuth) {
  const double beta = deg2rad(azimuth - p.dip_direction());
  return rad2deg(std::atan(std::tan(deg2rad(p.dip)) * std::abs(std::cos(beta))));
}

Result<Plane> plane_from_apparent_dips(double az1, double ad1, double az2, double ad2) {
  if (std::abs(std::sin(deg2rad(az1 - az2))) < kParallelSine)
    return Result<Plane>::failure(
        "the two apparent dips lie in the same vertical section, so the true dip is undetermined");
  // Each apparent dip is a line in the plane: the plane's normal is their cross product.
  const Vec3 u = line_vector(Line{wrap360(az1), ad1});
  const Vec3 v = line_vector(Line{wrap360(az2), ad2});
  const Vec3 n = u.cross(v);
  if (n.norm() < kParallelSine)
    return Result<Plane>::failure("the two apparent dips lie in parallel sections, so the true dip is undetermined");
  return plane_from_normal(n);
}

Line line_from_rake(const Plane& p, double rake) {
  const double r = deg2rad(rake);
  return line_from_vector(std::cos(r) * strike_vector(p) + std::sin(r) * dip_vector(p));
}

double rake_of_line(const Plane& p, const Line& l) {
  const Vec3 v = line_vector(l);
  const double along = v.dot(strike_vector(p));
  const double down = v.dot(dip_vector(p));
  // Lines are undirected: take the sense that points down the dip (rake 0..180).
  double r = rad2deg(std::atan2(down, along));
  if (r < 0) r += 180.0;
  if (r >= 180.0) r -= 180.0;
  return r;
}

}  // namespace cairn::geo
