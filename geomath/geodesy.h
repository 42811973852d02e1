// WGS84 latitude/longitude <-> UTM, through GeographicLib's UTMUPS (Karney,
// 2011, "Transverse Mercator with an accuracy of a few nanometers", J. Geodesy
// 85, 475-485). All of Cairn's fitting happens in metres in a UTM zone.
//
// Zones follow the UTM standard as GeographicLib implements it: 6-degree zones
// 1..60 with the Norway (32V) and Svalbard (31X, 33X, 35X, 37X) exceptions.
// UTM covers latitudes from -80 to 84 degrees; beyond that (the UPS polar
// regions) Cairn refuses.
#pragma once
#include <optional>
#include <string_view>
#include <vector>

#include "geomath/orientation.h"
#include "geomath/result.h"

namespace cairn::geo {

struct LatLon {
  double lat = 0;  // degrees, WGS84, north positive
  double lon = 0;  // degrees, WGS84, east positive
};

struct UtmPoint {
  int zone = 0;         // 1..60
  bool northp = true;   // hemisphere: true north, false south (false northing 10,000 km)
  double easting = 0;   // metres
  double northing = 0;  // metres
};

// A zone and hemisphere to project into.
struct UtmZone {
  int zone = 0;
  bool northp = true;
};

// The standard zone of a point (with the Norway/Svalbard exceptions).
// Fails for a latitude outside -80..84, or values out of range / not finite.
Result<UtmZone> utm_zone_for(const LatLon& p);

// The zone for a set of points: the standard zone of their mean position (the
// mean longitude taken on the circle, so sets across the antimeridian work).
// The hemisphere is that of the mean latitude. Fails for an empty set.
Result<UtmZone> utm_zone_for(const std::vector<LatLon>& pts);

// Projects into the given zone and hemisphere (a point across the equator gets
// a northing continued past it, as GeographicLib's UTMUPS::Transfer does), or
// into its own standard zone when `zone` is absent. Fails naming the value for
// a latitude outside -80..84, a longitude outside -180..180, a zone outside
// 1..60, or a point too far from the zone's central meridian for UTM.
Result<UtmPoint> to_utm(const LatLon& p, std::optional<UtmZone> zone = std::nullopt);
Result<LatLon> from_utm(const UtmPoint& u);

// Meridian convergence (degrees: the azimuth of grid north measured clockwise
// from true north) and point scale factor of UTM at a point in a given zone.
struct GridFactors {
  double convergence = 0;
  double scale = 1;
};
Result<GridFactors> utm_grid_factors(const LatLon& p, const UtmZone& zone);

// A plane whose strike/dip were measured against grid north and grid metres
// (e.g. fitted to UTM coordinates), expressed against true north and ground
// metres: azimuths gain the convergence, and tan(dip) is multiplied by the
// scale factor (grid distances are `scale` times ground distances).
Plane grid_plane_to_true(const Plane& grid, const GridFactors& f);
// The same for a plane's upward normal (unit, ENU): the horizontal part is
// rotated by the convergence and scaled by the scale factor, then renormalised.
Vec3 grid_normal_to_true(const Vec3& grid_normal, const GridFactors& f);

// "33", "33N", "33S", "33n" -> zone 33, hemisphere when given. Fails naming the
// text when it is not a zone 1..60 with an optional N or S.
struct UtmZoneSpec {
  int zone = 0;
  std::optional<bool> northp;
};
Result<UtmZoneSpec> parse_utm_zone(std::string_view text);

}  // namespace cairn::geo
