#include "app/survey/survey.h"
#include "app/core/export_layers.h"
#include "formats/layers.h"

#include <sqlite3.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <set>
#include <stdexcept>
#include <unordered_map>

#include "app/core/export_layers.h"
#include "formats/ids.h"
#include "formats/iso8601.h"
#include "storage/reviews.h"
#include "storage/schema.h"
#include "storage/sqlite.h"
#include "app/survey/pg.h"
#include "geomath/decimal.h"

namespace fs = std::filesystem;

namespace cairn::store::survey {

using namespace cairn::core;     // the check and the export layers (app/core)
using namespace cairn::formats;  // layers as plain data, ids (formats/)

namespace {

using pg::Conn;
using Fields = std::vector<std::optional<std::string>>;

// ---- scratch folder --------------------------------------------------------------

class Scratch {
 public:
  Scratch() {
    std::string tmpl = (fs::temp_directory_path() / "cairn-survey-XXXXXX").string();
    if (!mkdtemp(tmpl.data())) throw std::runtime_error("cannot make a temporary folder");
    path_ = tmpl;
  }
  ~Scratch() {
    std::error_code ec;
    fs::remove_all(path_, ec);
  }
  std::string file(const std::string& name) const { return (path_ / name).string(); }

 private:
  fs::path path_;
};

OpenOptions scratch_options(const Scratch& s, const std::string& device = "", const std::string& device_name = "") {
  OpenOptions o;
  o.backups = false;
  o.backup_dir = s.file("backups");
  o.device_id = device;
  o.device_name = device_name;
  return o;
}

// ---- the tables of a project file ------------------------------------------------------

// Column types: 'i' INTEGER, 'r' REAL, 't' TEXT affinity, 'a' no declared type
// (SQLite documentation, "Datatypes In SQLite", section 3.1).
struct Col {
  std::string name;
  char type;
  bool notnull;
  std::string dflt;  // default as SQL text ("" none)
};

struct TableDef {
  std::string name;
  std::vector<Col> cols;
  std::vector<int> pk;  // column indexes
  struct Fk {
    std::string from, table, to, on_delete;
  };
  std::vector<Fk> fks;
  struct Unique {
    std::vector<std::string> cols;
    std::string where;
  };
  std::vector<Unique> uniques;

