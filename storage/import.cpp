#include "storage/import.h"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <map>
#include <set>
#include <sstream>
#include <unordered_map>

#include "geomath/geodesy.h"
#include "geomath/notation.h"
#include "formats/csv.h"
#include "formats/gpx.h"
#include "storage/listing.h"
#include "storage/pick_lists.h"
#include "storage/repository.h"
#include "formats/sha256.h"
#include "formats/validate.h"
#include "storage/terrain.h"

namespace cairn::store {

using namespace cairn::formats;  // file formats and value rules (formats/)

namespace {

struct Abort {};  // thrown inside the transaction to roll back a file with bad rows

const std::map<ImportKind, std::vector<std::string>>& columns() {
  static const std::map<ImportKind, std::vector<std::string>> c = {
      {ImportKind::Units, {"unit", "name", "age_rank", "colour"}},
      {ImportKind::Contacts, {"contact", "lower_unit", "upper_unit", "type"}},
      {ImportKind::Stations,
       {"station", "lat", "lon", "easting", "northing", "elevation", "h_accuracy", "v_accuracy", "source", "unit",
        "observer", "time", "notes"}},
      {ImportKind::Planes,
       {"station", "kind", "strike", "dip_direction", "dip", "attitude", "north", "declination", "contact", "quality",
        "facing", "ref", "time", "notes", "repeat_of"}},
      {ImportKind::Lines,
       {"station", "kind", "trend", "plunge", "rake", "plane_ref", "north", "declination", "ref", "time", "notes"}},
      {ImportKind::Points,
       {"contact", "lat", "lon", "easting", "northing", "elevation", "h_accuracy", "v_accuracy", "source", "time",
        "notes"}},
  };
  return c;
}

// One CSV row with its location, collecting errors.
class Row {
 public:
  Row(const std::vector<std::string>& header, const std::vector<std::string>& cells, int line, const std::string& file,
      std::vector<std::string>& errors)
      : header_(header), cells_(cells), line_(line), file_(file), errors_(errors), start_(errors.size()) {}

  bool has(const std::string& c) const { return index(c) >= 0; }
  std::string get(const std::string& c) const {
    const int i = index(c);
    return i < 0 ? std::string() : cells_[static_cast<size_t>(i)];
  }
  int line() const { return line_; }
  int column_number(const std::string& c) const {
    const int i = index(c);
    return i < 0 ? 1 : i + 1;
  }
  void error(const std::string& c, const std::string& rule, const std::string& message) {
    errors_.push_back(file_ + ":" + std::to_string(line()) + ":" + std::to_string(column_number(c)) + ": " + rule +
                      ": " + message);
  }
  void error(const std::string& c, const Broken& b) { error(c, b.rule, b.message); }
  bool bad() const { return errors_.size() > start_; }

  // A required cell: empty is an error.
  std::string required(const std::string& c) {
    std::string v = get(c);
    if (v.empty()) error(c, "required", c + " is empty");
    return v;
  }
  // An optional number; an error when present but not a number.
  std::optional<double> number(const std::string& c, const std::string& what) {
    const std::string v = get(c);
    if (v.empty()) return std::nullopt;
    double x = 0;
    if (auto b = check_number_text(v, what, &x)) {
      error(c, *b);
      return std::nullopt;
    }
    return x;
  }
  std::optional<double> elevation() {
    auto v = number("elevation", "elevation");
    if (v)
      if (auto b = check_elevation(*v)) error("elevation", *b);
    return v;
  }
  std::optional<double> accuracy(const std::string& c) {
    auto v = number(c, c);
    if (v)
      if (auto b = check_accuracy(*v, c)) error(c, *b);
    return v;
  }
  std::optional<double> angle(const std::string& c, double lo, double hi) {
    const std::string v = get(c);
    if (v.empty()) {
      error(c, "required", c + " is empty");
      return std::nullopt;
    }
    auto a = geo::parse_angle(v, c.c_str(), lo, hi);
    if (!a) {
      error(c, "angle", a.error());
      return std::nullopt;
    }
    return *a;
  }
  std::string time() {
    const std::string v = get("time");
    if (v.empty()) return v;
    std::string norm;
    if (auto b = check_time(v, &norm)) error("time", *b);
    return norm;
  }
  template <class E>
  std::optional<E> choice(const std::string& c, std::optional<E> (*parse)(std::string_view), const std::string& names,
                          std::optional<E> dflt) {
    const std::string v = get(c);
    if (v.empty()) {
      if (!dflt) error(c, "required", c + " is empty");
      return dflt;
    }
    auto e = parse(v);
    if (!e) error(c, "choice", c + " '" + v + "' is not one of: " + names);
    return e;
  }
  // The row's cells by column name, sorted, for its digest (import_key).
  std::string cells_text(ImportKind k) const {
    std::vector<std::pair<std::string, std::string>> cells;
    for (size_t i = 0; i < header_.size(); ++i) cells.emplace_back(header_[i], cells_[i]);
    std::sort(cells.begin(), cells.end());
    std::string s(to_string(k));
    for (const auto& [n, v] : cells)
      if (!v.empty()) s += "\n" + n + "=" + v;
    return s;
  }

