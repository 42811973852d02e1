#include "geomath/strike_lines.h"

#include <algorithm>
#include <cmath>
#include <string>

#include "geomath/angles.h"

namespace cairn::geo {

namespace {
// Dips this close to 0 or 90 degrees are treated as horizontal or vertical.
constexpr double kFlatDip = 1e-9;
// Normal z-component below this: vertical plane (elevation undefined in plan).
constexpr double kVerticalNz = 1e-12;

bool horizontal(const Plane& p) { return p.dip <= kFlatDip; }
bool vertical(const Plane& p) { return p.dip >= 90.0 - kFlatDip; }

double plane_z(const Vec3& point, const Vec3& normal, double e, double n) {
  return point.z() - (normal.x() * (e - point.x()) + normal.y() * (n - point.y())) / normal.z();
}
}  // namespace

Result<ElevationEstimate> elevation_at(const PlaneFit& fit, double e, double n) {
  if (!std::isfinite(e) || !std::isfinite(n))
    return Result<ElevationEstimate>::failure("easting or northing is not a finite number");
  if (std::abs(fit.normal.z()) < kVerticalNz)
    return Result<ElevationEstimate>::failure("the plane is vertical: its elevation is not a function of map position");
  ElevationEstimate out;
  out.elevation = plane_z(fit.centroid, fit.normal, e, n);
  // Spread of the Monte Carlo planes' elevations here (draws that came out
  // vertical are skipped: they say nothing about elevation at one place).
  double sum = 0, sum2 = 0;
  size_t k = 0;
  for (const auto& d : fit.draws) {
    if (std::abs(d.normal.z()) < kVerticalNz) continue;
    const double z = plane_z(d.point, d.normal, e, n) - out.elevation;
    sum += z;
    sum2 += z * z;
    ++k;
  }
  if (k >= 2) {
    const double mean = sum / static_cast<double>(k);
    const double var = std::max(0.0, (sum2 - static_cast<double>(k) * mean * mean) / static_cast<double>(k - 1));
    // 1.96 with the precision known; t_0.975(N-3) times the variance factor when
    // it was estimated from the residuals (see small_sample_scaling in plane_fit.cpp).
    out.half_width95 = fit.interval_k95 * std::sqrt(var);
  }
  return out;
}

Result<double> strike_line_azimuth(const Plane& p) {
  if (horizontal(p)) return Result<double>::failure("the plane is horizontal: it has no strike, and no strike lines");
  return wrap360(p.strike);
}

Result<double> strike_line_spacing(const Plane& p, double interval) {
  if (!std::isfinite(interval) || interval <= 0)
    return Result<double>::failure("the contour interval must be a positive number of metres");
  if (horizontal(p))
    return Result<double>::failure("the plane is horizontal: strike lines are undefined and their spacing infinite");
  if (vertical(p)) return 0.0;
  return interval / std::tan(deg2rad(p.dip));
}

Result<std::vector<ContourSegment>> structure_contours(const Plane& p, const Vec3& through, const MapRect& r,
                                                       double interval, size_t max_lines) {
  using R = Result<std::vector<ContourSegment>>;
  if (!std::isfinite(interval) || interval <= 0)
    return R::failure("the contour interval must be a positive number of metres");
  if (!through.allFinite() || !std::isfinite(r.e_min) || !std::isfinite(r.e_max) || !std::isfinite(r.n_min) ||
      !std::isfinite(r.n_max))
    return R::failure("a coordinate is not a finite number");
  if (!(r.e_max > r.e_min) || !(r.n_max > r.n_min))
    return R::failure("the map rectangle is empty (its maximum must exceed its minimum)");
  if (horizontal(p)) return R::failure("the plane is horizontal: it has no structure contours");
  if (vertical(p)) return R::failure("the plane is vertical: its structure contours all coincide with its trace");

  // z(q) = z0 - g * (q - q0) . d, with d the horizontal unit dip direction and g = tan(dip).
  const double dd = deg2rad(p.dip_direction());
  const double dx = std::sin(dd), dy = std::cos(dd);
  const double g = std::tan(deg2rad(p.dip));
  auto z_at = [&](double e, double n) { return through.z() - g * ((e - through.x()) * dx + (n - through.y()) * dy); };
  double zmin = 1e300, zmax = -1e300;
  for (double e : {r.e_min, r.e_max})
    for (double n : {r.n_min, r.n_max}) {
      zmin = std::min(zmin, z_at(e, n));
      zmax = std::max(zmax, z_at(e, n));
    }
  // A level at a corner's elevation (to rounding) is kept.
  const double kmin = std::ceil(zmin / interval - 1e-9), kmax = std::floor(zmax / interval + 1e-9);
  if (kmax - kmin + 1 > static_cast<double>(max_lines))
    return R::failure(std::to_string(static_cast<long long>(kmax - kmin + 1)) +
                      " structure contours would cross this area; use a larger interval");
  std::vector<ContourSegment> out;
  // Strike direction (horizontal, perpendicular to the dip direction).
  const double sx = dy, sy = -dx;
  for (double k = kmin; k <= kmax; k += 1) {
    const double level = k * interval;
    // Foot point on the contour: move from `through` along the dip direction.
    const double t0 = (through.z() - level) / g;
    const double fe = through.x() + t0 * dx, fn = through.y() + t0 * dy;
    // Clip fe + t*(sx, sy) to the rectangle (Liang-Barsky).
    double tlo = -1e300, thi = 1e300;
    bool inside = true;
    auto clip = [&](double origin, double dir, double lo, double hi) {
      if (std::abs(dir) < 1e-15) {
        // Parallel to this pair of edges: inside when between them (a contour
        // lying on an edge, to rounding, counts as inside).
        const double tol = 1e-9 * (hi - lo);
        if (origin < lo - tol || origin > hi + tol) inside = false;
        return;
      }
      double a = (lo - origin) / dir, b = (hi - origin) / dir;
      if (a > b) std::swap(a, b);
      tlo = std::max(tlo, a);
      thi = std::min(thi, b);
    };
    clip(fe, sx, r.e_min, r.e_max);
    clip(fn, sy, r.n_min, r.n_max);
    if (!inside || !(thi > tlo)) continue;  // misses the rectangle or touches a corner only
    out.push_back(ContourSegment{level, fe + tlo * sx, fn + tlo * sy, fe + thi * sx, fn + thi * sy});
  }
  return out;
}

Result<std::vector<ContourSegment>> structure_contours(const PlaneFit& fit, const MapRect& rect, double interval,
                                                       size_t max_lines) {
  return structure_contours(fit.plane, fit.centroid, rect, interval, max_lines);
}

}  // namespace cairn::geo