  int col(const std::string& n) const {
    for (size_t i = 0; i < cols.size(); ++i)
      if (cols[i].name == n) return static_cast<int>(i);
    return -1;
  }
};

std::string q(const std::string& ident) { return "\"" + ident + "\""; }

char type_of(std::string t) {
  for (auto& ch : t) ch = static_cast<char>(std::toupper(static_cast<unsigned char>(ch)));
  if (t.empty()) return 'a';
  if (t.find("INT") != std::string::npos) return 'i';
  if (t.find("CHAR") != std::string::npos || t.find("CLOB") != std::string::npos || t.find("TEXT") != std::string::npos)
    return 't';
  return 'r';
}

// Tables in the order their references need (parents first).
const char* const kOrder[] = {"devices",         "people",      "units",        "contacts",    "stations", "planes",
                              "lines",           "points",      "photos",       "audit",       "merges",   "conflicts",
                              "conflict_values", "key_clashes", "flag_reviews", "day_signoffs"};

std::vector<TableDef> read_tables(Db& db) {
  std::vector<std::string> names;
  {
    // The terrain (a raster in compressed tiles) stays in the project files: a
    // GIS reads elevation models from its own raster store, not from rows.
    Stmt s(db,
           "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' AND name <> 'project' "
           "AND name NOT IN ('terrain', 'terrain_tiles')");
    while (s.step()) names.push_back(s.text(0));
  }
  auto rank = [](const std::string& n) {
    for (size_t i = 0; i < std::size(kOrder); ++i)
      if (n == kOrder[i]) return static_cast<int>(i);
    return 1000;
  };
  std::sort(names.begin(), names.end(), [&](const std::string& a, const std::string& b) {
    return std::make_pair(rank(a), a) < std::make_pair(rank(b), b);
  });
  std::vector<TableDef> out;
  for (const auto& n : names) {
    TableDef t;
    t.name = n;
    std::vector<std::pair<int, int>> pk;
    Stmt s(db, "SELECT name, type, \"notnull\", pk, dflt_value FROM pragma_table_info(?) ORDER BY cid");
    s.bind(1, n);
    while (s.step()) {
      // Defaults of the project schema are literals ('' or a number), valid SQL in both.
      t.cols.push_back({s.text(0), type_of(s.text(1)), s.int64(2) != 0, s.text(4)});
      if (s.int64(3) > 0) pk.emplace_back(static_cast<int>(s.int64(3)), static_cast<int>(t.cols.size() - 1));
    }
    std::sort(pk.begin(), pk.end());
    for (const auto& [order, idx] : pk) t.pk.push_back(idx);
    if (t.pk.empty()) continue;  // every table of a project file has a key; skip anything else
    Stmt f(db, "SELECT \"from\", \"table\", \"to\", on_delete FROM pragma_foreign_key_list(?)");
    f.bind(1, n);
    while (f.step()) t.fks.push_back({f.text(0), f.text(1), f.text(2).empty() ? "uuid" : f.text(2), f.text(3)});
    Stmt u(db,
           "SELECT name, sql FROM sqlite_master WHERE type = 'index' AND tbl_name = ? AND sql LIKE 'CREATE UNIQUE%'");
    u.bind(1, n);
    while (u.step()) {
      TableDef::Unique un;
      const std::string sql = u.text(1);
      const size_t w = sql.find(" WHERE ");
      if (w != std::string::npos) un.where = sql.substr(w + 7);
      Stmt c(db, "SELECT name FROM pragma_index_info(?) ORDER BY seqno");
      c.bind(1, u.text(0));
      while (c.step()) un.cols.push_back(c.text(0));
      t.uniques.push_back(un);
    }
    out.push_back(std::move(t));
  }
  return out;
}

// The store's columns of a table: every column, and COLUMN_kind after an untyped one.
std::vector<std::string> store_columns(const TableDef& t) {
  std::vector<std::string> c;
  for (const auto& col : t.cols) {
    c.push_back(col.name);
    if (col.type == 'a') c.push_back(col.name + "_kind");
  }
  return c;
}

std::string joined(const std::vector<std::string>& v, const std::string& prefix = "") {
  std::string s;
  for (const auto& x : v) s += (s.empty() ? "" : ", ") + prefix + q(x);
  return s;
}

// A freshly made project file with every table this build writes.
struct Template {
  Scratch dir;
  std::optional<Project> p;
  std::vector<TableDef> tables;
  std::vector<Col> project_cols;  // settings columns of the project row
  Template() {
    NewProject np;
    np.name = "template";
    p.emplace(Project::create(dir.file("template.cairn"), np, scratch_options(dir)));
    p->write([&] { ensure_review_tables(*p); });
    tables = read_tables(p->db());
    Stmt s(p->db(), "SELECT name, type FROM pragma_table_info('project') ORDER BY cid");
    while (s.step()) {
      const std::string n = s.text(0);
      if (n == "id" || n == "file_uuid" || n == "name" || n == "local_device" || n == "created" || n == "updated")
        continue;
      project_cols.push_back({n, type_of(s.text(1)), false, ""});
    }
  }
};

const char* pg_type(char t) {
  switch (t) {
    case 'i': return "bigint";
    case 'r': return "double precision";
    default: return "text";
  }
}

// ---- values ------------------------------------------------------------------------------

std::string real_text(double d) { return geo::format_decimal("%.17g", d); }

// The canonical COPY fields of one row read from the store (FIELDS in store column order).
Fields canonical_from_store(const TableDef& t, const Fields& in) {
  Fields out;
  out.reserve(in.size());
  size_t k = 0;
  for (const auto& c : t.cols) {
    const auto& v = in.at(k++);
    if (c.type == 'r' && v)
      out.push_back(real_text(std::strtod(v->c_str(), nullptr)));
    else if (c.type == 'a') {
      const auto& kind = in.at(k++);
      if (v && kind && *kind == "real")
        out.push_back(real_text(std::strtod(v->c_str(), nullptr)));
      else
        out.push_back(v);
      out.push_back(v ? kind : std::nullopt);
    } else
      out.push_back(v);
  }
  return out;
}

std::string line_of(const Fields& f) {
  std::string l;
  for (size_t i = 0; i < f.size(); ++i) {
    if (i) l += '\t';
    l += f[i] ? pg::copy_escape(*f[i]) : "\\N";
  }
  return l;
}

std::string key_of(const TableDef& t, const Fields& f, const std::vector<int>& field_of_col) {
  std::string k;
  for (int c : t.pk) k += (f[field_of_col[c]] ? *f[field_of_col[c]] : "") + '\x1f';
  return k;
}

std::vector<int> field_positions(const TableDef& t) {
  std::vector<int> pos;
  int k = 0;
  for (const auto& c : t.cols) {
    pos.push_back(k++);
    if (c.type == 'a') ++k;
  }
  return pos;
}

void bind_fields(Stmt& s, const TableDef& t, const Fields& f) {
  size_t k = 0;
  int i = 1;
  for (const auto& c : t.cols) {
    const auto& v = f[k++];
    char type = c.type;
    if (c.type == 'a') {
      const auto& kind = f[k++];
      type = !kind ? 't' : *kind == "integer" ? 'i' : *kind == "real" ? 'r' : 't';
    }
    if (!v)
      s.bind(i, nullptr);
    else if (type == 'i')
      s.bind(i, static_cast<int64_t>(std::strtoll(v->c_str(), nullptr, 10)));
    else if (type == 'r')
      s.bind(i, std::strtod(v->c_str(), nullptr));
    else
      s.bind(i, *v);
    ++i;
  }
}

// The canonical fields of every row of table T in a project file, by key.
std::unordered_map<std::string, std::string> dump_rows(Db& db, const TableDef& t) {
  std::string sel;
  for (const auto& c : t.cols) {
    sel += (sel.empty() ? "" : ", ") + q(c.name);
    if (c.type == 'a') sel += ", typeof(" + q(c.name) + ")";
  }
  const auto pos = field_positions(t);
  std::unordered_map<std::string, std::string> out;
  Stmt s(db, "SELECT " + sel + " FROM " + q(t.name));
  while (s.step()) {
    Fields f;
    int k = 0;
    for (const auto& c : t.cols) {
      const int i = k++;
      if (c.type == 'a') {
        const std::string kind = s.text(k++);
        if (s.is_null(i))
          f.push_back(std::nullopt), f.push_back(std::nullopt);
        else if (kind == "real")
          f.push_back(real_text(s.real(i))), f.push_back(kind);
        else
          f.push_back(s.text(i)), f.push_back(kind);
      } else if (s.is_null(i)) {
        f.push_back(std::nullopt);
      } else if (c.type == 'r') {
        f.push_back(real_text(s.real(i)));
      } else if (c.type == 'i') {
        f.push_back(std::to_string(s.int64(i)));
      } else {
        f.push_back(s.text(i));
      }
    }
    out.emplace(key_of(t, f, pos), line_of(f));
  }
  return out;
}

// ---- the store --------------------------------------------------------------------------------

struct StoreState {
  int version = 0, project_schema = 0;
  std::string device;
};

StoreState store_state(Conn& c) {
  StoreState st;
  if (!c.value("SELECT to_regclass('cairn.meta')::text")) return st;
  auto v = c.value("SELECT value FROM cairn.meta WHERE key = 'store_version'");
  auto p = c.value("SELECT value FROM cairn.meta WHERE key = 'project_schema'");
  auto d = c.value("SELECT value FROM cairn.meta WHERE key = 'store_device'");
  st.version = v ? std::atoi(v->c_str()) : 0;
  st.project_schema = p ? std::atoi(p->c_str()) : 0;
  st.device = d.value_or("");
  return st;
}

StoreState ready_store(Conn& c, const std::string& url) {
  const StoreState st = store_state(c);
  if (st.version == 0)
    throw PublishRefused("the survey store at " + pg::redact_url(url) +
                         " is not set up; run `cairn survey init URL` as its owner first");
  if (st.version < kStoreVersion || st.project_schema < kSchemaVersion)
    throw PublishRefused("the survey store at " + pg::redact_url(url) + " is at store version " +
                         std::to_string(st.version) + " for project files of schema " +
                         std::to_string(st.project_schema) + "; this Cairn needs " + std::to_string(kStoreVersion) +
                         " and " + std::to_string(kSchemaVersion) + ": run `cairn survey init URL` to upgrade it");
  if (st.version > kStoreVersion)
    throw PublishRefused("the survey store at " + pg::redact_url(url) + " was set up by a newer Cairn (store version " +
                         std::to_string(st.version) + "); use a newer Cairn");
  return st;
}

// Store version 1: meta, projects, crews, publishes, the two group roles and
// the crew test used by the row-level security policies.
const char* const kStoreV1 = R"SQL(
CREATE TABLE IF NOT EXISTS cairn.meta (key text PRIMARY KEY, value text NOT NULL);
CREATE TABLE IF NOT EXISTS cairn.projects (
  uuid          uuid PRIMARY KEY DEFAULT gen_random_uuid(),
  name          text NOT NULL UNIQUE,
  settings_set  boolean NOT NULL DEFAULT false,
  created       text NOT NULL,
  updated       text NOT NULL
);
CREATE TABLE IF NOT EXISTS cairn.crews (
  project  uuid NOT NULL REFERENCES cairn.projects(uuid) ON DELETE CASCADE,
  member   name NOT NULL,
  added    text NOT NULL,
  PRIMARY KEY (project, member)
);
CREATE TABLE IF NOT EXISTS cairn.publishes (
  uuid          uuid PRIMARY KEY DEFAULT gen_random_uuid(),
  project       uuid NOT NULL REFERENCES cairn.projects(uuid) ON DELETE CASCADE,
  at            text NOT NULL,
  role          name NOT NULL DEFAULT current_user,
  file_uuid     text NOT NULL,
  file_name     text NOT NULL,
  rows_written  bigint NOT NULL,
  conflicts     integer NOT NULL
);
DO $$
BEGIN
  IF NOT EXISTS (SELECT FROM pg_roles WHERE rolname = 'cairn_crew') THEN CREATE ROLE cairn_crew NOLOGIN; END IF;
  IF NOT EXISTS (SELECT FROM pg_roles WHERE rolname = 'cairn_supervisor') THEN CREATE ROLE cairn_supervisor NOLOGIN; END IF;
END $$;
-- True when the current role is in the crew of project P (the crews table's
-- own policy shows a crew member its rows only).
CREATE OR REPLACE FUNCTION cairn.crew_of(p uuid) RETURNS boolean LANGUAGE sql STABLE AS
  $$ SELECT EXISTS (SELECT 1 FROM cairn.crews c WHERE c.project = p AND c.member = current_user) $$;
-- EPSG code of the WGS84 / UTM zone: the project's zone ("33N"), else the
-- standard zone of the place (32600 + zone north, 32700 + zone south).
CREATE OR REPLACE FUNCTION cairn.utm_srid(zone text, lon double precision, lat double precision)
  RETURNS integer LANGUAGE sql IMMUTABLE AS $$
  SELECT CASE WHEN zone ~ '^[0-9]{1,2}[NS]$'
              THEN (CASE WHEN right(zone, 1) = 'N' THEN 32600 ELSE 32700 END) + left(zone, -1)::integer
              ELSE (CASE WHEN lat >= 0 THEN 32600 ELSE 32700 END) + least(60, floor((lon + 180) / 6)::integer + 1)
         END $$;
)SQL";

const char* const kStoreSteps[] = {kStoreV1};  // kStoreSteps[v]: version v -> v + 1

std::string fk_sql(const TableDef& t, const TableDef::Fk& fk) {
  return "ALTER TABLE cairn." + q(t.name) + " ADD CONSTRAINT " + q(t.name + "_" + fk.from + "_fk") +
         " FOREIGN KEY (project, " + q(fk.from) + ") REFERENCES cairn." + q(fk.table) + " (project, " + q(fk.to) + ")" +
         (fk.on_delete == "CASCADE" ? " ON DELETE CASCADE" : "") + " DEFERRABLE INITIALLY DEFERRED";
}

// Creates the table of T, or adds the columns it lacks (the project file gained them).
void sync_table(Conn& c, const TableDef& t, std::vector<std::string>& steps) {
  std::set<std::string> have;
  {
    auto r =
        c.query("SELECT column_name FROM information_schema.columns WHERE table_schema = 'cairn' AND table_name = $1",
                {t.name});
    for (int i = 0; i < r.rows(); ++i) have.insert(r.text(i, 0));
  }
  if (have.empty()) {
    std::string sql = "CREATE TABLE cairn." + q(t.name) +
                      " (\n  project uuid NOT NULL REFERENCES cairn.projects(uuid) ON DELETE CASCADE";
    for (const auto& col : t.cols) {
      sql += ",\n  " + q(col.name) + " " + pg_type(col.type) + (col.notnull ? " NOT NULL" : "") +
             (col.dflt.empty() ? "" : " DEFAULT " + col.dflt);
      if (col.type == 'a') sql += ",\n  " + q(col.name + "_kind") + " text";
    }
    std::vector<std::string> pk;
    for (int i : t.pk) pk.push_back(t.cols[i].name);
    sql += ",\n  PRIMARY KEY (project, " + joined(pk) + ")";
    for (size_t u = 0; u < t.uniques.size(); ++u) {
      std::string ex;
      for (const auto& col : t.uniques[u].cols) ex += ", " + q(col) + " WITH =";
      sql += ",\n  CONSTRAINT " + q(t.name + "_live_" + std::to_string(u)) +
             " EXCLUDE USING btree (project WITH =" + ex + ")" +
             (t.uniques[u].where.empty() ? "" : " WHERE (" + t.uniques[u].where + ")") +
             " DEFERRABLE INITIALLY DEFERRED";
    }
    sql += "\n)";
    c.exec(sql);
    steps.push_back("table cairn." + t.name);
    return;
  }
  for (const auto& col : t.cols) {
    if (have.count(col.name)) continue;
    // Added columns may not be NOT NULL: rows published by older files lack them.
    c.exec("ALTER TABLE cairn." + q(t.name) + " ADD COLUMN " + q(col.name) + " " + pg_type(col.type) +
           (col.dflt.empty() ? "" : " DEFAULT " + col.dflt));
    if (col.type == 'a') c.exec("ALTER TABLE cairn." + q(t.name) + " ADD COLUMN " + q(col.name + "_kind") + " text");
    steps.push_back("column cairn." + t.name + "." + col.name);
  }
}

void sync_foreign_keys(Conn& c, const TableDef& t) {
  for (const auto& fk : t.fks) {
    const std::string name = t.name + "_" + fk.from + "_fk";
    if (c.value("SELECT 1 FROM pg_constraint WHERE conname = $1 AND connamespace = 'cairn'::regnamespace", {name}))
      continue;
    c.exec(fk_sql(t, fk));
  }
  for (const auto& fk : t.fks)
    c.exec("CREATE INDEX IF NOT EXISTS " + q(t.name + "_" + fk.from) + " ON cairn." + q(t.name) + " (project, " +
           q(fk.from) + ")");
}

const char* field_type(FieldType t) {
  switch (t) {
    case FieldType::Real: return "double precision";
    case FieldType::Integer: return "bigint";
    case FieldType::Boolean: return "boolean";
    default: return "text";
  }
}

// The tables of the latest check (fitted_contacts -> cairn.fits, flags -> cairn.flags).
const char* check_table(const std::string& layer) {
  if (layer == "fitted_contacts") return "fits";
  if (layer == "flags") return "flags";
  return nullptr;
}

void sync_check_tables(Conn& c, Project& tmpl, std::vector<std::string>& steps) {
  LayerSet ls = build_layers(tmpl, {}, RotationFrame::TrueNorth);
  for (const auto& l : ls.layers) {
    const char* table = check_table(l.name);
    if (!table) continue;
    if (!c.value("SELECT to_regclass($1)::text", {std::string("cairn.") + table})) {
      std::string sql =
          std::string("CREATE TABLE cairn.") + table +
          " (\n  project uuid NOT NULL REFERENCES cairn.projects(uuid) ON DELETE CASCADE,\n  fid integer NOT NULL,"
          "\n  lon double precision,\n  lat double precision,\n  checked text NOT NULL";
      for (const auto& f : l.fields) sql += ",\n  " + q(f.name) + " " + field_type(f.type);
      sql += ",\n  PRIMARY KEY (project, fid)\n)";
      c.exec(sql);
      steps.push_back(std::string("table cairn.") + table);
    } else {
      for (const auto& f : l.fields)
        c.exec(std::string("ALTER TABLE cairn.") + table + " ADD COLUMN IF NOT EXISTS " + q(f.name) + " " +
               field_type(f.type));
    }
  }
}

// The GIS layers: one WGS84 point geometry each, live records only.
const char* const kViews = R"SQL(
DROP VIEW IF EXISTS public.stations, public.planar_readings, public.linear_readings, public.contact_points,
  public.fitted_contacts, public.flags;
CREATE VIEW public.stations WITH (security_invoker = true) AS
SELECT s.project, p.name AS project_name, s.uuid, s.code, s.lat, s.lon, s.elevation, s.h_accuracy, s.v_accuracy,
       s.source, u.code AS unit, pe.initials AS observer, s.time, s.notes, s.created, s.updated, s.device,
       cairn.utm_srid(p.utm_zone, s.lon, s.lat) AS utm_epsg,
       ST_X(ST_Transform(g.geom, cairn.utm_srid(p.utm_zone, s.lon, s.lat))) AS utm_easting,
       ST_Y(ST_Transform(g.geom, cairn.utm_srid(p.utm_zone, s.lon, s.lat))) AS utm_northing,
       g.geom
FROM cairn.stations s
JOIN cairn.projects p ON p.uuid = s.project
LEFT JOIN cairn.units u ON u.project = s.project AND u.uuid = s.unit
LEFT JOIN cairn.people pe ON pe.project = s.project AND pe.uuid = s.observer
CROSS JOIN LATERAL (SELECT ST_SetSRID(ST_MakePoint(s.lon, s.lat), 4326)::geometry(Point, 4326) AS geom) g
WHERE s.deleted IS NULL;

CREATE VIEW public.planar_readings WITH (security_invoker = true) AS
SELECT r.project, p.name AS project_name, r.uuid, s.code AS station, r.kind, r.strike, r.dip,
       (r.strike + 90)::numeric % 360 AS dip_direction, r.typed, r.notation, r.north, r.measured_strike,
       r.measured_dip, r.declination, r.declination_source, r.quality, r.facing, c.name AS contact, r.ref, r.time,
       pe.initials AS observer, r.notes, r.created, r.updated, r.device,
       ST_SetSRID(ST_MakePoint(s.lon, s.lat), 4326)::geometry(Point, 4326) AS geom
FROM cairn.planes r
JOIN cairn.projects p ON p.uuid = r.project
JOIN cairn.stations s ON s.project = r.project AND s.uuid = r.station
LEFT JOIN cairn.contacts c ON c.project = r.project AND c.uuid = r.contact
LEFT JOIN cairn.people pe ON pe.project = r.project AND pe.uuid = r.observer
WHERE r.deleted IS NULL;

CREATE VIEW public.linear_readings WITH (security_invoker = true) AS
SELECT r.project, p.name AS project_name, r.uuid, s.code AS station, r.kind, r.trend, r.plunge, r.typed, r.north,
       r.measured_trend, r.measured_plunge, r.declination, r.declination_source, h.ref AS host_plane_ref, r.rake,
       r.ref, r.time, pe.initials AS observer, r.notes, r.created, r.updated, r.device,
       ST_SetSRID(ST_MakePoint(s.lon, s.lat), 4326)::geometry(Point, 4326) AS geom
FROM cairn.lines r
JOIN cairn.projects p ON p.uuid = r.project
JOIN cairn.stations s ON s.project = r.project AND s.uuid = r.station
LEFT JOIN cairn.planes h ON h.project = r.project AND h.uuid = r.host_plane
LEFT JOIN cairn.people pe ON pe.project = r.project AND pe.uuid = r.observer
WHERE r.deleted IS NULL;

CREATE VIEW public.contact_points WITH (security_invoker = true) AS
SELECT x.project, p.name AS project_name, x.uuid, c.name AS contact, x.lat, x.lon, x.elevation, x.h_accuracy,
       x.v_accuracy, x.source, x.time, pe.initials AS observer, x.notes, x.created, x.updated, x.device,
       ST_SetSRID(ST_MakePoint(x.lon, x.lat), 4326)::geometry(Point, 4326) AS geom
FROM cairn.points x
JOIN cairn.projects p ON p.uuid = x.project
JOIN cairn.contacts c ON c.project = x.project AND c.uuid = x.contact
LEFT JOIN cairn.people pe ON pe.project = x.project AND pe.uuid = x.observer
WHERE x.deleted IS NULL;

CREATE VIEW public.fitted_contacts WITH (security_invoker = true) AS
SELECT f.*, p.name AS project_name, ST_SetSRID(ST_MakePoint(f.lon, f.lat), 4326)::geometry(Point, 4326) AS geom
FROM cairn.fits f JOIN cairn.projects p ON p.uuid = f.project;

CREATE VIEW public.flags WITH (security_invoker = true) AS
SELECT f.*, p.name AS project_name, ST_SetSRID(ST_MakePoint(f.lon, f.lat), 4326)::geometry(Point, 4326) AS geom
FROM cairn.flags f JOIN cairn.projects p ON p.uuid = f.project;
)SQL";

