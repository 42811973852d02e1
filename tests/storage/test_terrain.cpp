// The terrain in the project file (storage/terrain.h) and DEMs read through
// GDAL (formats/raster.h).
//
// Outside sources named beside the checks:
//  - the ESRI ASCII grid format as GDAL's AAIGrid driver documents it (ncols,
//    nrows, xllcorner, yllcorner, cellsize, NODATA_value; rows from the north;
//    the CRS only from a .prj beside it): the test rasters are written as that text,
//    so their values come from the text, not from Cairn;
//  - GDAL Data Model, "Affine GeoTransform" ("pixel is area": a value belongs to
//    its cell's centre);
//  - RFC 1950/1951 (zlib): a compressed tile must give back every byte;
//  - SQLite documentation, "PRAGMA writable_schema" and "ALTER TABLE" section 7:
//    a widened CHECK constraint accepts the new value and still refuses others;
//  - a bilinear surface reproduces a plane exactly (Press et al., "Numerical
//    Recipes", 3rd ed., section 3.6.1).
#include <gtest/gtest.h>

#include <cmath>
#include <limits>

#include "formats/limits.h"
#include "formats/raster.h"
#include "geomath/geodesy.h"
#include "app/core/export.h"
#include "formats/layers.h"
#include "storage/merge.h"
#include "storage/repository.h"
#include "storage/schema.h"
#include "storage/terrain.h"
#include "storage_test_util.h"

using namespace cairn::store;
using cairn::store::testing::TempDir;
using cairn::store::testing::write_file;

namespace {

// Zone 8N: the point lies near E 466234, N 6783779 (checked against pyproj in
// tests/reference/test_terrain_gdal.py; here only our own round trip matters).
constexpr double kLat = 61.187, kLon = -135.628;

struct Fixture {
  TempDir dir;
  std::string path = dir.file("ground.cairn");
  Project p = Project::create(path, NewProject{"Ground", "8N", North::True, 0}, cairn::store::testing::quiet());
  std::string contact, point, station;
  cairn::geo::UtmPoint u;

  Fixture() {
    Unit a;
    a.code = "Ls";
    a.name = "lower slate";
    a.age_rank = 1;
    Unit b;
    b.code = "Uq";
    b.name = "upper quartzite";
    b.age_rank = 2;
    Contact c;
    c.name = "slate-quartzite";
    c.lower_unit = add(p, a);
    c.upper_unit = add(p, b);
    contact = add(p, c);
    ContactPoint pt;
    pt.contact = contact;
    pt.lat = kLat;
    pt.lon = kLon;
    point = add(p, pt);  // no elevation
    Station s;
    s.code = "S1";
    s.lat = kLat + 0.001;
    s.lon = kLon + 0.001;
    station = add(p, s);
    u = *cairn::geo::to_utm({kLat, kLon}, cairn::geo::UtmZone{8, true});
  }

  // An ESRI ASCII grid of a plane z = 700 + 0.1 dE + 0.05 dN about the point,
  // cellsize 10, 200 x 150 cells; with a .prj of UTM 8N when `prj`.
  std::string plane_grid(bool prj, int nx = 200, int ny = 150) {
    const double x0 = std::floor(u.easting - 1000), y0 = std::floor(u.northing - 700);
    std::string text = "ncols " + std::to_string(nx) + "\nnrows " + std::to_string(ny) + "\nxllcorner " +
                       std::to_string(x0) + "\nyllcorner " + std::to_string(y0) + "\ncellsize 10\nNODATA_value -9999\n";
    for (int j = 0; j < ny; ++j) {
      const double n = y0 + (ny - j - 0.5) * 10;  // rows from the north, value at the cell centre
      for (int i = 0; i < nx; ++i) {
        const double e = x0 + (i + 0.5) * 10;
        text += std::to_string(700 + 0.1 * (e - x0) + 0.05 * (n - y0)) + (i + 1 < nx ? " " : "\n");
      }
    }
    const std::string asc = dir.file(prj ? "plane.asc" : "bare.asc");
    write_file(asc, text);
    if (prj) write_file(dir.file("plane.prj"), cairn::formats::utm_wkt(cairn::geo::UtmZone{8, true}));
    x0_ = x0;
    y0_ = y0;
    return asc;
  }
  double plane_at(double e, double n) const { return 700 + 0.1 * (e - x0_) + 0.05 * (n - y0_); }
  double x0_ = 0, y0_ = 0;
};

}  // namespace

