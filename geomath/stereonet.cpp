#include "geomath/stereonet.h"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "geomath/angles.h"

namespace cairn::geo {

namespace {

// A point this far outside the primitive (in net units) still counts as on it: rounding.
constexpr double kPrimitiveTolerance = 1e-9;

int clamp_samples(int samples) { return std::max(samples, 8); }

// Net point of a unit vector already in the lower hemisphere. A z of rounding size
// above zero is treated as zero instead of flipping the point across the net.
//
// Both projections are written without trigonometry: for a unit vector (x, y, z)
// with z = -cos(theta) and horizontal length sin(theta),
//   equal-area:  sqrt(2) sin(theta/2) / sin(theta) = 1 / sqrt(1 - z)
//   equal-angle: tan(theta/2) / sin(theta)         = 1 / (1 - z)
// (half-angle identities), so the net point is (x, y) times that factor.
NetPoint project_down(NetKind kind, const Vec3& v) {
  const double z = std::min(v.z(), 0.0);
  const double f = kind == NetKind::EqualArea ? 1.0 / std::sqrt(1.0 - z) : 1.0 / (1.0 - z);
  return NetPoint{v.x() * f, v.y() * f};
}

// A unit vector perpendicular to the unit vector a.
Vec3 any_perpendicular(const Vec3& a) {
  // Cross with the coordinate axis least aligned with a, for a well-conditioned result.
  Vec3 e = Vec3::UnitX();
  if (std::abs(a.y()) < std::abs(a.x()) && std::abs(a.y()) <= std::abs(a.z()))
    e = Vec3::UnitY();
  else if (std::abs(a.z()) < std::abs(a.x()) && std::abs(a.z()) < std::abs(a.y()))
    e = Vec3::UnitZ();
  return a.cross(e).normalized();
}

std::string format_point(const NetPoint& p) {
  std::ostringstream s;
  s << "(" << p[0] << ", " << p[1] << ")";
  return s.str();
}

}  // namespace

double net_radius(NetKind kind, double theta_deg) {
  const double half = deg2rad(theta_deg) / 2.0;
  return kind == NetKind::EqualArea ? std::sqrt(2.0) * std::sin(half) : std::tan(half);
}

NetPoint project(NetKind kind, const Line& l) { return project_down(kind, line_vector(l)); }

NetPoint project_vector(NetKind kind, const Vec3& v_in) {
  Vec3 v = v_in.normalized();
  if (v.z() > 0) v = -v;
  return project_down(kind, v);
}

Vec3 unproject_vector_extended(NetKind kind, const NetPoint& p) {
  const double r2 = p[0] * p[0] + p[1] * p[1];
  if (kind == NetKind::EqualArea) {
    // Inverse of r = sqrt(2) sin(theta/2): cos(theta) = 1 - r^2, and the horizontal
    // part sin(theta) = r sqrt(2 - r^2), i.e. (x, y) = p sqrt(2 - r^2).
    const double t = std::min(r2, 2.0);
    const double h = std::sqrt(2.0 - t);
    return Vec3(p[0] * h, p[1] * h, t - 1.0);
  }
  // Inverse stereographic: with t = r^2 = tan^2(theta/2), cos(theta) = (1 - t)/(1 + t)
  // and sin(theta) = 2r/(1 + t).
  return Vec3(2.0 * p[0] / (1.0 + r2), 2.0 * p[1] / (1.0 + r2), (r2 - 1.0) / (1.0 + r2));
}

Result<Vec3> unproject_vector(NetKind kind, const NetPoint& p) {
  const double r = std::hypot(p[0], p[1]);
  if (!(r <= 1.0 + kPrimitiveTolerance)) {
    std::ostringstream s;
    s << "net point " << format_point(p) << " lies outside the primitive circle (radius " << r << " > 1)";
    return Result<Vec3>::failure(s.str());
  }
  NetPoint q = p;
  if (r > 1.0) q = NetPoint{p[0] / r, p[1] / r};
  Vec3 v = unproject_vector_extended(kind, q);
  v.z() = std::min(v.z(), 0.0);
  return Vec3(v.normalized());
}

Result<Line> unproject(NetKind kind, const NetPoint& p) {
  auto v = unproject_vector(kind, p);
  if (!v) return Result<Line>::failure(v.error());
  return line_from_vector(*v);
}

NetPolyline primitive_circle(int samples) {
  const int n = clamp_samples(samples);
  NetPolyline out;
  out.pts.reserve(n + 1);
  for (int k = 0; k < n; ++k) {
    const double t = 2.0 * kPi * k / n;
    out.pts.push_back({std::sin(t), std::cos(t)});
  }
  out.pts.push_back(out.pts.front());
  return out;
}

NetPolyline great_circle(NetKind kind, const Plane& p, int samples) {
  const int m = std::max(clamp_samples(samples) / 2, 4);
  const Vec3 s = strike_vector(p), d = dip_vector(p);
  NetPolyline out;
  out.pts.reserve(m + 1);
  // Half-turn from the strike direction through the dip line to the opposite strike.
  for (int k = 0; k <= m; ++k) {
    const double t = kPi * k / m;
    out.pts.push_back(project_down(kind, std::cos(t) * s + std::sin(t) * d));
  }
  return out;
}

Result<std::vector<NetPolyline>> small_circle(NetKind kind, const Line& axis, double half_angle_deg, int samples) {
  using R = Result<std::vector<NetPolyline>>;
  if (!(half_angle_deg >= 0.0 && half_angle_deg <= 180.0)) {
    std::ostringstream s;
    s << "small circle half-angle " << half_angle_deg << " is outside 0..180 degrees";
    return R::failure(s.str());
  }
  const int n = clamp_samples(samples);
  const double alpha = deg2rad(half_angle_deg);
  const double ca = std::cos(alpha), sa = std::sin(alpha);
  const Vec3 a = line_vector(axis);
  const Vec3 u = any_perpendicular(a);
  const Vec3 w = a.cross(u);
  auto point = [&](double t) -> Vec3 { return ca * a + sa * (std::cos(t) * u + std::sin(t) * w); };

  // Height of the circle point at parameter t: z(t) = A + B cos t + C sin t.
  const double A = ca * a.z(), B = sa * u.z(), C = sa * w.z();
  const double amp = std::hypot(B, C);

  std::vector<NetPolyline> out;
  if (!(amp > std::abs(A)) || amp < 1e-15) {
    // The cone does not cross the horizontal (at most touches it): one closed curve,
    // on the lower hemisphere or drawn by its antipodes.
    const double sign = A > 0 ? -1.0 : 1.0;
    NetPolyline pl;
    pl.pts.reserve(n + 1);
    for (int k = 0; k < n; ++k) pl.pts.push_back(project_down(kind, sign * point(2.0 * kPi * k / n)));
    pl.pts.push_back(pl.pts.front());
    out.push_back(std::move(pl));
    return out;
  }

  // Crossings of the horizontal: B cos t + C sin t = amp cos(t - phi) = -A.
  const double phi = std::atan2(C, B);
  const double delta = std::acos(std::max(-1.0, std::min(1.0, -A / amp)));
  const double t1 = phi - delta, t2 = phi + delta;  // z > 0 between t1 and t2 (z(phi) = A + amp > 0)

  // One arc sampled at the circle's density, both ends on the primitive.
  auto arc = [&](double from, double to, double sign) {
    const int m = std::max(2, static_cast<int>(std::ceil((to - from) / (2.0 * kPi) * n)));
    NetPolyline pl;
    pl.pts.reserve(m + 1);
    for (int k = 0; k <= m; ++k) {
      const double t = from + (to - from) * k / m;
      Vec3 v = sign * point(t);
      if (k == 0 || k == m) v.z() = 0.0;  // exactly on the horizontal
      pl.pts.push_back(project_down(kind, v));
    }
    return pl;
  };
  out.push_back(arc(t2, t1 + 2.0 * kPi, 1.0));  // the lower-hemisphere part
  // A half-angle of 90 degrees is a great circle: its upper half's antipodes retrace
  // the lower half, so it is drawn once.
  if (std::abs(ca) > 1e-12) out.push_back(arc(t1, t2, -1.0));  // the upper part, by antipodes
  return out;
}

Result<std::vector<NetPolyline>> confidence_cone(NetKind kind, const Line& mean, double alpha95_deg, int samples) {
  if (!(alpha95_deg >= 0.0 && alpha95_deg <= 180.0)) {
    std::ostringstream s;
    s << "confidence cone radius " << alpha95_deg << " is outside 0..180 degrees";
    return Result<std::vector<NetPolyline>>::failure(s.str());
  }
  return small_circle(kind, mean, alpha95_deg, samples);
}

}  // namespace cairn::geo