const char* const kLayerViews[] = {"stations",       "planar_readings", "linear_readings",
                                   "contact_points", "fitted_contacts", "flags"};

// Grants and row-level security: crews to their own projects, supervisors read
// all and write reviews and sign-offs only.
void secure(Conn& c, const std::vector<std::string>& record_tables) {
  c.exec("GRANT USAGE ON SCHEMA cairn TO cairn_crew, cairn_supervisor");
  c.exec("GRANT SELECT ON cairn.meta TO cairn_crew, cairn_supervisor");
  c.exec(
      "GRANT EXECUTE ON FUNCTION cairn.crew_of(uuid), cairn.utm_srid(text, double precision, double precision) "
      "TO cairn_crew, cairn_supervisor");
  auto policy = [&](const std::string& table, const std::string& name, const std::string& body) {
    c.exec("DROP POLICY IF EXISTS " + q(name) + " ON cairn." + q(table));
    c.exec("CREATE POLICY " + q(name) + " ON cairn." + q(table) + " " + body);
  };
  // projects: crews see (and fill in the settings of) their own; supervisors see all.
  c.exec("ALTER TABLE cairn.projects ENABLE ROW LEVEL SECURITY");
  c.exec("GRANT SELECT ON cairn.projects TO cairn_crew, cairn_supervisor");
  c.exec("GRANT UPDATE ON cairn.projects TO cairn_crew");
  policy("projects", "crew_projects", "TO cairn_crew USING (cairn.crew_of(uuid)) WITH CHECK (cairn.crew_of(uuid))");
  policy("projects", "supervisor_read", "FOR SELECT TO cairn_supervisor USING (true)");
  c.exec("ALTER TABLE cairn.crews ENABLE ROW LEVEL SECURITY");
  c.exec("GRANT SELECT ON cairn.crews TO cairn_crew, cairn_supervisor");
  policy("crews", "crew_own", "FOR SELECT TO cairn_crew USING (member = current_user)");
  policy("crews", "supervisor_read", "FOR SELECT TO cairn_supervisor USING (true)");
  std::vector<std::string> tables = record_tables;
  tables.insert(tables.end(), {"publishes", "fits", "flags"});
  for (const auto& t : tables) {
    c.exec("ALTER TABLE cairn." + q(t) + " ENABLE ROW LEVEL SECURITY");
    c.exec("GRANT SELECT, INSERT, UPDATE, DELETE ON cairn." + q(t) + " TO cairn_crew");
    c.exec("GRANT SELECT ON cairn." + q(t) + " TO cairn_supervisor");
    policy(t, "crew_rows", "TO cairn_crew USING (cairn.crew_of(project)) WITH CHECK (cairn.crew_of(project))");
    policy(t, "supervisor_read", "FOR SELECT TO cairn_supervisor USING (true)");
    if (t == "flag_reviews" || t == "day_signoffs") {
      c.exec("GRANT INSERT, UPDATE ON cairn." + q(t) + " TO cairn_supervisor");
      policy(t, "supervisor_insert", "FOR INSERT TO cairn_supervisor WITH CHECK (true)");
      policy(t, "supervisor_update", "FOR UPDATE TO cairn_supervisor USING (true) WITH CHECK (true)");
    }
  }
  for (const char* v : kLayerViews)
    c.exec(std::string("GRANT SELECT ON public.") + v + " TO cairn_crew, cairn_supervisor");
}

