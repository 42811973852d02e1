// Planes and lines, and their vectors in a local East-North-Up frame.
//
// Conventions (common practice in structural geology):
//  - a plane is stored as strike by the right-hand rule (the plane dips to the
//    right when looking along strike, so dip direction = strike + 90) and dip;
//  - a line is stored as trend (azimuth of its downward horizontal projection)
//    and plunge (angle below horizontal, 0..90);
//  - azimuths are degrees clockwise from north, in [0, 360).
//  - vectors are unit vectors in ENU: x = east, y = north, z = up.
#pragma once
#include <Eigen/Core>
#include <Eigen/Geometry>
#include <optional>

#include "geomath/result.h"

namespace cairn::geo {

using Vec3 = Eigen::Vector3d;

struct Plane {
  double strike = 0;  // right-hand rule, [0, 360)
  double dip = 0;     // [0, 90]
  double dip_direction() const;
};

struct Line {
  double trend = 0;   // [0, 360)
  double plunge = 0;  // [0, 90]
};

Plane plane_from_dip_direction(double dip_direction, double dip);

// Unit vector of a line, pointing down (or horizontal).
Vec3 line_vector(const Line& l);
// Line of any unit or non-unit vector; the vector is flipped to point down.
Line line_from_vector(const Vec3& v);

// Upward unit normal of the plane (the pole's antipode; ENU z >= 0).
Vec3 plane_normal_up(const Plane& p);
// Pole to the plane as a lower-hemisphere line (trend = dip direction + 180, plunge = 90 - dip).
Line pole(const Plane& p);
Vec3 pole_vector(const Plane& p);  // down-pointing
// Plane whose normal is n (either sense).
Plane plane_from_normal(const Vec3& n);
// The plane whose pole is the given line.
Plane plane_from_pole(const Line& pole);

Vec3 dip_vector(const Plane& p);     // unit, down the dip
Vec3 strike_vector(const Plane& p);  // unit, horizontal, along the RHR strike

// Acute angle between two planes (between their poles), 0..90 degrees.
double angle_between_planes(const Plane& a, const Plane& b);
// Acute angle between two (undirected) lines, 0..90 degrees.
double angle_between_lines(const Line& a, const Line& b);

// The plane containing two lines; fails when the lines are (nearly) parallel.
Result<Plane> plane_through_lines(const Line& a, const Line& b);
// Line of intersection of two planes; fails when the planes are (nearly) parallel.
Result<Line> intersection_line(const Plane& a, const Plane& b);

// Apparent dip (degrees, 0..90) of a plane seen in a vertical section of the given azimuth:
// tan(alpha) = tan(dip) * |cos(beta)|, beta = azimuth - dip direction.
double apparent_dip(const Plane& p, double azimuth);
// True dip from two apparent dips (each an azimuth and an apparent dip, the
// apparent dip measured downward in that azimuth's direction). Fails when the two
// azimuths are parallel.
Result<Plane> plane_from_apparent_dips(double azimuth1, double apparent_dip1, double azimuth2, double apparent_dip2);

// Rake (pitch): angle in the plane from the strike direction (RHR) to the line,
// 0..180 degrees, measured downward.
Line line_from_rake(const Plane& p, double rake);
// Rake of a line lying in (or projected onto) the plane.
double rake_of_line(const Plane& p, const Line& l);

}  // namespace cairn::geo
