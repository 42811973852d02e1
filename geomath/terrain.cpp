#include "geomath/terrain.h"

#include <algorithm>
#include <sstream>

namespace cairn::geo {

Result<double> elevation_at(const TerrainGrid& g, double e, double n) {
  if (!g.valid_shape()) return Result<double>::failure("the terrain grid is empty or malformed");
  if (!std::isfinite(e) || !std::isfinite(n)) return Result<double>::failure("the place is not a finite position");
  if (e < g.west || e > g.east() || n < g.south() || n > g.north) {
    std::ostringstream s;
    s.precision(10);
    s << "E " << e << " N " << n << " lies outside the terrain";
    return Result<double>::failure(s.str());
  }
  // Continuous cell coordinates of the point, 0 at the first centre.
  double fx = (e - g.west) / g.cell - 0.5;
  double fy = (g.north - n) / g.cell - 0.5;
  fx = std::clamp(fx, 0.0, static_cast<double>(g.nx - 1));
  fy = std::clamp(fy, 0.0, static_cast<double>(g.ny - 1));
  int i0 = std::min(static_cast<int>(std::floor(fx)), std::max(g.nx - 2, 0));
  int j0 = std::min(static_cast<int>(std::floor(fy)), std::max(g.ny - 2, 0));
  const int i1 = std::min(i0 + 1, g.nx - 1), j1 = std::min(j0 + 1, g.ny - 1);
  const double tx = fx - i0, ty = fy - j0;
  const double z00 = g.at(i0, j0), z10 = g.at(i1, j0), z01 = g.at(i0, j1), z11 = g.at(i1, j1);
  // Only the corners with a non-zero weight must be present.
  const bool need10 = tx > 0, need01 = ty > 0, need11 = tx > 0 && ty > 0;
  if (std::isnan(z00) || (need10 && std::isnan(z10)) || (need01 && std::isnan(z01)) || (need11 && std::isnan(z11)))
    return Result<double>::failure("the terrain has no elevation (nodata) at this place");
  double z = (1 - tx) * (1 - ty) * z00;
  if (need10) z += tx * (1 - ty) * z10;
  if (need01) z += (1 - tx) * ty * z01;
  if (need11) z += tx * ty * z11;
  return z;
}

}  // namespace cairn::geo

