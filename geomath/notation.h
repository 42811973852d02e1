// Text notations for planes and lines, parsed and formatted.
//
// Planes:
//  - strike/dip by the right-hand rule: "030/40", "30 40", "030° 40°";
//  - dip direction/dip: "120/40" (the convention says which), or with the
//    dip direction written as an azimuth marker "40->120" is not accepted;
//  - quadrant notation: "N30E 40SE", "N01E 10.5E", "S20E 30W", "N30W45SW",
//    with or without spaces and degree signs. The dip quadrant must lie on one
//    side of the strike line; "N30E 40N" contradicts it and is an error.
//  - strike/dip with a dip quadrant: "030/40SE" (the strike is then read as
//    either end of the strike line and the quadrant decides the dip side).
// Lines: trend/plunge "120/35", quadrant "S60E 35"; rake on a plane.
//
// A bare "30/40" is ambiguous between strike/dip (RHR) and dip direction/dip
// unless the caller names the convention: the error names both readings.
#pragma once
#include <string>
#include <string_view>

#include "geomath/orientation.h"
#include "geomath/result.h"

namespace cairn::geo {

enum class PlaneConvention {
  Unspecified,     // only self-describing text (quadrant notation, a dip quadrant) is accepted
  StrikeDipRHR,    // "a/b" is strike (right-hand rule) / dip
  DipDirectionDip  // "a/b" is dip direction / dip
};

Result<Plane> parse_plane(std::string_view text, PlaneConvention convention = PlaneConvention::Unspecified);
Result<Line> parse_line(std::string_view text);
// A line given by its rake on a host plane: "40" (0..180, from the right-hand-rule
// strike direction, measured down the dip) or "40NE" (0..90 from the named strike end).
Result<Line> parse_rake(std::string_view text, const Plane& host);
// A plain number in degrees within [lo, hi]; `what` names the quantity in errors.
Result<double> parse_angle(std::string_view text, const char* what, double lo, double hi);

// "030/40" (strike RHR, three-digit azimuth; decimals kept when present).
std::string format_strike_dip(const Plane& p);
// "120/40" (dip direction / dip).
std::string format_dip_direction(const Plane& p);
// "N30E 40SE"
std::string format_quadrant(const Plane& p);
// "035/20" (trend / plunge)
std::string format_trend_plunge(const Line& l);
// Rake of a line on its host plane, 0..180 from the right-hand-rule strike: "40", "132.5".
std::string format_rake(const Plane& host, const Line& l);
// Azimuth in quadrant form: 30 -> "N30E", 200 -> "S20W".
std::string format_quadrant_azimuth(double azimuth);

}  // namespace cairn::geo
