#include "geomath/geodesy.h"

#include <GeographicLib/Constants.hpp>
#include <GeographicLib/UTMUPS.hpp>
#include <cmath>
#include <cstdio>
#include <string>

#include "geomath/angles.h"

namespace cairn::geo {

namespace {
using GeographicLib::UTMUPS;

std::string num(double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.10g", v);
  return buf;
}

// Latitude and longitude checks shared by every conversion.
std::optional<std::string> check_latlon(const LatLon& p) {
  if (!std::isfinite(p.lat)) return std::string("latitude is not a finite number");
  if (!std::isfinite(p.lon)) return std::string("longitude is not a finite number");
  if (p.lat < -90 || p.lat > 90) return "latitude " + num(p.lat) + " is outside -90..90";
  if (p.lon < -180 || p.lon > 180) return "longitude " + num(p.lon) + " is outside -180..180";
  // UTM's own limits; GeographicLib would switch to UPS beyond them.
  if (p.lat < -80 || p.lat > 84) return "latitude " + num(p.lat) + " is outside UTM's range (-80 to 84 degrees)";
  return std::nullopt;
}

std::optional<std::string> check_zone(int zone) {
  if (zone < UTMUPS::MINUTMZONE || zone > UTMUPS::MAXUTMZONE)
    return "UTM zone " + std::to_string(zone) + " is outside 1..60";
  return std::nullopt;
}
}  // namespace

Result<UtmZone> utm_zone_for(const LatLon& p) {
  if (auto why = check_latlon(p)) return Result<UtmZone>::failure(*why);
  // Longitude 180 is the same meridian as -180 (zone 1).
  const double lon = p.lon == 180 ? -180 : p.lon;
  return UtmZone{UTMUPS::StandardZone(p.lat, lon, UTMUPS::UTM), p.lat >= 0};
}

Result<UtmZone> utm_zone_for(const std::vector<LatLon>& pts) {
  if (pts.empty()) return Result<UtmZone>::failure("no points to choose a UTM zone from");
  double lat = 0, sx = 0, sy = 0;
  for (const auto& p : pts) {
    if (auto why = check_latlon(p)) return Result<UtmZone>::failure(*why);
    lat += p.lat;
    sx += std::cos(deg2rad(p.lon));
    sy += std::sin(deg2rad(p.lon));
  }
  lat /= static_cast<double>(pts.size());
  const double lon = (sx == 0 && sy == 0) ? 0.0 : rad2deg(std::atan2(sy, sx));
  return utm_zone_for(LatLon{lat, lon});
}

Result<UtmPoint> to_utm(const LatLon& p, std::optional<UtmZone> zone) {
  if (auto why = check_latlon(p)) return Result<UtmPoint>::failure(*why);
  UtmZone z;
  if (zone) {
    if (auto why = check_zone(zone->zone)) return Result<UtmPoint>::failure(*why);
    z = *zone;
  } else {
    z = *utm_zone_for(p);
  }
  try {
    int got_zone;
    bool got_north;
    double x, y;
    UTMUPS::Forward(p.lat, p.lon, got_zone, got_north, x, y, z.zone);
    if (got_north != z.northp) {
      // Continue the northing across the equator into the requested hemisphere.
      int tz;
      UTMUPS::Transfer(got_zone, got_north, x, y, z.zone, z.northp, x, y, tz);
    }
    return UtmPoint{z.zone, z.northp, x, y};
  } catch (const std::exception&) {
    return Result<UtmPoint>::failure("latitude " + num(p.lat) + ", longitude " + num(p.lon) +
                                     " is too far from UTM zone " + std::to_string(z.zone) + " to project into it");
  }
}

Result<LatLon> from_utm(const UtmPoint& u) {
  if (auto why = check_zone(u.zone)) return Result<LatLon>::failure(*why);
  if (!std::isfinite(u.easting) || !std::isfinite(u.northing))
    return Result<LatLon>::failure("easting or northing is not a finite number");
  try {
    double lat, lon;
    UTMUPS::Reverse(u.zone, u.northp, u.easting, u.northing, lat, lon);
    return LatLon{lat, lon};
  } catch (const std::exception&) {
    return Result<LatLon>::failure("easting " + num(u.easting) + ", northing " + num(u.northing) +
                                   " is outside the range of UTM zone " + std::to_string(u.zone) +
                                   (u.northp ? "N" : "S"));
  }
}

Result<GridFactors> utm_grid_factors(const LatLon& p, const UtmZone& zone) {
  if (auto why = check_latlon(p)) return Result<GridFactors>::failure(*why);
  if (auto why = check_zone(zone.zone)) return Result<GridFactors>::failure(*why);
  try {
    int z;
    bool north;
    double x, y, gamma, k;
    UTMUPS::Forward(p.lat, p.lon, z, north, x, y, gamma, k, zone.zone);
    return GridFactors{gamma, k};
  } catch (const std::exception&) {
    return Result<GridFactors>::failure("latitude " + num(p.lat) + ", longitude " + num(p.lon) +
                                        " is too far from UTM zone " + std::to_string(zone.zone));
  }
}

Vec3 grid_normal_to_true(const Vec3& n, const GridFactors& f) {
  // GeographicLib: gamma is the bearing of grid north clockwise from true
  // north, so an azimuth against true north = grid azimuth + gamma. A
  // horizontal vector (sin a, cos a) becomes (sin(a+g), cos(a+g)). The
  // gradient per ground metre is `scale` times that per grid metre, so the
  // normal's horizontal part (tan(dip) * its vertical part) scales by it too.
  const double g = deg2rad(f.convergence), c = std::cos(g), s = std::sin(g);
  Vec3 t(f.scale * (n.x() * c + n.y() * s), f.scale * (-n.x() * s + n.y() * c), n.z());
  t.normalize();
  return t.z() < 0 ? Vec3(-t) : t;
}

Plane grid_plane_to_true(const Plane& grid, const GridFactors& f) {
  return plane_from_normal(grid_normal_to_true(plane_normal_up(grid), f));
}

Result<UtmZoneSpec> parse_utm_zone(std::string_view text) {
  auto fail = [&] {
    return Result<UtmZoneSpec>::failure("'" + std::string(text) +
                                        "' is not a UTM zone (1..60, optionally followed by N or S)");
  };
  std::string t(text);
  while (!t.empty() && (t.back() == ' ' || t.back() == '\t')) t.pop_back();
  while (!t.empty() && (t.front() == ' ' || t.front() == '\t')) t.erase(t.begin());
  UtmZoneSpec s;
  if (!t.empty() && (t.back() == 'N' || t.back() == 'n' || t.back() == 'S' || t.back() == 's')) {
    s.northp = (t.back() == 'N' || t.back() == 'n');
    t.pop_back();
  }
  if (t.empty() || t.size() > 2) return fail();
  for (char ch : t)
    if (ch < '0' || ch > '9') return fail();
  s.zone = std::stoi(t);
  if (s.zone < 1 || s.zone > 60) return fail();
  return s;
}

}  // namespace cairn::geo