namespace cairn::geo {

namespace {
constexpr double kDeg = 3.14159265358979323846 / 180.0;
constexpr float kNaN = std::numeric_limits<float>::quiet_NaN();
}  // namespace

Result<Gradient> horn_gradient(const TerrainGrid& g, int i, int j) {
  if (i < 1 || j < 1 || i + 1 >= g.nx || j + 1 >= g.ny)
    return Result<Gradient>::failure("the cell lies on the terrain's border");
  const double a = g.at(i - 1, j - 1), b = g.at(i, j - 1), c = g.at(i + 1, j - 1);
  const double d = g.at(i - 1, j), f = g.at(i + 1, j);
  const double gg = g.at(i - 1, j + 1), h = g.at(i, j + 1), k = g.at(i + 1, j + 1);
  if (std::isnan(a) || std::isnan(b) || std::isnan(c) || std::isnan(d) || std::isnan(g.at(i, j)) || std::isnan(f) ||
      std::isnan(gg) || std::isnan(h) || std::isnan(k))
    return Result<Gradient>::failure("the terrain has missing cells around this place");
  Gradient out;
  out.dz_de = ((c + 2 * f + k) - (a + 2 * d + gg)) / (8 * g.cell);
  out.dz_dn = ((a + 2 * b + c) - (gg + 2 * h + k)) / (8 * g.cell);
  return out;
}

namespace {

template <class F>
std::vector<float> per_cell(const TerrainGrid& g, F f) {
  std::vector<float> out(static_cast<std::size_t>(g.nx) * g.ny, kNaN);
  if (!g.valid_shape()) return out;
  for (int j = 1; j + 1 < g.ny; ++j)
    for (int i = 1; i + 1 < g.nx; ++i) {
      const auto gr = horn_gradient(g, i, j);
      if (gr) out[static_cast<std::size_t>(j) * g.nx + i] = f(*gr);
    }
  return out;
}

double slope_of(const Gradient& gr) { return std::atan(std::hypot(gr.dz_de, gr.dz_dn)) / kDeg; }

std::optional<double> aspect_of(const Gradient& gr) {
  if (gr.dz_de == 0 && gr.dz_dn == 0) return std::nullopt;
  double a = std::atan2(-gr.dz_de, -gr.dz_dn) / kDeg;
  if (a < 0) a += 360;
  if (a >= 360) a -= 360;
  return a;
}

}  // namespace

std::vector<float> slope_degrees(const TerrainGrid& g) {
  return per_cell(g, [](const Gradient& gr) { return static_cast<float>(slope_of(gr)); });
}

std::vector<float> aspect_degrees(const TerrainGrid& g) {
  return per_cell(g, [](const Gradient& gr) {
    const auto a = aspect_of(gr);
    return a ? static_cast<float>(*a) : kNaN;
  });
}

std::vector<float> hillshade(const TerrainGrid& g, double azimuth, double altitude) {
  const double zen = (90 - altitude) * kDeg, az = azimuth * kDeg;
  return per_cell(g, [&](const Gradient& gr) {
    const double s = std::atan(std::hypot(gr.dz_de, gr.dz_dn));
    const auto a = aspect_of(gr);
    double v = std::cos(zen) * std::cos(s);
    if (a) v += std::sin(zen) * std::sin(s) * std::cos(az - *a * kDeg);
    return static_cast<float>(std::max(0.0, v));
  });
}

namespace {
// Horn's gradient of the cell a place lies in.
Result<Gradient> gradient_at(const TerrainGrid& g, double e, double n) {
  if (!g.valid_shape()) return Result<Gradient>::failure("the terrain grid is empty or malformed");
  if (!(e >= g.west && e <= g.east() && n >= g.south() && n <= g.north))
    return Result<Gradient>::failure("the place lies outside the terrain");
  const int i = std::min(static_cast<int>((e - g.west) / g.cell), g.nx - 1);
  const int j = std::min(static_cast<int>((g.north - n) / g.cell), g.ny - 1);
  return horn_gradient(g, i, j);
}
}  // namespace

Result<SlopeAt> slope_at(const TerrainGrid& g, double e, double n) {
  const auto gr = gradient_at(g, e, n);
  if (!gr) return Result<SlopeAt>::failure(gr.error());
  SlopeAt out;
  out.slope = slope_of(*gr);
  out.aspect = aspect_of(*gr).value_or(0);
  return out;
}

double plane_elevation(const Vec3& p, const Vec3& nrm, double e, double n) {
  return p.z() - (nrm.x() * (e - p.x()) + nrm.y() * (n - p.y())) / nrm.z();
}

namespace {
// A scalar grid whose node (i, j) is the centre of cell (i, j), values not set.
ScalarGrid on_centres(const TerrainGrid& g) {
  ScalarGrid d;
  d.nx = g.nx;
  d.ny = g.ny;
  d.x0 = g.centre_e(0);
  d.y0 = g.centre_n(0);
  d.dx = g.cell;
  d.dy = -g.cell;
  return d;
}
}  // namespace

ScalarGrid difference_grid(const TerrainGrid& g, const Vec3& point, const Vec3& normal) {
  ScalarGrid d = on_centres(g);
  d.values.resize(g.z.size());
  for (int j = 0; j < g.ny; ++j) {
    const double n = g.centre_n(j);
    for (int i = 0; i < g.nx; ++i) {
      const float z = g.at(i, j);
      d.values[static_cast<std::size_t>(j) * g.nx + i] = std::isnan(z)
                                                             ? std::numeric_limits<double>::quiet_NaN()
                                                             : z - plane_elevation(point, normal, g.centre_e(i), n);
    }
  }
  return d;
}

Result<std::vector<NetPolyline>> outcrop_trace(const TerrainGrid& g, const Vec3& point, const Vec3& normal) {
  using R = Result<std::vector<NetPolyline>>;
  if (!(normal.z() > 1e-9)) return R::failure("a vertical plane has no elevation to compare with the ground");
  if (!g.valid_shape()) return R::failure("the terrain grid is empty or malformed");
  return contour_lines(difference_grid(g, point, normal), 0.0);
}

std::vector<LevelLines> terrain_contours(const TerrainGrid& g, double interval) {
  std::vector<LevelLines> out;
  if (!g.valid_shape() || !(interval > 0)) return out;
  ScalarGrid s = on_centres(g);
  s.values.assign(g.z.begin(), g.z.end());
  double lo = INFINITY, hi = -INFINITY;
  for (float v : g.z)
    if (!std::isnan(v)) {
      lo = std::min<double>(lo, v);
      hi = std::max<double>(hi, v);
    }
  if (!(lo <= hi)) return out;
  for (double level = std::ceil(lo / interval) * interval; level <= hi; level += interval) {
    auto lines = contour_lines(s, level);
    if (!lines.empty()) out.push_back({level, std::move(lines)});
    if (out.size() > 10000) break;  // a bound for absurd intervals
  }
  return out;
}

std::vector<LevelLines> structure_contours(const TerrainGrid& g, const Vec3& point, const Vec3& normal,
                                           double interval) {
  std::vector<LevelLines> out;
  if (!g.valid_shape() || !(interval > 0) || !(normal.z() > 1e-9)) return out;
  const double hx = normal.x(), hy = normal.y();
  if (std::hypot(hx, hy) < 1e-12) return out;  // horizontal plane: no strike
  // The plane's elevation at the grid's corners bounds the levels.
  double lo = INFINITY, hi = -INFINITY;
  for (double e : {g.west, g.east()})
    for (double n : {g.south(), g.north}) {
      const double z = plane_elevation(point, normal, e, n);
      lo = std::min(lo, z);
      hi = std::max(hi, z);
    }
  // A straight line per level, clipped to the rectangle by sampling along the
  // strike (Liang-Barsky style parametric clip).
  const double sx = -hy, sy = hx;  // horizontal direction along the strike
  const double len = std::hypot(sx, sy);
  for (double level = std::ceil(lo / interval) * interval; level <= hi; level += interval) {
    // A point on the level line: move from `point` down the dip direction.
    const double grad = std::hypot(hx, hy) / normal.z();  // tan(dip)
    const double dist = (point.z() - level) / grad;       // horizontal distance along the dip direction
    const double px = point.x() + hx / std::hypot(hx, hy) * dist, py = point.y() + hy / std::hypot(hx, hy) * dist;
    double t0 = -INFINITY, t1 = INFINITY;
    auto clip = [&](double p, double d, double lo_b, double hi_b) {
      if (std::fabs(d) < 1e-15) return p >= lo_b && p <= hi_b;
      double a = (lo_b - p) / d, b = (hi_b - p) / d;
      if (a > b) std::swap(a, b);
      t0 = std::max(t0, a);
      t1 = std::min(t1, b);
      return t0 <= t1;
    };
    if (!clip(px, sx / len, g.west, g.east()) || !clip(py, sy / len, g.south(), g.north)) continue;
    NetPolyline line;
    line.pts.push_back({px + sx / len * t0, py + sy / len * t0});
    line.pts.push_back({px + sx / len * t1, py + sy / len * t1});
    out.push_back({level, {line}});
    if (out.size() > 10000) break;
  }
  return out;
}

Result<double> structure_contour_spacing(double dip_deg, double interval) {
  if (!(dip_deg > 0 && dip_deg < 90)) return Result<double>::failure("structure contours need a dip between 0 and 90");
  if (!(interval > 0)) return Result<double>::failure("the interval must be positive");
  return interval / std::tan(dip_deg * kDeg);
}

}  // namespace cairn::geo

