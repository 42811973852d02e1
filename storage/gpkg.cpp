// GeoPackage 1.3 (OGC 12-128r18) written directly with SQLite. Clause and
// requirement numbers below are those of the standard.
#include <sqlite3.h>

#include <cmath>
#include <cstring>
#include <filesystem>
#include <limits>
#include <stdexcept>

#include "storage/gpkg.h"
#include "formats/ids.h"
#include "storage/sqlite.h"

namespace fs = std::filesystem;

namespace cairn::store {

using namespace cairn::formats;  // file formats and value rules (formats/)

namespace {

// "GPKG" in ASCII (Requirement 2) and version 1.3.0 as 10300 (Requirement 2, clause 1.1.1.1.1).
constexpr int32_t kGpkgApplicationId = 0x47504B47;
constexpr int kGpkgUserVersion = 10300;

// Clause 1.1.2.1.1 and Annex C.1: the table of spatial reference systems.
const char* const kSrsTable = R"SQL(
CREATE TABLE gpkg_spatial_ref_sys (
  srs_name TEXT NOT NULL,
  srs_id INTEGER NOT NULL PRIMARY KEY,
  organization TEXT NOT NULL,
  organization_coordsys_id INTEGER NOT NULL,
  definition TEXT NOT NULL,
  description TEXT
);
)SQL";

// Annex C.2.
const char* const kContentsTable = R"SQL(
CREATE TABLE gpkg_contents (
  table_name TEXT NOT NULL PRIMARY KEY,
  data_type TEXT NOT NULL,
  identifier TEXT UNIQUE,
  description TEXT DEFAULT '',
  last_change DATETIME NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')),
  min_x DOUBLE,
  min_y DOUBLE,
  max_x DOUBLE,
  max_y DOUBLE,
  srs_id INTEGER,
  CONSTRAINT fk_gc_r_srs_id FOREIGN KEY (srs_id) REFERENCES gpkg_spatial_ref_sys(srs_id)
);
)SQL";

// Annex C.3.
const char* const kGeometryColumnsTable = R"SQL(
CREATE TABLE gpkg_geometry_columns (
  table_name TEXT NOT NULL,
  column_name TEXT NOT NULL,
  geometry_type_name TEXT NOT NULL,
  srs_id INTEGER NOT NULL,
  z TINYINT NOT NULL,
  m TINYINT NOT NULL,
  CONSTRAINT pk_geom_cols PRIMARY KEY (table_name, column_name),
  CONSTRAINT uk_gc_table_name UNIQUE (table_name),
  CONSTRAINT fk_gc_tn FOREIGN KEY (table_name) REFERENCES gpkg_contents(table_name),
  CONSTRAINT fk_gc_srs FOREIGN KEY (srs_id) REFERENCES gpkg_spatial_ref_sys (srs_id)
);
)SQL";

// WGS 84 geographic 2D in OGC WKT version 1, as in the standard's Table 21 example.
const char* const kWgs84Wkt =
    "GEOGCS[\"WGS 84\",DATUM[\"WGS_1984\",SPHEROID[\"WGS 84\",6378137,298.257223563,AUTHORITY[\"EPSG\",\"7030\"]],"
    "AUTHORITY[\"EPSG\",\"6326\"]],PRIMEM[\"Greenwich\",0,AUTHORITY[\"EPSG\",\"8901\"]],"
    "UNIT[\"degree\",0.0174532925199433,AUTHORITY[\"EPSG\",\"9122\"]],AUTHORITY[\"EPSG\",\"4326\"]]";

void put_u8(std::string& b, unsigned v) { b += static_cast<char>(v & 0xff); }
void put_le32(std::string& b, uint32_t v) {
  for (int i = 0; i < 4; ++i) put_u8(b, v >> (8 * i));
}
void put_le_double(std::string& b, double d) {
  uint64_t v;
  static_assert(sizeof v == sizeof d, "IEEE 754 binary64 expected");
  std::memcpy(&v, &d, sizeof v);
  for (int i = 0; i < 8; ++i) put_u8(b, static_cast<unsigned>(v >> (8 * i)));
}

