// Density of axes on a net: Kamb (1959) counting and the 1%-area counting cone, on a
// regular grid over the net, with contour lines for drawing.
//
// Each grid node stands for a direction (its inverse projection); the count at a node
// is the number of axes within the counting cone of half-angle theta about it, taken
// axially (|cos| >= cos theta, so cones at the primitive wrap to the opposite side).
// The cone covers a fraction A = 1 - cos(theta) of the hemisphere.
//
//  - Kamb (1959), J. Geophys. Res. 64, 1891-1909: A = 9 / (N + 9), chosen so that the
//    expected count under uniformity, E = N A, is three standard deviations of the
//    binomial count, sigma = sqrt(N A (1 - A)). Node values are count / sigma ("sigma
//    units": a uniform spread gives 3); contours are usually drawn at 2-sigma steps.
//  - 1% area: A = 0.01 whatever N; node values are 100 * count / N, percent of the
//    data per 1% of the area (a uniform spread gives 1).
//
// Nodes just outside the primitive are given the value of the direction the
// projection continues to there (the upper hemisphere, i.e. the antipodal axis), so
// contours run smoothly to the primitive and are then clipped to it.
#pragma once
#include <vector>

#include "geomath/contour.h"
#include "geomath/orientation.h"
#include "geomath/result.h"
#include "geomath/stereonet.h"

namespace cairn::geo {

enum class CountingMethod { Kamb, OnePercent };

struct DensityOptions {
  CountingMethod method = CountingMethod::Kamb;
  int grid_nodes = 61;  // nodes per side of the square grid over [-1, 1] x [-1, 1], >= 3
};

struct DensityGrid {
  NetKind kind = NetKind::EqualArea;
  CountingMethod method = CountingMethod::Kamb;
  int n_data = 0;
  double area_fraction = 0;    // A, of the hemisphere
  double cone_half_angle = 0;  // theta, degrees
  double expected = 0;         // E = N A (a count)
  double sigma = 0;            // sqrt(N A (1 - A)) (a count)
  ScalarGrid grid;             // node values (sigma units, or % per 1% area)
  std::vector<int> counts;     // node counts, same layout as grid.values

  int nodes() const { return grid.nx; }
  NetPoint node(int i, int j) const { return NetPoint{grid.x0 + i * grid.dx, grid.y0 + j * grid.dy}; }
  double value(int i, int j) const { return grid.at(i, j); }
  int count(int i, int j) const { return counts[static_cast<std::size_t>(j) * grid.nx + i]; }
  // Whether node (i, j) lies on or inside the primitive circle.
  bool inside(int i, int j) const;
  // Largest node value on or inside the primitive (0 when none).
  double max_value() const;
};

// Fails for no data or fewer than 3 grid nodes per side.
Result<DensityGrid> density_grid(NetKind kind, const std::vector<Line>& axes, const DensityOptions& opt = {});

// step, 2 step, 3 step, ... up to the grid's largest value inside the primitive
// (e.g. step 2 for Kamb's 2-sigma contours). Empty for a step that is not positive.
std::vector<double> contour_levels(const DensityGrid& g, double step = 2.0);

struct DensityContour {
  double level = 0;
  std::vector<NetPolyline> lines;  // clipped to the primitive circle
};
std::vector<DensityContour> density_contours(const DensityGrid& g, const std::vector<double>& levels);

}  // namespace cairn::geo
