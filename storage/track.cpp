#include "storage/track.h"

#include <cmath>

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

}  // namespace cairn::store