void set_meta(Conn& c, const std::string& key, const std::string& value) {
  c.query("INSERT INTO cairn.meta(key, value) VALUES ($1, $2) ON CONFLICT (key) DO UPDATE SET value = EXCLUDED.value",
          {key, value});
}

std::optional<std::string> project_uuid(Conn& c, const std::string& name) {
  return c.value("SELECT uuid::text FROM cairn.projects WHERE name = $1", {name});
}

// ---- filling a project file from the store ---------------------------------------------

using Snapshot = std::map<std::string, std::unordered_map<std::string, std::string>>;

// Copies the store's rows of PROJECT into the project file DB, table by table
// (WHERE: extra conditions per table, SQL over the store's columns with alias r).
// SNAP, when given, receives the canonical line of every row by key.
std::map<std::string, long> fill(Conn& c, Db& db, const std::vector<TableDef>& tables, const std::string& project,
                                 const std::map<std::string, std::string>& where, Snapshot* snap) {
  std::map<std::string, long> counts;
  db.exec("PRAGMA defer_foreign_keys = ON");
  for (const auto& t : tables) {
    const auto pos = field_positions(t);
    std::string marks;
    for (size_t i = 0; i < t.cols.size(); ++i) marks += i ? ",?" : "?";
    std::vector<std::string> names;
    for (const auto& col : t.cols) names.push_back(col.name);
    Stmt ins(db, "INSERT OR REPLACE INTO " + q(t.name) + " (" + joined(names) + ") VALUES (" + marks + ")");
    std::string sql = "COPY (SELECT " + joined(store_columns(t), "r.") + " FROM cairn." + q(t.name) +
                      " r WHERE r.project = " + c.literal(project);
    auto w = where.find(t.name);
    if (w != where.end()) sql += " AND (" + w->second + ")";
    sql += ") TO STDOUT";
    long n = 0;
    auto* rows = snap ? &(*snap)[t.name] : nullptr;
    c.copy_out(sql, [&](const std::string& line) {
      const Fields f = canonical_from_store(t, pg::copy_split(line));
      bind_fields(ins, t, f);
      ins.run();
      ins.reset();
      if (rows) rows->emplace(key_of(t, f, pos), line_of(f));
      ++n;
    });
    counts[t.name] = n;
    if (std::getenv("CAIRN_SURVEY_TIMING")) std::fprintf(stderr, "  fill %s %ld\n", t.name.c_str(), n);
  }
  return counts;
}

