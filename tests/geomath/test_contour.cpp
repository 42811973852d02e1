// Tests of marching-squares contouring and disk clipping (geomath/contour.h).
//
// Outside sources: analytic fields whose level sets are known in closed form
// (x^2 + y^2 = c is a circle of radius sqrt c and area pi c; x = c a straight line;
// x y = 0 the two axes) and the line-circle intersection x^2 + y^2 = 1 (plane geometry;
// standard closed forms, value from memory).
#include <gtest/gtest.h>

#include <cmath>
#include <functional>

#include "geomath/contour.h"

namespace cairn::geo {
namespace {

ScalarGrid sample(int n, const std::function<double(double, double)>& f) {
  ScalarGrid g;
  g.nx = g.ny = n;
  g.x0 = g.y0 = -1.0;
  g.dx = g.dy = 2.0 / (n - 1);
  for (int j = 0; j < n; ++j)
    for (int i = 0; i < n; ++i) g.values.push_back(f(g.x0 + i * g.dx, g.y0 + j * g.dy));
  return g;
}

double shoelace(const std::vector<NetPoint>& ring) {
  double s = 0;
  for (std::size_t i = 0; i + 1 < ring.size(); ++i) s += ring[i][0] * ring[i + 1][1] - ring[i + 1][0] * ring[i][1];
  return std::abs(s) / 2;
}

TEST(Contour, CircleOfTheQuadraticField) {
  const auto g = sample(41, [](double x, double y) { return x * x + y * y; });
  const auto lines = contour_lines(g, 0.25);
  ASSERT_EQ(lines.size(), 1u);
  ASSERT_TRUE(lines[0].closed());
  for (const NetPoint& p : lines[0].pts) EXPECT_NEAR(std::hypot(p[0], p[1]), 0.5, 0.005);
  EXPECT_NEAR(shoelace(lines[0].pts) / (3.14159265358979 * 0.25), 1.0, 0.01);
}

TEST(Contour, OpenLineEndsOnTheBorder) {
  const auto g = sample(21, [](double x, double) { return x; });
  const auto lines = contour_lines(g, 0.33);
  ASSERT_EQ(lines.size(), 1u);
  EXPECT_FALSE(lines[0].closed());
  for (const NetPoint& p : lines[0].pts) EXPECT_NEAR(p[0], 0.33, 1e-12);
  EXPECT_NEAR(std::abs(lines[0].pts.front()[1]), 1.0, 1e-12);
  EXPECT_NEAR(std::abs(lines[0].pts.back()[1]), 1.0, 1e-12);
  EXPECT_EQ(lines[0].pts.size(), 21u);  // one point per row of cells, plus one
}

TEST(Contour, SaddleGivesTwoLinesOnTheAxes) {
  // 40 nodes: no node on the axes, the centre cell is a saddle.
  const auto g = sample(40, [](double x, double y) { return x * y; });
  const auto lines = contour_lines(g, 0.0);
  ASSERT_EQ(lines.size(), 2u);
  for (const auto& pl : lines) {
    EXPECT_FALSE(pl.closed());
    for (const NetPoint& p : pl.pts) EXPECT_LT(std::min(std::abs(p[0]), std::abs(p[1])), 1e-12);
  }
}

TEST(Contour, SeparateBumpsGiveSeparateLoopsAndNothingAboveTheTop) {
  const auto g = sample(61, [](double x, double y) {
    return std::exp(-((x - 0.5) * (x - 0.5) + y * y) * 20) + std::exp(-((x + 0.5) * (x + 0.5) + y * y) * 20);
  });
  const auto lines = contour_lines(g, 0.5);
  ASSERT_EQ(lines.size(), 2u);
  EXPECT_TRUE(lines[0].closed() && lines[1].closed());
  EXPECT_TRUE(contour_lines(g, 5.0).empty());
  ScalarGrid bad = g;
  bad.values.pop_back();
  EXPECT_TRUE(contour_lines(bad, 0.5).empty());
}

TEST(Contour, ClipToDisk) {
  // Through the middle: from (-1, 0) to (1, 0).
  auto a = clip_to_disk({NetPolyline{{{-2, 0}, {2, 0}}}});
  ASSERT_EQ(a.size(), 1u);
  EXPECT_NEAR(a[0].pts.front()[0], -1.0, 1e-12);
  EXPECT_NEAR(a[0].pts.back()[0], 1.0, 1e-12);
  // A chord at y = 0.5 meets the circle at x = +-sqrt(0.75).
  auto b = clip_to_disk({NetPolyline{{{-2, 0.5}, {2, 0.5}}}});
  ASSERT_EQ(b.size(), 1u);
  EXPECT_NEAR(b[0].pts.front()[0], -std::sqrt(0.75), 1e-12);
  EXPECT_NEAR(b[0].pts.back()[0], std::sqrt(0.75), 1e-12);
  // Wholly outside: nothing. Wholly inside and closed: kept closed.
  EXPECT_TRUE(clip_to_disk({NetPolyline{{{2, 2}, {3, 2}, {3, 3}}}}).empty());
  NetPolyline small{{{0, 0}, {0.1, 0}, {0.1, 0.1}, {0, 0}}};
  auto c = clip_to_disk({small});
  ASSERT_EQ(c.size(), 1u);
  EXPECT_TRUE(c[0].closed());
  // A closed circle of radius 1 about (1, 0) starting inside the disk: one arc, ending
  // on the unit circle at (1/2, +-sqrt(3)/2).
  NetPolyline ring;
  for (int k = 0; k <= 360; ++k) {
    const double t = (k % 360) * 3.14159265358979323846 / 180 + 3.14159265358979323846;
    ring.pts.push_back({1 + std::cos(t), std::sin(t)});
  }
  ASSERT_TRUE(ring.closed());
  auto d = clip_to_disk({ring});
  ASSERT_EQ(d.size(), 1u);
  for (const NetPoint* e : {&d[0].pts.front(), &d[0].pts.back()}) {
    EXPECT_NEAR(std::hypot((*e)[0], (*e)[1]), 1.0, 1e-12);
    EXPECT_NEAR((*e)[0], 0.5, 1e-12);
  }
  for (const NetPoint& p : d[0].pts) EXPECT_LE(std::hypot(p[0], p[1]), 1.0 + 1e-12);
}

}  // namespace
}  // namespace cairn::geo