TEST(Terrain, MigrationAddsTablesAndDemStations) {
  Fixture f;
  EXPECT_EQ(f.p.schema_version(), kSchemaVersion);
  EXPECT_EQ(f.p.db().query_int("SELECT count(*) FROM sqlite_schema WHERE name IN ('terrain','terrain_tiles')"), 2);
  // SQLite "ALTER TABLE" section 7: the widened CHECK takes 'dem' and still refuses others.
  auto st = *get_station(f.p, f.station);
  st.source = PositionSource::Dem;
  st.elevation = 800;
  EXPECT_TRUE(update(f.p, st));
  EXPECT_THROW(f.p.db().exec("UPDATE stations SET source = 'guess'"), SqlError);
  EXPECT_TRUE(f.p.integrity_check().empty());
}

TEST(Terrain, GridWithoutCrsIsRefused) {
  Fixture f;
  const auto r = cairn::formats::read_dem(f.plane_grid(false), {32608, std::nullopt});
  ASSERT_FALSE(r.ok());
  EXPECT_NE(r.error().find("no coordinate reference system"), std::string::npos) << r.error();
  EXPECT_NE(r.error().find("bare.asc"), std::string::npos);
}

TEST(Terrain, UnreadableAndTooLargeAreRefused) {
  Fixture f;
  write_file(f.dir.file("junk.tif"), "not a raster at all");
  EXPECT_FALSE(cairn::formats::read_dem(f.dir.file("junk.tif"), {32608, std::nullopt}).ok());
  cairn::formats::DemRequest req{32608, std::nullopt};
  req.max_cells = 1000;  // the grid has 30 000 cells
  const auto r = cairn::formats::read_dem(f.plane_grid(true), req);
  ASSERT_FALSE(r.ok());
  EXPECT_NE(r.error().find("limit"), std::string::npos) << r.error();
}

TEST(Terrain, AsciiGridReadAsWrittenAndClipped) {
  Fixture f;
  const std::string asc = f.plane_grid(true);
  const auto all = cairn::formats::read_dem(asc, {32608, std::nullopt});
  ASSERT_TRUE(all.ok()) << all.error();
  EXPECT_FALSE(all->reprojected);
  EXPECT_EQ(all->grid.nx, 200);
  EXPECT_EQ(all->grid.ny, 150);
  EXPECT_DOUBLE_EQ(all->grid.cell, 10);
  EXPECT_DOUBLE_EQ(all->grid.west, f.x0_);
  EXPECT_DOUBLE_EQ(all->grid.north, f.y0_ + 1500);
  // Cell (3, 2): the text's value at that cell's centre.
  EXPECT_NEAR(all->grid.at(3, 2), f.plane_at(f.x0_ + 35, f.y0_ + 1500 - 25), 1e-3);
  // Clipped to an area: whole cells covering it, nothing more.
  cairn::formats::DemArea a{f.x0_ + 101, f.y0_ + 202, f.x0_ + 299, f.y0_ + 395};
  const auto part = cairn::formats::read_dem(asc, {32608, a});
  ASSERT_TRUE(part.ok()) << part.error();
  EXPECT_DOUBLE_EQ(part->grid.west, f.x0_ + 100);
  EXPECT_DOUBLE_EQ(part->grid.east(), f.x0_ + 300);
  EXPECT_DOUBLE_EQ(part->grid.south(), f.y0_ + 200);
  EXPECT_DOUBLE_EQ(part->grid.north, f.y0_ + 400);
}

// A grid cut short (its header promises 150 rows, the file holds 5: an ESRI
// ASCII grid as GDAL's AAIGrid driver documents it) is refused, naming the
// first missing row, also when the area asked for lies far below it (the read
// that once ran for minutes, tests/fuzz/regressions/raster).
TEST(Terrain, AsciiGridCutShortIsRefusedNamingTheRow) {
  Fixture f;
  const std::string asc = f.plane_grid(true);
  std::string text = cairn::formats::read_file_limited(asc).value();
  size_t at = 0;
  for (int line = 0; line < 6 + 5; ++line) at = text.find('\n', at) + 1;  // header (6 lines) and 5 rows
  text.resize(at);
  write_file(asc, text);
  cairn::formats::DemArea a{f.x0_ + 101, f.y0_ + 202, f.x0_ + 299, f.y0_ + 395};
  const auto part = cairn::formats::read_dem(asc, {32608, a});
  ASSERT_FALSE(part.ok());
  EXPECT_NE(part.error().find("plane.asc"), std::string::npos) << part.error();
  EXPECT_NE(part.error().find("row 6"), std::string::npos) << part.error();
}