// COPY into a scratch table, then one INSERT into cairn.TABLE: COPY FROM cannot
// write a table with row-level security, an INSERT ... SELECT can and is checked
// by the policies (PostgreSQL documentation, "COPY", Notes).
void copy_insert(Conn& c, const std::string& table, const std::string& cols, const std::string& data,
                 const std::string& on_conflict = "") {
  c.exec("CREATE TEMP TABLE cairn_in (LIKE cairn." + q(table) + ") ON COMMIT DROP");
  c.copy_in("COPY cairn_in (" + cols + ") FROM STDIN", data);
  c.exec("INSERT INTO cairn." + q(table) + " (" + cols + ") SELECT " + cols + " FROM cairn_in" + on_conflict);
  c.exec("DROP TABLE cairn_in");
}

// Writes the rows of DB that differ from SNAP to the store, and deletes the
// rows SNAP has that DB no longer has.
// DIRECT: the role is not subject to row-level security (the store's owner), so
// a table of which the store held no row of the project is filled with one COPY.
std::map<std::string, TableWrite> write_back(Conn& c, Db& db, const std::vector<TableDef>& tables,
                                             const std::string& project, const Snapshot& snap, bool direct) {
  std::map<std::string, TableWrite> out;
  const std::string lit = c.literal(project);
  for (const auto& t : tables) {
    const auto now = dump_rows(db, t);
    static const std::unordered_map<std::string, std::string> none;
    auto s = snap.find(t.name);
    const auto& before = s == snap.end() ? none : s->second;
    std::string data, gone;
    long written = 0, removed = 0;
    const std::string project_field = project + "\t";
    for (const auto& [key, line] : now) {
      auto b = before.find(key);
      if (b != before.end() && b->second == line) continue;
      data += project_field + line + "\n";
      ++written;
    }
    for (const auto& [key, line] : before) {
      if (now.count(key)) continue;
      std::string k = key;
      std::replace(k.begin(), k.end(), '\x1f', '\t');
      k.pop_back();
      std::string esc;
      for (size_t a = 0, b; a <= k.size(); a = b + 1) {
        b = k.find('\t', a);
        if (b == std::string::npos) b = k.size();
        esc += (esc.empty() ? "" : "\t") + pg::copy_escape(k.substr(a, b - a));
      }
      gone += esc + "\n";
      ++removed;
    }
    const auto cols = store_columns(t);
    std::vector<std::string> pk;
    for (int i : t.pk) pk.push_back(t.cols[i].name);
    if (removed) {
      std::string defs;
      for (const auto& k : pk) defs += (defs.empty() ? "" : ", ") + q(k) + " text";
      c.exec("CREATE TEMP TABLE cairn_gone (" + defs + ") ON COMMIT DROP");
      c.copy_in("COPY cairn_gone FROM STDIN", gone);
      std::string match;
      for (const auto& k : pk) match += " AND r." + q(k) + "::text = g." + q(k);
      c.exec("DELETE FROM cairn." + q(t.name) + " r USING cairn_gone g WHERE r.project = " + lit + match);
      c.exec("DROP TABLE cairn_gone");
    }
    if (written) {
      std::string set;
      for (const auto& col : cols)
        if (std::find(pk.begin(), pk.end(), col) == pk.end())
          set += (set.empty() ? "" : ", ") + q(col) + " = EXCLUDED." + q(col);
      if (direct && before.empty())
        c.copy_in("COPY cairn." + q(t.name) + " (project, " + joined(cols) + ") FROM STDIN", data);
      else
        copy_insert(c, t.name, "project, " + joined(cols), data,
                    " ON CONFLICT (project, " + joined(pk) + ") DO " + (set.empty() ? "NOTHING" : "UPDATE SET " + set));
    }
    if (written || removed) out[t.name] = {written, removed};
  }
  return out;
}

std::string field_text(const FieldValue& v) {
  if (std::holds_alternative<std::monostate>(v)) return "\\N";
  if (auto s = std::get_if<std::string>(&v)) return pg::copy_escape(*s);
  if (auto d = std::get_if<double>(&v)) return std::isfinite(*d) ? real_text(*d) : "\\N";
  if (auto i = std::get_if<int64_t>(&v)) return std::to_string(*i);
  return std::get<bool>(v) ? "t" : "f";
}

// Replaces the project's fits and flags with those of a check of P.
void write_check(Conn& c, Project& p, const std::string& project, const ExportOptions& o, PublishReport& rep) {
  LayerSet ls;
  try {
    ls = build_layers(p, o, RotationFrame::TrueNorth);
  } catch (const std::exception& e) {
    rep.merge.warnings.push_back(std::string("the check could not run; fits and flags not updated (") + e.what() + ")");
    return;
  }
  const std::string now = utc_now();
  for (const auto& l : ls.layers) {
    const char* table = check_table(l.name);
    if (!table) continue;
    c.query(std::string("DELETE FROM cairn.") + table + " WHERE project = $1", {project});
    // Features in the order of their values, so that the same check gives the
    // same fids whatever order the records came in.
    std::vector<std::string> rows;
    for (const auto& f : l.features) {
      std::string r;
      for (const auto& v : f.values) r += field_text(v) + "\t";
      r += (f.where ? real_text(f.where->lon) : "\\N") + "\t" + (f.where ? real_text(f.where->lat) : "\\N");
      rows.push_back(std::move(r));
    }
    std::sort(rows.begin(), rows.end());
    std::string data;
    int fid = 0;
    for (const auto& r : rows) data += project + "\t" + std::to_string(++fid) + "\t" + now + "\t" + r + "\n";
    std::vector<std::string> cols;
    for (const auto& fd : l.fields) cols.push_back(fd.name);
    if (!data.empty()) copy_insert(c, table, "project, fid, checked, " + joined(cols) + ", lon, lat", data);
    (l.name == "flags" ? rep.flags : rep.fits) = fid;
  }
}

// The settings columns of the project row of a project file.
std::map<std::string, std::optional<std::string>> project_settings(Db& db, const std::vector<Col>& cols) {
  std::map<std::string, std::optional<std::string>> out;
  std::string sel;
  for (const auto& c : cols) sel += (sel.empty() ? "" : ", ") + q(c.name);
  if (sel.empty()) return out;
  Stmt s(db, "SELECT " + sel + " FROM project");
  if (!s.step()) return out;
  for (size_t i = 0; i < cols.size(); ++i) {
    const int k = static_cast<int>(i);
    if (s.is_null(k))
      out[cols[i].name] = std::nullopt;
    else if (cols[i].type == 'r')
      out[cols[i].name] = real_text(s.real(k));
    else
      out[cols[i].name] = s.text(k);
  }
  return out;
}

// ---- records that need no judgement --------------------------------------------------

// Natural keys of the project file (storage/SCHEMA.md: unique among live records).
struct KeyCol {
  const char* table;
  const char* key;    // nullptr: no natural key
  const char* scope;  // nullptr: the whole table
};
const KeyCol kRecordKeys[] = {{"people", "initials", nullptr}, {"units", "code", nullptr},
                              {"contacts", "name", nullptr},   {"stations", "code", nullptr},
                              {"planes", "ref", "station"},    {"lines", "ref", "station"},
                              {"points", nullptr, nullptr},    {"photos", nullptr, nullptr}};

struct Plain {
  long added = 0, skipped = 0, audit = 0;
};

