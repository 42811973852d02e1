// geo_probe: lets the Python reference checks reach geomath/geodesy directly.
//
//   geo_probe [--zone ZONE]       stdin "lat lon" lines -> "zone hemisphere easting northing"
//   geo_probe --inverse           stdin "zone hemisphere easting northing" -> "lat lon"
//   geo_probe --factors [--zone]  stdin "lat lon" -> "zone hemisphere convergence scale"
//   geo_probe --set               stdin "lat lon" lines -> the zone chosen for the whole set
//
// Eastings/northings are printed with %.6f, angles with %.10f. A line that
// cannot be converted prints "error: MESSAGE" and the probe goes on.
#include <cstdio>
#include <cstdlib>
#include <iostream>
#include <sstream>
#include <string>
#include <vector>

#include "geomath/geodesy.h"

using namespace cairn::geo;

int main(int argc, char** argv) {
  std::string mode = "forward";
  std::optional<UtmZone> zone;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    if (a == "--inverse")
      mode = "inverse";
    else if (a == "--factors")
      mode = "factors";
    else if (a == "--set")
      mode = "set";
    else if (a == "--zone" && i + 1 < argc) {
      auto z = parse_utm_zone(argv[++i]);
      if (!z) {
        std::fprintf(stderr, "geo_probe: %s\n", z.error().c_str());
        return 2;
      }
      zone = UtmZone{z->zone, z->northp.value_or(true)};
    } else {
      std::fprintf(stderr, "usage: geo_probe [--inverse | --factors | --set] [--zone ZONE]\n");
      return 2;
    }
  }
  std::string line;
  std::vector<LatLon> set;
  while (std::getline(std::cin, line)) {
    if (line.empty()) continue;
    std::istringstream in(line);
    if (mode == "inverse") {
      UtmPoint u;
      std::string hemi;
      if (!(in >> u.zone >> hemi >> u.easting >> u.northing)) {
        std::printf("error: cannot read '%s'\n", line.c_str());
        continue;
      }
      u.northp = hemi == "N";
      auto r = from_utm(u);
      if (!r)
        std::printf("error: %s\n", r.error().c_str());
      else
        std::printf("%.10f %.10f\n", r->lat, r->lon);
      continue;
    }
    LatLon p;
    std::string a, b;  // strtod, so that "nan" reaches geodesy's own checks
    if (in >> a >> b) {
      p.lat = std::strtod(a.c_str(), nullptr);
      p.lon = std::strtod(b.c_str(), nullptr);
    } else {
      std::printf("error: cannot read '%s'\n", line.c_str());
      continue;
    }
    if (mode == "set") {
      set.push_back(p);
    } else if (mode == "factors") {
      UtmZone z;
      if (zone) {
        z = *zone;
      } else {
        auto s = utm_zone_for(p);
        if (!s) {
          std::printf("error: %s\n", s.error().c_str());
          continue;
        }
        z = *s;
      }
      auto f = utm_grid_factors(p, z);
      if (!f)
        std::printf("error: %s\n", f.error().c_str());
      else
        std::printf("%d %s %.10f %.12f\n", z.zone, z.northp ? "N" : "S", f->convergence, f->scale);
    } else {
      auto u = to_utm(p, zone);
      if (!u)
        std::printf("error: %s\n", u.error().c_str());
      else
        std::printf("%d %s %.6f %.6f\n", u->zone, u->northp ? "N" : "S", u->easting, u->northing);
    }
  }
  if (mode == "set") {
    auto z = utm_zone_for(set);
    if (!z)
      std::printf("error: %s\n", z.error().c_str());
    else
      std::printf("%d %s\n", z->zone, z->northp ? "N" : "S");
  }
  return 0;
}
