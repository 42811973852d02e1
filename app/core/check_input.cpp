#include "app/core/check_input.h"

#include <stdexcept>

#include "formats/iso8601.h"
#include "storage/each.h"
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

// Longer than a screen: the steps below (reading, zone, grid factors, positions,
// readings, each contact's fit) share the working zone and the factors found
// first; each is marked by its comment. Records are read one at a time into the
// engine's compact form (no list of whole records is held: issue 16); what the
// later steps need of a station or point before the zone is known (its latitude
// and longitude, a station's observer and time) is kept aside until used.
CheckData load_check_input(Project& p, const LocalDeclination& local_declination) {
  CheckData out;
  for (const auto& u : list_units(p)) out.unit_code[u.meta.uuid] = u.code;

  // Stations and contact points as read: positions are projected below, once the
  // working zone is known (it may come from the data's mean position).
  struct StationAside {
    geo::LatLon at;
    std::string observer, time;
  };
  std::vector<StationAside> station_aside;
  out.input.stations.reserve(count_stations(p));
  station_aside.reserve(out.input.stations.capacity());
  for_each_station(p, {}, [&](const Station& s) {
    geo::CheckStation cs;
    cs.uuid = s.meta.uuid;
    cs.code = s.code;
    cs.z = s.elevation;
    cs.h_acc = s.h_accuracy.value_or(0);
    cs.v_acc = s.v_accuracy.value_or(0);
    cs.unit = s.unit;
    out.input.stations.push_back(std::move(cs));
    station_aside.push_back({{s.lat, s.lon}, s.observer, s.time});
  });
  std::unordered_map<std::string, size_t> contact_index;
  for (const auto& c : list_contacts(p)) {
    geo::CheckContact cc;
    cc.uuid = c.meta.uuid;
    cc.name = c.name;
    cc.type = std::string(to_string(c.type));
    cc.lower_unit = c.lower_unit;
    cc.upper_unit = c.upper_unit;
    contact_index[c.meta.uuid] = out.input.contacts.size();
    out.input.contacts.push_back(cc);
  }
  // Every point's position (for the zone), and the points fitted: a point of a
  // known contact with an elevation (a point without one cannot be fitted).
  struct PointAside {
    size_t contact;
    geo::LatLon at;
    std::string uuid;
  };
  std::vector<geo::LatLon> point_latlon;
  std::vector<PointAside> fitted;
  std::vector<geo::FitPoint> fitted_points;
  for_each_point(p, {}, [&](const ContactPoint& q) {
    point_latlon.push_back({q.lat, q.lon});
    ++out.elevation_sources[q.contact][q.elevation ? std::string(to_string(q.source)) : std::string("none")];
    auto it = contact_index.find(q.contact);
    if (it == contact_index.end() || !q.elevation) return;
    fitted.push_back({it->second, {q.lat, q.lon}, q.meta.uuid});
    fitted_points.push_back({0, 0, *q.elevation, q.h_accuracy.value_or(0), q.v_accuracy.value_or(0)});
  });

  // The working zone: the project's, else the zone of the data's mean position.
  const ProjectInfo info = p.info();
  std::vector<geo::LatLon> all;
  all.reserve(station_aside.size() + point_latlon.size());
  for (const auto& s : station_aside) all.push_back(s.at);
  all.insert(all.end(), point_latlon.begin(), point_latlon.end());
  point_latlon = {};
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
  all = {};
  auto project = [&](double lat, double lon, const std::string& what) {
    auto u = geo::to_utm({lat, lon}, out.zone);
    if (!u) throw std::runtime_error(what + ": " + u.error());
    return *u;
  };

  std::unordered_map<std::string, size_t> station_by_id;
  station_by_id.reserve(out.input.stations.size());
  for (size_t i = 0; i < out.input.stations.size(); ++i) {
    auto& cs = out.input.stations[i];
    station_by_id[cs.uuid] = i;
    const auto u = project(station_aside[i].at.lat, station_aside[i].at.lon, "station " + cs.code);
    cs.e = u.easting;
    cs.n = u.northing;
  }
  std::vector<size_t> per_contact(out.input.contacts.size(), 0);
  for (const auto& f : fitted) ++per_contact[f.contact];
  for (size_t i = 0; i < out.input.contacts.size(); ++i) {
    out.input.contacts[i].points.reserve(per_contact[i]);
    out.input.contacts[i].point_ids.reserve(per_contact[i]);
  }
  std::vector<std::vector<geo::LatLon>> contact_latlon(out.input.contacts.size());
  for (size_t k = 0; k < fitted.size(); ++k) {
    auto& f = fitted[k];
    const auto u = project(f.at.lat, f.at.lon, "contact point " + f.uuid);
    auto& cc = out.input.contacts[f.contact];
    geo::FitPoint fp = fitted_points[k];
    fp.e = u.easting;
    fp.n = u.northing;
    cc.points.push_back(fp);
    cc.point_ids.push_back(std::move(f.uuid));
    contact_latlon[f.contact].push_back(f.at);
  }
  fitted = {};
  fitted_points = {};
  // Each contact's plane is turned to true north with the convergence at its own
  // points: one value for a whole project is wrong where it spans a zone.
  for (size_t i = 0; i < out.input.contacts.size(); ++i)
    if (!contact_latlon[i].empty())
      out.input.contacts[i].grid = grid_at(contact_latlon[i], "contact " + out.input.contacts[i].name);
  contact_latlon = {};
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

  std::unordered_map<std::string, std::string> initials;
  for (const auto& person : list_people(p))
    initials[person.meta.uuid] = person.initials.empty() ? person.name : person.initials;
  out.input.planes.reserve(count_planes(p));
  for_each_plane(p, {}, [&](const PlanarReading& r) {
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
    const StationAside* st = st_it == station_by_id.end() ? nullptr : &station_aside[st_it->second];
    std::string who = r.observer;
    if (who.empty() && st) who = st->observer;
    if (!who.empty()) {
      auto in = initials.find(who);
      cp.observer = in != initials.end() ? in->second : who;
    }
    const std::string& when = !r.time.empty() || !st ? r.time : st->time;
    if (when.size() >= 10) cp.day = when.substr(0, 10);
    cp.device = r.meta.device;
    cp.repeat_of = r.repeat_of;
    if (local_declination && st) {
      auto year = decimal_year_of(r.time);
      if (year) cp.local_declination = local_declination(st->at.lat, st->at.lon, *year);
    }
    out.input.planes.push_back(std::move(cp));
  });
  return out;
}

}  // namespace cairn::core