// Takes out of COPY (a scratch copy of the published file) what merge would
// not have to judge, so that merge_files only sees the rest: a version the
// store already has is dropped (merge skips it), and a record the store lacks
// whose code no live record of the store holds is added to MIRROR as it is
// (merge adds it unchanged), with every audit row (merge adds those the target
// lacks). A season of records published once costs a bulk copy, not a merge of
// each record. Anything else - other versions of stored records, codes already
// taken, records the file keeps under a clash code, devices, reviews - stays in
// COPY for merge_files and its rules.
Plain take_plain(Db& mirror, const std::string& copy) {
  Plain d;
  mirror.exec("PRAGMA foreign_keys = OFF");  // parents may come in with the merge that follows
  {
    Stmt a(mirror, "ATTACH DATABASE ? AS src");
    a.bind(1, copy);
    a.run();
  }
  mirror.exec("PRAGMA src.cache_size = -524288; PRAGMA src.synchronous = OFF; PRAGMA src.journal_mode = OFF");
  try {
    mirror.exec("BEGIN IMMEDIATE");
    for (const auto& k : kRecordKeys) {
      const std::string t = q(k.table);
      std::vector<std::string> names;
      {
        Stmt s(mirror, "SELECT name FROM pragma_table_info(?) ORDER BY cid");
        s.bind(1, k.table);
        while (s.step()) names.push_back(s.text(0));
      }
      const std::string cols = joined(names);
      mirror.exec("CREATE TEMP TABLE cairn_same AS SELECT s.uuid FROM src." + t + " s JOIN main." + t +
                  " m ON m.uuid = s.uuid AND m.updated = s.updated AND m.device = s.device");
      d.skipped += mirror.query_int("SELECT count(*) FROM temp.cairn_same");
      std::string fresh =
          "SELECT s.uuid FROM src." + t + " s WHERE NOT EXISTS (SELECT 1 FROM main." + t +
          " m WHERE m.uuid = s.uuid) AND NOT EXISTS (SELECT 1 FROM src.key_clashes c WHERE c.record = s.uuid)";
      if (k.key) {
        fresh += " AND (s." + q(k.key) + " IS NULL OR s.deleted IS NOT NULL OR NOT EXISTS (SELECT 1 FROM main." + t +
                 " m WHERE m." + q(k.key) + " = s." + q(k.key) + " AND m.deleted IS NULL";
        if (k.scope) fresh += " AND m." + q(k.scope) + " IS s." + q(k.scope);
        fresh += "))";
      }
      mirror.exec("CREATE TEMP TABLE cairn_fresh AS " + fresh);
      mirror.exec("INSERT INTO main." + t + " (" + cols + ") SELECT " + cols + " FROM src." + t +
                  " WHERE uuid IN (SELECT uuid FROM temp.cairn_fresh)");
      d.added += mirror.changes();
      // What stays for the merge is usually a few rows: keep them aside, empty
      // the table at once (SQLite's truncate optimisation, "DELETE" documentation)
      // and put them back, rather than deleting the many rows one by one.
      mirror.exec(
          "CREATE TEMP TABLE cairn_keep AS SELECT " + cols + " FROM src." + t +
          " WHERE uuid NOT IN (SELECT uuid FROM temp.cairn_fresh) AND uuid NOT IN (SELECT uuid FROM temp.cairn_same)");
      mirror.exec("DELETE FROM src." + t);
      mirror.exec("INSERT INTO src." + t + " (" + cols + ") SELECT " + cols + " FROM temp.cairn_keep");
      mirror.exec("DROP TABLE temp.cairn_fresh; DROP TABLE temp.cairn_same; DROP TABLE temp.cairn_keep");
    }
    {
      std::vector<std::string> names;
      Stmt a(mirror, "SELECT name FROM pragma_table_info('audit') ORDER BY cid");
      while (a.step()) names.push_back(a.text(0));
      mirror.exec("INSERT OR IGNORE INTO main.audit (" + joined(names) + ") SELECT " + joined(names) +
                  " FROM src.audit");
    }
    d.audit = mirror.changes();
    mirror.exec("DELETE FROM src.audit");
    mirror.exec("COMMIT");
  } catch (...) {
    try {
      mirror.exec("ROLLBACK");
    } catch (...) {}
    mirror.exec("DETACH DATABASE src");
    mirror.exec("PRAGMA foreign_keys = ON");
    throw;
  }
  mirror.exec("DETACH DATABASE src");
  mirror.exec("PRAGMA foreign_keys = ON");
  return d;
}

bool is_owner(Conn& c) {
  return c.value(
             "SELECT (SELECT rolsuper FROM pg_roles WHERE rolname = current_user) OR "
             "pg_has_role(current_user, (SELECT nspowner FROM pg_namespace WHERE nspname = 'cairn'), 'MEMBER')") ==
         std::optional<std::string>("t");
}

}  // namespace

// ---- init ----------------------------------------------------------------------------------

InitReport init_store(const std::string& url) {
  Conn c(url);
  Template tmpl;
  InitReport rep;
  c.exec("BEGIN");
  try {
    // One init at a time (PostgreSQL documentation, "Advisory Locks").
    c.exec("SELECT pg_advisory_xact_lock(hashtext('cairn survey init'))");
    try {
      c.exec("CREATE EXTENSION IF NOT EXISTS postgis");
    } catch (const pg::PgError& e) {
      throw std::runtime_error(
          std::string("PostGIS is not available in this database (install postgresql-15-postgis-3, "
                      "or have a superuser run CREATE EXTENSION postgis): ") +
          e.what());
    }
    c.exec("CREATE SCHEMA IF NOT EXISTS cairn");
    StoreState st = store_state(c);
    rep.from_version = st.version;
    if (st.version > kStoreVersion)
      throw std::runtime_error("the survey store was set up by a newer Cairn (store version " +
                               std::to_string(st.version) + ")");
    for (int v = st.version; v < kStoreVersion; ++v) {
      c.exec(kStoreSteps[v]);
      rep.steps.push_back("store version " + std::to_string(v + 1));
    }
    for (const auto& col : tmpl.project_cols)
      c.exec("ALTER TABLE cairn.projects ADD COLUMN IF NOT EXISTS " + q(col.name) + " " + pg_type(col.type));
    std::vector<std::string> record_tables;
    for (const auto& t : tmpl.tables) {
      sync_table(c, t, rep.steps);
      record_tables.push_back(t.name);
    }
    for (const auto& t : tmpl.tables) sync_foreign_keys(c, t);
    c.exec(
        "CREATE INDEX IF NOT EXISTS stations_where ON cairn.stations USING gist "
        "((ST_SetSRID(ST_MakePoint(lon, lat), 4326)))");
    c.exec(
        "CREATE INDEX IF NOT EXISTS points_where ON cairn.points USING gist ((ST_SetSRID(ST_MakePoint(lon, lat), "
        "4326)))");
    sync_check_tables(c, *tmpl.p, rep.steps);
    c.exec(kViews);
    secure(c, record_tables);
    set_meta(c, "store_version", std::to_string(kStoreVersion));
    set_meta(c, "project_schema", std::to_string(std::max(kSchemaVersion, st.project_schema)));
    if (st.device.empty()) set_meta(c, "store_device", new_uuid());
    c.exec("COMMIT");
  } catch (...) {
    try {
      c.exec("ROLLBACK");
    } catch (...) {}
    throw;
  }
  rep.to_version = kStoreVersion;
  rep.project_schema = kSchemaVersion;
  return rep;
}

// ---- crews --------------------------------------------------------------------------------

