#include "storage/repository.h"

#include <algorithm>
#include <cmath>
#include <map>
#include <mutex>

#include "geomath/angles.h"
#include "geomath/notation.h"
#include "geomath/orientation.h"
#include "formats/ids.h"
#include "formats/validate.h"
#include "storage/each.h"
#include "storage/terrain.h"

namespace cairn::store {

using namespace cairn::formats;  // file formats and value rules (formats/)

namespace {

[[noreturn]] void fail(const std::string& field, const Broken& b) { throw ValidationError(field, b.rule, b.message); }
[[noreturn]] void fail(const std::string& field, const std::string& rule, const std::string& msg) {
  throw ValidationError(field, rule, msg);
}
void require(const std::string& field, const Check& c) {
  if (c) fail(field, *c);
}
void require_text(const std::string& field, const std::string& v, const std::string& what) {
  if (v.empty()) fail(field, "required", what + " is empty");
}

bool is_live(Db& db, const std::string& table, const std::string& uuid) {
  Stmt s(db, "SELECT 1 FROM " + table + " WHERE uuid = ? AND deleted IS NULL");
  s.bind(1, uuid);
  return s.step();
}

// True when a live record other than `self` has column = value.
bool taken(Db& db, const std::string& table, const std::string& column, const std::string& value,
           const std::string& self) {
  Stmt s(db, "SELECT 1 FROM " + table + " WHERE " + column + " = ? AND deleted IS NULL AND uuid <> ?");
  s.bind(1, value).bind(2, self);
  return s.step();
}

void require_live(Db& db, const std::string& field, const std::string& table, const std::string& uuid,
                  const std::string& what) {
  if (!is_live(db, table, uuid))
    fail(field, "unknown-" + what, "no " + what + " with UUID '" + uuid + "' in the project");
}

std::string time_field(const std::string& field, const std::string& t) {
  if (t.empty()) return t;
  std::string norm;
  require(field, check_time(t, &norm));
  return norm;
}

void optional_range(const std::string& field, const std::optional<double>& v, Check (*f)(double)) {
  if (v) require(field, f(*v));
}

// ---- per-kind column lists, binding, reading and preparation ------------------

template <class T>
struct Traits;

template <>
struct Traits<Person> {
  static constexpr const char* table = "people";
  static std::vector<const char*> cols() { return {"name", "initials"}; }
  static void bind(Stmt& s, int i, const Person& r) { s.bind(i, r.name).bind(i + 1, r.initials); }
  static void read(const Stmt& s, int i, Person& r) {
    r.name = s.text(i);
    r.initials = s.text(i + 1);
  }
  static void prepare(Project& p, Person& r) {
    require_text("name", r.name, "name");
    require_text("initials", r.initials, "initials");
    if (taken(p.db(), table, "initials", r.initials, r.meta.uuid))
      fail("initials", "duplicate", "a person with initials '" + r.initials + "' already exists");
  }
};

template <>
struct Traits<Unit> {
  static constexpr const char* table = "units";
  static std::vector<const char*> cols() { return {"code", "name", "age_rank", "colour"}; }
  static void bind(Stmt& s, int i, const Unit& r) {
    s.bind(i, r.code).bind(i + 1, r.name).bind(i + 2, r.age_rank).bind(i + 3, r.colour);
  }
  static void read(const Stmt& s, int i, Unit& r) {
    r.code = s.text(i);
    r.name = s.text(i + 1);
    r.age_rank = s.integer(i + 2);
    r.colour = s.text(i + 3);
  }
  static void prepare(Project& p, Unit& r) {
    require_text("code", r.code, "unit code");
    require_text("name", r.name, "unit name");
    require("age_rank", check_age_rank(r.age_rank));
    if (r.colour.empty()) r.colour = default_unit_colour(r.age_rank);
    require("colour", check_colour(r.colour));
    if (taken(p.db(), table, "code", r.code, r.meta.uuid))
      fail("code", "duplicate", "a unit with code '" + r.code + "' already exists");
  }
};

template <>
struct Traits<Contact> {
  static constexpr const char* table = "contacts";
  static std::vector<const char*> cols() { return {"name", "lower_unit", "upper_unit", "type"}; }
  static void bind(Stmt& s, int i, const Contact& r) {
    s.bind(i, r.name).bind(i + 1, r.lower_unit).bind(i + 2, r.upper_unit).bind(i + 3, to_string(r.type));
  }
  static void read(const Stmt& s, int i, Contact& r) {
    r.name = s.text(i);
    r.lower_unit = s.text(i + 1);
    r.upper_unit = s.text(i + 2);
    r.type = parse_contact_type(s.text(i + 3)).value_or(ContactType::Depositional);
  }
  static void prepare(Project& p, Contact& r) {
    require_text("name", r.name, "contact name");
    require_live(p.db(), "lower_unit", "units", r.lower_unit, "unit");
    require_live(p.db(), "upper_unit", "units", r.upper_unit, "unit");
    if (taken(p.db(), table, "name", r.name, r.meta.uuid))
      fail("name", "duplicate", "a contact named '" + r.name + "' already exists");
  }
};

template <>
struct Traits<Station> {
  static constexpr const char* table = "stations";
  static std::vector<const char*> cols() {
    return {"code",   "lat",  "lon",      "elevation", "h_accuracy", "v_accuracy",
            "source", "unit", "observer", "time",      "notes"};
  }
  static void bind(Stmt& s, int i, const Station& r) {
    s.bind(i, r.code).bind(i + 1, r.lat).bind(i + 2, r.lon).bind(i + 3, r.elevation);
    s.bind(i + 4, r.h_accuracy).bind(i + 5, r.v_accuracy).bind(i + 6, to_string(r.source));
    s.bind_text_or_null(i + 7, r.unit).bind_text_or_null(i + 8, r.observer).bind_text_or_null(i + 9, r.time);
    s.bind(i + 10, r.notes);
  }
  static void read(const Stmt& s, int i, Station& r) {
    r.code = s.text(i);
    r.lat = s.real(i + 1);
    r.lon = s.real(i + 2);
    r.elevation = s.opt_real(i + 3);
    r.h_accuracy = s.opt_real(i + 4);
    r.v_accuracy = s.opt_real(i + 5);
    r.source = parse_position_source(s.text(i + 6)).value_or(PositionSource::Gps);
    r.unit = s.text(i + 7);
    r.observer = s.text(i + 8);
    r.time = s.text(i + 9);
    r.notes = s.text(i + 10);
  }
  static void prepare(Project& p, Station& r) {
    require_text("code", r.code, "station code");
    require("lat", check_latitude(r.lat));
    require("lon", check_longitude(r.lon));
    optional_range("elevation", r.elevation, check_elevation);
    if (r.h_accuracy) require("h_accuracy", check_accuracy(*r.h_accuracy, "h_accuracy"));
    if (r.v_accuracy) require("v_accuracy", check_accuracy(*r.v_accuracy, "v_accuracy"));
    if (!r.unit.empty()) require_live(p.db(), "unit", "units", r.unit, "unit");
    if (!r.observer.empty()) require_live(p.db(), "observer", "people", r.observer, "person");
    r.time = time_field("time", r.time);
    if (taken(p.db(), table, "code", r.code, r.meta.uuid))
      fail("code", "duplicate", "a station with code '" + r.code + "' already exists");
  }
};

// Declination of a magnetic reading at its station.
void apply_declination(Project& p, const Station& st, const std::string& time, North north, double& decl,
                       std::string& source) {
  if (north == North::True) {
    decl = 0;
    source.clear();
    return;
  }
  if (source.empty()) {
    const Declination d = p.declination_at(st.lat, st.lon, time.empty() ? st.time : time);
    decl = d.degrees;
    source = d.source;
  }
  if (!std::isfinite(decl) || std::abs(decl) > 180)
    fail("declination", "declination-range", "declination " + format_number(decl) + " is outside -180..180 degrees");
}

template <class T>
std::optional<T> get_one(Project& p, const std::string& where, const std::vector<std::string>& args);

// The live station a reading belongs to, read in one query.
Station live_station(Project& p, const std::string& uuid) {
  auto st = get_one<Station>(p, "uuid = ? AND deleted IS NULL", {uuid});
  if (!st) fail("station", "unknown-station", "no station with UUID '" + uuid + "' in the project");
  return *st;
}

template <>
struct Traits<PlanarReading> {
  static constexpr const char* table = "planes";
  static std::vector<const char*> cols() {
    return {"station",
            "kind",
            "strike",
            "dip",
            "typed",
            "notation",
            "north",
            "measured_strike",
            "measured_dip",
            "declination",
            "declination_source",
            "quality",
            "facing",
            "contact",
            "ref",
            "time",
            "observer",
            "notes",
            "repeat_of"};
  }
  static void bind(Stmt& s, int i, const PlanarReading& r) {
    s.bind(i, r.station).bind(i + 1, to_string(r.kind)).bind(i + 2, r.strike).bind(i + 3, r.dip);
    s.bind(i + 4, r.typed).bind(i + 5, to_string(r.notation)).bind(i + 6, to_string(r.north));
    s.bind(i + 7, r.measured_strike).bind(i + 8, r.measured_dip).bind(i + 9, r.declination);
    s.bind(i + 10, r.declination_source).bind(i + 11, r.quality).bind(i + 12, to_string(r.facing));
    s.bind_text_or_null(i + 13, r.contact).bind_text_or_null(i + 14, r.ref).bind_text_or_null(i + 15, r.time);
    s.bind_text_or_null(i + 16, r.observer).bind(i + 17, r.notes).bind_text_or_null(i + 18, r.repeat_of);
  }
  static void read(const Stmt& s, int i, PlanarReading& r) {
    r.station = s.text(i);
    r.kind = parse_plane_kind(s.text(i + 1)).value_or(PlaneKind::Bedding);
    r.strike = s.real(i + 2);
    r.dip = s.real(i + 3);
    r.typed = s.text(i + 4);
    r.notation = parse_plane_notation(s.text(i + 5)).value_or(PlaneNotation::Text);
    r.north = parse_north(s.text(i + 6)).value_or(North::True);
    r.measured_strike = s.real(i + 7);
    r.measured_dip = s.real(i + 8);
    r.declination = s.real(i + 9);
    r.declination_source = s.text(i + 10);
    r.quality = s.opt_int(i + 11);
    r.facing = parse_facing(s.text(i + 12)).value_or(Facing::Unknown);
    r.contact = s.text(i + 13);
    r.ref = s.text(i + 14);
    r.time = s.text(i + 15);
    r.observer = s.text(i + 16);
    r.notes = s.text(i + 17);
    r.repeat_of = s.text(i + 18);
  }
  static void prepare(Project& p, PlanarReading& r) {
    const Station st = live_station(p, r.station);
    if (!r.typed.empty()) {
      const auto conv = r.notation == PlaneNotation::StrikeDip         ? geo::PlaneConvention::StrikeDipRHR
                        : r.notation == PlaneNotation::DipDirectionDip ? geo::PlaneConvention::DipDirectionDip
                                                                       : geo::PlaneConvention::Unspecified;
      auto pl = geo::parse_plane(r.typed, conv);
      if (!pl) fail("typed", "notation", pl.error());
      r.measured_strike = pl->strike;
      r.measured_dip = pl->dip;
    } else {
      if (!std::isfinite(r.measured_strike) || r.measured_strike < 0 || r.measured_strike > 360)
        fail("measured_strike", "angle", "strike " + format_number(r.measured_strike) + " is outside 0..360");
      if (!std::isfinite(r.measured_dip) || r.measured_dip < 0 || r.measured_dip > 90)
        fail("measured_dip", "angle", "dip " + format_number(r.measured_dip) + " is outside 0..90");
      r.measured_strike = geo::wrap360(r.measured_strike);
      r.typed = geo::format_strike_dip(geo::Plane{r.measured_strike, r.measured_dip});
      r.notation = PlaneNotation::StrikeDip;
    }
    r.time = time_field("time", r.time);
    apply_declination(p, st, r.time, r.north, r.declination, r.declination_source);
    r.strike = geo::wrap360(r.measured_strike + r.declination);
    r.dip = r.measured_dip;
    if (r.quality) require("quality", check_quality(*r.quality));
    if (!r.contact.empty()) require_live(p.db(), "contact", "contacts", r.contact, "contact");
    if (!r.observer.empty()) require_live(p.db(), "observer", "people", r.observer, "person");
    if (!r.repeat_of.empty()) {
      // A repeat measures the same surface again: a live reading of the same kind
      // at the same station, and not itself.
      Stmt s(p.db(), "SELECT station, kind FROM planes WHERE uuid = ? AND deleted IS NULL");
      s.bind(1, r.repeat_of);
      if (!s.step() || r.repeat_of == r.meta.uuid)
        fail("repeat_of", "unknown-reading", "repeat_of names no live planar reading: " + r.repeat_of);
      if (s.text(0) != r.station || s.text(1) != to_string(r.kind))
        fail("repeat_of", "repeat-mismatch",
             "a repeat must be of a " + std::string(to_string(r.kind)) + " reading at station " + st.code);
    }
    if (!r.ref.empty()) {
      Stmt s(p.db(), "SELECT 1 FROM planes WHERE station = ? AND ref = ? AND deleted IS NULL AND uuid <> ?");
      s.bind(1, r.station).bind(2, r.ref).bind(3, r.meta.uuid);
      if (s.step())
        fail("ref", "duplicate", "station " + st.code + " already has a planar reading with ref '" + r.ref + "'");
    }
  }
};

template <>
struct Traits<LinearReading> {
  static constexpr const char* table = "lines";
  static std::vector<const char*> cols() {
    return {"station",
            "kind",
            "trend",
            "plunge",
            "typed",
            "north",
            "measured_trend",
            "measured_plunge",
            "declination",
            "declination_source",
            "host_plane",
            "rake",
            "ref",
            "time",
            "observer",
            "notes"};
  }
  static void bind(Stmt& s, int i, const LinearReading& r) {
    s.bind(i, r.station).bind(i + 1, to_string(r.kind)).bind(i + 2, r.trend).bind(i + 3, r.plunge);
    s.bind(i + 4, r.typed).bind(i + 5, to_string(r.north)).bind(i + 6, r.measured_trend);
    s.bind(i + 7, r.measured_plunge).bind(i + 8, r.declination).bind(i + 9, r.declination_source);
    s.bind_text_or_null(i + 10, r.host_plane).bind(i + 11, r.rake).bind_text_or_null(i + 12, r.ref);
    s.bind_text_or_null(i + 13, r.time).bind_text_or_null(i + 14, r.observer).bind(i + 15, r.notes);
  }
  static void read(const Stmt& s, int i, LinearReading& r) {
    r.station = s.text(i);
    r.kind = parse_line_kind(s.text(i + 1)).value_or(LineKind::Lineation);
    r.trend = s.real(i + 2);
    r.plunge = s.real(i + 3);
    r.typed = s.text(i + 4);
    r.north = parse_north(s.text(i + 5)).value_or(North::True);
    r.measured_trend = s.real(i + 6);
    r.measured_plunge = s.real(i + 7);
    r.declination = s.real(i + 8);
    r.declination_source = s.text(i + 9);
    r.host_plane = s.text(i + 10);
    r.rake = s.opt_real(i + 11);
    r.ref = s.text(i + 12);
    r.time = s.text(i + 13);
    r.observer = s.text(i + 14);
    r.notes = s.text(i + 15);
  }
  static void prepare(Project& p, LinearReading& r) {
    const Station st = live_station(p, r.station);
    r.time = time_field("time", r.time);
    std::optional<PlanarReading> host;
    if (!r.host_plane.empty()) {
      require_live(p.db(), "host_plane", "planes", r.host_plane, "plane");
      host = get_plane(p, r.host_plane);
      if (host->station != r.station) fail("host_plane", "host-station", "the host plane belongs to another station");
    }
    if (r.rake) {
      if (!host) fail("rake", "rake-host", "a rake needs the plane it was measured on (plane_ref)");
      const geo::Plane hp{host->strike, host->dip};
      if (r.typed.empty()) {
        if (!std::isfinite(*r.rake) || *r.rake < 0 || *r.rake > 180)
          fail("rake", "angle", "rake " + format_number(*r.rake) + " is outside 0..180");
        r.typed = format_number(*r.rake);
      }
      auto l = geo::parse_rake(r.typed, hp);
      if (!l) fail("typed", "notation", l.error());
      r.rake = geo::rake_of_line(hp, *l);
      // A rake lies in its (already true-north) host plane: no declination of its own.
      r.north = North::True;
      r.declination = 0;
      r.declination_source.clear();
      r.trend = r.measured_trend = l->trend;
      r.plunge = r.measured_plunge = l->plunge;
    } else {
      if (!r.typed.empty()) {
        auto l = geo::parse_line(r.typed);
        if (!l) fail("typed", "notation", l.error());
        r.measured_trend = l->trend;
        r.measured_plunge = l->plunge;
      } else {
        if (!std::isfinite(r.measured_trend) || r.measured_trend < 0 || r.measured_trend > 360)
          fail("measured_trend", "angle", "trend " + format_number(r.measured_trend) + " is outside 0..360");
        if (!std::isfinite(r.measured_plunge) || r.measured_plunge < 0 || r.measured_plunge > 90)
          fail("measured_plunge", "angle", "plunge " + format_number(r.measured_plunge) + " is outside 0..90");
        r.measured_trend = geo::wrap360(r.measured_trend);
        r.typed = geo::format_trend_plunge(geo::Line{r.measured_trend, r.measured_plunge});
      }
      apply_declination(p, st, r.time, r.north, r.declination, r.declination_source);
      r.trend = geo::wrap360(r.measured_trend + r.declination);
      r.plunge = r.measured_plunge;
    }
    if (!r.observer.empty()) require_live(p.db(), "observer", "people", r.observer, "person");
    if (!r.ref.empty()) {
      Stmt s(p.db(), "SELECT 1 FROM lines WHERE station = ? AND ref = ? AND deleted IS NULL AND uuid <> ?");
      s.bind(1, r.station).bind(2, r.ref).bind(3, r.meta.uuid);
      if (s.step())
        fail("ref", "duplicate", "station " + st.code + " already has a linear reading with ref '" + r.ref + "'");
    }
  }
};

template <>
struct Traits<ContactPoint> {
  static constexpr const char* table = "points";
  static std::vector<const char*> cols() {
    return {"contact", "lat", "lon", "elevation", "h_accuracy", "v_accuracy", "source", "time", "observer", "notes"};
  }
  static void bind(Stmt& s, int i, const ContactPoint& r) {
    s.bind(i, r.contact).bind(i + 1, r.lat).bind(i + 2, r.lon).bind(i + 3, r.elevation);
    s.bind(i + 4, r.h_accuracy).bind(i + 5, r.v_accuracy).bind(i + 6, to_string(r.source));
    s.bind_text_or_null(i + 7, r.time).bind_text_or_null(i + 8, r.observer).bind(i + 9, r.notes);
  }
  static void read(const Stmt& s, int i, ContactPoint& r) {
    r.contact = s.text(i);
    r.lat = s.real(i + 1);
    r.lon = s.real(i + 2);
    r.elevation = s.opt_real(i + 3);
    r.h_accuracy = s.opt_real(i + 4);
    r.v_accuracy = s.opt_real(i + 5);
    r.source = parse_point_source(s.text(i + 6)).value_or(PointSource::Gps);
    r.time = s.text(i + 7);
    r.observer = s.text(i + 8);
    r.notes = s.text(i + 9);
  }
  static void prepare(Project& p, ContactPoint& r) {
    require_live(p.db(), "contact", "contacts", r.contact, "contact");
    require("lat", check_latitude(r.lat));
    require("lon", check_longitude(r.lon));
    optional_range("elevation", r.elevation, check_elevation);
    if (r.h_accuracy) require("h_accuracy", check_accuracy(*r.h_accuracy, "h_accuracy"));
    if (r.v_accuracy) require("v_accuracy", check_accuracy(*r.v_accuracy, "v_accuracy"));
    r.time = time_field("time", r.time);
    if (!r.observer.empty()) require_live(p.db(), "observer", "people", r.observer, "person");
  }
};

template <>
struct Traits<Photo> {
  static constexpr const char* table = "photos";
  static std::vector<const char*> cols() { return {"station", "path", "sha256", "caption", "time"}; }
  static void bind(Stmt& s, int i, const Photo& r) {
    s.bind_text_or_null(i, r.station).bind(i + 1, r.path).bind(i + 2, r.sha256).bind(i + 3, r.caption);
    s.bind_text_or_null(i + 4, r.time);
  }
  static void read(const Stmt& s, int i, Photo& r) {
    r.station = s.text(i);
    r.path = s.text(i + 1);
    r.sha256 = s.text(i + 2);
    r.caption = s.text(i + 3);
    r.time = s.text(i + 4);
  }
  static void prepare(Project& p, Photo& r) {
    if (!r.station.empty()) require_live(p.db(), "station", "stations", r.station, "station");
    require_text("path", r.path, "photo path");
    require("sha256", check_sha256(r.sha256));
    r.time = time_field("time", r.time);
  }
};

// ---- generic machinery -------------------------------------------------------

template <class T>
std::string select_sql() {
  std::string sql = "SELECT uuid";
  for (const char* c : Traits<T>::cols()) sql += std::string(", ") + c;
  return sql + ", created, updated, device, deleted FROM " + Traits<T>::table;
}

template <class T>
T read_row(const Stmt& s) {
  T r;
  r.meta.uuid = s.text(0);
  Traits<T>::read(s, 1, r);
  const int m = static_cast<int>(Traits<T>::cols().size()) + 1;
  r.meta.created = s.text(m);
  r.meta.updated = s.text(m + 1);
  r.meta.device = s.text(m + 2);
  r.meta.deleted = s.opt_text(m + 3);
  return r;
}

// Each record that matches, one at a time, stepped from one prepared statement.
template <class T, class F>
void each_row(Project& p, const std::string& where, const std::vector<std::string>& args, const std::string& order,
              F&& f) {
  Stmt s(p.db(), select_sql<T>() + (where.empty() ? "" : " WHERE " + where) + " ORDER BY " + order);
  for (size_t i = 0; i < args.size(); ++i) s.bind(static_cast<int>(i) + 1, args[i]);
  while (s.step()) f(read_row<T>(s));
}

template <class T>
std::vector<T> query(Project& p, const std::string& where, const std::vector<std::string>& args,
                     const std::string& order = "created, rowid") {
  std::vector<T> out;
  each_row<T>(p, where, args, order, [&](T&& r) { out.push_back(std::move(r)); });
  return out;
}

template <class T>
std::optional<T> get_one(Project& p, const std::string& where, const std::vector<std::string>& args) {
  auto v = query<T>(p, where, args);
  if (v.empty()) return std::nullopt;
  return v.front();
}

// The arguments of json_object for every column of TABLE ('name', "name", ...),
// read from the schema once per connection and schema version: an import
// writes an audit row per record, and reading pragma_table_info each time was
// a tenth of its time. SQLite bumps PRAGMA schema_version on every change of
// the schema, so a changed table is read again.
std::string json_columns(Db& db, const std::string& table) {
  static std::mutex lock;
  static std::map<std::pair<const sqlite3*, std::string>, std::pair<int64_t, std::string>> known;
  int64_t version = 0;
  {
    Stmt v(db, "PRAGMA schema_version");
    if (v.step()) version = v.int64(0);
  }
  const auto key = std::make_pair(static_cast<const sqlite3*>(db.handle()), table);
  {
    std::lock_guard<std::mutex> hold(lock);
    auto it = known.find(key);
    if (it != known.end() && it->second.first == version) return it->second.second;
  }
  std::string expr;
  {
    Stmt info(db, "SELECT name FROM pragma_table_info(?)");
    info.bind(1, table);
    while (info.step()) {
      const std::string c = info.text(0);
      expr += (expr.empty() ? "" : ", ") + std::string("'") + c + "', \"" + c + "\"";
    }
  }
  std::lock_guard<std::mutex> hold(lock);
  known[key] = {version, expr};
  return expr;
}

// The JSON object of a whole row (every column), made by SQLite's json_object
// (SQLite documentation, "JSON Functions"). Column names come from the schema.
std::string row_json(Db& db, const std::string& table, const std::string& uuid) {
  Stmt s(db, "SELECT json_object(" + json_columns(db, table) + ") FROM " + table + " WHERE uuid = ?");
  s.bind(1, uuid);
  return s.step() ? s.text(0) : std::string();
}

void write_audit(Project& p, const std::string& table, const std::string& record, const std::string& action,
                 const std::string& old_values, const std::string& new_values, const std::string& at) {
  Stmt s(p.db(),
         "INSERT INTO audit(uuid, at, device, person, tbl, record, action, old_values, new_values) "
         "VALUES (?,?,?,?,?,?,?,?,?)");
  s.bind(1, new_uuid()).bind(2, at).bind(3, p.device()).bind_text_or_null(4, p.person());
  s.bind(5, table).bind(6, record).bind(7, action);
  s.bind_text_or_null(8, old_values).bind_text_or_null(9, new_values);
  s.run();
}

// A unique-index violation (two live records with one key) as a ValidationError.
[[noreturn]] void rethrow_constraint(const SqlError& e, const std::string& table) {
  if ((e.code() & 0xff) == 19 /* SQLITE_CONSTRAINT */)
    fail("uuid", "constraint", "the " + table + " record breaks a rule of the file: " + e.what());
  throw e;
}

template <class T>
std::string add_impl(Project& p, T& r) {
  const std::string table = Traits<T>::table;
  p.write([&] {
    // A UUID made here is new (random, 122 bits); one given by the caller is checked.
    const bool fresh = r.meta.uuid.empty();
    if (fresh) r.meta.uuid = new_uuid();
    if (!is_uuid(r.meta.uuid)) fail("uuid", "uuid", "'" + r.meta.uuid + "' is not a UUID");
    if (!fresh) {
      Stmt s(p.db(), "SELECT 1 FROM " + table + " WHERE uuid = ?");
      s.bind(1, r.meta.uuid);
      if (s.step()) fail("uuid", "duplicate", "a record with UUID " + r.meta.uuid + " already exists");
    }
    Traits<T>::prepare(p, r);
    const std::string now = utc_now();
    if (r.meta.created.empty()) r.meta.created = now;
    if (r.meta.updated.empty()) r.meta.updated = r.meta.created;
    if (r.meta.device.empty()) r.meta.device = p.device();
    const auto cols = Traits<T>::cols();
    std::string sql = "INSERT INTO " + table + "(uuid";
    std::string qs = "?";
    for (const char* c : cols) {
      sql += std::string(", ") + c;
      qs += ",?";
    }
    sql += ", created, updated, device, deleted) VALUES (" + qs + ",?,?,?,?)";
    Stmt s(p.db(), sql);
    s.bind(1, r.meta.uuid);
    Traits<T>::bind(s, 2, r);
    const int m = static_cast<int>(cols.size()) + 2;
    s.bind(m, r.meta.created).bind(m + 1, r.meta.updated).bind(m + 2, r.meta.device).bind(m + 3, r.meta.deleted);
    try {
      s.run();
    } catch (const SqlError& e) {
      rethrow_constraint(e, table);
    }
    write_audit(p, table, r.meta.uuid, "insert", "", row_json(p.db(), table, r.meta.uuid), now);
  });
  return r.meta.uuid;
}

template <class T>
bool update_impl(Project& p, T& r) {
  const std::string table = Traits<T>::table;
  bool changed = false;
  p.write([&] {
    if (!is_live(p.db(), table, r.meta.uuid))
      fail("uuid", "unknown-record", "no live " + table + " record with UUID '" + r.meta.uuid + "'");
    Traits<T>::prepare(p, r);
    const std::string before = row_json(p.db(), table, r.meta.uuid);
    const auto cols = Traits<T>::cols();
    std::string sql = "UPDATE " + table + " SET ";
    for (size_t i = 0; i < cols.size(); ++i) sql += std::string(i ? ", " : "") + cols[i] + " = ?";
    sql += " WHERE uuid = ?";
    {
      Stmt s(p.db(), sql);
      Traits<T>::bind(s, 1, r);
      s.bind(static_cast<int>(cols.size()) + 1, r.meta.uuid);
      try {
        s.run();
      } catch (const SqlError& e) {
        rethrow_constraint(e, table);
      }
    }
    if (row_json(p.db(), table, r.meta.uuid) == before) return;  // nothing changed: no new version
    const std::string now = utc_now();
    Stmt s(p.db(), "UPDATE " + table + " SET updated = ?, device = ? WHERE uuid = ?");
    s.bind(1, now).bind(2, p.device()).bind(3, r.meta.uuid);
    s.run();
    r.meta.updated = now;
    r.meta.device = p.device();
    write_audit(p, table, r.meta.uuid, "update", before, row_json(p.db(), table, r.meta.uuid), now);
    changed = true;
  });
  return changed;
}

struct Ref {
  const char* table;
  const char* column;
};

// Who points at a record of each table (children), and what each table points at (parents).
std::vector<Ref> children_of(const std::string& t) {
  if (t == "units") return {{"contacts", "lower_unit"}, {"contacts", "upper_unit"}, {"stations", "unit"}};
  if (t == "contacts") return {{"planes", "contact"}, {"points", "contact"}};
  if (t == "stations") return {{"planes", "station"}, {"lines", "station"}, {"photos", "station"}};
  if (t == "planes") return {{"lines", "host_plane"}};
  if (t == "people")
    return {{"stations", "observer"}, {"planes", "observer"}, {"lines", "observer"}, {"points", "observer"}};
  return {};
}
std::vector<Ref> parents_of(const std::string& t) {  // {parent table, column in t}
  if (t == "contacts") return {{"units", "lower_unit"}, {"units", "upper_unit"}};
  if (t == "stations") return {{"units", "unit"}, {"people", "observer"}};
  if (t == "planes") return {{"stations", "station"}, {"contacts", "contact"}, {"people", "observer"}};
  if (t == "lines") return {{"stations", "station"}, {"planes", "host_plane"}, {"people", "observer"}};
  if (t == "points") return {{"contacts", "contact"}, {"people", "observer"}};
  if (t == "photos") return {{"stations", "station"}};
  return {};
}
// The natural key that must stay unique among live records.
const char* key_of(const std::string& t) {
  if (t == "people") return "initials";
  if (t == "units") return "code";
  if (t == "contacts") return "name";
  if (t == "stations") return "code";
  return nullptr;
}

void set_deleted(Project& p, Kind kind, const std::string& uuid, bool del) {
  const std::string table = table_of(kind);
  p.write([&] {
    std::optional<std::string> deleted;
    {
      Stmt s(p.db(), "SELECT deleted FROM " + table + " WHERE uuid = ?");
      s.bind(1, uuid);
      if (!s.step()) fail("uuid", "unknown-record", "no " + table + " record with UUID '" + uuid + "'");
      deleted = s.opt_text(0);
    }
    if (del && deleted) fail("uuid", "already-deleted", "the " + table + " record " + uuid + " is already deleted");
    if (!del && !deleted) fail("uuid", "not-deleted", "the " + table + " record " + uuid + " is not deleted");
    if (del) {
      for (const Ref& c : children_of(table)) {
        Stmt s(p.db(),
               std::string("SELECT count(*) FROM ") + c.table + " WHERE " + c.column + " = ? AND deleted IS NULL");
        s.bind(1, uuid);
        s.step();
        if (s.int64(0) > 0)
          fail("uuid", "in-use",
               "the " + table + " record is still used by " + std::to_string(s.int64(0)) + " live " + c.table +
                   " record(s); delete those first");
      }
    } else {
      for (const Ref& r : parents_of(table)) {
        Stmt s(p.db(), std::string("SELECT x.uuid FROM ") + r.table + " x JOIN " + table + " t ON t." + r.column +
                           " = x.uuid WHERE t.uuid = ? AND x.deleted IS NOT NULL");
        s.bind(1, uuid);
        if (s.step())
          fail("uuid", "parent-deleted",
               "the " + table + " record points at a deleted " + r.table + " record (" + s.text(0) +
                   "); restore that first");
      }
      if (const char* key = key_of(table)) {
        Stmt s(p.db(), "SELECT t." + std::string(key) + " FROM " + table + " t JOIN " + table + " o ON o." + key +
                           " = t." + key + " AND o.deleted IS NULL AND o.uuid <> t.uuid WHERE t.uuid = ?");
        s.bind(1, uuid);
        if (s.step())
          fail(key, "duplicate",
               "a live " + table + " record already has " + key + " '" + s.text(0) + "'; rename one before restoring");
      }
    }
    const std::string before = row_json(p.db(), table, uuid);
    const std::string now = utc_now();
    Stmt s(p.db(), "UPDATE " + table + " SET deleted = ?, updated = ?, device = ? WHERE uuid = ?");
    if (del)
      s.bind(1, now);
    else
      s.bind(1, nullptr);
    s.bind(2, now).bind(3, p.device()).bind(4, uuid);
    try {
      s.run();
    } catch (const SqlError& e) {
      rethrow_constraint(e, table);
    }
    write_audit(p, table, uuid, del ? "delete" : "restore", before, row_json(p.db(), table, uuid), now);
  });
}

std::string live_clause(const ListOptions& o, std::vector<std::string>& args, const char* filter_col,
                        const std::string& filter) {
  std::string w = o.include_deleted ? "" : "deleted IS NULL";
  if (filter_col && !filter.empty()) {
    w += (w.empty() ? "" : " AND ") + std::string(filter_col) + " = ?";
    args.push_back(filter);
  }
  return w;
}

template <class T>
std::vector<T> list_kind(Project& p, const ListOptions& o, const char* filter_col = nullptr,
                         const std::string& filter = "", const std::string& order = "created, rowid") {
  std::vector<std::string> args;
  const std::string w = live_clause(o, args, filter_col, filter);
  return query<T>(p, w, args, order);
}

AuditEntry read_audit(const Stmt& s) {
  AuditEntry a;
  a.uuid = s.text(0);
  a.at = s.text(1);
  a.device = s.text(2);
  a.person = s.text(3);
  a.table = s.text(4);
  a.record = s.text(5);
  a.action = s.text(6);
  a.old_values = s.text(7);
  a.new_values = s.text(8);
  return a;
}

const char* const kAuditSelect =
    "SELECT uuid, at, device, person, tbl, record, action, old_values, new_values FROM audit";

}  // namespace

std::string table_of(Kind k) {
  switch (k) {
    case Kind::Device: return "devices";
    case Kind::Person: return "people";
    case Kind::Unit: return "units";
    case Kind::Contact: return "contacts";
    case Kind::Station: return "stations";
    case Kind::Plane: return "planes";
    case Kind::Line: return "lines";
    case Kind::Point: return "points";
    case Kind::Photo: return "photos";
  }
  return "";
}

std::optional<Kind> kind_of_table(const std::string& t) {
  for (Kind k : {Kind::Device, Kind::Person, Kind::Unit, Kind::Contact, Kind::Station, Kind::Plane, Kind::Line,
                 Kind::Point, Kind::Photo})
    if (table_of(k) == t) return k;
  return std::nullopt;
}

std::string add(Project& p, Person& r) { return add_impl(p, r); }
std::string add(Project& p, Unit& r) { return add_impl(p, r); }
std::string add(Project& p, Contact& r) { return add_impl(p, r); }
// A station or point recorded without an elevation takes the terrain's (storage/terrain.h).
std::string add(Project& p, Station& r) {
  elevation_from_terrain(p, r);
  return add_impl(p, r);
}
std::string add(Project& p, PlanarReading& r) { return add_impl(p, r); }
std::string add(Project& p, LinearReading& r) { return add_impl(p, r); }
std::string add(Project& p, ContactPoint& r) {
  elevation_from_terrain(p, r);
  return add_impl(p, r);
}
std::string add(Project& p, Photo& r) { return add_impl(p, r); }

bool update(Project& p, Person& r) { return update_impl(p, r); }
bool update(Project& p, Unit& r) { return update_impl(p, r); }
bool update(Project& p, Contact& r) { return update_impl(p, r); }
bool update(Project& p, Station& r) { return update_impl(p, r); }
bool update(Project& p, PlanarReading& r) { return update_impl(p, r); }
bool update(Project& p, LinearReading& r) { return update_impl(p, r); }
bool update(Project& p, ContactPoint& r) { return update_impl(p, r); }
bool update(Project& p, Photo& r) { return update_impl(p, r); }

void soft_delete(Project& p, Kind kind, const std::string& uuid) { set_deleted(p, kind, uuid, true); }
void restore(Project& p, Kind kind, const std::string& uuid) { set_deleted(p, kind, uuid, false); }

std::vector<Device> list_devices(Project& p) {
  Stmt s(p.db(), "SELECT uuid, name, created, updated, device, deleted FROM devices ORDER BY created, uuid");
  std::vector<Device> out;
  while (s.step()) {
    Device d;
    d.meta.uuid = s.text(0);
    d.name = s.text(1);
    d.meta.created = s.text(2);
    d.meta.updated = s.text(3);
    d.meta.device = s.text(4);
    d.meta.deleted = s.opt_text(5);
    out.push_back(d);
  }
  return out;
}

std::vector<Person> list_people(Project& p, const ListOptions& o) { return list_kind<Person>(p, o); }
std::vector<Unit> list_units(Project& p, const ListOptions& o) {
  return list_kind<Unit>(p, o, nullptr, "", "age_rank, code, uuid");
}
std::vector<Contact> list_contacts(Project& p, const ListOptions& o) { return list_kind<Contact>(p, o); }
std::vector<Station> list_stations(Project& p, const ListOptions& o) { return list_kind<Station>(p, o); }
std::vector<PlanarReading> list_planes(Project& p, const ListOptions& o) {
  return list_kind<PlanarReading>(p, o, "station", o.station);
}
std::vector<LinearReading> list_lines(Project& p, const ListOptions& o) {
  return list_kind<LinearReading>(p, o, "station", o.station);
}
std::vector<ContactPoint> list_points(Project& p, const ListOptions& o) {
  return list_kind<ContactPoint>(p, o, "contact", o.contact);
}
std::vector<Photo> list_photos(Project& p, const ListOptions& o) {
  return list_kind<Photo>(p, o, "station", o.station);
}

// ---- one at a time (storage/each.h) ----------------------------------------

template <class T>
void each_kind(Project& p, const ListOptions& o, const char* filter_col, const std::string& filter,
               const std::function<void(const T&)>& f, const std::string& order = "created, rowid") {
  std::vector<std::string> args;
  const std::string w = live_clause(o, args, filter_col, filter);
  each_row<T>(p, w, args, order, [&](const T& r) { f(r); });
}

template <class T>
size_t count_kind(Project& p, const ListOptions& o, const char* filter_col = nullptr, const std::string& filter = "") {
  std::vector<std::string> args;
  const std::string w = live_clause(o, args, filter_col, filter);
  Stmt s(p.db(), std::string("SELECT count(*) FROM ") + Traits<T>::table + (w.empty() ? "" : " WHERE " + w));
  for (size_t i = 0; i < args.size(); ++i) s.bind(static_cast<int>(i) + 1, args[i]);
  return s.step() ? static_cast<size_t>(s.int64(0)) : 0;
}

void for_each_station(Project& p, const ListOptions& o, const std::function<void(const Station&)>& f, Ties ties) {
  each_kind<Station>(p, o, nullptr, "", f, ties == Ties::Uuid ? "created, uuid" : "created, rowid");
}
void for_each_plane(Project& p, const ListOptions& o, const std::function<void(const PlanarReading&)>& f) {
  each_kind<PlanarReading>(p, o, "station", o.station, f);
}
void for_each_line(Project& p, const ListOptions& o, const std::function<void(const LinearReading&)>& f) {
  each_kind<LinearReading>(p, o, "station", o.station, f);
}
void for_each_point(Project& p, const ListOptions& o, const std::function<void(const ContactPoint&)>& f) {
  each_kind<ContactPoint>(p, o, "contact", o.contact, f);
}
void for_each_photo(Project& p, const ListOptions& o, const std::function<void(const Photo&)>& f) {
  each_kind<Photo>(p, o, "station", o.station, f);
}
size_t count_stations(Project& p, const ListOptions& o) { return count_kind<Station>(p, o); }
size_t count_planes(Project& p, const ListOptions& o) { return count_kind<PlanarReading>(p, o, "station", o.station); }
size_t count_lines(Project& p, const ListOptions& o) { return count_kind<LinearReading>(p, o, "station", o.station); }
size_t count_points(Project& p, const ListOptions& o) { return count_kind<ContactPoint>(p, o, "contact", o.contact); }

std::unordered_map<std::string, size_t> readings_per_station(Project& p) {
  std::unordered_map<std::string, size_t> n;
  for (const char* table : {Traits<PlanarReading>::table, Traits<LinearReading>::table}) {
    Stmt s(p.db(), std::string("SELECT station, count(*) FROM ") + table + " WHERE deleted IS NULL GROUP BY station");
    while (s.step()) n[s.text(0)] += static_cast<size_t>(s.int64(1));
  }
  return n;
}

std::optional<Person> get_person(Project& p, const std::string& u) { return get_one<Person>(p, "uuid = ?", {u}); }
std::optional<Unit> get_unit(Project& p, const std::string& u) { return get_one<Unit>(p, "uuid = ?", {u}); }
std::optional<Contact> get_contact(Project& p, const std::string& u) { return get_one<Contact>(p, "uuid = ?", {u}); }
std::optional<Station> get_station(Project& p, const std::string& u) { return get_one<Station>(p, "uuid = ?", {u}); }
std::optional<PlanarReading> get_plane(Project& p, const std::string& u) {
  return get_one<PlanarReading>(p, "uuid = ?", {u});
}
std::optional<LinearReading> get_line(Project& p, const std::string& u) {
  return get_one<LinearReading>(p, "uuid = ?", {u});
}
std::optional<ContactPoint> get_point(Project& p, const std::string& u) {
  return get_one<ContactPoint>(p, "uuid = ?", {u});
}
std::optional<Photo> get_photo(Project& p, const std::string& u) { return get_one<Photo>(p, "uuid = ?", {u}); }

std::optional<Person> find_person(Project& p, const std::string& initials) {
  return get_one<Person>(p, "initials = ? AND deleted IS NULL", {initials});
}
std::optional<Unit> find_unit(Project& p, const std::string& code) {
  return get_one<Unit>(p, "code = ? AND deleted IS NULL", {code});
}
std::optional<Contact> find_contact(Project& p, const std::string& name) {
  return get_one<Contact>(p, "name = ? AND deleted IS NULL", {name});
}
std::optional<Station> find_station(Project& p, const std::string& code) {
  return get_one<Station>(p, "code = ? AND deleted IS NULL", {code});
}
std::optional<PlanarReading> find_plane_by_ref(Project& p, const std::string& station, const std::string& ref) {
  return get_one<PlanarReading>(p, "station = ? AND ref = ? AND deleted IS NULL", {station, ref});
}

std::vector<AuditEntry> audit_trail(Project& p, const std::string& record) {
  Stmt s(p.db(), std::string(kAuditSelect) + " WHERE record = ? ORDER BY at, rowid");
  s.bind(1, record);
  std::vector<AuditEntry> out;
  while (s.step()) out.push_back(read_audit(s));
  return out;
}

std::vector<AuditEntry> audit_log(Project& p, const AuditQuery& q) {
  std::string sql = std::string(kAuditSelect) + " WHERE 1";
  std::vector<std::string> args;
  if (!q.since.empty()) {
    sql += " AND at >= ?";
    args.push_back(q.since);
  }
  if (!q.device.empty()) {
    sql += " AND device = ?";
    args.push_back(q.device);
  }
  if (!q.table.empty()) {
    sql += " AND tbl = ?";
    args.push_back(q.table);
  }
  sql += " ORDER BY at DESC, rowid DESC";
  if (q.limit > 0) sql += " LIMIT " + std::to_string(q.limit);
  Stmt s(p.db(), sql);
  for (size_t i = 0; i < args.size(); ++i) s.bind(static_cast<int>(i) + 1, args[i]);
  std::vector<AuditEntry> out;
  while (s.step()) out.push_back(read_audit(s));
  std::reverse(out.begin(), out.end());
  return out;
}

void undo(Project& p, const AuditEntry& e) {
  const auto kind = kind_of_table(e.table);
  if (!kind) fail("table", "unknown-table", "no record table '" + e.table + "'");
  if (e.action == "insert" || e.action == "restore") {
    soft_delete(p, *kind, e.record);
  } else if (e.action == "delete") {
    restore(p, *kind, e.record);
  } else if (e.action == "update") {
    // Write back every data column from the old values (json_extract keeps
    // SQLite's types: SQLite documentation, "JSON Functions").
    p.write([&] {
      if (!is_live(p.db(), e.table, e.record))
        fail("uuid", "unknown-record", "no live " + e.table + " record with UUID '" + e.record + "'");
      std::string set;
      {
        Stmt info(p.db(), "SELECT name FROM pragma_table_info(?)");
        info.bind(1, e.table);
        while (info.step()) {
          const std::string c = info.text(0);
          if (c == "uuid" || c == "created" || c == "updated" || c == "device" || c == "deleted") continue;
          set += (set.empty() ? "" : ", ") + std::string("\"") + c + "\" = json_extract(?1, '$.\"" + c + "\"')";
        }
      }
      const std::string before = row_json(p.db(), e.table, e.record);
      const std::string now = utc_now();
      Stmt s(p.db(), "UPDATE " + e.table + " SET " + set + ", updated = ?2, device = ?3 WHERE uuid = ?4");
      s.bind(1, e.old_values).bind(2, now).bind(3, p.device()).bind(4, e.record);
      try {
        s.run();
      } catch (const SqlError& err) {
        rethrow_constraint(err, e.table);
      }
      write_audit(p, e.table, e.record, "update", before, row_json(p.db(), e.table, e.record), now);
    });
  }
}

std::optional<AuditEntry> undo_last(Project& p) {
  AuditQuery q;
  q.device = p.device();
  q.limit = 1;
  auto v = audit_log(p, q);
  if (v.empty()) return std::nullopt;
  undo(p, v.back());
  return v.back();
}

}  // namespace cairn::store