// A point as GeoPackage binary (clause 2.1.3.1.1, StandardGeoPackageBinary):
// magic "GP", version 0 (= version 1 of the format), flags, srs_id, envelope,
// then the point as ISO WKB (little-endian, type 1 = Point; OGC 06-103r4 clause 8).
// Flags: bits 7-6 reserved 0, bit 5 X = 0 (standard), bit 4 Y = 0 (not empty),
// bits 3-1 E = 1 (envelope [minx, maxx, miny, maxy]), bit 0 B = 1 (little-endian).
std::string gpkg_point(int32_t srs_id, double x, double y) {
  std::string b;
  b += "GP";
  put_u8(b, 0);
  put_u8(b, (1u << 1) | 1u);
  put_le32(b, static_cast<uint32_t>(srs_id));
  for (double v : {x, x, y, y}) put_le_double(b, v);
  put_u8(b, 1);    // WKB byte order: little-endian (NDR)
  put_le32(b, 1);  // wkbPoint
  put_le_double(b, x);
  put_le_double(b, y);
  return b;
}

// Lines or polygons as GeoPackage binary, the header as for a point with the
// parts' envelope, then ISO WKB (OGC 06-103r4 clause 8): MultiLineString (type 5)
// of LineStrings (2), or MultiPolygon (6) of Polygons (3) with one ring each;
// for a LINESTRING layer the first part alone as a LineString (2).
std::string gpkg_multi(int32_t srs_id, const std::string& geometry, const Parts& parts, double env[4]) {
  const bool polygons = geometry == "MULTIPOLYGON", single = geometry == "LINESTRING";
  std::string b;
  b += "GP";
  put_u8(b, 0);
  put_u8(b, (1u << 1) | 1u);
  put_le32(b, static_cast<uint32_t>(srs_id));
  env[0] = env[2] = std::numeric_limits<double>::infinity();
  env[1] = env[3] = -env[0];
  for (const auto& part : parts)
    for (const auto& q : part) {
      env[0] = std::min(env[0], q[0]), env[1] = std::max(env[1], q[0]);
      env[2] = std::min(env[2], q[1]), env[3] = std::max(env[3], q[1]);
    }
  for (int k = 0; k < 4; ++k) put_le_double(b, env[k]);
  if (!single) {
    put_u8(b, 1);
    put_le32(b, polygons ? 6 : 5);
    put_le32(b, static_cast<uint32_t>(parts.size()));
  }
  for (const auto& part : parts) {
    if (single && &part != &parts.front()) break;
    put_u8(b, 1);
    put_le32(b, polygons ? 3 : 2);
    if (polygons) put_le32(b, 1);  // one ring
    put_le32(b, static_cast<uint32_t>(part.size()));
    for (const auto& q : part) {
      put_le_double(b, q[0]);
      put_le_double(b, q[1]);
    }
  }
  return b;
}

// A prepared statement of the raw SQLite API, for binding BLOBs (the storage
// Stmt binds text and numbers only).
class RawStmt {
 public:
  RawStmt(Db& db, const std::string& sql) : db_(db) {
    if (sqlite3_prepare_v2(db.handle(), sql.c_str(), -1, &st_, nullptr) != SQLITE_OK)
      throw SqlError(db.errmsg(), sqlite3_extended_errcode(db.handle()));
  }
  ~RawStmt() { sqlite3_finalize(st_); }
  RawStmt(const RawStmt&) = delete;
  RawStmt& operator=(const RawStmt&) = delete;
  void bind(int i, const FieldValue& v) {
    int rc = SQLITE_OK;
    if (std::holds_alternative<std::monostate>(v))
      rc = sqlite3_bind_null(st_, i);
    else if (auto s = std::get_if<std::string>(&v))
      rc = sqlite3_bind_text(st_, i, s->data(), static_cast<int>(s->size()), SQLITE_TRANSIENT);
    else if (auto d = std::get_if<double>(&v))
      rc = std::isfinite(*d) ? sqlite3_bind_double(st_, i, *d) : sqlite3_bind_null(st_, i);
    else if (auto n = std::get_if<int64_t>(&v))
      rc = sqlite3_bind_int64(st_, i, *n);
    else if (auto t = std::get_if<bool>(&v))
      rc = sqlite3_bind_int(st_, i, *t ? 1 : 0);  // BOOLEAN: 0 or 1 (clause 1.1.1.1.3)
    check(rc);
  }
  void bind_blob(int i, const std::string& b) {
    check(sqlite3_bind_blob(st_, i, b.data(), static_cast<int>(b.size()), SQLITE_TRANSIENT));
  }
  void bind_null(int i) { check(sqlite3_bind_null(st_, i)); }
  void run() {
    const int rc = sqlite3_step(st_);
    if (rc != SQLITE_DONE) check(rc);
    sqlite3_reset(st_);
    sqlite3_clear_bindings(st_);
  }