 private:
  int index(const std::string& c) const {
    for (size_t i = 0; i < header_.size(); ++i)
      if (header_[i] == c) return static_cast<int>(i);
    return -1;
  }
  const std::vector<std::string>& header_;
  const std::vector<std::string>& cells_;
  int line_;
  const std::string& file_;
  std::vector<std::string>& errors_;
  size_t start_;
};

// Where a ValidationError from the record API belongs in a CSV row.
std::string column_for(const std::string& field, ImportKind k, const Row& row) {
  if (field == "code") return k == ImportKind::Units ? "unit" : "station";
  if (field == "name" && k == ImportKind::Contacts) return "contact";
  if (field == "typed" || field == "measured_strike" || field == "measured_dip") {
    if (k == ImportKind::Lines) return row.has("rake") && !row.get("rake").empty() ? "rake" : "trend";
    if (row.has("attitude")) return "attitude";
    return row.has("strike") ? "strike" : "dip_direction";
  }
  if (field == "measured_trend" || field == "measured_plunge") return "trend";
  if (field == "host_plane") return "plane_ref";
  return field;
}

template <class T>
void add_or_report(Project& p, T& rec, Row& row, ImportKind k, ImportReport& rep) {
  try {
    add(p, rec);
    ++rep.added;
  } catch (const ValidationError& e) {
    row.error(column_for(e.field(), k, row), e.rule(), e.what());
  }
}

struct Position {
  bool utm = false;  // easting/northing columns
  geo::UtmZone zone;
};

// Header checks: unknown and missing columns, and the alternatives.
void check_header(const CsvReader& t, ImportKind k, const std::string& file, Project& p, Position& pos,
                  std::vector<std::string>& errors) {
  const int hline = t.header_line();
  const auto& allowed = columns().at(k);
  auto at = [&](const std::string& c, const std::string& rule, const std::string& msg) {
    const int i = t.column(c);
    errors.push_back(file + ":" + std::to_string(hline) + ":" + std::to_string(i < 0 ? 1 : i + 1) + ": " + rule + ": " +
                     msg);
  };
  std::string list;
  for (const auto& a : allowed) list += (list.empty() ? "" : ", ") + a;
  for (const auto& h : t.header())
    if (std::find(allowed.begin(), allowed.end(), h) == allowed.end())
      at(h, "unknown-column", "unknown column '" + h + "' (" + std::string(to_string(k)) + " takes: " + list + ")");
  auto need = [&](const std::string& c) {
    if (t.column(c) < 0) at(c, "missing-column", "column '" + c + "' is missing");
  };
  auto has = [&](const std::string& c) { return t.column(c) >= 0; };
  switch (k) {
    case ImportKind::Units: need("unit"), need("name"), need("age_rank"); break;
    case ImportKind::Contacts: need("contact"), need("lower_unit"), need("upper_unit"), need("type"); break;
    case ImportKind::Stations:
    case ImportKind::Points: {
      need(k == ImportKind::Stations ? "station" : "contact");
      const bool ll = has("lat") || has("lon"), en = has("easting") || has("northing");
      if (ll && en) {
        at(has("easting") ? "easting" : "northing", "columns", "give lat and lon, or easting and northing, not both");
      } else if (en) {
        need("easting"), need("northing");
        pos.utm = true;
        const std::string zone = p.info().utm_zone;
        if (zone.empty()) {
          at(has("easting") ? "easting" : "northing", "utm-zone",
             "easting and northing need the project's UTM zone; this project has none (cairn new --utm ZONE)");
        } else {
          auto z = geo::parse_utm_zone(zone);
          pos.zone = geo::UtmZone{z->zone, z->northp.value_or(true)};
        }
      } else {
        need("lat"), need("lon");
      }
      break;
    }
    case ImportKind::Planes: {
      need("station"), need("kind");
      const int n = (has("strike") ? 1 : 0) + (has("dip_direction") ? 1 : 0) + (has("attitude") ? 1 : 0);
      if (n > 1) {
        at(has("attitude") ? "attitude" : "dip_direction", "columns",
           "give strike and dip, dip_direction and dip, or attitude: only one of them");
      } else if (n == 0) {
        at("strike", "missing-column",
           "the attitude is missing: give strike and dip, dip_direction and dip, or attitude");
      } else if (has("attitude")) {
        if (has("dip")) at("dip", "columns", "attitude holds the dip already; leave out the dip column");
      } else {
        need("dip");
      }
      break;
    }
    case ImportKind::Lines: {
      need("station"), need("kind");
      // Each row gives trend and plunge, or a rake on plane_ref; a file may mix both kinds of row.
      const bool tp = has("trend") || has("plunge");
      if (tp || !has("rake")) need("trend"), need("plunge");
      if (has("rake")) need("plane_ref");
      break;
    }
  }
}

bool read_position(Row& row, const Position& pos, double& lat, double& lon) {
  if (pos.utm) {
    const auto e = row.number("easting", "easting");
    const auto n = row.number("northing", "northing");
    if (!row.has("easting") || row.get("easting").empty()) row.error("easting", "required", "easting is empty");
    if (!row.has("northing") || row.get("northing").empty()) row.error("northing", "required", "northing is empty");
    if (!e || !n) return false;
    auto ll = geo::from_utm(geo::UtmPoint{pos.zone.zone, pos.zone.northp, *e, *n});
    if (!ll) {
      row.error("easting", "utm-range", ll.error());
      return false;
    }
    lat = ll->lat;
    lon = ll->lon;
    return true;
  }
  const auto a = row.number("lat", "latitude");
  const auto o = row.number("lon", "longitude");
  if (row.get("lat").empty()) row.error("lat", "required", "lat is empty");
  if (row.get("lon").empty()) row.error("lon", "required", "lon is empty");
  if (a)
    if (auto b = check_latitude(*a)) row.error("lat", *b);
  if (o)
    if (auto b = check_longitude(*o)) row.error("lon", *b);
  if (!a || !o) return false;
  lat = *a;
  lon = *o;
  return true;
}

// Names the fields where two stations differ ("" when they are the same).
std::string station_differences(const Station& a, const Station& b) {
  std::string d;
  auto add = [&](bool differ, const char* name) {
    if (differ) d += (d.empty() ? "" : ", ") + std::string(name);
  };
  add(a.lat != b.lat, "lat");
  add(a.lon != b.lon, "lon");
  add(a.elevation != b.elevation, "elevation");
  add(a.h_accuracy != b.h_accuracy, "h_accuracy");
  add(a.v_accuracy != b.v_accuracy, "v_accuracy");
  add(a.source != b.source, "source");
  add(a.unit != b.unit, "unit");
  add(a.observer != b.observer, "observer");
  add(a.time != b.time, "time");
  add(a.notes != b.notes, "notes");
  return d;
}

// Adds a station, or skips it when an identical one exists; a different one is an error.
void put_station(Project& p, Station& s, Row* row, const std::string& code_column, ImportReport& rep,
                 const std::function<void(const std::string&, const std::string&, const std::string&)>& error) {
  if (auto old = find_station(p, s.code)) {
    const std::string diff = station_differences(*old, s);
    if (diff.empty()) {
      ++rep.skipped;
    } else {
      error(code_column, "duplicate", "station '" + s.code + "' already exists with other values (" + diff + ")");
    }
    return;
  }
  try {
    add(p, s);
    ++rep.added;
  } catch (const ValidationError& e) {
    error(row ? column_for(e.field(), ImportKind::Stations, *row) : code_column, e.rule(), e.what());
  }
}

bool key_exists(Project& p, const char* table, const std::string& key) {
  Stmt s(p.db(), std::string("SELECT 1 FROM ") + table + " WHERE import_key = ? AND deleted IS NULL");
  s.bind(1, key);
  return s.step();
}

void set_import_key(Project& p, const char* table, const std::string& uuid, const std::string& key) {
  Stmt s(p.db(), std::string("UPDATE ") + table + " SET import_key = ? WHERE uuid = ?");
  s.bind(1, key).bind(2, uuid);
  s.run();
}

// ---- one row of each kind ----------------------------------------------------

// What this file has had so far, by key: a natural key (how many rows had it,
// and the line of the first) or a row's cells (how many identical rows, for
// the import key). A key is held as the first 128 bits of its SHA-256
// (FIPS 180-4), about 60 bytes a distinct key with the map's own, instead of
// the key's text (a row's cells: hundreds of bytes) as before issue 16. Two
// different keys of one file share them with a probability under 1e-27 at
// kMaxImportRows rows (birthday bound n^2 / 2^129), the same assumption the
// import key's own SHA-256 rests on. (A table in SQLite's temporary schema
// would keep the memory flat, but it made the import of planes 40% slower:
// measured, about 7.1 s against 4.9 s of CPU for the 37 563 readings of
// the 1/8 season.)
struct Fingerprint {
  uint64_t a = 0, b = 0;
  bool operator==(const Fingerprint& o) const { return a == o.a && b == o.b; }
};
struct FingerprintHash {
  size_t operator()(const Fingerprint& f) const { return static_cast<size_t>(f.a); }  // already uniform
};
Fingerprint fingerprint(const std::string& key) {
  const std::string hex = sha256_hex(key);
  Fingerprint f;
  f.a = std::stoull(hex.substr(0, 16), nullptr, 16);
  f.b = std::stoull(hex.substr(16, 16), nullptr, 16);
  return f;
}
struct Seen {
  int count = 0;       // rows with this key so far, this one included
  int first_line = 0;  // line of the first of them
};
struct Context {
  Project& p;
  ImportReport& rep;
  Position pos;
  North north_default = North::True;
  std::set<std::string> added_people;  // people this import made (a project without a person list)
  std::unordered_map<Fingerprint, Seen, FingerprintHash> seen;  // see seen() below
  // Records the rows name, looked up once per import: during an import of one
  // kind the records of the kinds it refers to do not change (people excepted,
  // kept up to date by station_row). Each holds at most kCached names.
  std::unordered_map<std::string, std::optional<Station>> stations;
  std::unordered_map<std::string, std::optional<Contact>> contacts;
  std::unordered_map<std::string, std::optional<Unit>> units;
  std::unordered_map<std::string, std::string> people;  // initials -> UUID ("" = none)
  // The project's pick-lists, read once per import when first needed.
  std::map<PickList, std::vector<std::string>> lists;
  const std::vector<std::string>& list(PickList l) {
    auto it = lists.find(l);
    if (it == lists.end()) it = lists.emplace(l, pick_list(p, l)).first;
    return it->second;
  }
};

// Refuses a structure kind that the project's structure list leaves out.
void check_structure(Context& cx, Row& row, const std::string& kind) {
  if (!kind.empty() && !allowed_by(cx.list(PickList::Structure), kind))
    row.error("kind", "pick-list", not_in_list(PickList::Structure, kind, cx.list(PickList::Structure)));
}

constexpr size_t kCached = 4096;

// A record by name through a cache of CACHE (emptied when it is full, so it stays bounded).
template <class V, class F>
const V& cached(std::unordered_map<std::string, V>& cache, const std::string& key, F find) {
  auto it = cache.find(key);
  if (it != cache.end()) return it->second;
  if (cache.size() >= kCached) cache.clear();
  return cache.emplace(key, find()).first->second;
}

std::optional<Station> station_named(Context& cx, const std::string& code) {
  return cached(cx.stations, code, [&] { return find_station(cx.p, code); });
}
std::optional<Contact> contact_named(Context& cx, const std::string& name) {
  return cached(cx.contacts, name, [&] { return find_contact(cx.p, name); });
}
std::optional<Unit> unit_coded(Context& cx, const std::string& code) {
  return cached(cx.units, code, [&] { return find_unit(cx.p, code); });
}
std::string person_with(Context& cx, const std::string& initials) {
  return cached(cx.people, initials, [&] {
    auto who = find_person(cx.p, initials);
    return who ? who->meta.uuid : std::string();
  });
}

Seen seen(Context& cx, const std::string& key, int line) {
  Seen& s = cx.seen[fingerprint(key)];
  if (s.count++ == 0) s.first_line = line;
  return s;
}

bool first_in_file(Context& cx, Row& row, const std::string& column, const std::string& key, const std::string& what) {
  const Seen was = seen(cx, key, row.line());
  if (was.count > 1)
    row.error(
        column, "duplicate",
        what + " '" + key + "' appears twice in this file (first on line " + std::to_string(was.first_line) + ")");
  return was.count == 1;
}

// Digest of the row's cells by column name, plus its occurrence number in the
// file (two identical readings in one file stay two readings).
std::string row_key(Context& cx, const Row& row, ImportKind k) {
  const std::string s = row.cells_text(k);
  const int occurrence = seen(cx, s, row.line()).count;
  return sha256_hex(s + "\n#" + std::to_string(occurrence));
}

void unit_row(Context& cx, Row& row) {
  Unit u;
  u.code = row.required("unit");
  u.name = row.required("name");
  const std::string rank = row.required("age_rank");
  if (!rank.empty()) {
    if (auto b = check_integer_text(rank, "age_rank", &u.age_rank))
      row.error("age_rank", *b);
    else if (auto r = check_age_rank(u.age_rank))
      row.error("age_rank", *r);
  }
  u.colour = row.get("colour");
  if (!u.colour.empty())
    if (auto b = check_colour(u.colour)) row.error("colour", *b);
  if (!u.code.empty()) first_in_file(cx, row, "unit", u.code, "unit");
  if (row.bad()) return;
  if (auto old = find_unit(cx.p, u.code)) {
    if (old->name == u.name && old->age_rank == u.age_rank && (u.colour.empty() || u.colour == old->colour))
      ++cx.rep.skipped;
    else
      row.error("unit", "duplicate", "unit '" + u.code + "' already exists with other values");
    return;
  }
  add_or_report(cx.p, u, row, ImportKind::Units, cx.rep);
}

std::string unit_ref(Context& cx, Row& row, const std::string& column) {
  const std::string code = row.required(column);
  if (code.empty()) return "";
  auto u = unit_coded(cx, code);
  if (!u) {
    row.error(column, "unknown-unit", not_in_list(PickList::Unit, code, cx.list(PickList::Unit)));
    return "";
  }
  return u->meta.uuid;
}

void contact_row(Context& cx, Row& row) {
  Contact c;
  c.name = row.required("contact");
  c.lower_unit = unit_ref(cx, row, "lower_unit");
  c.upper_unit = unit_ref(cx, row, "upper_unit");
  if (auto t = row.choice("type", parse_contact_type, names_of_contact_type(), std::optional<ContactType>{}))
    c.type = *t;
  if (!c.name.empty()) first_in_file(cx, row, "contact", c.name, "contact");
  if (row.bad()) return;
  if (auto old = find_contact(cx.p, c.name)) {
    if (old->lower_unit == c.lower_unit && old->upper_unit == c.upper_unit && old->type == c.type)
      ++cx.rep.skipped;
    else
      row.error("contact", "duplicate", "contact '" + c.name + "' already exists with other values");
    return;
  }
  add_or_report(cx.p, c, row, ImportKind::Contacts, cx.rep);
}

void station_row(Context& cx, Row& row) {
  Station s;
  s.code = row.required("station");
  read_position(row, cx.pos, s.lat, s.lon);
  s.elevation = row.elevation();
  s.h_accuracy = row.accuracy("h_accuracy");
  s.v_accuracy = row.accuracy("v_accuracy");
  if (auto src = row.choice("source", parse_position_source, names_of_position_source(),
                            std::optional<PositionSource>(cx.pos.utm ? PositionSource::Map : PositionSource::Gps)))
    s.source = *src;
  const std::string unit = row.get("unit");
  if (!unit.empty()) {
    if (auto u = unit_coded(cx, unit))
      s.unit = u->meta.uuid;
    else
      row.error("unit", "unknown-unit", not_in_list(PickList::Unit, unit, cx.list(PickList::Unit)));
  }
  s.time = row.time();
  s.notes = row.get("notes");
  if (!s.code.empty()) first_in_file(cx, row, "station", s.code, "station");
  // A project with a person list takes only its people; the first import into a
  // project without one makes its people from the observers' initials.
  const std::string initials = row.get("observer");
  if (!initials.empty() && person_with(cx, initials).empty() && !cx.list(PickList::Person).empty() &&
      cx.added_people.count(initials) == 0)
    row.error("observer", "pick-list", not_in_list(PickList::Person, initials, cx.list(PickList::Person)));
  if (row.bad()) return;
  if (!initials.empty()) {
    s.observer = person_with(cx, initials);
    if (s.observer.empty()) {
      cx.added_people.insert(initials);
      Person np;
      np.name = initials;
      np.initials = initials;
      s.observer = add(cx.p, np);
      cx.people[initials] = s.observer;
    }
  }
  put_station(cx.p, s, &row, "station", cx.rep,
              [&](const std::string& c, const std::string& rule, const std::string& m) { row.error(c, rule, m); });
}

std::optional<Station> station_ref(Context& cx, Row& row) {
  const std::string code = row.required("station");
  if (code.empty()) return std::nullopt;
  auto s = station_named(cx, code);
  if (!s) row.error("station", "unknown-station", "no station '" + code + "' in the project");
  return s;
}

// north and declination columns of a reading.
void north_columns(Context& cx, Row& row, North& north, double& decl, std::string& source) {
  if (auto n = row.choice("north", parse_north, names_of_north(), std::optional<North>(cx.north_default))) north = *n;
  if (auto d = row.number("declination", "declination")) {
    if (std::abs(*d) > 180) {
      row.error("declination", "declination-range",
                "declination " + format_number(*d) + " is outside -180..180 degrees");
    } else if (north == North::True && *d != 0) {
      row.error("declination", "declination", "a declination applies only to readings against magnetic north");
    } else if (north == North::Magnetic) {
      decl = *d;
      source = "given";
    }
  }
}

void plane_row(Context& cx, Row& row) {
  PlanarReading r;
  auto st = station_ref(cx, row);
  if (auto k = row.choice("kind", parse_plane_kind, names_of_plane_kind(), std::optional<PlaneKind>{})) {
    r.kind = *k;
    check_structure(cx, row, std::string(to_string(*k)));
  }
  if (row.has("attitude")) {
    r.typed = row.required("attitude");
    r.notation = PlaneNotation::Text;
    if (!r.typed.empty()) {
      auto pl = geo::parse_plane(r.typed, geo::PlaneConvention::Unspecified);
      if (!pl) row.error("attitude", "notation", pl.error());
    }
  } else {
    const bool rhr = row.has("strike");
    const std::string az = rhr ? "strike" : "dip_direction";
    const auto a = row.angle(az, 0, 360);
    const auto d = row.angle("dip", 0, 90);
    if (a && d) {
      r.typed = row.get(az) + "/" + row.get("dip");
      r.notation = rhr ? PlaneNotation::StrikeDip : PlaneNotation::DipDirectionDip;
    }
  }
  north_columns(cx, row, r.north, r.declination, r.declination_source);
  const std::string contact = row.get("contact");
  if (!contact.empty()) {
    if (auto c = contact_named(cx, contact))
      r.contact = c->meta.uuid;
    else
      row.error("contact", "unknown-contact", "no contact '" + contact + "' in the project");
  }
  const std::string q = row.get("quality");
  if (!q.empty()) {
    int v = 0;
    if (auto b = check_integer_text(q, "quality", &v))
      row.error("quality", *b);
    else if (auto rq = check_quality(v))
      row.error("quality", *rq);
    else
      r.quality = v;
  }
  if (auto f = row.choice("facing", parse_facing, names_of_facing(), std::optional<Facing>(Facing::Unknown)))
    r.facing = *f;
  r.ref = row.get("ref");
  r.time = row.time();
  r.notes = row.get("notes");
  // repeat_of: the ref of the first reading of the same surface at this station
  // (a mapper's repeated measurement, combined into a Fisher mean by the check).
  const std::string repeat = row.get("repeat_of");
  if (!repeat.empty() && st) {
    if (auto first = find_plane_by_ref(cx.p, st->meta.uuid, repeat))
      r.repeat_of = first->meta.uuid;
    else
      row.error("repeat_of", "unknown-reading", "station " + st->code + " has no planar reading '" + repeat + "'");
  }
  if (row.bad() || !st) return;
  const std::string key = row_key(cx, row, ImportKind::Planes);
  if (key_exists(cx.p, "planes", key)) {
    ++cx.rep.skipped;
    return;
  }
  r.station = st->meta.uuid;
  r.observer = st->observer;
  const int before = cx.rep.added;
  add_or_report(cx.p, r, row, ImportKind::Planes, cx.rep);
  if (cx.rep.added > before) set_import_key(cx.p, "planes", r.meta.uuid, key);
}

void line_row(Context& cx, Row& row) {
  LinearReading r;
  auto st = station_ref(cx, row);
  if (auto k = row.choice("kind", parse_line_kind, names_of_line_kind(), std::optional<LineKind>{})) {
    r.kind = *k;
    check_structure(cx, row, std::string(to_string(*k)));
  }
  const bool by_rake = !row.get("rake").empty();
  if (by_rake) {
    if (!row.get("trend").empty() || !row.get("plunge").empty())
      row.error("rake", "columns", "give trend and plunge, or rake with plane_ref: not both");
    r.typed = row.get("rake");
    r.rake = 0;  // the value comes from parsing `typed` on the host plane
  } else {
    const auto t = row.angle("trend", 0, 360);
    const auto pl = row.angle("plunge", 0, 90);
    if (t && pl) r.typed = row.get("trend") + "/" + row.get("plunge");
  }
  north_columns(cx, row, r.north, r.declination, r.declination_source);
  const std::string plane_ref = row.get("plane_ref");
  if (by_rake && plane_ref.empty()) row.error("plane_ref", "required", "plane_ref is empty (a rake needs its plane)");
  if (st && !plane_ref.empty()) {
    if (auto host = find_plane_by_ref(cx.p, st->meta.uuid, plane_ref))
      r.host_plane = host->meta.uuid;
    else
      row.error("plane_ref", "unknown-plane-ref",
                "station " + st->code + " has no planar reading with ref '" + plane_ref + "'");
  }
  r.ref = row.get("ref");
  r.time = row.time();
  r.notes = row.get("notes");
  if (row.bad() || !st) return;
  const std::string key = row_key(cx, row, ImportKind::Lines);
  if (key_exists(cx.p, "lines", key)) {
    ++cx.rep.skipped;
    return;
  }
  r.station = st->meta.uuid;
  r.observer = st->observer;
  const int before = cx.rep.added;
  add_or_report(cx.p, r, row, ImportKind::Lines, cx.rep);
  if (cx.rep.added > before) set_import_key(cx.p, "lines", r.meta.uuid, key);
}

void point_row(Context& cx, Row& row) {
  ContactPoint pt;
  const std::string name = row.required("contact");
  std::optional<Contact> c;
  if (!name.empty()) {
    c = contact_named(cx, name);
    if (!c) row.error("contact", "unknown-contact", "no contact '" + name + "' in the project");
  }
  read_position(row, cx.pos, pt.lat, pt.lon);
  pt.elevation = row.elevation();
  pt.h_accuracy = row.accuracy("h_accuracy");
  pt.v_accuracy = row.accuracy("v_accuracy");
  if (auto s = row.choice("source", parse_point_source, names_of_point_source(),
                          std::optional<PointSource>(cx.pos.utm ? PointSource::Map : PointSource::Gps)))
    pt.source = *s;
  pt.time = row.time();
  pt.notes = row.get("notes");
  if (row.bad() || !c) return;
  const std::string key = row_key(cx, row, ImportKind::Points);
  if (key_exists(cx.p, "points", key)) {
    ++cx.rep.skipped;
    return;
  }
  pt.contact = c->meta.uuid;
  const int before = cx.rep.added;
  add_or_report(cx.p, pt, row, ImportKind::Points, cx.rep);
  if (cx.rep.added > before) set_import_key(cx.p, "points", pt.meta.uuid, key);
}

// Runs `body` in one transaction; rolls back and zeroes the counts when errors were found.
// Stations and points that came without an elevation take the terrain's (storage/terrain.h).
void all_or_nothing(Project& p, ImportReport& rep, const std::function<void()>& body) {
  BulkWriteCache cache(p.db());  // one transaction over the season's indexes (storage/sqlite.h)
  try {
    p.write([&] {
      body();
      if (!rep.errors.empty()) throw Abort{};
      if (rep.added > 0) {
        const TerrainStored filled = fill_elevations(p);
        rep.from_terrain = filled.filled_points + filled.filled_stations;
      }
    });
  } catch (const Abort&) {
    rep.added = 0;
    rep.skipped = 0;
  }
}

std::string opt(const std::optional<double>& v) { return v ? format_number(*v) : ""; }

}  // namespace

std::optional<ImportKind> parse_import_kind(std::string_view s) {
  for (const auto& [k, cols] : columns())
    if (to_string(k) == s) return k;
  return std::nullopt;
}

std::string_view to_string(ImportKind k) {
  switch (k) {
    case ImportKind::Units: return "units";
    case ImportKind::Contacts: return "contacts";
    case ImportKind::Stations: return "stations";
    case ImportKind::Planes: return "planes";
    case ImportKind::Lines: return "lines";
    case ImportKind::Points: return "points";
  }
  return "";
}

const std::vector<std::string>& import_columns(ImportKind k) { return columns().at(k); }

namespace {

// Opens the CSV for one pass over its rows.
using OpenCsv = std::function<Result<CsvReader>()>;

// Two passes over text that passed check_csv_text/check_csv_file (issue 16:
// memory does not grow with the rows). The first reads every row without
// keeping it, so that a malformed line anywhere refuses the file before
// anything is written (as parse_csv did); the second reads them again and
// imports them one by one inside the one transaction.
ImportReport import_rows(Project& p, ImportKind kind, const OpenCsv& open, const std::string& filename,
                         const ImportProgress& progress) {
  ImportReport rep;
  auto first = open();
  if (!first) {
    rep.errors.push_back(first.error());
    return rep;
  }
  CsvReader& check = first.value();
  if (check.read_header())
    while (check.next()) {}
  if (!check.error().empty()) {
    rep.errors.push_back(check.error());  // already "FILE:LINE:COLUMN: rule: message"
    return rep;
  }
  const size_t total = check.rows();
  Context cx{p, rep, {}, p.info().north_default, {}, {}, {}, {}, {}, {}, {}};
  check_header(check, kind, filename, p, cx.pos, rep.errors);
  if (!rep.errors.empty()) return rep;
  all_or_nothing(p, rep, [&] {
    auto second = open();
    // The file changed between the passes (another program writing it):
    // refused, as the rows checked are not the rows read.
    auto changed = [&] {
      rep.errors.push_back(filename + ":1:1: csv: the file changed while it was imported; import it again");
    };
    if (!second || !second.value().read_header() || second.value().header() != check.header()) return changed();
    CsvReader& in = second.value();
    while (in.next()) {
      const size_t r = in.rows() - 1;
      if (r >= total) return changed();
      if (progress && r % 1000 == 0) progress(r, total);
      // Cells written by list_csv were made safe for spreadsheets (formats/csv.h).
      for (auto& cell : in.row()) cell = from_formula_safe(cell);
      Row row(in.header(), in.row(), in.line(), filename, rep.errors);
      switch (kind) {
        case ImportKind::Units: unit_row(cx, row); break;
        case ImportKind::Contacts: contact_row(cx, row); break;
        case ImportKind::Stations: station_row(cx, row); break;
        case ImportKind::Planes: plane_row(cx, row); break;
        case ImportKind::Lines: line_row(cx, row); break;
        case ImportKind::Points: point_row(cx, row); break;
      }
    }
    if (!in.error().empty() || in.rows() != total) return changed();
    if (progress) progress(total, total);
  });
  return rep;
}

}  // namespace

ImportReport import_csv(Project& p, ImportKind kind, std::string_view text, const std::string& filename,
                        const ImportProgress& progress) {
  if (auto e = check_csv_text(text, filename)) {
    ImportReport rep;
    rep.errors.push_back(*e);
    return rep;
  }
  if (text.substr(0, 3) == "\xEF\xBB\xBF") text.remove_prefix(3);
  const OpenCsv open = [&]() -> Result<CsvReader> {
    return CsvReader(
        [rest = text](char* buf, size_t n) mutable {
          const size_t k = std::min(n, rest.size());
          std::copy_n(rest.data(), k, buf);
          rest.remove_prefix(k);
          return k;
        },
        filename);
  };
  return import_rows(p, kind, open, filename, progress);
}

ImportReport import_csv_file(Project& p, ImportKind kind, const std::string& path, const ImportProgress& progress) {
  if (auto e = check_csv_file(path, path)) {
    ImportReport rep;
    rep.errors.push_back(*e);
    return rep;
  }
  return import_rows(
      p, kind, [&] { return CsvReader::open(path, path); }, path, progress);
}

ImportReport import_gpx(Project& p, std::string_view text, const std::string& filename, const std::string& contact) {
  ImportReport rep;
  GpxFile gpx = parse_gpx(text, filename);
  rep.errors = gpx.errors;
  std::optional<Contact> c;
  if (!contact.empty()) {
    c = find_contact(p, contact);
    if (!c) rep.errors.push_back(filename + ":1:1: unknown-contact: no contact '" + contact + "' in the project");
  }
  if (!rep.errors.empty()) return rep;
  all_or_nothing(p, rep, [&] {
    std::map<std::string, int> first_line, digests;
    for (const GpxWaypoint& w : gpx.waypoints) {
      auto error = [&](const std::string&, const std::string& rule, const std::string& msg) {
        rep.errors.push_back(filename + ":" + std::to_string(w.line) + ":" + std::to_string(w.column) + ": " + rule +
                             ": " + msg);
      };
      if (!c) {
        Station s;
        s.code = w.name;
        if (s.code.empty()) {
          error("", "required", "waypoint has no <name>; a station needs its code there");
          continue;
        }
        auto [it, inserted] = first_line.emplace(s.code, w.line);
        if (!inserted) {
          error(
              "", "duplicate",
              "station '" + s.code + "' appears twice in this file (first on line " + std::to_string(it->second) + ")");
          continue;
        }
        s.lat = w.lat;
        s.lon = w.lon;
        s.elevation = w.elevation;
        s.source = PositionSource::Gps;
        s.time = w.time;
        s.notes = !w.description.empty() ? w.description : w.comment;
        put_station(p, s, nullptr, "", rep, error);
      } else {
        ContactPoint pt;
        pt.contact = c->meta.uuid;
        pt.lat = w.lat;
        pt.lon = w.lon;
        pt.elevation = w.elevation;
        pt.source = PointSource::Gps;
        pt.time = w.time;
        pt.notes = w.name;
        std::string s = "gpx\n" + format_number(w.lat) + "\n" + format_number(w.lon) + "\n" + opt(w.elevation) + "\n" +
                        w.time + "\n" + w.name + "\n" + contact;
        const std::string key = sha256_hex(s + "\n#" + std::to_string(++digests[s]));
        if (key_exists(p, "points", key)) {
          ++rep.skipped;
          continue;
        }
        try {
          add(p, pt);
          set_import_key(p, "points", pt.meta.uuid, key);
          ++rep.added;
        } catch (const ValidationError& e) {
          error("", e.rule(), e.what());
        }
      }
    }
  });
  return rep;
}

std::string list_csv(Project& p, ImportKind kind) {
  std::ostringstream out;  // the streamed listing (storage/listing.h), held whole
  write_list_csv(p, kind, out);
  return out.str();
}

}  // namespace cairn::store
