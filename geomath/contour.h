// Contour lines of a scalar field sampled on a regular grid (marching squares), and
// clipping of polylines to a disk (the primitive circle of a net).
//
// Marching squares: the two-dimensional form of marching cubes (Lorensen & Cline
// 1987, SIGGRAPH '87). A saddle cell (diagonal corners on the same side) is resolved
// by the value at its centre, taken as the mean of the four corners (common practice).
#pragma once
#include <vector>

#include "geomath/stereonet.h"

namespace cairn::geo {

// nx * ny samples; node (i, j) lies at (x0 + i * dx, y0 + j * dy) and holds
// values[j * nx + i].
struct ScalarGrid {
  int nx = 0, ny = 0;
  double x0 = 0, y0 = 0, dx = 1, dy = 1;
  std::vector<double> values;
  double at(int i, int j) const { return values[static_cast<std::size_t>(j) * nx + i]; }
};

// The curves where the field equals `level`, linearly interpolated along cell edges.
// A node counts as inside the contour when its value is >= level. Curves that close
// within the grid are returned closed (first point == last point); others end on the
// grid's border. Empty for a grid smaller than 2 x 2 or with a wrong value count.
// Cells with a NaN corner (missing data) are skipped: curves end at them.
std::vector<NetPolyline> contour_lines(const ScalarGrid& grid, double level);

// The parts of the polylines inside the disk of the given radius about the origin
// (points on the circle count as inside). A closed polyline wholly inside stays closed.
std::vector<NetPolyline> clip_to_disk(const std::vector<NetPolyline>& lines, double radius = 1.0);

}  // namespace cairn::geo