void set_crew(const std::string& url, const std::string& role, const std::string& project, bool remove) {
  Conn c(url);
  ready_store(c, url);
  if (project.empty()) throw std::invalid_argument("--project NAME is required");
  c.exec("BEGIN");
  try {
    if (!c.value("SELECT 1 FROM pg_roles WHERE rolname = $1", {role}))
      throw std::runtime_error("there is no database role \"" + role + "\"; create it first (CREATE ROLE ... LOGIN)");
    auto id = project_uuid(c, project);
    if (!id) {
      if (remove) throw std::runtime_error("there is no project \"" + project + "\" in the survey store");
      const std::string now = utc_now();
      id = c.value("INSERT INTO cairn.projects(name, created, updated) VALUES ($1, $2, $2) RETURNING uuid::text",
                   {project, now});
    }
    const std::string ident = *c.value("SELECT quote_ident($1)", {role});
    if (remove) {
      c.query("DELETE FROM cairn.crews WHERE project = $1 AND member = $2", {*id, role});
      if (!c.value("SELECT 1 FROM cairn.crews WHERE member = $1", {role})) c.exec("REVOKE cairn_crew FROM " + ident);
    } else {
      c.query("INSERT INTO cairn.crews(project, member, added) VALUES ($1, $2, $3) ON CONFLICT DO NOTHING",
              {*id, role, utc_now()});
      c.exec("GRANT cairn_crew TO " + ident);
    }
    c.exec("COMMIT");
  } catch (...) {
    try {
      c.exec("ROLLBACK");
    } catch (...) {}
    throw;
  }
}

// ---- publish --------------------------------------------------------------------------------

// Long on purpose: a publish is one transaction on the store, and its steps
// (read the file, check the crew and the project, copy each table, write the
// report) read in the order the store sees them; the copying is in the helpers above.
PublishReport publish(const std::string& file, const std::string& url, const PublishOptions& o) {
  PublishReport rep;
  Template tmpl;
  std::map<std::string, std::optional<std::string>> settings;
  std::string file_uuid;
  {
    std::error_code ec;
    if (!fs::exists(file, ec)) throw PublishRefused("no project file " + file);
    OpenOptions oo;
    oo.read_only = true;
    oo.backups = false;
    Project f = Project::open(file, oo);
    if (!f.problem().empty()) throw PublishRefused(file + " failed its integrity check; nothing was published");
    const ProjectInfo info = f.info();
    rep.project = info.name;
    file_uuid = info.file_uuid;
    settings = project_settings(f.db(), tmpl.project_cols);
  }
  const std::string what = "publish of project \"" + rep.project + "\" refused: ";
  Conn c(url);
  rep.role = c.user();
  StoreState st;
  try {
    st = ready_store(c, url);
  } catch (const PublishRefused& e) {
    throw PublishRefused(what + e.what());
  }
  c.exec("BEGIN");
  try {
    auto id = project_uuid(c, rep.project);
    const bool owner = is_owner(c);
    if (!id) {
      if (!owner)
        throw PublishRefused(what + "role \"" + rep.role + "\" is not in the crew of a project of that name; ask the " +
                             "store's owner to run `cairn survey crew URL " + rep.role + " --project NAME`");
      const std::string now = utc_now();
      id = c.value("INSERT INTO cairn.projects(name, created, updated) VALUES ($1, $2, $2) RETURNING uuid::text",
                   {rep.project, now});
      rep.project_created = true;
    } else if (!owner && c.value("SELECT cairn.crew_of($1)", {*id}) != std::optional<std::string>("t")) {
      throw PublishRefused(what + "role \"" + rep.role +
                           "\" is not in the crew of this project (it may read it, not write it)");
    }
    rep.project_uuid = *id;
    // Publishes of one project take turns; other projects go on.
    c.query("SELECT pg_advisory_xact_lock(hashtext($1))", {"cairn publish " + *id});

    Scratch scratch;
    NewProject np;
    np.name = rep.project;
    Project mirror =
        Project::create(scratch.file("store.cairn"), np, scratch_options(scratch, st.device, "survey store"));
    // A scratch file: no need to wait for the disk (SQLite documentation, "PRAGMA synchronous").
    // and a page cache big enough for a season, so pages are not spilled and read back.
    mirror.db().exec("PRAGMA synchronous = OFF; PRAGMA cache_size = -524288; PRAGMA temp_store = MEMORY");
    auto T = [](const char* what) {
      static auto t0 = std::chrono::steady_clock::now();
      if (std::getenv("CAIRN_SURVEY_TIMING"))
        std::fprintf(stderr, "%s %.3f\n", what,
                     std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count());
    };
    T("start");
    Snapshot snap;
    // The store's rows are whole already (its own deferred foreign keys), so the
    // copy skips SQLite's reference checks.
    mirror.db().exec("PRAGMA foreign_keys = OFF");
    mirror.write([&] {
      ensure_review_tables(mirror);
      fill(c, mirror.db(), tmpl.tables, *id, {}, &snap);
    });
    mirror.db().exec("PRAGMA foreign_keys = ON");
    T("filled");
    // Every row of the file already in the store, the same to the last value:
    // merge would skip them all (its own logs, conflicts and clash lists are
    // not carried from a source, so they are not compared).
    bool news = rep.project_created;
    {
      static const std::set<std::string> not_carried = {"merges", "conflicts", "conflict_values", "key_clashes"};
      Db src(file, SQLITE_OPEN_READONLY);
      if (src.query_int("PRAGMA user_version") != kSchemaVersion) news = true;  // merge migrates a copy
      for (const auto& t : tmpl.tables) {
        if (news) break;
        if (not_carried.count(t.name)) continue;
        Stmt has(src, "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = ?");
        has.bind(1, t.name);
        if (!has.step()) continue;
        const auto& stored = snap[t.name];
        for (const auto& [key, line] : dump_rows(src, t)) {
          auto it = stored.find(key);
          if (it == stored.end() || it->second != line) {
            news = true;
            break;
          }
        }
      }
    }
    T("compared");
    if (!news) {
      c.exec("ROLLBACK");
      return rep;
    }
    // A copy of the file (SQLite documentation, "VACUUM INTO"); when it is of
    // this build's schema, what needs no judgement goes straight in first.
    const std::string copy = scratch.file(fs::path(file).filename().string());
    bool plain = false;
    {
      Db src(file, SQLITE_OPEN_READONLY);
      if (src.query_int("PRAGMA user_version") == kSchemaVersion) {
        Stmt v(src, "VACUUM INTO ?");
        v.bind(1, copy);
        v.run();
        plain = true;
      }
    }
    if (plain) rep.plain_added = take_plain(mirror.db(), copy).added;
    T("plain");
    MergeOptions mo;
    mo.terrain = false;  // the store keeps no terrain (read_tables)
    mo.track = false;    // nor day tracks, nor pick-lists
    mo.pick_list_report = false;
    rep.merge = merge_files(mirror, {plain ? copy : file}, mo);
    T("merged");
    if (plain) {
      mirror.write([&] {
        Stmt m(mirror.db(), "UPDATE merges SET peer_path = ? WHERE peer_path = ?");
        m.bind(1, file).bind(2, copy);
        m.run();
      });
      for (auto& w : rep.merge.warnings)
        for (size_t at; (at = w.find(copy)) != std::string::npos;) w.replace(at, copy.size(), file);
    }
    if (rep.merge.changed || rep.project_created || rep.plain_added > 0) {
      // A project's settings come from its first published file.
      if (c.value("SELECT settings_set FROM cairn.projects WHERE uuid = $1", {*id}) ==
          std::optional<std::string>("f")) {
        std::string set = "settings_set = true";
        std::vector<pg::Param> params{*id};
        for (const auto& [col, v] : settings) {
          params.push_back(v);
          set += ", " + q(col) + " = $" + std::to_string(params.size());
        }
        c.query("UPDATE cairn.projects SET " + set + " WHERE uuid = $1", params);
      }
      rep.tables = write_back(c, mirror.db(), tmpl.tables, *id, snap, owner);
      T("written");
      write_check(c, mirror, *id, o.check, rep);
      T("checked");
      long rows = 0;
      for (const auto& [t, w] : rep.tables) rows += w.written + w.removed;
      c.query("UPDATE cairn.projects SET updated = $2 WHERE uuid = $1", {*id, utc_now()});
      c.query(
          "INSERT INTO cairn.publishes(project, at, file_uuid, file_name, rows_written, conflicts) "
          "VALUES ($1, $2, $3, $4, $5, $6)",
          {*id, utc_now(), file_uuid, fs::path(file).filename().string(), std::to_string(rows),
           std::to_string(rep.merge.conflicts.size())});
      rep.changed = true;
      if (o.before_commit) o.before_commit();
      c.exec("COMMIT");
    } else {
      c.exec("ROLLBACK");
    }
  } catch (const PublishRefused&) {
    try {
      c.exec("ROLLBACK");
    } catch (...) {}
    throw;
  } catch (const pg::PgError& e) {
    try {
      c.exec("ROLLBACK");
    } catch (...) {}
    // 42501: insufficient privilege, including a row-level security policy.
    if (e.sqlstate() == "42501")
      throw PublishRefused(what + "the store does not let role \"" + rep.role + "\" write it (" + e.what() +
                           "); nothing was written");
    throw PublishRefused(what + e.what() + "; nothing was written");
  } catch (const std::exception& e) {
    try {
      c.exec("ROLLBACK");
    } catch (...) {}
    throw PublishRefused(what + e.what() + "; nothing was written");
  }
  return rep;
}

