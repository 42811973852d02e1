#include "storage/listing.h"

#include <algorithm>
#include <stdexcept>
#include <unordered_map>

#include "formats/csv.h"
#include "formats/validate.h"
#include "storage/each.h"
#include "storage/sqlite.h"

namespace cairn::store {

using namespace cairn::formats;  // file formats and value rules (formats/)

namespace {

// The columns list_csv writes: the import's, less the alternatives it does not
// use (positions as lat/lon, planes as strike/dip, no repeat_of).
std::vector<std::string> listed_columns(ImportKind k) {
  static const char* const alternatives[] = {"easting", "northing", "dip_direction", "attitude", "repeat_of"};
  std::vector<std::string> out;
  for (const auto& c : import_columns(k))
    if (std::find(std::begin(alternatives), std::end(alternatives), c) == std::end(alternatives)) out.push_back(c);
  return out;
}

// One text column of a record by UUID, deleted or not ("" when there is none),
// from a statement prepared once; the last answer is kept (readings come by
// station).
class TextOf {
 public:
  TextOf(Project& p, const char* sql) : s_(p.db(), sql) {}
  const std::string& operator()(const std::string& uuid) {
    if (has_ && uuid == key_) return value_;
    s_.reset();
    s_.bind(1, uuid);
    value_ = s_.step() ? s_.text(0) : std::string();
    key_ = uuid;
    has_ = true;
    return value_;
  }

 private:
  Stmt s_;
  std::string key_, value_;
  bool has_ = false;
};

std::string opt(const std::optional<double>& v) { return v ? format_number(*v) : ""; }
std::string decl(North n, double d) { return n == North::Magnetic ? format_number(d) : std::string(); }

}  // namespace

void write_list_csv(Project& p, ImportKind kind, std::ostream& out, const ImportProgress& progress) {
  ListOptions all;
  all.include_deleted = true;
  // The small tables by UUID (deleted ones too: live records may name them).
  std::unordered_map<std::string, std::string> unit_code, contact_name, initials;
  for (const auto& u : list_units(p, all)) unit_code[u.meta.uuid] = u.code;
  for (const auto& c : list_contacts(p, all)) contact_name[c.meta.uuid] = c.name;
  for (const auto& x : list_people(p, all)) initials[x.meta.uuid] = x.initials;
  auto look = [](const std::unordered_map<std::string, std::string>& m, const std::string& k) {
    const auto it = m.find(k);
    return it == m.end() ? std::string() : it->second;
  };
  TextOf station_code(p, "SELECT code FROM stations WHERE uuid = ?");
  TextOf plane_ref(p, "SELECT ref FROM planes WHERE uuid = ?");

  size_t total = 0, done = 0;
  switch (kind) {
    case ImportKind::Units: total = list_units(p).size(); break;
    case ImportKind::Contacts: total = list_contacts(p).size(); break;
    case ImportKind::Stations: total = count_stations(p); break;
    case ImportKind::Planes: total = count_planes(p); break;
    case ImportKind::Lines: total = count_lines(p); break;
    case ImportKind::Points: total = count_points(p); break;
  }
  auto row = [&](const std::vector<std::string>& fields) {
    out << csv_record(fields);
    if (!out) throw std::runtime_error("cannot write the listing (the output failed)");
    if (progress && ++done % 1000 == 0) progress(done, total);
  };
  out << csv_record(listed_columns(kind));
  switch (kind) {
    case ImportKind::Units:
      for (const auto& u : list_units(p)) row({u.code, u.name, std::to_string(u.age_rank), u.colour});
      break;
    case ImportKind::Contacts:
      for (const auto& c : list_contacts(p))
        row({c.name, look(unit_code, c.lower_unit), look(unit_code, c.upper_unit), std::string(to_string(c.type))});
      break;
    case ImportKind::Stations:
      for_each_station(p, {}, [&](const Station& s) {
        row({s.code, format_number(s.lat), format_number(s.lon), opt(s.elevation), opt(s.h_accuracy), opt(s.v_accuracy),
             std::string(to_string(s.source)), look(unit_code, s.unit), look(initials, s.observer), s.time, s.notes});
      });
      break;
    case ImportKind::Planes:
      for_each_plane(p, {}, [&](const PlanarReading& r) {
        row({station_code(r.station), std::string(to_string(r.kind)), format_number(r.measured_strike),
             format_number(r.measured_dip), std::string(to_string(r.north)), decl(r.north, r.declination),
             look(contact_name, r.contact), r.quality ? std::to_string(*r.quality) : "",
             std::string(to_string(r.facing)), r.ref, r.time, r.notes});
      });
      break;
    case ImportKind::Lines:
      for_each_line(p, {}, [&](const LinearReading& r) {
        const bool rake = r.rake.has_value();
        row({station_code(r.station), std::string(to_string(r.kind)), rake ? "" : format_number(r.measured_trend),
             rake ? "" : format_number(r.measured_plunge), rake ? format_number(*r.rake) : "",
             r.host_plane.empty() ? std::string() : plane_ref(r.host_plane), std::string(to_string(r.north)),
             decl(r.north, r.declination), r.ref, r.time, r.notes});
      });
      break;
    case ImportKind::Points:
      for_each_point(p, {}, [&](const ContactPoint& pt) {
        row({look(contact_name, pt.contact), format_number(pt.lat), format_number(pt.lon), opt(pt.elevation),
             opt(pt.h_accuracy), opt(pt.v_accuracy), std::string(to_string(pt.source)), pt.time, pt.notes});
      });
      break;
  }
  out.flush();
  if (progress) progress(done, total);
}

}  // namespace cairn::store