TEST(Terrain, StoredTilesComeBackExactly) {
  Fixture f;
  cairn::geo::TerrainGrid g;
  g.nx = 300;  // two tiles across, the second partial
  g.ny = 270;
  g.west = 466000;
  g.north = 6784000;
  g.cell = 2.5;
  for (int k = 0; k < g.nx * g.ny; ++k) g.z.push_back(static_cast<float>(600 + (k % 977) * 0.125));
  g.z[12345] = std::numeric_limits<float>::quiet_NaN();
  store_terrain(f.p, g, 32608, "synthetic", 1.5);
  const auto back = load_terrain(f.p);
  ASSERT_TRUE(back);
  ASSERT_EQ(back->z.size(), g.z.size());
  for (std::size_t k = 0; k < g.z.size(); ++k) {
    if (k == 12345)
      EXPECT_TRUE(std::isnan(back->z[k]));
    else
      ASSERT_EQ(back->z[k], g.z[k]) << k;
  }
  const auto info = terrain_info(f.p);
  ASSERT_TRUE(info);
  EXPECT_EQ(info->digest, terrain_digest(g, 32608));
  EXPECT_EQ(*info->vertical_accuracy, 1.5);
  EXPECT_EQ(f.p.db().query_int("SELECT count(*) FROM terrain_tiles"), 4);
  // A damaged tile is named, not silently read.
  f.p.db().exec("UPDATE terrain_tiles SET data = x'00112233' WHERE row = 1 AND col = 1");
  EXPECT_THROW(load_terrain(f.p), std::runtime_error);
}

TEST(Terrain, AttachingFillsMissingElevationsAudited) {
  Fixture f;
  const auto r = cairn::formats::read_dem(f.plane_grid(true), {32608, std::nullopt});
  ASSERT_TRUE(r.ok()) << r.error();
  const auto stored = store_terrain(f.p, r->grid, 32608, "plane.asc", 2.0);
  EXPECT_EQ(stored.filled_points, 1);
  EXPECT_EQ(stored.filled_stations, 1);
  const auto pt = *get_point(f.p, f.point);
  ASSERT_TRUE(pt.elevation);
  // Bilinear on a plane is the plane (Numerical Recipes 3.6.1).
  EXPECT_NEAR(*pt.elevation, f.plane_at(f.u.easting, f.u.northing), 1e-3);
  EXPECT_EQ(pt.source, PointSource::Dem);
  EXPECT_EQ(*pt.v_accuracy, 2.0);
  const auto st = *get_station(f.p, f.station);
  EXPECT_EQ(st.source, PositionSource::Dem);
  EXPECT_TRUE(st.elevation);
  // Audited: the update is in the point's trail and undoing it brings back "no elevation".
  const auto trail = audit_trail(f.p, f.point);
  ASSERT_EQ(trail.back().action, "update");
  undo(f.p, trail.back());
  EXPECT_FALSE(get_point(f.p, f.point)->elevation);
  // The terrain's own insert is audited too.
  EXPECT_EQ(audit_trail(f.p, stored.uuid).front().action, "insert");
}

TEST(Terrain, SnapReplacesReceiverElevationsAndUndoes) {
  Fixture f;
  auto pt = *get_point(f.p, f.point);
  pt.elevation = 650;
  pt.v_accuracy = 8;
  update(f.p, pt);
  EXPECT_THROW(snap_to_terrain(f.p, f.contact), ValidationError);  // no terrain yet
  const auto r = cairn::formats::read_dem(f.plane_grid(true), {32608, std::nullopt});
  ASSERT_TRUE(r.ok());
  store_terrain(f.p, r->grid, 32608, "plane.asc", 1.0);
  EXPECT_EQ(get_point(f.p, f.point)->elevation, 650);  // attaching fills only missing ones
  EXPECT_EQ(snap_to_terrain(f.p, f.contact), 1);
  EXPECT_NEAR(*get_point(f.p, f.point)->elevation, f.plane_at(f.u.easting, f.u.northing), 1e-3);
  undo(f.p, audit_trail(f.p, f.point).back());
  EXPECT_EQ(get_point(f.p, f.point)->elevation, 650);
  EXPECT_EQ(get_point(f.p, f.point)->source, PointSource::Gps);
}

