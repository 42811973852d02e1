// Strike lines and structure contours of a plane in map view.
//
// A strike line is a horizontal line on the plane; strike lines at a contour
// interval h are parallel, horizontally h / tan(dip) apart (common practice,
// the basis of the three-point and strike-line constructions). A structure
// contour is the strike line at a given elevation, drawn on the map.
// Coordinates are metres (easting, northing, elevation).
#pragma once
#include <optional>
#include <vector>

#include "geomath/orientation.h"
#include "geomath/plane_fit.h"
#include "geomath/result.h"

namespace cairn::geo {

struct ElevationEstimate {
  double elevation = 0;  // metres, on the fitted plane
  // Half-width of the 95% interval (metres): the standard deviation of the
  // Monte Carlo planes' elevations at this place times the fit's interval_k95
  // (1.96, or the t quantile and variance factor of a precision estimated from
  // the residuals). Absent when the fit carries no uncertainty (three exact
  // points without accuracies).
  std::optional<double> half_width95;
};

// Elevation of the fitted plane at (e, n) with its 95% interval. Fails for a
// vertical plane (its elevation is not a function of map position).
Result<ElevationEstimate> elevation_at(const PlaneFit& fit, double e, double n);

// Azimuth of the strike lines (the RHR strike, [0, 360)). Fails for a
// horizontal plane, which has no strike.
Result<double> strike_line_azimuth(const Plane& p);

// Horizontal distance between strike lines whose elevations differ by
// `interval` metres: interval / tan(dip). A horizontal plane fails (the spacing
// is infinite); a vertical plane gives 0 (the strike lines coincide in plan).
Result<double> strike_line_spacing(const Plane& p, double interval);

struct MapRect {
  double e_min = 0, n_min = 0, e_max = 0, n_max = 0;
};

struct ContourSegment {
  double elevation = 0;   // metres, a multiple of the interval
  double e0 = 0, n0 = 0;  // one end, metres
  double e1 = 0, n1 = 0;  // the other end
};

// Structure contours of the plane through `through` (a point on it, metres) at
// every multiple of `interval` that crosses the rectangle, clipped to it, in
// ascending elevation. Fails for a non-positive interval, an empty rectangle,
// a horizontal or vertical plane (no contours to draw), or when more than
// `max_lines` contours would be needed.
Result<std::vector<ContourSegment>> structure_contours(const Plane& p, const Vec3& through, const MapRect& rect,
                                                       double interval, size_t max_lines = 1000);
// The same for a fitted plane (through its centroid).
Result<std::vector<ContourSegment>> structure_contours(const PlaneFit& fit, const MapRect& rect, double interval,
                                                       size_t max_lines = 1000);

}  // namespace cairn::geo
