// The 95% trace band (geomath/terrain.h) by simulation.
//
// Outside sources: the coverage of a 95% interval is checked the way any
// confidence statement is, by simulation (e.g. Efron & Tibshirani, "An
// Introduction to the Bootstrap", 1993, ch. 12): contacts with a known plane on
// known ground, mapped by noisy points (stated accuracies), fitted, and the TRUE
// trace tested against the predicted band. 95% is met within three binomial
// standard deviations of 600 trials (sqrt(0.95 * 0.05 / 600) = 0.0089), so a
// band at 1 sigma (68%) or at twice the width (>99.9%) cannot pass. Fixed seed.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "geomath/plane_fit.h"
#include "geomath/terrain.h"

using namespace cairn::geo;

namespace {

TerrainGrid hills(double offset = 0) {
  TerrainGrid g;
  g.nx = 200;
  g.ny = 200;
  g.west = 0;
  g.north = 2000;
  g.cell = 10;
  for (int j = 0; j < g.ny; ++j)
    for (int i = 0; i < g.nx; ++i) {
      const double e = g.centre_e(i), n = g.centre_n(j);
      g.z.push_back(static_cast<float>(1000 + 80 * std::sin(e / 400) * std::cos(n / 500) + 0.05 * e + offset));
    }
  return g;
}

Vec3 normal_of(double strike_deg, double dip_deg) {
  const double dd = (strike_deg + 90) * M_PI / 180, dip = dip_deg * M_PI / 180;
  return Vec3(std::sin(dip) * std::sin(dd), std::sin(dip) * std::cos(dd), std::cos(dip));
}

double coverage(double terrain_sigma, int trials, double sigma_scale) {
  const TerrainGrid truth = hills();
  const Vec3 n_true = normal_of(30, 25);
  const Vec3 p0(1000, 1000, *elevation_at(truth, 1000, 1000));
  const auto trace = outcrop_trace(truth, p0, n_true);
  std::vector<NetPoint> on;  // vertices of the true trace well inside the grid
  for (const auto& l : *trace)
    for (const auto& p : l.pts)
      if (p[0] > 300 && p[0] < 1700 && p[1] > 300 && p[1] < 1700) on.push_back(p);
  EXPECT_GT(on.size(), 50u);
  std::mt19937_64 rng(20261203);
  std::normal_distribution<double> gauss(0, 1);
  std::uniform_int_distribution<std::size_t> pick(0, on.size() - 1);
  const double h_acc = 3, v_acc = 2;
  int inside = 0;
  for (int k = 0; k < trials; ++k) {
    std::vector<FitPoint> pts;
    for (int m = 0; m < 8; ++m) {
      const NetPoint& q = on[pick(rng)];
      FitPoint f;
      f.e = q[0] + h_acc * gauss(rng);
      f.n = q[1] + h_acc * gauss(rng);
      f.z = *elevation_at(truth, q[0], q[1]) + v_acc * gauss(rng);
      f.h_acc = h_acc;
      f.v_acc = v_acc;
      pts.push_back(f);
    }
    FitOptions o;
    o.draws = 400;
    o.seed = 1000 + k;
    const auto fit = fit_plane(pts, o);
    if (!fit) continue;
    auto u = plane_uncertainty(*fit);
    if (!u) continue;
    u.value().cov *= sigma_scale * sigma_scale;
    // The stored terrain is off by a random amount of its stated accuracy (a DEM's
    // error is correlated over a contact's length: one offset per trial).
    const TerrainGrid stored = hills(terrain_sigma * gauss(rng));
    const NetPoint& x = on[pick(rng)];
    inside += in_trace_band(stored, fit->centroid, fit->normal, *u, terrain_sigma * sigma_scale, x[0], x[1]);
  }
  return static_cast<double>(inside) / trials;
}

}  // namespace

TEST(TraceBand, TrueTraceInsideAbout95PercentOfTheTime) {
  const double c = coverage(1.5, 600, 1.0);
  std::printf("coverage of the 95%% trace band: %.3f\n", c);
  EXPECT_GT(c, 0.95 - 3 * 0.0089);
  EXPECT_LT(c, 0.95 + 3 * 0.0089);
}

TEST(TraceBand, ANarrowerBandIsCaught) {
  // The same simulation with the band at 1 sigma instead of 1.96 sigma: about 68%,
  // far outside what the test above accepts (so that test can fail).
  const double c = coverage(1.5, 600, 1.0 / kZ95);
  EXPECT_LT(c, 0.95 - 3 * 0.0089);
}

TEST(TraceBand, PlaneSigmaGrowsAwayFromTheCentroid) {
  // Variance of a linear model v' C v (JCGM 100:2008, 5.1.2): with only the slope
  // uncertain (var gE = 1e-4), 100 m east of the centroid sigma = 100 * 0.01 = 1 m.
  PlaneUncertainty u;
  u.centroid = Vec3(500, 500, 0);
  u.cov(1, 1) = 1e-4;
  EXPECT_NEAR(plane_sigma(u, 600, 500), 1.0, 1e-12);
  EXPECT_NEAR(plane_sigma(u, 500, 900), 0.0, 1e-12);
}
