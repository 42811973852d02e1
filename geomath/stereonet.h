// Lower-hemisphere stereonets: projection of lines onto the net and the
// geometry (polylines) of great circles, small circles and confidence cones.
//
// Geometry only: drawers (UI, reports) consume NetPoint / NetPolyline and do
// their own scaling, colours and strokes.
//
// Net coordinates: x east, y north, centre (0, 0) is the vertical (plunge 90),
// the primitive circle (horizontal directions) has radius 1.
//
// For a direction at angle theta from the downward vertical (theta = 90 - plunge):
//  - equal-area net (Lambert azimuthal equal-area, Schmidt net):
//      r = sqrt(2) * sin(theta / 2)
//  - equal-angle net (stereographic, Wulff net):
//      r = tan(theta / 2)
// These are the polar aspects of the two projections in Snyder (1987), Map
// Projections - A Working Manual, USGS Professional Paper 1395 (rho = 2R sin(chi/2)
// and rho = 2R tan(chi/2) with chi the colatitude), with R chosen so that the
// primitive circle has radius 1 (R = 1/sqrt(2) and R = 1/2).
#pragma once
#include <array>
#include <vector>

#include "geomath/orientation.h"
#include "geomath/result.h"

namespace cairn::geo {

enum class NetKind {
  EqualArea,  // Lambert azimuthal equal-area (Schmidt net)
  EqualAngle  // stereographic (Wulff net)
};

// A point on the net: {x east, y north}.
using NetPoint = std::array<double, 2>;

// An open or closed (first point == last point) run of net points, for drawers.
struct NetPolyline {
  std::vector<NetPoint> pts;
  bool closed() const { return pts.size() > 2 && pts.front() == pts.back(); }
};

// Radius on the net of a direction theta degrees from the downward vertical.
// Defined for theta in [0, 180) (beyond 90 it lies outside the primitive, which
// contouring uses to run smoothly across it).
double net_radius(NetKind kind, double theta_deg);

// Net point of a line (lower hemisphere).
NetPoint project(NetKind kind, const Line& l);
// Net point of a direction; a vector pointing up is replaced by its antipode, as on
// any lower-hemisphere net. The vector need not be of unit length but must not be zero.
NetPoint project_vector(NetKind kind, const Vec3& v);

// Inverse projection: the down-pointing unit vector (or line) at a net point.
// Fails for points outside the primitive circle (beyond a rounding tolerance).
Result<Vec3> unproject_vector(NetKind kind, const NetPoint& p);
Result<Line> unproject(NetKind kind, const NetPoint& p);

// The same inverse continued beyond the primitive into the upper hemisphere
// (equal-area: r up to sqrt(2), the upward vertical; equal-angle: any r). Used to
// evaluate axial fields (contouring) on grid nodes just outside the primitive.
// Not for user input: it never fails, r is clamped to the projection's range.
Vec3 unproject_vector_extended(NetKind kind, const NetPoint& p);

// Sampling density: points per full circle (a great circle gets half of them,
// plus its end point). Values below 8 are raised to 8.
constexpr int kDefaultCircleSamples = 360;

// The primitive circle, closed.
NetPolyline primitive_circle(int samples = kDefaultCircleSamples);

// The great circle of a plane: one open polyline from the strike azimuth on the
// primitive, through the dip line, to the opposite point on the primitive.
NetPolyline great_circle(NetKind kind, const Plane& p, int samples = kDefaultCircleSamples);

// A small circle: the directions at half_angle_deg (0..180) from the axis line.
// Parts of the cone above the horizontal are drawn by their antipodes, as on any
// lower-hemisphere net, so the result is either one closed polyline (the cone does
// not reach the horizontal) or several open polylines that end on the primitive.
// Fails for a half-angle outside [0, 180] or not a number.
Result<std::vector<NetPolyline>> small_circle(NetKind kind, const Line& axis, double half_angle_deg,
                                              int samples = kDefaultCircleSamples);

// Confidence cone of radius alpha95_deg (e.g. the Fisher alpha95) around a mean line:
// the small circle of that half-angle.
Result<std::vector<NetPolyline>> confidence_cone(NetKind kind, const Line& mean, double alpha95_deg,
                                                 int samples = kDefaultCircleSamples);

}  // namespace cairn::geo
