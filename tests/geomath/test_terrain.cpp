// Elevations from a terrain grid (geomath/terrain.h).
//
// Outside sources named beside the checks:
//  - bilinear interpolation in its standard form (Press et al., "Numerical
//    Recipes", 3rd ed., 2007, section 3.6.1, eq. 3.6.5): the expected values
//    below are worked by hand from that formula;
//  - GDAL Data Model, "Affine GeoTransform": a cell's value belongs to its centre
//    ("pixel is area"), half a cell in from the cell's corner;
//  - a bilinear surface reproduces any plane exactly (a property of the formula).
#include <gtest/gtest.h>

#include <cmath>
#include <limits>

#include "geomath/terrain.h"

using namespace cairn::geo;

namespace {

// 3 x 2 cells of 10 m; west edge 1000, north edge 5000.
//   row 0 (north): 100 110 130
//   row 1        : 120 140 150
TerrainGrid small() {
  TerrainGrid g;
  g.nx = 3;
  g.ny = 2;
  g.west = 1000;
  g.north = 5000;
  g.cell = 10;
  g.z = {100, 110, 130, 120, 140, 150};
  return g;
}

}  // namespace

TEST(TerrainBilinear, CellCentresGiveTheirOwnValue) {
  // GDAL "pixel is area": centre of cell (1, 0) at E 1015, N 4995.
  const auto g = small();
  EXPECT_DOUBLE_EQ(*elevation_at(g, 1015, 4995), 110.0);
  EXPECT_DOUBLE_EQ(*elevation_at(g, 1025, 4985), 150.0);
}

TEST(TerrainBilinear, HandWorkedValue) {
  // Numerical Recipes eq. 3.6.5 at E 1008, N 4991: between centres (1005, 4995)
  // and (1015, 4985): t = 0.3, u = 0.4;
  // z = 0.7*0.6*100 + 0.3*0.6*110 + 0.7*0.4*120 + 0.3*0.4*140 = 42 + 19.8 + 33.6 + 16.8 = 112.2
  const auto g = small();
  EXPECT_NEAR(*elevation_at(g, 1008, 4991), 112.2, 1e-9);
}

TEST(TerrainBilinear, EdgeHalfCellTakesNearestCentres) {
  // Between the edge and the first centre the grid is extended flat (documented):
  // E 1002, N 4998 lies within half a cell of the north-west corner -> cell (0,0).
  const auto g = small();
  EXPECT_DOUBLE_EQ(*elevation_at(g, 1002, 4998), 100.0);
  // On the east edge at the row-0 centre line: the last centre's value.
  EXPECT_DOUBLE_EQ(*elevation_at(g, 1030, 4995), 130.0);
}

TEST(TerrainBilinear, PlaneIsReproducedExactly) {
  // z = 500 + 0.1 E' - 0.25 N' (E', N' from the grid's corner) on 20 x 15 cells.
  TerrainGrid g;
  g.nx = 20;
  g.ny = 15;
  g.west = 0;
  g.north = 150;
  g.cell = 10;
  for (int j = 0; j < g.ny; ++j)
    for (int i = 0; i < g.nx; ++i) g.z.push_back(static_cast<float>(500 + 0.1 * g.centre_e(i) - 0.25 * g.centre_n(j)));
  for (double e : {5.0, 17.3, 99.9, 194.0})
    for (double n : {5.0, 42.42, 144.9}) EXPECT_NEAR(*elevation_at(g, e, n), 500 + 0.1 * e - 0.25 * n, 1e-4);
}

TEST(TerrainBilinear, RefusesOutsideAndMissing) {
  auto g = small();
  const auto out = elevation_at(g, 999, 4995);
  ASSERT_FALSE(out.ok());
  EXPECT_NE(out.error().find("outside"), std::string::npos);
  g.z[4] = std::numeric_limits<float>::quiet_NaN();  // cell (1, 1)
  const auto miss = elevation_at(g, 1012, 4988);
  ASSERT_FALSE(miss.ok());
  EXPECT_NE(miss.error().find("nodata"), std::string::npos);
  // A place whose weights skip the missing cell still has an elevation (centre of (0,0)).
  EXPECT_DOUBLE_EQ(*elevation_at(g, 1005, 4995), 100.0);
  EXPECT_FALSE(elevation_at(g, NAN, 4995).ok());
}
