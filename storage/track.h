// The day track in the project file (table track_points, storage/SCHEMA.md).
#pragma once
#include <optional>
#include <string>
#include <vector>

namespace cairn::store {

class Project;
class Db;

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

// One person's fixes of one UTC day, in time order: a day track.
struct DayTrack {
  std::string person;  // person UUID ("" = none chosen)
  std::string day;     // "YYYY-MM-DD" (UTC)
  std::vector<TrackPoint> points;
};

// The day tracks of the project (of DAY only when given), by day, then person.
std::vector<DayTrack> day_tracks(Project& p, const std::string& day = "");

// The days that have fixes, oldest first ("YYYY-MM-DD", UTC).
std::vector<std::string> track_days(Project& p);

// Most fixes a merge takes from one source file (a fix every 5 s for ten hours
// a day is 7 200; this is a season of such days for several people).
constexpr long kMaxMergedTrackPoints = 2000000;

struct TrackMerge {
  long added = 0;    // fixes the camp did not have
  long skipped = 0;  // identical to one the camp has (same person, device, time, place, elevation, accuracy)
};

// Brings the day track of a merge source (storage/merge.h; its values already
// checked by the merge's validation) into the camp file P, inside the merge's
// transaction: a fix identical to one the camp holds is skipped, so merging a
// file twice, or files that hold each other's fixes, adds nothing. More than
// kMaxMergedTrackPoints fixes: std::runtime_error naming the limit (the merge
// rolls back).
TrackMerge merge_track(Project& p, Db& source);

}  // namespace cairn::store