TEST(Terrain, RemoveDropsItAudited) {
  Fixture f;
  const auto r = cairn::formats::read_dem(f.plane_grid(true), {32608, std::nullopt});
  ASSERT_TRUE(r.ok());
  const auto stored = store_terrain(f.p, r->grid, 32608, "plane.asc", std::nullopt);
  EXPECT_TRUE(remove_terrain(f.p));
  EXPECT_FALSE(terrain_info(f.p));
  EXPECT_FALSE(load_terrain(f.p));
  EXPECT_FALSE(remove_terrain(f.p));
  EXPECT_EQ(f.p.db().query_int("SELECT count(*) FROM terrain_tiles"), 0);
  EXPECT_EQ(audit_trail(f.p, stored.uuid).back().action, "delete");
  // A bad accuracy is refused and nothing is written.
  EXPECT_THROW(store_terrain(f.p, r->grid, 32608, "plane.asc", -1.0), ValidationError);
  EXPECT_FALSE(terrain_info(f.p));
}

TEST(Terrain, MergeCarriesAddsSkipsAndReportsADifferentOne) {
  // Merge rules of storage/merge.h: a record the target lacks is added, the same
  // version skipped, two different ones a conflict that replaces nothing.
  Fixture a;
  const auto r = cairn::formats::read_dem(a.plane_grid(true), {32608, std::nullopt});
  ASSERT_TRUE(r.ok());
  store_terrain(a.p, r->grid, 32608, "plane.asc", 1.0);
  TempDir dir;
  const std::string camp_path = dir.file("camp.cairn");
  {
    Project camp = Project::create(camp_path, NewProject{"Camp", "8N", North::True, 0}, cairn::store::testing::quiet());
    auto rep = merge_files(camp, {a.path});
    ASSERT_TRUE(terrain_info(camp));
    EXPECT_EQ(terrain_info(camp)->digest, terrain_info(a.p)->digest);
    EXPECT_EQ(load_terrain(camp)->z, load_terrain(a.p)->z);
    rep = merge_files(camp, {a.path});  // again: identical, skipped, nothing changes
    EXPECT_FALSE(rep.changed);
    // A different terrain elsewhere: reported, the camp keeps its own.
    Fixture b;
    auto g = r->grid;
    g.z[0] += 1;
    store_terrain(b.p, g, 32608, "other.asc", 1.0);
    const std::string before = terrain_info(camp)->digest;
    rep = merge_files(camp, {b.path});
    EXPECT_EQ(terrain_info(camp)->digest, before);
    bool reported = false;
    for (const auto& w : rep.warnings) reported = reported || w.find("differs from this file's") != std::string::npos;
    EXPECT_TRUE(reported);
    EXPECT_GE(rep.sources[0].counts.conflicts, 1);
  }
}

TEST(Terrain, RecordedAfterAttachingTakesTheTerrainsElevation) {
  // A point recorded later without an elevation: bilinear on the plane (Numerical
  // Recipes 3.6.1) from the tiles around it, source dem, in its insert audit row.
  Fixture f;
  const auto r = cairn::formats::read_dem(f.plane_grid(true), {32608, std::nullopt});
  ASSERT_TRUE(r.ok());
  store_terrain(f.p, r->grid, 32608, "plane.asc", 0.8);
  ContactPoint pt;
  pt.contact = f.contact;
  pt.lat = kLat + 0.002;
  pt.lon = kLon - 0.003;
  const std::string id = add(f.p, pt);
  const auto got = *get_point(f.p, id);
  const auto u = *cairn::geo::to_utm({pt.lat, pt.lon}, cairn::geo::UtmZone{8, true});
  ASSERT_TRUE(got.elevation);
  EXPECT_NEAR(*got.elevation, f.plane_at(u.easting, u.northing), 1e-3);
  EXPECT_EQ(got.source, PointSource::Dem);
  EXPECT_EQ(*got.v_accuracy, 0.8);
  EXPECT_NE(audit_trail(f.p, id).front().new_values.find("\"dem\""), std::string::npos);
  // One with its own elevation keeps it; one off the terrain stays without.
  ContactPoint own = pt;
  own.meta = {};
  own.elevation = 512;
  EXPECT_EQ(get_point(f.p, add(f.p, own))->elevation, 512);
  ContactPoint far = pt;
  far.meta = {};
  far.elevation.reset();
  far.lat = kLat + 1;
  EXPECT_FALSE(get_point(f.p, add(f.p, far))->elevation);
}
