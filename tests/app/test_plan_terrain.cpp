// The ground on the Plan (app/plot/plan_terrain.h).
//
// Outside sources: block averages worked by hand (the arithmetic mean);
// Horn (1981) / Burrough & McDonnell (1998): flat ground lit from 45 degrees has
// illumination cos 45 = 0.707 everywhere; two planes meet along one straight line
// (solved by hand, as in tests/geomath/test_terrain.cpp).
#include <gtest/gtest.h>

#include <cmath>

#include "app/plot/plan_terrain.h"

using namespace cairn;

TEST(PlanTerrain, CoarsenAveragesBlocksAndSkipsMissing) {
  geo::TerrainGrid g;
  g.nx = 3;
  g.ny = 2;
  g.west = 0;
  g.north = 20;
  g.cell = 10;
  g.z = {1, 3, 10, 5, NAN, 20};
  const auto c = plot::coarsen(g, 2);
  ASSERT_EQ(c.nx, 2);
  ASSERT_EQ(c.ny, 1);
  EXPECT_DOUBLE_EQ(c.cell, 20);
  EXPECT_FLOAT_EQ(c.z[0], 3.0f);   // (1 + 3 + 5) / 3, the missing cell left out
  EXPECT_FLOAT_EQ(c.z[1], 15.0f);  // (10 + 20) / 2, a block cut by the grid's edge
}

TEST(PlanTerrain, AddsShadingContoursAndTheTrace) {
  // Ground z = 1000 + 0.2 E - 0.1 N; a horizontal contact at 1030 m meets it
  // along E = 150 + 0.5 N (by hand).
  geo::TerrainGrid g;
  g.nx = 60;
  g.ny = 40;
  g.west = 0;
  g.north = 400;
  g.cell = 10;
  for (int j = 0; j < g.ny; ++j)
    for (int i = 0; i < g.nx; ++i) g.z.push_back(static_cast<float>(1000 + 0.2 * g.centre_e(i) - 0.1 * g.centre_n(j)));
  geo::PlaneFit fit;
  fit.centroid = geo::Vec3(0, 0, 1030);
  fit.normal = geo::Vec3(0, 0, 1);
  plot::PlanData d;
  const auto notes = plot::add_terrain(d, g, {{"flat", &fit, plot::kInk}}, 1.0);
  EXPECT_FALSE(d.shading.empty());
  for (const auto& a : d.shading) ASSERT_TRUE(a.shade);
  EXPECT_FALSE(d.terrain_contours.empty());
  ASSERT_FALSE(d.traces.empty());
  for (const auto& p : d.traces.front().pts) EXPECT_NEAR(p.first, 150 + 0.5 * p.second, 1e-3);
  EXPECT_TRUE(d.bands.empty());  // a fit without Monte Carlo realisations has no band
  ASSERT_FALSE(notes.empty());
  // Flat ground: every shaded cell has illumination cos 45 (Burrough & McDonnell 1998).
  for (float& v : g.z) v = 500;
  plot::PlanData flat;
  plot::add_terrain(flat, g, {}, 0);
  ASSERT_FALSE(flat.shading.empty());
  const int level = static_cast<int>(std::cos(M_PI / 4) * 7);  // 7 grey levels
  for (const auto& a : flat.shading) EXPECT_NEAR(*a.shade, level / 6.0, 1e-12);
}
