// Export (app/core/export.h): the choice of format, the GeoPackage's fixed
// structure, the UTM definitions, and the CSV round trip through `import`.
//
// Outside sources named beside the checks:
//  - GeoPackage 1.3, OGC 12-128r18: application_id and user_version
//    (Requirement 2), required spatial reference systems (Requirement 11), the
//    binary geometry header of clause 2.1.3.1.1 and OGC 06-103r4 (WKB, clause 8);
//  - the UTM grid: central meridian 6*zone - 183, scale 0.9996, false easting
//    500 000 m, false northing 10 000 000 m in the south (DMA Technical Manual
//    8358.2), and EPSG's numbering 326zz / 327zz (EPSG registry, value from memory);
//  - RFC 4180 for the CSV files compared byte for byte after the round trip
//    (the requirement: export, import into a fresh file, export again).
// GDAL's ogrinfo and validator and PROJ check the same outputs in
// tests/reference/test_export_ogr.py.
#include <gtest/gtest.h>

#include <sqlite3.h>

#include <cstring>
#include <filesystem>

#include "app/core/export.h"
#include "formats/layers.h"
#include "storage/import.h"
#include "storage/repository.h"
#include "storage/sqlite.h"
#include "tests/storage/storage_test_util.h"

using namespace cairn::store;
using namespace cairn::core;
using namespace cairn::formats;
using cairn::store::testing::read_file;
using cairn::store::testing::TempDir;
namespace fs = std::filesystem;

namespace {

OpenOptions quiet() {
  OpenOptions o;
  o.backups = false;
  o.device_id = "e0000000-0000-4000-8000-00000000000e";
  o.device_name = "field tablet";
  return o;
}

// An invented project with every CSV kind, awkward text included.
struct Sample {
  TempDir dir;
  std::string path = dir.file("gully.cairn");
  Project p = Project::create(path, NewProject{"Quartz Gully", "33N", North::True, 2.5}, quiet());
  Sample() {
    Person who;
    who.name = "Ana Example";
    who.initials = "AE";
    const std::string ae = add(p, who);
    Unit a;
    a.code = "Gs";
    a.name = "grey slate";
    a.age_rank = 1;
    const std::string ua = add(p, a);
    Unit b;
    b.code = "Wq";
    b.name = "white \"sugary\" quartzite";
    b.age_rank = 2;
    const std::string ub = add(p, b);
    Contact c;
    c.name = "slate, quartzite";
    c.lower_unit = ua;
    c.upper_unit = ub;
    const std::string ct = add(p, c);
    Station s;
    s.code = "S1";
    s.lat = 46.5;
    s.lon = 16.2;
    s.elevation = 1200.25;
    s.h_accuracy = 3;
    s.unit = ua;
    s.observer = ae;
    s.time = "2025-06-14T09:30:00Z";
    s.notes = "spur\nabove the stream, \"big\" slab";
    const std::string st = add(p, s);
    PlanarReading r;
    r.station = st;
    r.kind = PlaneKind::Bedding;
    r.measured_strike = 120;
    r.measured_dip = 35;
    r.ref = "P1";
    r.contact = ct;
    r.quality = 4;
    r.facing = Facing::Upright;
    add(p, r);
    PlanarReading m;
    m.station = st;
    m.kind = PlaneKind::Joint;
    m.north = North::Magnetic;
    m.measured_strike = 30;
    m.measured_dip = 80;
    m.declination = 4;
    m.declination_source = "given";
    m.ref = "J1";
    add(p, m);
    LinearReading l;
    l.station = st;
    l.kind = LineKind::Slickenline;
    l.host_plane = r.meta.uuid;
    l.rake = 30;
    l.ref = "L1";
    add(p, l);
    LinearReading l2;
    l2.station = st;
    l2.kind = LineKind::Lineation;
    l2.measured_trend = 45;
    l2.measured_plunge = 10;
    add(p, l2);
    for (int i = 0; i < 4; ++i) {
      ContactPoint q;
      q.contact = ct;
      q.lat = 46.50 + 0.002 * i;
      q.lon = 16.20 + 0.003 * (i % 2);
      q.elevation = 1200 - 10 * i;
      q.source = PointSource::Gps;
      add(p, q);
    }
  }
};

// Reads an exported GeoPackage with SQLite only.
struct Gpkg {
  Db db;
  explicit Gpkg(const std::string& path) : db(path, SQLITE_OPEN_READONLY) {}
};

}  // namespace

