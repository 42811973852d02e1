// The day tracks on the Plan (the touch UI's and the report's): each person's
// path of one UTC day (storage/track.h) as a dashed line in the zone's metres,
// labelled with the person's initials at the last fix.
#pragma once
#include <string>
#include <vector>

#include "app/plot/plan_scene.h"
#include "geomath/geodesy.h"

namespace cairn::store {
class Project;
}

namespace cairn::plot {

// The day tracks of DAY ("YYYY-MM-DD"), one path per person (a person with a
// single fix gets a path of one point: its last-fix mark). Fixes that cannot be
// put into ZONE are left out.
std::vector<PlanPath> day_track_paths(store::Project& p, const geo::UtmZone& zone, const std::string& day,
                                      Rgba colour = kInk);

// The day the Plan shows by default: the newest day with fixes ("" when none).
std::string newest_track_day(store::Project& p);

}  // namespace cairn::plot