// ---- pull ------------------------------------------------------------------------------------

Result<BBox> parse_bbox(const std::string& text) {
  double v[4];
  size_t at = 0;
  for (int i = 0; i < 4; ++i) {
    const size_t end = i < 3 ? text.find(',', at) : text.size();
    if (end == std::string::npos)
      return Result<BBox>::failure("--bbox wants W,S,E,N in decimal degrees, not \"" + text + "\"");
    const std::string part = text.substr(at, end - at);
    char* stop = nullptr;
    v[i] = std::strtod(part.c_str(), &stop);
    if (part.empty() || *stop != '\0' || !std::isfinite(v[i]))
      return Result<BBox>::failure("--bbox: \"" + part + "\" is not a number (W,S,E,N in decimal degrees)");
    at = end + 1;
  }
  const BBox b{v[0], v[1], v[2], v[3]};
  if (b.west < -180 || b.west > 180 || b.east < -180 || b.east > 180)
    return Result<BBox>::failure("--bbox: longitudes must lie within -180..180");
  if (b.south < -90 || b.north > 90 || b.south > b.north)
    return Result<BBox>::failure("--bbox: latitudes must lie within -90..90 with S <= N");
  return b;
}

// Long on purpose: one read-only transaction on the store, then one new file:
// choose the stations and points, then the records that hang on them, in the
// order a project file needs them.
PullReport pull(const std::string& url, const std::string& out, const PullOptions& o) {
  PullReport rep;
  rep.project = o.project;
  rep.path = out;
  std::optional<std::string> since;
  if (o.since) {
    auto t = parse_iso8601(*o.since);
    if (!t) throw std::invalid_argument("--since: " + t.error());
    since = t->text;
  }
  std::error_code ec;
  if (fs::exists(out, ec)) throw std::runtime_error(out + " exists; pull makes a new project file");
  Template tmpl;
  Conn c(url);
  const StoreState st = ready_store(c, url);
  (void)st;
  c.exec("BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY");
  auto id = project_uuid(c, o.project);
  if (!id)
    throw std::runtime_error("no project \"" + o.project + "\" in the survey store that role \"" + c.user() +
                             "\" may read");

  // Which stations and points: inside the box (a box with W > E crosses the antimeridian).
  auto in_box = [&](const std::string& a) -> std::string {
    if (!o.bbox) return "true";
    const BBox& b = *o.bbox;
    const std::string lon =
        b.west <= b.east ? a + ".lon BETWEEN " + real_text(b.west) + " AND " + real_text(b.east)
                         : "(" + a + ".lon >= " + real_text(b.west) + " OR " + a + ".lon <= " + real_text(b.east) + ")";
    return lon + " AND " + a + ".lat BETWEEN " + real_text(b.south) + " AND " + real_text(b.north);
  };
  const std::string p = c.literal(*id);
  std::string station_cond = in_box("s");
  std::string point_cond = in_box("r");
  if (since) {
    const std::string d = c.literal(*since);
    station_cond += " AND (s.updated >= " + d +
                    " OR EXISTS (SELECT 1 FROM cairn.planes x WHERE x.project = s.project AND "
                    "x.station = s.uuid AND x.updated >= " +
                    d +
                    ") OR EXISTS (SELECT 1 FROM cairn.lines x WHERE "
                    "x.project = s.project AND x.station = s.uuid AND x.updated >= " +
                    d + "))";
    point_cond += " AND r.updated >= " + d;
  }
  const std::string stations = "SELECT s.uuid FROM cairn.stations s WHERE s.project = " + p + " AND " + station_cond;
  const std::string readings = "SELECT uuid FROM cairn.planes WHERE project = " + p + " AND station IN (" + stations +
                               ") UNION ALL SELECT uuid FROM cairn.lines WHERE project = " + p + " AND station IN (" +
                               stations + ")";
  const std::string points = "SELECT r.uuid FROM cairn.points r WHERE r.project = " + p + " AND " + point_cond;
  const std::string photos =
      "SELECT uuid FROM cairn.photos WHERE project = " + p + " AND station IN (" + stations + ")";
  const std::string taken = "(" + stations + ") UNION ALL (" + readings + ") UNION ALL (" + points + ") UNION ALL (" +
                            photos + ") UNION ALL SELECT uuid FROM cairn.people WHERE project = " + p +
                            " UNION ALL SELECT uuid FROM cairn.units WHERE project = " + p +
                            " UNION ALL SELECT uuid FROM cairn.contacts WHERE project = " + p;
  // Tables not listed here (devices, reviews, sign-offs, any a later module adds) come whole.
  std::map<std::string, std::string> where{
      {"stations", "r.uuid IN (" + stations + ")"},
      {"planes", "r.station IN (" + stations + ")"},
      {"lines", "r.station IN (" + stations + ")"},
      {"points", point_cond},
      {"photos", "r.station IN (" + stations + ")"},
      {"audit", "r.record IN (" + taken + ")"},
      {"conflicts", "r.record IN (" + taken + ")"},
      {"conflict_values",
       "r.conflict IN (SELECT uuid FROM cairn.conflicts WHERE project = " + p + " AND record IN (" + taken + "))"},
      {"key_clashes", "r.record IN (" + taken + ")"},
      {"merges", "false"},
  };
  std::map<std::string, std::optional<std::string>> settings;
  for (const auto& col : tmpl.project_cols) {
    auto v = c.value("SELECT " + q(col.name) + "::text FROM cairn.projects WHERE uuid = $1", {*id});
    settings[col.name] = v;
  }
  NewProject np;
  np.name = o.project;
  if (settings["utm_zone"]) np.utm_zone = *settings["utm_zone"];
  OpenOptions oo;
  oo.backups = false;
  Project f = Project::create(out, np, oo);
  try {
    f.write([&] {
      ensure_review_tables(f);
      for (const auto& col : tmpl.project_cols) {
        const auto& v = settings[col.name];
        if (!v) continue;
        Stmt s(f.db(), "UPDATE project SET " + q(col.name) + " = ?");
        if (col.type == 'r')
          s.bind(1, std::strtod(v->c_str(), nullptr));
        else if (col.type == 'i')
          s.bind(1, static_cast<int64_t>(std::strtoll(v->c_str(), nullptr, 10)));
        else
          s.bind(1, *v);
        s.run();
      }
      rep.rows = fill(c, f.db(), tmpl.tables, *id, where, nullptr);
    });
  } catch (...) {
    c.exec("ROLLBACK");
    std::error_code e2;
    fs::remove(out, e2);
    fs::remove(out + "-wal", e2);
    fs::remove(out + "-shm", e2);
    throw;
  }
  c.exec("COMMIT");
  return rep;
}

}  // namespace cairn::store::survey
