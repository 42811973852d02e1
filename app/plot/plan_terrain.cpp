#include "app/plot/plan_terrain.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fmt/format.h>

namespace cairn::plot {

geo::TerrainGrid coarsen(const geo::TerrainGrid& g, int f) {
  if (f <= 1 || !g.valid_shape()) return g;
  geo::TerrainGrid c;
  c.nx = (g.nx + f - 1) / f;
  c.ny = (g.ny + f - 1) / f;
  c.west = g.west;
  c.north = g.north;
  c.cell = g.cell * f;
  c.z.assign(static_cast<std::size_t>(c.nx) * c.ny, std::numeric_limits<float>::quiet_NaN());
  for (int J = 0; J < c.ny; ++J)
    for (int I = 0; I < c.nx; ++I) {
      double sum = 0;
      int n = 0;
      for (int j = J * f; j < std::min(g.ny, (J + 1) * f); ++j)
        for (int i = I * f; i < std::min(g.nx, (I + 1) * f); ++i)
          if (g.has(i, j)) sum += g.at(i, j), ++n;
      if (n) c.z[static_cast<std::size_t>(J) * c.nx + I] = static_cast<float>(sum / n);
    }
  return c;
}

namespace {

std::vector<std::pair<double, double>> ring_of(const std::vector<geo::NetPoint>& r) {
  std::vector<std::pair<double, double>> out;
  out.reserve(r.size());
  for (const auto& p : r) out.emplace_back(p[0], p[1]);
  return out;
}

double nice_interval(double relief) {
  const double raw = std::max(1.0, relief / 12);
  const double p = std::pow(10.0, std::floor(std::log10(raw)));
  for (double m : {1.0, 2.0, 5.0, 10.0})
    if (m * p >= raw) return m * p;
  return 10 * p;
}

}  // namespace

std::vector<std::string> add_terrain(PlanData& d, const geo::TerrainGrid& g, const std::vector<TracedContact>& contacts,
                                     double terrain_sigma, const PlanTerrainOptions& o) {
  std::vector<std::string> notes;
  if (!g.valid_shape()) return notes;
  const int factor = std::max(1, static_cast<int>(std::ceil(std::max(g.nx, g.ny) / static_cast<double>(o.max_cells))));
  const geo::TerrainGrid c = coarsen(g, factor);

  // Hillshade in grey levels.
  const std::vector<float> shade = geo::hillshade(c);
  const int levels = std::max(2, o.grey_levels);
  for (int k = 0; k < levels; ++k) {
    std::vector<unsigned char> mask(shade.size(), 0);
    for (std::size_t q = 0; q < shade.size(); ++q)
      if (!std::isnan(shade[q])) mask[q] = std::min(levels - 1, static_cast<int>(shade[q] * levels)) == k;
    const double shade = static_cast<double>(k) / (levels - 1);
    for (const auto& r : geo::mask_rectangles(c, mask)) d.shading.push_back({ring_of(r), Rgba{}, shade});
  }

  // Terrain contours.
  double lo = INFINITY, hi = -INFINITY;
  for (float v : c.z)
    if (!std::isnan(v)) lo = std::min<double>(lo, v), hi = std::max<double>(hi, v);
  const double interval = o.contour_interval > 0 ? o.contour_interval : nice_interval(hi - lo);
  for (const auto& level : geo::terrain_contours(c, interval))
    for (const auto& l : level.lines) {
      PlanPath p;
      for (const auto& q : l.pts) p.pts.emplace_back(q[0], q[1]);
      p.colour = o.contour;
      p.width = std::fmod(level.level, 5 * interval) == 0 ? 0.7 : 0.4;
      d.terrain_contours.push_back(std::move(p));
    }
  notes.push_back(fmt::format("terrain contours every {:g} m, hillshade from the north-west", interval));

  // Traces and bands, on a grid no finer than trace_cells across.
  const int tf = std::max(1, static_cast<int>(std::ceil(std::max(g.nx, g.ny) / static_cast<double>(o.trace_cells))));
  const geo::TerrainGrid tg = tf == factor ? c : coarsen(g, tf);
  for (const auto& tc : contacts) {
    if (!tc.fit) continue;
    const auto pred = geo::predict_contact(tg, *tc.fit, terrain_sigma);
    if (!pred) continue;
    for (const auto& l : pred->trace) {
      PlanPath p;
      for (const auto& q : l.pts) p.pts.emplace_back(q[0], q[1]);
      p.colour = tc.colour;
      p.width = 1.6;
      p.label = tc.name;
      d.traces.push_back(std::move(p));
    }
    Rgba band = tc.colour;
    band.a = 60;
    for (const auto& r : pred->band) d.bands.push_back({ring_of(r), band, std::nullopt});
    if (pred->mean_half_width) {
      notes.push_back(fmt::format("{}: trace band about +/- {:.0f} m", tc.name, *pred->mean_half_width));
    }
  }
  return notes;
}

}  // namespace cairn::plot
