#include "geomath/density.h"

#include <algorithm>
#include <cmath>
#include <string>

#include "geomath/angles.h"

namespace cairn::geo {

bool DensityGrid::inside(int i, int j) const {
  const NetPoint p = node(i, j);
  return p[0] * p[0] + p[1] * p[1] <= 1.0 + 1e-12;
}

double DensityGrid::max_value() const {
  double m = 0.0;
  for (int j = 0; j < grid.ny; ++j) {
    for (int i = 0; i < grid.nx; ++i) {
      if (inside(i, j)) m = std::max(m, value(i, j));
    }
  }
  return m;
}

Result<DensityGrid> density_grid(NetKind kind, const std::vector<Line>& axes, const DensityOptions& opt) {
  using R = Result<DensityGrid>;
  if (axes.empty()) return R::failure("no lines to count on the net");
  if (opt.grid_nodes < 3) {
    return R::failure("the counting grid needs at least 3 nodes per side, got " + std::to_string(opt.grid_nodes));
  }
  DensityGrid g;
  g.kind = kind;
  g.method = opt.method;
  g.n_data = static_cast<int>(axes.size());
  const double n = g.n_data;
  g.area_fraction = opt.method == CountingMethod::Kamb ? 9.0 / (n + 9.0) : 0.01;
  const double cos_theta = 1.0 - g.area_fraction;
  g.cone_half_angle = rad2deg(std::acos(cos_theta));
  g.expected = n * g.area_fraction;
  g.sigma = std::sqrt(n * g.area_fraction * (1.0 - g.area_fraction));

  const int m = opt.grid_nodes;
  g.grid.nx = g.grid.ny = m;
  g.grid.x0 = g.grid.y0 = -1.0;
  g.grid.dx = g.grid.dy = 2.0 / (m - 1);
  g.grid.values.assign(static_cast<std::size_t>(m) * m, 0.0);
  g.counts.assign(static_cast<std::size_t>(m) * m, 0);

  // Unit vectors once; the inner loop is three multiplications and a compare.
  std::vector<double> xs, ys, zs;
  xs.reserve(axes.size()), ys.reserve(axes.size()), zs.reserve(axes.size());
  for (const Line& l : axes) {
    const Vec3 v = line_vector(l);
    xs.push_back(v.x()), ys.push_back(v.y()), zs.push_back(v.z());
  }
  const double scale = opt.method == CountingMethod::Kamb ? 1.0 / g.sigma : 100.0 / n;
  for (int j = 0; j < m; ++j) {
    for (int i = 0; i < m; ++i) {
      const Vec3 d = unproject_vector_extended(kind, g.node(i, j)).normalized();
      const double dx = d.x(), dy = d.y(), dz = d.z();
      int c = 0;
      for (std::size_t k = 0; k < xs.size(); ++k) {
        c += std::abs(dx * xs[k] + dy * ys[k] + dz * zs[k]) >= cos_theta;
      }
      const std::size_t at = static_cast<std::size_t>(j) * m + i;
      g.counts[at] = c;
      g.grid.values[at] = c * scale;
    }
  }
  return g;
}

std::vector<double> contour_levels(const DensityGrid& g, double step) {
  std::vector<double> out;
  if (!(step > 0.0)) return out;
  const double top = g.max_value();
  for (int k = 1; k * step <= top; ++k) out.push_back(k * step);
  return out;
}

std::vector<DensityContour> density_contours(const DensityGrid& g, const std::vector<double>& levels) {
  std::vector<DensityContour> out;
  out.reserve(levels.size());
  for (double level : levels) {
    out.push_back(DensityContour{level, clip_to_disk(contour_lines(g.grid, level), 1.0)});
  }
  return out;
}

}  // namespace cairn::geo
