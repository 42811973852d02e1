#include "app/core/check_input.h"

#include <stdexcept>

#include "formats/iso8601.h"
#include "storage/repository.h"

namespace cairn::core {

using namespace cairn::store;  // the project file and its records (storage/)

using namespace cairn::formats;  // file formats and value rules (formats/)

namespace {

geo::CheckFacing facing_of(Facing f) {
  switch (f) {
    case Facing::Upright: return geo::CheckFacing::Upright;
    case Facing::Overturned: return geo::CheckFacing::Overturned;
    case Facing::Unknown: break;
  }
  return geo::CheckFacing::Unknown;
}

}  // namespace

std::optional<double> minutes_since_epoch(const std::string& iso) {
  if (iso.empty()) return std::nullopt;
  auto t = parse_iso8601(iso);
  if (!t) return std::nullopt;
  // A time without an offset is taken as written (the same clock for every
  // reading of one file); an offset turns local time into UTC (local = UTC + offset).
  const auto instant = date::sys_days{t->day} + t->time_of_day.value_or(std::chrono::milliseconds{0}) -
                       t->utc_offset.value_or(std::chrono::minutes{0});
  return std::chrono::duration<double, std::ratio<60>>(instant.time_since_epoch()).count();
}

std::optional<double> decimal_year_of(const std::string& iso) {
  if (iso.empty()) return std::nullopt;
  auto t = parse_iso8601(iso);
  if (!t) return std::nullopt;
  return geo::decimal_year(t->day);
}

// Longer than a screen: the steps below (zone, grid factors, readings, each
// contact's fit) share the working zone and the factors found first; each is
// marked by its comment.
CheckData load_check_input(Project& p, const LocalDeclination& local_declination) {
  CheckData out;
  const auto stations = list_stations(p);
  const auto contacts = list_contacts(p);
  const auto points = list_points(p);
  const auto planes = list_planes(p);
  for (const auto& u : list_units(p)) out.unit_code[u.meta.uuid] = u.code;

  // The working zone: the project's, else the zone of the data's mean position.
  const ProjectInfo info = p.info();
  std::vector<geo::LatLon> all;
  for (const auto& s : stations) all.push_back({s.lat, s.lon});
  for (const auto& q : points) all.push_back({q.lat, q.lon});
  if (!info.utm_zone.empty()) {
    auto z = geo::parse_utm_zone(info.utm_zone);
    if (!z) throw std::runtime_error("project UTM zone: " + z.error());
    out.zone.zone = z->zone;
    out.zone.northp = z->northp.value_or(all.empty() || all.front().lat >= 0);
  } else if (!all.empty()) {
    auto z = geo::utm_zone_for(all);
    if (!z) throw std::runtime_error("choosing a UTM zone: " + z.error());
    out.zone = *z;
  } else {
    out.zone = {31, true};
  }
  // Grid convergence and scale: at the data's mean position for the project,
  // and at each contact's own points below. A failure is refused, never taken
  // as zero convergence.
  auto grid_at = [&](const std::vector<geo::LatLon>& where, const std::string& what) {
    double lat = 0, lon = 0;
    for (const auto& a : where) lat += a.lat, lon += a.lon;
    auto g = geo::utm_grid_factors({lat / where.size(), lon / where.size()}, out.zone);
    if (!g) throw std::runtime_error("grid convergence for " + what + ": " + g.error());
    return *g;
  };
  if (!all.empty()) out.input.grid = grid_at(all, "the project area");
  auto project = [&](double lat, double lon, const std::string& what) {
    auto u = geo::to_utm({lat, lon}, out.zone);
    if (!u) throw std::runtime_error(what + ": " + u.error());
    return *u;
  };

  std::unordered_map<std::string, std::string> initials;
  for (const auto& person : list_people(p))
    initials[person.meta.uuid] = person.initials.empty() ? person.name : person.initials;
  std::unordered_map<std::string, const Station*> station_by_id;
  for (const auto& s : stations) {
    station_by_id[s.meta.uuid] = &s;
    const auto u = project(s.lat, s.lon, "station " + s.code);
    geo::CheckStation cs;
    cs.uuid = s.meta.uuid;
    cs.code = s.code;
    cs.e = u.easting;
    cs.n = u.northing;
    cs.z = s.elevation;
    cs.h_acc = s.h_accuracy.value_or(0);
    cs.v_acc = s.v_accuracy.value_or(0);
    cs.unit = s.unit;
    out.input.stations.push_back(cs);
  }
  std::unordered_map<std::string, size_t> contact_index;
  for (const auto& c : contacts) {
    geo::CheckContact cc;
    cc.uuid = c.meta.uuid;
    cc.name = c.name;
    cc.type = std::string(to_string(c.type));
    cc.lower_unit = c.lower_unit;
    cc.upper_unit = c.upper_unit;
    contact_index[c.meta.uuid] = out.input.contacts.size();
    out.input.contacts.push_back(cc);
  }
  std::vector<std::vector<geo::LatLon>> contact_latlon(out.input.contacts.size());
  for (const auto& q : points) {
    auto it = contact_index.find(q.contact);
    if (it == contact_index.end() || !q.elevation) continue;  // a point without elevation cannot be fitted
    const auto u = project(q.lat, q.lon, "contact point " + q.meta.uuid);
    auto& cc = out.input.contacts[it->second];
    cc.points.push_back({u.easting, u.northing, *q.elevation, q.h_accuracy.value_or(0), q.v_accuracy.value_or(0)});
    cc.point_ids.push_back(q.meta.uuid);
    contact_latlon[it->second].push_back({q.lat, q.lon});
  }
  // Each contact's plane is turned to true north with the convergence at its own
  // points: one value for a whole project is wrong where it spans a zone.
  for (size_t i = 0; i < out.input.contacts.size(); ++i)
    if (!contact_latlon[i].empty())
      out.input.contacts[i].grid = grid_at(contact_latlon[i], "contact " + out.input.contacts[i].name);
  // A contact whose points state accuracies only in part is fitted without them:
  // fit_plane needs all or none.
  for (auto& cc : out.input.contacts) {
    bool any = false, all_given = true;
    for (const auto& fp : cc.points) {
      const bool given = fp.h_acc > 0 || fp.v_acc > 0;
      any = any || given;
      all_given = all_given && given;
    }
    if (any && !all_given)
      for (auto& fp : cc.points) fp.h_acc = fp.v_acc = 0;
  }
  for (const auto& r : planes) {
    geo::CheckPlane cp;
    cp.uuid = r.meta.uuid;
    cp.station = r.station;
    cp.ref = r.ref;
    cp.kind = std::string(to_string(r.kind));
    cp.plane = geo::Plane{r.strike, r.dip};
    cp.magnetic = r.north == North::Magnetic;
    cp.declination_applied = r.declination;
    cp.quality = r.quality;
    cp.facing = facing_of(r.facing);
    cp.contact = r.contact;
    cp.time_minutes = minutes_since_epoch(r.time);
    // Who, which day (the local calendar date as recorded) and which device, for
    // the systematic compass check; the station's observer when the reading names none.
    auto st_it = station_by_id.find(r.station);
    std::string who = r.observer;
    if (who.empty() && st_it != station_by_id.end()) who = st_it->second->observer;
    if (!who.empty()) {
      auto in = initials.find(who);
      cp.observer = in != initials.end() ? in->second : who;
    }
    const std::string& when = !r.time.empty() || st_it == station_by_id.end() ? r.time : st_it->second->time;
    if (when.size() >= 10) cp.day = when.substr(0, 10);
    cp.device = r.meta.device;
    cp.repeat_of = r.repeat_of;
    if (local_declination) {
      auto st = station_by_id.find(r.station);
      auto year = decimal_year_of(r.time);
      if (st != station_by_id.end() && year)
        cp.local_declination = local_declination(st->second->lat, st->second->lon, *year);
    }
    out.input.planes.push_back(cp);
  }
  return out;
}

}  // namespace cairn::core