 private:
  void check(int rc) {
    if (rc != SQLITE_OK && rc != SQLITE_DONE) throw SqlError(db_.errmsg(), rc);
  }
  Db& db_;
  sqlite3_stmt* st_ = nullptr;
};

std::string sql_type(FieldType t) {
  // Clause 1.1.1.1.3, Table 1: GeoPackage data types.
  switch (t) {
    case FieldType::Text: return "TEXT";
    case FieldType::Real: return "DOUBLE";
    case FieldType::Integer: return "INTEGER";
    case FieldType::Boolean: return "BOOLEAN";
  }
  return "TEXT";
}

std::string quoted(const std::string& s) { return "\"" + s + "\""; }

}  // namespace

struct GeoPackageWriter::Impl {
  Impl(const std::string& path, int e) : db(path, SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE), epsg(e) {}
  Db db;
  int epsg;
  std::string now;
  Layer layer;  // the current layer's header
  std::unique_ptr<RawStmt> ins;
  double min_x = 0, min_y = 0, max_x = 0, max_y = 0;
};

GeoPackageWriter::GeoPackageWriter(const std::string& path, int epsg) : impl_(std::make_unique<Impl>(path, epsg)) {}
GeoPackageWriter::~GeoPackageWriter() = default;

void GeoPackageWriter::begin(const geo::UtmZone& zone) {
  Db& db = impl_->db;
  if (impl_->epsg == 0) impl_->epsg = utm_epsg(zone);
  const int epsg = impl_->epsg;
  db.exec("PRAGMA application_id = " + std::to_string(kGpkgApplicationId));
  db.exec("PRAGMA user_version = " + std::to_string(kGpkgUserVersion));
  db.exec("PRAGMA foreign_keys = ON");
  db.exec("BEGIN");
  db.exec(kSrsTable);
  {
    // Requirement 11: the rows for EPSG:4326 and the undefined Cartesian (-1) and
    // geographic (0) systems; then the layers' own UTM zone.
    Stmt s(db,
           "INSERT INTO gpkg_spatial_ref_sys(srs_name, srs_id, organization, organization_coordsys_id, "
           "definition, description) VALUES (?,?,?,?,?,?)");
    auto row = [&](const std::string& name, int id, const std::string& org, int org_id, const std::string& def,
                   const std::string& desc) {
      s.bind(1, name).bind(2, id).bind(3, org).bind(4, org_id).bind(5, def).bind(6, desc);
      s.run();
      s.reset();
    };
    row("Undefined cartesian SRS", -1, "NONE", -1, "undefined", "undefined cartesian coordinate reference system");
    row("Undefined geographic SRS", 0, "NONE", 0, "undefined", "undefined geographic coordinate reference system");
    row("WGS 84 geodetic", 4326, "EPSG", 4326, kWgs84Wkt,
        "longitude/latitude coordinates in decimal degrees on the WGS 84 spheroid");
    const std::string zone_name = "WGS 84 / UTM zone " + std::to_string(zone.zone) + (zone.northp ? "N" : "S");
    row(zone_name, epsg, "EPSG", epsg, utm_wkt(zone), "the project's working UTM zone");
  }
  db.exec(kContentsTable);
  db.exec(kGeometryColumnsTable);
  impl_->now = utc_now();  // Requirement 15: ISO 8601 "YYYY-MM-DDTHH:MM:SS.SSSZ"
}