namespace cairn::geo {

Result<PlaneUncertainty> plane_uncertainty(const PlaneFit& fit) {
  using R = Result<PlaneUncertainty>;
  if (fit.draws.size() < 10) return R::failure("the fit has no Monte Carlo realisations to take its uncertainty from");
  PlaneUncertainty u;
  u.centroid = fit.centroid;
  std::vector<Eigen::Vector3d> q;
  q.reserve(fit.draws.size());
  Eigen::Vector3d mean = Eigen::Vector3d::Zero();
  for (const auto& d : fit.draws) {
    if (!(d.normal.z() > 1e-9)) return R::failure("a realisation of the plane is vertical");
    const Eigen::Vector3d v(plane_elevation(d.point, d.normal, u.centroid.x(), u.centroid.y()),
                            -d.normal.x() / d.normal.z(), -d.normal.y() / d.normal.z());
    q.push_back(v);
    mean += v;
  }
  mean /= static_cast<double>(q.size());
  for (const auto& v : q) u.cov += (v - mean) * (v - mean).transpose();
  u.cov /= static_cast<double>(q.size() - 1);
  return u;
}

double plane_sigma(const PlaneUncertainty& u, double e, double n) {
  const Eigen::Vector3d v(1, e - u.centroid.x(), n - u.centroid.y());
  return std::sqrt(std::max(0.0, v.dot(u.cov * v)));
}

namespace {
double band_sigma(const PlaneUncertainty& u, double terrain_sigma, double e, double n) {
  const double sp = plane_sigma(u, e, n);
  return std::sqrt(sp * sp + terrain_sigma * terrain_sigma);
}
}  // namespace

bool in_trace_band(const TerrainGrid& g, const Vec3& point, const Vec3& normal, const PlaneUncertainty& u,
                   double terrain_sigma, double e, double n) {
  const auto z = elevation_at(g, e, n);
  if (!z || !(normal.z() > 1e-9)) return false;
  const double d = *z - plane_elevation(point, normal, e, n);
  return std::fabs(d) <= kZ95 * band_sigma(u, terrain_sigma, e, n);
}

std::vector<unsigned char> trace_band_cells(const TerrainGrid& g, const Vec3& point, const Vec3& normal,
                                            const PlaneUncertainty& u, double terrain_sigma) {
  std::vector<unsigned char> out(g.z.size(), 0);
  if (!g.valid_shape() || !(normal.z() > 1e-9)) return out;
  for (int j = 0; j < g.ny; ++j) {
    const double n = g.centre_n(j);
    for (int i = 0; i < g.nx; ++i) {
      const float z = g.at(i, j);
      if (std::isnan(z)) continue;
      const double e = g.centre_e(i);
      const double d = z - plane_elevation(point, normal, e, n);
      out[static_cast<std::size_t>(j) * g.nx + i] = std::fabs(d) <= kZ95 * band_sigma(u, terrain_sigma, e, n);
    }
  }
  return out;
}

Result<double> trace_band_half_width(const TerrainGrid& g, const Vec3& normal, const PlaneUncertainty& u,
                                     double terrain_sigma, double e, double n) {
  if (!(normal.z() > 1e-9)) return Result<double>::failure("a vertical plane");
  const auto gr = gradient_at(g, e, n);
  if (!gr) return Result<double>::failure(gr.error());
  const double de = gr->dz_de + normal.x() / normal.z(), dn = gr->dz_dn + normal.y() / normal.z();
  const double slope = std::hypot(de, dn);
  if (slope < 1e-6) return Result<double>::failure("the ground runs parallel to the plane here: the band has no width");
  return kZ95 * band_sigma(u, terrain_sigma, e, n) / slope;
}

}  // namespace cairn::geo

