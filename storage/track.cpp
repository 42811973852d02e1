#include "storage/track.h"

#include <cmath>
#include <map>
#include <stdexcept>

#include "storage/project.h"
#include "storage/sqlite.h"

namespace cairn::store {

void add_track_point(Project& p, const TrackPoint& t) {
  if (!std::isfinite(t.lat) || t.lat < -90 || t.lat > 90)
    throw ValidationError("lat", "lat-range", "track latitude must be within -90..90");
  if (!std::isfinite(t.lon) || t.lon < -180 || t.lon > 180)
    throw ValidationError("lon", "lon-range", "track longitude must be within -180..180");
  if (t.h_accuracy && (!std::isfinite(*t.h_accuracy) || *t.h_accuracy < 0))
    throw ValidationError("h_accuracy", "accuracy-range", "track accuracy must be 0 m or more");
  if (t.elevation && !std::isfinite(*t.elevation))
    throw ValidationError("elevation", "number", "track elevation is not a number");
  p.write([&] {
    Stmt s(p.db(),
           "INSERT INTO track_points (person, device, time, lat, lon, elevation, h_accuracy) VALUES (?, ?, ?, ?, ?, ?, "
           "?)");
    s.bind(1, t.person)
        .bind(2, p.device())
        .bind(3, t.time)
        .bind(4, t.lat)
        .bind(5, t.lon)
        .bind(6, t.elevation)
        .bind(7, t.h_accuracy);
    s.run();
  });
}

std::vector<TrackPoint> list_track(Project& p, const std::string& person, const std::string& day) {
  Stmt s(p.db(),
         "SELECT person, time, lat, lon, elevation, h_accuracy FROM track_points "
         "WHERE (?1 = '' OR person = ?1) AND (?2 = '' OR substr(time, 1, 10) = ?2) ORDER BY time, id");
  s.bind(1, person).bind(2, day);
  std::vector<TrackPoint> out;
  while (s.step()) out.push_back({s.text(0), s.text(1), s.real(2), s.real(3), s.opt_real(4), s.opt_real(5)});
  return out;
}

std::vector<DayTrack> day_tracks(Project& p, const std::string& day) {
  std::map<std::pair<std::string, std::string>, std::vector<TrackPoint>> by;  // (day, person) -> fixes in time order
  for (auto& t : list_track(p, "", day)) {
    const std::string d = t.time.substr(0, 10);
    const std::string who = t.person;
    by[{d, who}].push_back(std::move(t));
  }
  std::vector<DayTrack> out;
  for (auto& [key, pts] : by) out.push_back({key.second, key.first, std::move(pts)});
  return out;
}

std::vector<std::string> track_days(Project& p) {
  Stmt s(p.db(), "SELECT DISTINCT substr(time, 1, 10) AS d FROM track_points ORDER BY d");
  std::vector<std::string> out;
  while (s.step()) out.push_back(s.text(0));
  return out;
}

TrackMerge merge_track(Project& p, Db& source) {
  TrackMerge m;
  const long n = static_cast<long>(source.query_int("SELECT count(*) FROM track_points"));
  if (n > kMaxMergedTrackPoints)
    throw std::runtime_error("the day track holds " + std::to_string(n) + " fixes, more than the " +
                             std::to_string(kMaxMergedTrackPoints) +
                             " a merge takes from one file (too-large); nothing was merged");
  Stmt in(source, "SELECT person, device, time, lat, lon, elevation, h_accuracy FROM track_points ORDER BY time, id");
  // The index track_points_time (person, time) finds the candidates.
  Stmt have(p.db(),
            "SELECT 1 FROM track_points WHERE person = ?1 AND time = ?3 AND device = ?2 AND lat = ?4 AND lon = ?5 "
            "AND elevation IS ?6 AND h_accuracy IS ?7");
  Stmt add(p.db(),
           "INSERT INTO track_points (person, device, time, lat, lon, elevation, h_accuracy) VALUES (?1, ?2, ?3, ?4, "
           "?5, ?6, ?7)");
  while (in.step()) {
    for (Stmt* s : {&have, &add}) {
      s->reset();
      s->bind(1, in.text(0)).bind(2, in.text(1)).bind(3, in.text(2)).bind(4, in.real(3)).bind(5, in.real(4));
      s->bind(6, in.opt_real(5)).bind(7, in.opt_real(6));
    }
    if (have.step()) {
      ++m.skipped;
      continue;
    }
    add.run();
    ++m.added;
  }
  return m;
}

}  // namespace cairn::store