void GeoPackageWriter::begin_layer(const Layer& l) {
  Impl& m = *impl_;
  m.layer = Layer{l.name, l.title, l.description, l.fields, {}, l.geometry};
  // Requirement 29: an INTEGER PRIMARY KEY AUTOINCREMENT column; clause 2.1.6:
  // the geometry column declared with its geometry type name.
  std::string ddl =
      "CREATE TABLE " + quoted(l.name) + " (fid INTEGER PRIMARY KEY AUTOINCREMENT NOT NULL, geom " + l.geometry;
  std::string cols = "geom", marks = "?";
  for (const auto& f : l.fields) {
    ddl += ", " + quoted(f.name) + " " + sql_type(f.type);
    cols += ", " + quoted(f.name);
    marks += ",?";
  }
  m.db.exec(ddl + ")");
  m.ins = std::make_unique<RawStmt>(m.db, "INSERT INTO " + quoted(l.name) + "(" + cols + ") VALUES (" + marks + ")");
  m.min_x = std::numeric_limits<double>::infinity(), m.min_y = m.min_x, m.max_x = -m.min_x, m.max_y = -m.min_x;
}

void GeoPackageWriter::feature(Feature&& f) {
  Impl& m = *impl_;
  RawStmt& ins = *m.ins;
  if (!f.grid_parts.empty()) {
    double env[4];
    ins.bind_blob(1, gpkg_multi(m.epsg, m.layer.geometry, f.grid_parts, env));
    m.min_x = std::min(m.min_x, env[0]);
    m.max_x = std::max(m.max_x, env[1]);
    m.min_y = std::min(m.min_y, env[2]);
    m.max_y = std::max(m.max_y, env[3]);
  } else if (f.grid) {
    ins.bind_blob(1, gpkg_point(m.epsg, f.grid->easting, f.grid->northing));
    m.min_x = std::min(m.min_x, f.grid->easting);
    m.max_x = std::max(m.max_x, f.grid->easting);
    m.min_y = std::min(m.min_y, f.grid->northing);
    m.max_y = std::max(m.max_y, f.grid->northing);
  } else {
    ins.bind_null(1);
  }
  for (size_t i = 0; i < f.values.size(); ++i) ins.bind(static_cast<int>(i) + 2, f.values[i]);
  ins.run();
}

void GeoPackageWriter::end_layer() {
  Impl& m = *impl_;
  m.ins.reset();
  const Layer& l = m.layer;
  Stmt c(m.db,
         "INSERT INTO gpkg_contents(table_name, data_type, identifier, description, last_change, min_x, min_y, "
         "max_x, max_y, srs_id) VALUES (?, 'features', ?, ?, ?, ?, ?, ?, ?, ?)");
  c.bind(1, l.name).bind(2, l.title).bind(3, l.description).bind(4, m.now);
  if (std::isfinite(m.min_x))
    c.bind(5, m.min_x).bind(6, m.min_y).bind(7, m.max_x).bind(8, m.max_y);
  else
    c.bind(5, nullptr).bind(6, nullptr).bind(7, nullptr).bind(8, nullptr);
  c.bind(9, m.epsg);
  c.run();
  Stmt g(m.db,
         "INSERT INTO gpkg_geometry_columns(table_name, column_name, geometry_type_name, srs_id, z, m) "
         "VALUES (?, 'geom', ?, ?, 0, 0)");
  g.bind(1, l.name).bind(2, l.geometry).bind(3, m.epsg);
  g.run();
}

void GeoPackageWriter::finish() { impl_->db.exec("COMMIT"); }

void write_geopackage(const std::string& path, const LayerSet& set, int epsg) {
  GeoPackageWriter w(path, epsg);
  send_layers(set, w);
  w.finish();
}

}  // namespace cairn::store
