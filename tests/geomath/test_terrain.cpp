// Elevations from a terrain grid (geomath/terrain.h).
//
// Outside sources named beside the checks:
//  - bilinear interpolation in its standard form (Press et al., "Numerical
//    Recipes", 3rd ed., 2007, section 3.6.1, eq. 3.6.5): the expected values
//    below are worked by hand from that formula;
//  - GDAL Data Model, "Affine GeoTransform": a cell's value belongs to its centre
//    ("pixel is area"), half a cell in from the cell's corner;
//  - a bilinear surface reproduces any plane exactly (a property of the formula);
//  - Horn (1981): on a planar surface the 3 x 3 weighted differences give the
//    plane's exact gradient, so slope = atan(|grad z|) and aspect = the dip direction;
//  - the strike-line construction (common practice): structure contours an
//    interval h apart lie h / tan(dip) apart on the map; two planes (ground and
//    contact) meet along a straight line found by solving their two equations by hand.
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

namespace {

// Ground that is itself a plane: z = 1000 + 0.2 E' - 0.1 N' (E', N' from the grid's corner).
TerrainGrid ramp(int nx = 60, int ny = 40, double cell = 10) {
  TerrainGrid g;
  g.nx = nx;
  g.ny = ny;
  g.west = 0;
  g.north = ny * cell;
  g.cell = cell;
  for (int j = 0; j < ny; ++j)
    for (int i = 0; i < nx; ++i) g.z.push_back(static_cast<float>(1000 + 0.2 * g.centre_e(i) - 0.1 * g.centre_n(j)));
  return g;
}

}  // namespace

TEST(TerrainHorn, PlaneGivesItsOwnSlopeAndAspect) {
  // Horn (1981) on a plane: grad = (0.2, -0.1), slope atan(sqrt(0.05)) = 12.6044 deg;
  // steepest descent towards (-0.2, +0.1): azimuth atan2(-0.2, 0.1) = 296.5651 deg.
  const auto g = ramp();
  const auto s = slope_degrees(g), a = aspect_degrees(g);
  const double slope = std::atan(std::sqrt(0.05)) * 180 / M_PI;
  const double aspect = 360 + std::atan2(-0.2, 0.1) * 180 / M_PI;
  EXPECT_NEAR(slope, 12.6044, 1e-4);  // value worked by hand
  EXPECT_NEAR(s[5 * g.nx + 7], slope, 1e-3);
  EXPECT_NEAR(a[5 * g.nx + 7], aspect, 1e-2);
  EXPECT_TRUE(std::isnan(s[0]));  // border: no value (as gdaldem)
  const auto at = slope_at(g, 205, 205);
  ASSERT_TRUE(at.ok());
  EXPECT_NEAR(at->slope, slope, 1e-3);
  EXPECT_FALSE(slope_at(g, 3, 3).ok());  // a border cell
  // Hillshade (Burrough & McDonnell 1998): flat ground lit from 45 degrees -> cos 45.
  TerrainGrid flat = ramp();
  for (float& v : flat.z) v = 500;
  EXPECT_NEAR(hillshade(flat)[5 * flat.nx + 7], std::cos(M_PI / 4), 1e-6);
}

TEST(TerrainTrace, StrikeLineSpacing) {
  // The strike-line fact (common practice): dip 10.5 degrees, 100 m of rise between
  // structure contours -> 100 / tan(10.5) = 539.55 m apart. The figure usually quoted,
  // 538.5 m, comes from rounded tables; it is met within 0.2 %.
  const auto d = structure_contour_spacing(10.5, 100);
  ASSERT_TRUE(d.ok());
  EXPECT_NEAR(*d, 538.5, 1.1);
  EXPECT_NEAR(*d, 100 / std::tan(10.5 * M_PI / 180), 1e-9);
  EXPECT_FALSE(structure_contour_spacing(0, 100).ok());
  EXPECT_FALSE(structure_contour_spacing(90, 100).ok());
  // On a grid the structure contours of a plane dipping 10.5 degrees east lie that far apart.
  const auto g = ramp(400, 100, 10);
  const double dip = 10.5 * M_PI / 180;
  const Vec3 normal(std::sin(dip), 0, std::cos(dip));  // dips east
  const auto sc = structure_contours(g, Vec3(2000, 500, 1000), normal, 100);
  ASSERT_GE(sc.size(), 3u);
  EXPECT_NEAR(sc[0].lines[0].pts[0][0] - sc[1].lines[0].pts[0][0], 539.55, 0.01);
}

TEST(TerrainTrace, TwoPlanesMeetAlongTheirLine) {
  // Ground z = 1000 + 0.2 E - 0.1 N' with N' = N (north edge at 400); contact plane
  // horizontal at 1030 m: by hand, 0.2 E - 0.1 N = 30, i.e. E = 150 + 0.5 N.
  const auto g = ramp();
  const auto lines = outcrop_trace(g, Vec3(0, 0, 1030), Vec3(0, 0, 1));
  ASSERT_TRUE(lines.ok());
  ASSERT_EQ(lines->size(), 1u);
  ASSERT_GE(lines->front().pts.size(), 10u);
  for (const auto& p : lines->front().pts) EXPECT_NEAR(p[0], 150 + 0.5 * p[1], 1e-3);
  EXPECT_FALSE(outcrop_trace(g, Vec3(0, 0, 1030), Vec3(1, 0, 0)).ok());  // vertical plane
  // A missing cell breaks the line there rather than inventing one (contour.h).
  auto holed = g;
  holed.z[20 * holed.nx + 25] = std::numeric_limits<float>::quiet_NaN();
  const auto broken = outcrop_trace(holed, Vec3(0, 0, 1030), Vec3(0, 0, 1));
  ASSERT_TRUE(broken.ok());
  for (const auto& l : *broken)
    for (const auto& p : l.pts) EXPECT_TRUE(std::isfinite(p[0]) && std::isfinite(p[1]));
}

TEST(TerrainBand, MaskRectanglesWorkedByHand) {
  // 4 x 3 cells of 10 m, west 0, north 30; mask (row 0 north):
  //   1 1 0 0
  //   1 1 0 1
  //   0 1 1 0
  // By hand: columns 0-1 over rows 0-1 -> [0,20] x [10,30]; row 1 column 3 -> [30,40] x [10,20];
  // row 2 columns 1-2 -> [10,30] x [0,10]. Total area 400 + 100 + 200 = 700 m^2.
  TerrainGrid g;
  g.nx = 4;
  g.ny = 3;
  g.west = 0;
  g.north = 30;
  g.cell = 10;
  g.z.assign(12, 100.0f);
  const std::vector<unsigned char> mask = {1, 1, 0, 0, 1, 1, 0, 1, 0, 1, 1, 0};
  const auto rings = mask_rectangles(g, mask);
  ASSERT_EQ(rings.size(), 3u);
  double area = 0;
  for (const auto& r : rings) {
    ASSERT_EQ(r.size(), 5u);
    EXPECT_EQ(r.front(), r.back());
    double a = 0;  // shoelace formula: positive for counter-clockwise
    for (std::size_t k = 0; k + 1 < r.size(); ++k) a += r[k][0] * r[k + 1][1] - r[k + 1][0] * r[k][1];
    EXPECT_GT(a, 0);
    area += a / 2;
  }
  EXPECT_DOUBLE_EQ(area, 700);
}