namespace cairn::geo {

std::vector<std::vector<NetPoint>> mask_rectangles(const TerrainGrid& g, const std::vector<unsigned char>& mask) {
  std::vector<std::vector<NetPoint>> out;
  if (!g.valid_shape() || mask.size() != g.z.size()) return out;
  struct Open {
    int i0, i1, j0;  // columns [i0, i1), first row
  };
  std::vector<Open> open, next;
  auto close = [&](const Open& r, int j_end) {
    const double w = g.west + r.i0 * g.cell, e = g.west + r.i1 * g.cell;
    const double n = g.north - r.j0 * g.cell, s = g.north - j_end * g.cell;
    out.push_back({{w, s}, {e, s}, {e, n}, {w, n}, {w, s}});  // counter-clockwise
  };
  for (int j = 0; j <= g.ny; ++j) {
    next.clear();
    std::vector<std::pair<int, int>> runs;
    if (j < g.ny) {
      for (int i = 0; i < g.nx;) {
        if (!mask[static_cast<std::size_t>(j) * g.nx + i]) {
          ++i;
          continue;
        }
        int k = i;
        while (k < g.nx && mask[static_cast<std::size_t>(j) * g.nx + k]) ++k;
        runs.emplace_back(i, k);
        i = k;
      }
    }
    for (const Open& r : open) {
      bool continued = false;
      for (auto& run : runs)
        if (run.first == r.i0 && run.second == r.i1) {
          next.push_back(r);
          run.first = -1;  // taken
          continued = true;
          break;
        }
      if (!continued) close(r, j);
    }
    for (const auto& run : runs)
      if (run.first >= 0) next.push_back({run.first, run.second, j});
    open.swap(next);
  }
  return out;
}

Result<ContactPrediction> predict_contact(const TerrainGrid& g, const PlaneFit& fit, double terrain_sigma) {
  using R = Result<ContactPrediction>;
  auto trace = outcrop_trace(g, fit.centroid, fit.normal);
  if (!trace) return R::failure(trace.error());
  ContactPrediction out;
  out.trace = std::move(trace.value());
  auto u = plane_uncertainty(fit);
  if (!u) return out;
  out.has_band = true;
  out.uncertainty = *u;
  out.band = mask_rectangles(g, trace_band_cells(g, fit.centroid, fit.normal, *u, terrain_sigma));
  double sum = 0;
  int count = 0;
  for (const auto& l : out.trace)
    for (const auto& p : l.pts) {
      const auto w = trace_band_half_width(g, fit.normal, *u, terrain_sigma, p[0], p[1]);
      if (w) sum += *w, ++count;
    }
  if (count) out.mean_half_width = sum / count;
  return out;
}

}  // namespace cairn::geo