TEST(Export, TheNameOfTheOutputPicksTheFormat) {
  TempDir d;
  EXPECT_EQ(*export_format_for("camp.gpkg"), ExportFormat::GeoPackage);
  EXPECT_EQ(*export_format_for("CAMP.GPKG"), ExportFormat::GeoPackage);
  EXPECT_EQ(*export_format_for("camp.geojson"), ExportFormat::GeoJson);
  EXPECT_EQ(*export_format_for("camp-csv/"), ExportFormat::CsvFolder);
  EXPECT_EQ(*export_format_for("camp-csv"), ExportFormat::CsvFolder);
  EXPECT_EQ(*export_format_for(d.path().string()), ExportFormat::CsvFolder);
  auto bad = export_format_for("camp.shp");
  ASSERT_FALSE(bad);
  EXPECT_NE(bad.error().find("camp.shp"), std::string::npos);
}

TEST(Export, UtmZonesAsTheEpsgRegistryNumbersAndDefinesThem) {
  EXPECT_EQ(utm_epsg({33, true}), 32633);
  EXPECT_EQ(utm_epsg({1, false}), 32701);
  EXPECT_EQ(utm_epsg({60, false}), 32760);
  const std::string n = utm_wkt({33, true}), s = utm_wkt({1, false});
  EXPECT_NE(n.find("PARAMETER[\"central_meridian\",15]"), std::string::npos);  // 6*33 - 183
  EXPECT_NE(n.find("PARAMETER[\"false_northing\",0]"), std::string::npos);
  EXPECT_NE(n.find("AUTHORITY[\"EPSG\",\"32633\"]]"), std::string::npos);
  EXPECT_NE(s.find("PARAMETER[\"central_meridian\",-177]"), std::string::npos);  // 6*1 - 183
  EXPECT_NE(s.find("PARAMETER[\"false_northing\",10000000]"), std::string::npos);
  EXPECT_NE(s.find("PARAMETER[\"scale_factor\",0.9996]"), std::string::npos);
  EXPECT_NE(s.find("\"WGS 84 / UTM zone 1S\""), std::string::npos);
}

TEST(Export, GeoPackageStructureFollowsTheStandard) {
  Sample x;
  const std::string out = x.dir.file("gully.gpkg");
  const ExportSummary s = export_geopackage(x.p, out);
  EXPECT_EQ(s.epsg, 32633);
  Gpkg g(out);
  // OGC 12-128r18 Requirement 2.
  EXPECT_EQ(g.db.query_int("PRAGMA application_id"), 0x47504B47);
  EXPECT_EQ(g.db.query_int("PRAGMA user_version"), 10300);
  // Requirement 11: -1, 0 and 4326, here with the working zone.
  EXPECT_EQ(g.db.query_int("SELECT count(*) FROM gpkg_spatial_ref_sys WHERE srs_id IN (-1, 0, 4326, 32633)"), 4);
  EXPECT_EQ(g.db.query_text("SELECT definition FROM gpkg_spatial_ref_sys WHERE srs_id = -1"), "undefined");
  EXPECT_EQ(g.db.query_text("SELECT organization FROM gpkg_spatial_ref_sys WHERE srs_id = 0"), "NONE");
  for (const char* layer :
       {"stations", "planar_readings", "linear_readings", "contact_points", "fitted_contacts", "flags"}) {
    Stmt c(g.db, "SELECT data_type, srs_id FROM gpkg_contents WHERE table_name = ?");
    c.bind(1, layer);
    ASSERT_TRUE(c.step()) << layer;
    EXPECT_EQ(c.text(0), "features");
    EXPECT_EQ(c.int64(1), 32633);
    Stmt gc(g.db, "SELECT column_name, geometry_type_name, z, m FROM gpkg_geometry_columns WHERE table_name = ?");
    gc.bind(1, layer);
    ASSERT_TRUE(gc.step()) << layer;
    EXPECT_EQ(gc.text(0), "geom");
    EXPECT_EQ(gc.text(1), "POINT");
  }
  EXPECT_EQ(g.db.query_int("SELECT count(*) FROM stations"), 1);
  EXPECT_EQ(g.db.query_int("SELECT count(*) FROM planar_readings"), 2);
  EXPECT_EQ(g.db.query_int("SELECT count(*) FROM linear_readings"), 2);
  EXPECT_EQ(g.db.query_int("SELECT count(*) FROM contact_points"), 4);
  EXPECT_EQ(g.db.query_int("SELECT count(*) FROM fitted_contacts"), 1);
  // Clause 2.1.3.1.1: "GP", version 0, flags, srs_id, envelope, then WKB.
  const std::string blob = g.db.query_text("SELECT geom FROM stations");
  ASSERT_EQ(blob.size(), 8u + 32u + 21u);
  EXPECT_EQ(blob.substr(0, 2), "GP");
  EXPECT_EQ(blob[2], 0);
  const unsigned flags = static_cast<unsigned char>(blob[3]);
  EXPECT_EQ(flags & 1u, 1u);         // B: little-endian
  EXPECT_EQ((flags >> 1) & 7u, 1u);  // E: envelope minx, maxx, miny, maxy
  EXPECT_EQ(flags & 0xF0u, 0u);      // standard, not empty, reserved bits 0
  int32_t srs;
  std::memcpy(&srs, blob.data() + 4, 4);  // little-endian host, as the flag says
  EXPECT_EQ(srs, 32633);
  EXPECT_EQ(blob[40], 1);  // WKB byte order NDR
  uint32_t type;
  std::memcpy(&type, blob.data() + 41, 4);
  EXPECT_EQ(type, 1u);  // Point
  double env[4], xy[2];
  std::memcpy(env, blob.data() + 8, 32);
  std::memcpy(xy, blob.data() + 45, 16);
  EXPECT_EQ(env[0], xy[0]);
  EXPECT_EQ(env[1], xy[0]);
  EXPECT_EQ(env[2], xy[1]);
  EXPECT_EQ(env[3], xy[1]);
  // Spot values from the records: declination as NOAA defines it (true = magnetic
  // + declination), dip direction by the right-hand rule (strike + 90).
  EXPECT_DOUBLE_EQ(std::stod(g.db.query_text("SELECT strike FROM planar_readings WHERE ref = 'J1'")), 34.0);
  EXPECT_DOUBLE_EQ(std::stod(g.db.query_text("SELECT dip_direction FROM planar_readings WHERE ref = 'P1'")), 210.0);
  EXPECT_EQ(g.db.query_text("SELECT notes FROM stations"), "spur\nabove the stream, \"big\" slab");
}

