#include "app/core/export_track.h"

#include <map>
#include <stdexcept>

#include "geomath/track.h"
#include "storage/repository.h"
#include "storage/track.h"

namespace cairn::core {

formats::Layer day_track_layer(store::Project& p, const geo::UtmZone& zone) {
  using formats::FieldType;
  formats::Layer l{"day_tracks",
                   "Day tracks",
                   "Where each person went on each day: the GPS fixes logged while Cairn ran, thinned, in time "
                   "order (one line per person and UTC day; a day of a single fix has no line). length_m: along "
                   "the line on the WGS84 ellipsoid.",
                   {{"person", FieldType::Text},
                    {"day", FieldType::Text},
                    {"start", FieldType::Text},
                    {"end", FieldType::Text},
                    {"fixes", FieldType::Integer},
                    {"length_m", FieldType::Real}},
                   {},
                   "LINESTRING"};
  store::ListOptions all;
  all.include_deleted = true;  // a fix may name someone deleted since
  std::map<std::string, std::string> initials;
  for (const auto& who : store::list_people(p, all)) initials[who.meta.uuid] = who.initials;
  for (const auto& t : store::day_tracks(p)) {
    if (t.points.size() < 2) continue;
    formats::Feature f;
    std::vector<std::array<double, 2>> grid, lonlat;
    double length = 0;
    for (size_t i = 0; i < t.points.size(); ++i) {
      const auto& q = t.points[i];
      const auto u = geo::to_utm(geo::LatLon{q.lat, q.lon}, zone);
      if (!u) throw std::runtime_error("day track fix at " + q.time + ": " + u.error());
      grid.push_back({u->easting, u->northing});
      lonlat.push_back({q.lon, q.lat});
      if (i > 0) length += geo::geodesic_distance(t.points[i - 1].lat, t.points[i - 1].lon, q.lat, q.lon);
    }
    f.grid_parts.push_back(std::move(grid));
    f.lonlat_parts.push_back(std::move(lonlat));
    const auto it = initials.find(t.person);
    f.values = {it != initials.end() ? formats::FieldValue{it->second} : formats::FieldValue{},
                t.day,
                t.points.front().time,
                t.points.back().time,
                static_cast<int64_t>(t.points.size()),
                length};
    l.features.push_back(std::move(f));
  }
  return l;
}

}  // namespace cairn::core
