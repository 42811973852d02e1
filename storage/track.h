// The day track in the project file (table track_points, storage/SCHEMA.md).
#pragma once
#include <optional>
#include <string>
#include <vector>

namespace cairn::store {

class Project;

struct TrackPoint {
  std::string person;  // person UUID ("" = none chosen)
  std::string time;    // ISO 8601 UTC
  double lat = 0, lon = 0;
  std::optional<double> elevation, h_accuracy;
};

// Adds one fix (validated: latitude -90..90, longitude -180..180, accuracy >= 0;
// ValidationError otherwise, nothing written). The device is the project's.
void add_track_point(Project& p, const TrackPoint& t);

// The fixes of a person ("" = everyone) on a day ("YYYY-MM-DD" prefix of the
// UTC time; "" = every day), in time order.
std::vector<TrackPoint> list_track(Project& p, const std::string& person = "", const std::string& day = "");

}  // namespace cairn::store