TEST(Export, CsvExportImportExportGivesIdenticalFiles) {
  Sample x;
  const std::string first = x.dir.file("csv1"), second = x.dir.file("csv2");
  const ExportSummary s = export_csv_folder(x.p, first);
  ASSERT_EQ(s.layers.size(), 6u);
  EXPECT_EQ(s.layers[2].name, "stations.csv");
  EXPECT_EQ(s.layers[2].count, 1u);  // one station, its notes over two lines (RFC 4180 quoting)
  EXPECT_EQ(s.layers[3].count, 2u);
  Project fresh = Project::create(x.dir.file("fresh.cairn"), NewProject{"again", "33N", North::True, 0}, quiet());
  for (const auto& k : {"units", "contacts", "stations", "planes", "lines", "points"}) {
    const std::string file = (fs::path(first) / (std::string(k) + ".csv")).string();
    const ImportReport r = import_csv(fresh, *parse_import_kind(k), read_file(file), file);
    ASSERT_TRUE(r.ok()) << k << ": " << (r.errors.empty() ? "" : r.errors.front());
  }
  export_csv_folder(fresh, second);
  for (const auto& k : {"units", "contacts", "stations", "planes", "lines", "points"}) {
    const std::string a = read_file((fs::path(first) / (std::string(k) + ".csv")).string());
    const std::string b = read_file((fs::path(second) / (std::string(k) + ".csv")).string());
    EXPECT_FALSE(a.empty()) << k;
    EXPECT_EQ(a, b) << k;
  }
  // The header is exactly the import's own column names (a subset, in its order).
  const auto& allowed = import_columns(ImportKind::Planes);
  const std::string planes = read_file((fs::path(first) / "planes.csv").string());
  std::string header = planes.substr(0, planes.find('\n'));
  size_t at = 0;
  for (size_t i = 0; i <= header.size(); ++i) {
    if (i == header.size() || header[i] == ',') {
      const std::string col = header.substr(at, i - at);
      EXPECT_NE(std::find(allowed.begin(), allowed.end(), col), allowed.end()) << col;
      at = i + 1;
    }
  }
}

TEST(Export, AFailedExportLeavesNothingBehind) {
  Sample x;
  const std::string out = x.dir.file("no/such/folder/gully.gpkg");
  EXPECT_THROW(export_project(x.p, out), std::runtime_error);
  EXPECT_FALSE(fs::exists(x.dir.file("no")));
  EXPECT_THROW(export_project(x.p, x.dir.file("gully.kml")), std::invalid_argument);
  // A second export replaces the first whole.
  const std::string json = x.dir.file("gully.geojson");
  cairn::store::testing::write_file(json, std::string(100000, 'x'));
  export_project(x.p, json);
  const std::string text = read_file(json);
  EXPECT_EQ(text.find('x' + std::string(50, 'x')), std::string::npos);
  EXPECT_EQ(text.rfind("{\"type\":\"FeatureCollection\"", 0), 0u);
  // No temporary files are left beside the outputs.
  for (const auto& e : fs::directory_iterator(x.dir.path()))
    EXPECT_EQ(e.path().extension().string() == ".tmp", false) << e.path();
}
