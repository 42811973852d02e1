// Tests of Kamb and 1%-area counting on the net (geomath/density.h).
//
// Outside sources:
//  - Kamb, W. B. (1959). Ice petrofabric observations from Blue Glacier, Washington, in
//    relation to theory and experiment. J. Geophys. Res. 64, 1891-1909: counting cone
//    of area fraction A = 9/(N + 9), expected count E = N A = 3 sigma with
//    sigma = sqrt(N A (1 - A)); a uniform spread therefore averages 3 sigma.
//  - 1%-area counting: a cone of 1% of the hemisphere's area, densities in % of the
//    data per 1% area (common practice, no single published source); a uniform spread
//    averages 1.
//  - Snyder (1987), USGS PP 1395: the inverse polar projections used here to find each
//    node's direction (chi = 2 asin(r / sqrt 2) equal-area, chi = 2 atan(r) equal-angle).
// Counts are checked against a brute-force loop with acos written here.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "geomath/density.h"
#include "tests/geomath/net_test_support.h"

namespace cairn::geo {
namespace {

using namespace test;

// Direction of a net point by Snyder's inverse, continued past the primitive.
Vec3 node_direction(NetKind k, const NetPoint& p) {
  const double r = std::hypot(p[0], p[1]);
  const double chi = k == NetKind::EqualArea ? 2.0 * std::asin(std::min(1.0, r / std::sqrt(2.0))) : 2.0 * std::atan(r);
  const double az = std::atan2(p[0], p[1]);
  return Vec3(std::sin(chi) * std::sin(az), std::sin(chi) * std::cos(az), -std::cos(chi));
}

std::vector<Line> uniform_axes(std::mt19937_64& rng, int n) {
  std::vector<Line> out;
  for (int i = 0; i < n; ++i) {
    // Uniform on the sphere (Archimedes: z uniform), folded to the lower hemisphere.
    const double z = -uniform(rng);
    out.push_back(Line{360.0 * uniform(rng), deg(std::asin(-z))});
  }
  return out;
}

void check_brute_force(NetKind kind, CountingMethod method, int n_data, int nodes) {
  std::mt19937_64 rng(n_data * 7 + nodes);
  std::vector<Line> axes;
  for (int i = 0; i < n_data / 2; ++i) axes.push_back(Line{360 * uniform(rng), 90 * uniform(rng)});
  for (int i = n_data / 2; i < n_data; ++i)  // and a cluster, for high counts
    axes.push_back(Line{100 + 20 * uniform(rng), 30 + 20 * uniform(rng)});
  DensityOptions opt;
  opt.method = method;
  opt.grid_nodes = nodes;
  auto g = density_grid(kind, axes, opt);
  ASSERT_TRUE(g.ok()) << g.error();
  const double A = method == CountingMethod::Kamb ? 9.0 / (n_data + 9.0) : 0.01;
  const double theta = deg(std::acos(1.0 - A));
  const double sigma = std::sqrt(n_data * A * (1 - A));
  EXPECT_NEAR(g->area_fraction, A, 1e-15);
  EXPECT_NEAR(g->cone_half_angle, theta, 1e-12);
  EXPECT_NEAR(g->sigma, sigma, 1e-12);
  if (method == CountingMethod::Kamb) {
    EXPECT_NEAR(g->expected / g->sigma, 3.0, 1e-12);  // Kamb (1959)
  }
  ASSERT_EQ(g->nodes(), nodes);
  int nonzero = 0;
  for (int j = 0; j < nodes; ++j) {
    for (int i = 0; i < nodes; ++i) {
      const NetPoint p{-1.0 + 2.0 * i / (nodes - 1), -1.0 + 2.0 * j / (nodes - 1)};
      EXPECT_NEAR(g->node(i, j)[0], p[0], 1e-12);
      EXPECT_NEAR(g->node(i, j)[1], p[1], 1e-12);
      const Vec3 d = node_direction(kind, p);
      int count = 0;
      for (const Line& l : axes) {
        if (deg(std::acos(std::min(1.0, std::abs(d.dot(dir(l.trend, l.plunge)))))) <= theta) ++count;
      }
      EXPECT_EQ(g->count(i, j), count) << "node " << i << "," << j;
      const double want = method == CountingMethod::Kamb ? count / sigma : 100.0 * count / n_data;
      EXPECT_NEAR(g->value(i, j), want, 1e-12);
      nonzero += count > 0;
    }
  }
  EXPECT_GT(nonzero, 0);
}

TEST(Density, KambCountsMatchBruteForce) {
  check_brute_force(NetKind::EqualArea, CountingMethod::Kamb, 57, 25);
  check_brute_force(NetKind::EqualAngle, CountingMethod::Kamb, 40, 21);
}

TEST(Density, OnePercentCountsMatchBruteForce) {
  check_brute_force(NetKind::EqualArea, CountingMethod::OnePercent, 300, 21);
  check_brute_force(NetKind::EqualAngle, CountingMethod::OnePercent, 120, 17);
}

TEST(Density, UniformDataAverageTheExpectedDensity) {
  // Kamb (1959): under uniformity the expected count is 3 sigma; 1% counting: 1% per 1%.
  std::mt19937_64 rng(99);
  const auto axes = uniform_axes(rng, 4000);
  for (CountingMethod m : {CountingMethod::Kamb, CountingMethod::OnePercent}) {
    DensityOptions opt;
    opt.method = m;
    opt.grid_nodes = 31;
    auto g = density_grid(NetKind::EqualArea, axes, opt);
    ASSERT_TRUE(g.ok());
    double sum = 0;
    int n = 0;
    for (int j = 0; j < g->nodes(); ++j)
      for (int i = 0; i < g->nodes(); ++i)
        if (g->inside(i, j)) sum += g->value(i, j), ++n;
    EXPECT_NEAR(sum / n, m == CountingMethod::Kamb ? 3.0 : 1.0, 0.05 * (m == CountingMethod::Kamb ? 3.0 : 1.0));
  }
}

// Winding number of a closed polyline about a point.
int winding(const std::vector<NetPoint>& ring, const NetPoint& p) {
  int w = 0;
  for (std::size_t i = 0; i + 1 < ring.size(); ++i) {
    const NetPoint& a = ring[i];
    const NetPoint& b = ring[i + 1];
    const double cross = (b[0] - a[0]) * (p[1] - a[1]) - (p[0] - a[0]) * (b[1] - a[1]);
    if (a[1] <= p[1]) {
      if (b[1] > p[1] && cross > 0) ++w;
    } else if (b[1] <= p[1] && cross < 0) {
      --w;
    }
  }
  return w;
}

TEST(Density, HighestContourEnclosesTheCluster) {
  std::mt19937_64 rng(5);
  std::vector<Line> axes = uniform_axes(rng, 60);
  for (int i = 0; i < 60; ++i) axes.push_back(Line{220 + 10 * uniform(rng), 45 + 10 * uniform(rng)});
  auto g = density_grid(NetKind::EqualArea, axes);
  ASSERT_TRUE(g.ok());
  const auto levels = contour_levels(*g, 2.0);
  ASSERT_GE(levels.size(), 3u);
  for (std::size_t k = 0; k < levels.size(); ++k) EXPECT_DOUBLE_EQ(levels[k], 2.0 * (k + 1));
  EXPECT_LE(levels.back(), g->max_value());
  EXPECT_GT(levels.back() + 2.0, g->max_value());
  const auto contours = density_contours(*g, levels);
  ASSERT_EQ(contours.size(), levels.size());
  for (const auto& c : contours) {
    ASSERT_FALSE(c.lines.empty()) << "level " << c.level;
    for (const auto& pl : c.lines)
      for (const auto& p : pl.pts) EXPECT_LE(std::hypot(p[0], p[1]), 1.0 + 1e-12);
  }
  // The cluster centre (trend 225, plunge 50) projected by Snyder's formula.
  const double r = std::sqrt(2.0) * std::sin(rad(40.0) / 2);
  const NetPoint centre{r * std::sin(rad(225)), r * std::cos(rad(225))};
  int around = 0;
  for (const auto& pl : contours.back().lines)
    if (pl.closed()) around += std::abs(winding(pl.pts, centre));
  EXPECT_EQ(around, 1);
}

TEST(Density, FailsWithReasons) {
  auto none = density_grid(NetKind::EqualArea, {});
  ASSERT_FALSE(none.ok());
  EXPECT_NE(none.error().find("no lines"), std::string::npos);
  DensityOptions opt;
  opt.grid_nodes = 2;
  auto small = density_grid(NetKind::EqualArea, {Line{0, 0}}, opt);
  ASSERT_FALSE(small.ok());
  EXPECT_NE(small.error().find("at least 3 nodes"), std::string::npos);
}

}  // namespace
}  // namespace cairn::geo
