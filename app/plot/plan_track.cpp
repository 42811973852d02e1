#include "app/plot/plan_track.h"

#include <map>

#include "storage/repository.h"
#include "storage/track.h"

namespace cairn::plot {

std::vector<PlanPath> day_track_paths(store::Project& p, const geo::UtmZone& zone, const std::string& day,
                                      Rgba colour) {
  std::vector<PlanPath> out;
  if (day.empty()) return out;
  store::ListOptions all;
  all.include_deleted = true;
  std::map<std::string, std::string> initials;
  for (const auto& who : store::list_people(p, all)) initials[who.meta.uuid] = who.initials;
  for (const auto& t : store::day_tracks(p, day)) {
    PlanPath path;
    path.colour = colour;
    const auto it = initials.find(t.person);
    path.label = it != initials.end() ? it->second : "";
    for (const auto& q : t.points) {
      const auto u = geo::to_utm(geo::LatLon{q.lat, q.lon}, zone);
      if (u) path.pts.emplace_back(u->easting, u->northing);
    }
    if (!path.pts.empty()) out.push_back(std::move(path));
  }
  return out;
}

std::string newest_track_day(store::Project& p) {
  const auto days = store::track_days(p);
  return days.empty() ? std::string() : days.back();
}

}  // namespace cairn::plot
