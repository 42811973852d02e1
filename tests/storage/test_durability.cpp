// Durability of the project file: connection settings, migration of a file
// written by the version-1 schema, refusal of a newer file, read-only fallback
// on a damaged file naming the newest backup, and rolling backups.
// Sources: SQLite documentation ("PRAGMA journal_mode", "PRAGMA synchronous",
// "PRAGMA foreign_keys", "PRAGMA user_version", "PRAGMA quick_check",
// "ALTER TABLE", "Using the SQLite Online Backup API", "Database File Format"
// for the page layout used to damage a file).
#include <gtest/gtest.h>
#include <sqlite3.h>

#include <filesystem>
#include <fstream>

#include "storage/project.h"
#include "storage/repository.h"
#include "storage/schema.h"
#include "formats/sha256.h"
#include "storage/sqlite.h"
#include "storage_test_util.h"

using namespace cairn::store;
using namespace cairn::formats;
using cairn::store::testing::quiet;
using cairn::store::testing::read_file;
using cairn::store::testing::TempDir;

namespace {

// The version-1 schema exactly as Cairn first wrote it (frozen here on purpose:
// it is what files in the field have).
const char* const kV1 = R"SQL(
CREATE TABLE project (id INTEGER PRIMARY KEY CHECK (id = 1), file_uuid TEXT NOT NULL, name TEXT NOT NULL,
  utm_zone TEXT, north_default TEXT NOT NULL CHECK (north_default IN ('true','magnetic')),
  declination REAL NOT NULL DEFAULT 0 CHECK (declination BETWEEN -180 AND 180), local_device TEXT NOT NULL,
  created TEXT NOT NULL, updated TEXT NOT NULL);
CREATE TABLE devices (uuid TEXT PRIMARY KEY, name TEXT NOT NULL, created TEXT NOT NULL, updated TEXT NOT NULL,
  device TEXT NOT NULL, deleted TEXT);
CREATE TABLE people (uuid TEXT PRIMARY KEY, name TEXT NOT NULL, initials TEXT NOT NULL, created TEXT NOT NULL,
  updated TEXT NOT NULL, device TEXT NOT NULL, deleted TEXT);
CREATE UNIQUE INDEX people_initials ON people(initials) WHERE deleted IS NULL;
CREATE TABLE units (uuid TEXT PRIMARY KEY, code TEXT NOT NULL, name TEXT NOT NULL,
  age_rank INTEGER NOT NULL CHECK (age_rank >= 1), colour TEXT NOT NULL, created TEXT NOT NULL,
  updated TEXT NOT NULL, device TEXT NOT NULL, deleted TEXT);
CREATE UNIQUE INDEX units_code ON units(code) WHERE deleted IS NULL;
CREATE TABLE contacts (uuid TEXT PRIMARY KEY, name TEXT NOT NULL, lower_unit TEXT NOT NULL REFERENCES units(uuid),
  upper_unit TEXT NOT NULL REFERENCES units(uuid),
  type TEXT NOT NULL CHECK (type IN ('depositional','unconformity','fault','intrusive')),
  created TEXT NOT NULL, updated TEXT NOT NULL, device TEXT NOT NULL, deleted TEXT);
CREATE UNIQUE INDEX contacts_name ON contacts(name) WHERE deleted IS NULL;
CREATE TABLE stations (uuid TEXT PRIMARY KEY, code TEXT NOT NULL, lat REAL NOT NULL CHECK (lat BETWEEN -90 AND 90),
  lon REAL NOT NULL CHECK (lon BETWEEN -180 AND 180), elevation REAL CHECK (elevation BETWEEN -500 AND 9000),
  h_accuracy REAL CHECK (h_accuracy >= 0), v_accuracy REAL CHECK (v_accuracy >= 0),
  source TEXT NOT NULL CHECK (source IN ('gps','map','manual')), unit TEXT REFERENCES units(uuid),
  observer TEXT REFERENCES people(uuid), time TEXT, notes TEXT NOT NULL DEFAULT '', created TEXT NOT NULL,
  updated TEXT NOT NULL, device TEXT NOT NULL, deleted TEXT);
CREATE UNIQUE INDEX stations_code ON stations(code) WHERE deleted IS NULL;
CREATE TABLE planes (uuid TEXT PRIMARY KEY, station TEXT NOT NULL REFERENCES stations(uuid),
  kind TEXT NOT NULL CHECK (kind IN ('bedding','foliation','cleavage','joint','fault','vein','contact','slope')),
  strike REAL NOT NULL CHECK (strike >= 0 AND strike < 360), dip REAL NOT NULL CHECK (dip BETWEEN 0 AND 90),
  typed TEXT NOT NULL, notation TEXT NOT NULL CHECK (notation IN ('strike_dip','dip_direction_dip','text')),
  north TEXT NOT NULL CHECK (north IN ('true','magnetic')), measured_strike REAL NOT NULL,
  measured_dip REAL NOT NULL, declination REAL NOT NULL, declination_source TEXT NOT NULL DEFAULT '',
  quality INTEGER CHECK (quality BETWEEN 1 AND 5),
  facing TEXT NOT NULL CHECK (facing IN ('unknown','upright','overturned')), contact TEXT REFERENCES contacts(uuid),
  ref TEXT, time TEXT, observer TEXT REFERENCES people(uuid), notes TEXT NOT NULL DEFAULT '',
  created TEXT NOT NULL, updated TEXT NOT NULL, device TEXT NOT NULL, deleted TEXT);
CREATE INDEX planes_station ON planes(station);
CREATE UNIQUE INDEX planes_ref ON planes(station, ref) WHERE deleted IS NULL AND ref IS NOT NULL;
CREATE TABLE lines (uuid TEXT PRIMARY KEY, station TEXT NOT NULL REFERENCES stations(uuid),
  kind TEXT NOT NULL CHECK (kind IN ('lineation','fold_axis','slickenline','intersection')),
  trend REAL NOT NULL CHECK (trend >= 0 AND trend < 360), plunge REAL NOT NULL CHECK (plunge BETWEEN 0 AND 90),
  typed TEXT NOT NULL, north TEXT NOT NULL CHECK (north IN ('true','magnetic')), measured_trend REAL NOT NULL,
  measured_plunge REAL NOT NULL, declination REAL NOT NULL, declination_source TEXT NOT NULL DEFAULT '',
  host_plane TEXT REFERENCES planes(uuid), rake REAL CHECK (rake BETWEEN 0 AND 180), ref TEXT, time TEXT,
  observer TEXT REFERENCES people(uuid), notes TEXT NOT NULL DEFAULT '', created TEXT NOT NULL,
  updated TEXT NOT NULL, device TEXT NOT NULL, deleted TEXT);
CREATE INDEX lines_station ON lines(station);
CREATE UNIQUE INDEX lines_ref ON lines(station, ref) WHERE deleted IS NULL AND ref IS NOT NULL;
CREATE TABLE points (uuid TEXT PRIMARY KEY, contact TEXT NOT NULL REFERENCES contacts(uuid),
  lat REAL NOT NULL CHECK (lat BETWEEN -90 AND 90), lon REAL NOT NULL CHECK (lon BETWEEN -180 AND 180),
  elevation REAL CHECK (elevation BETWEEN -500 AND 9000), h_accuracy REAL CHECK (h_accuracy >= 0),
  v_accuracy REAL CHECK (v_accuracy >= 0), source TEXT NOT NULL CHECK (source IN ('gps','map','dem')), time TEXT,
  observer TEXT REFERENCES people(uuid), notes TEXT NOT NULL DEFAULT '', created TEXT NOT NULL,
  updated TEXT NOT NULL, device TEXT NOT NULL, deleted TEXT);
CREATE INDEX points_contact ON points(contact);
CREATE TABLE photos (uuid TEXT PRIMARY KEY, station TEXT REFERENCES stations(uuid), path TEXT NOT NULL,
  sha256 TEXT NOT NULL CHECK (length(sha256) = 64), caption TEXT NOT NULL DEFAULT '', time TEXT,
  created TEXT NOT NULL, updated TEXT NOT NULL, device TEXT NOT NULL, deleted TEXT);
CREATE TABLE audit (uuid TEXT PRIMARY KEY, at TEXT NOT NULL, device TEXT NOT NULL, person TEXT, tbl TEXT NOT NULL,
  record TEXT NOT NULL, action TEXT NOT NULL CHECK (action IN ('insert','update','delete','restore')),
  old_values TEXT, new_values TEXT);
CREATE INDEX audit_record ON audit(record);
CREATE INDEX audit_at ON audit(at);
PRAGMA application_id = 1128354382;
PRAGMA user_version = 1;
)SQL";

// Data as a version-1 Cairn would have written it.
const char* const kV1Data = R"SQL(
INSERT INTO project VALUES (1, 'a0000000-0000-4000-8000-000000000001', 'Old season', '33N', 'magnetic', 4.5,
  'd0000000-0000-4000-8000-000000000001', '2025-05-01T08:00:00.000Z', '2025-05-01T08:00:00.000Z');
INSERT INTO devices VALUES ('d0000000-0000-4000-8000-000000000001', 'old tablet', '2025-05-01T08:00:00.000Z',
  '2025-05-01T08:00:00.000Z', 'd0000000-0000-4000-8000-000000000001', NULL);
INSERT INTO people VALUES ('e0000000-0000-4000-8000-000000000001', 'Cleo Example', 'CE', '2025-05-01T08:00:00.000Z',
  '2025-05-01T08:00:00.000Z', 'd0000000-0000-4000-8000-000000000001', NULL);
INSERT INTO units VALUES ('b0000000-0000-4000-8000-000000000001', 'Pgs', 'grey schist', 1, '#E69F00',
  '2025-05-01T08:00:00.000Z', '2025-05-01T08:00:00.000Z', 'd0000000-0000-4000-8000-000000000001', NULL);
INSERT INTO units VALUES ('b0000000-0000-4000-8000-000000000002', 'Qm', 'pale marble', 2, '#56B4E9',
  '2025-05-01T08:00:00.000Z', '2025-05-01T08:00:00.000Z', 'd0000000-0000-4000-8000-000000000001', NULL);
INSERT INTO contacts VALUES ('c0000000-0000-4000-8000-000000000001', 'Pgs-Qm', 'b0000000-0000-4000-8000-000000000001',
  'b0000000-0000-4000-8000-000000000002', 'unconformity', '2025-05-01T08:00:00.000Z', '2025-05-01T08:00:00.000Z',
  'd0000000-0000-4000-8000-000000000001', NULL);
INSERT INTO stations VALUES ('50000000-0000-4000-8000-000000000001', 'S7', 46.5, 14.25, 1200.5, 3, 5, 'gps',
  'b0000000-0000-4000-8000-000000000001', 'e0000000-0000-4000-8000-000000000001', '2025-05-02T09:00:00Z',
  'saddle', '2025-05-02T09:00:01.000Z', '2025-05-02T09:10:00.000Z', 'd0000000-0000-4000-8000-000000000001', NULL);
INSERT INTO planes VALUES ('70000000-0000-4000-8000-000000000001', '50000000-0000-4000-8000-000000000001',
  'bedding', 34.5, 40, '030/40', 'strike_dip', 'magnetic', 30, 40, 4.5, 'project setting', 4, 'upright',
  'c0000000-0000-4000-8000-000000000001', 'p1', '2025-05-02T09:05:00Z', 'e0000000-0000-4000-8000-000000000001',
  'top', '2025-05-02T09:05:01.000Z', '2025-05-02T09:05:01.000Z', 'd0000000-0000-4000-8000-000000000001', NULL);
INSERT INTO lines VALUES ('80000000-0000-4000-8000-000000000001', '50000000-0000-4000-8000-000000000001',
  'fold_axis', 124.5, 35, '120/35', 'magnetic', 120, 35, 4.5, 'project setting', NULL, NULL, 'a1', NULL, NULL, '',
  '2025-05-02T09:06:00.000Z', '2025-05-02T09:06:00.000Z', 'd0000000-0000-4000-8000-000000000001',
  '2025-05-02T09:07:00.000Z');
INSERT INTO points VALUES ('90000000-0000-4000-8000-000000000001', 'c0000000-0000-4000-8000-000000000001',
  46.501, 14.251, 1190, 4, NULL, 'dem', '2025-05-02', NULL, '', '2025-05-02T10:00:00.000Z',
  '2025-05-02T10:00:00.000Z', 'd0000000-0000-4000-8000-000000000001', NULL);
INSERT INTO photos VALUES ('f0000000-0000-4000-8000-000000000001', '50000000-0000-4000-8000-000000000001',
  'photos/IMG_0007.jpg', 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad', 'fold hinge', NULL,
  '2025-05-02T10:01:00.000Z', '2025-05-02T10:01:00.000Z', 'd0000000-0000-4000-8000-000000000001', NULL);
INSERT INTO audit VALUES ('aa000000-0000-4000-8000-000000000001', '2025-05-02T09:10:00.000Z',
  'd0000000-0000-4000-8000-000000000001', 'e0000000-0000-4000-8000-000000000001', 'stations',
  '50000000-0000-4000-8000-000000000001', 'update', '{"elevation":1190}', '{"elevation":1200.5}');
)SQL";

void write_v1(const std::string& path) {
  Db db(path, SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE);
  db.exec(kV1);
  db.exec(kV1Data);
}

}  // namespace

TEST(Durability, ConnectionSettings) {
  TempDir dir;
  Project p = Project::create(dir.file("c.cairn"), NewProject{"c", "", North::True, 0}, quiet());
  EXPECT_EQ(p.db().query_text("PRAGMA journal_mode"), "wal");
  EXPECT_EQ(p.db().query_int("PRAGMA synchronous"), 2);  // 2 = FULL
  EXPECT_EQ(p.db().query_int("PRAGMA foreign_keys"), 1);
  EXPECT_EQ(p.db().query_int("PRAGMA application_id"), 0x4341524E);
  EXPECT_EQ(p.schema_version(), kSchemaVersion);
  // foreign_keys=ON: SQLite itself refuses a reading of a missing station.
  EXPECT_THROW(p.db().exec("INSERT INTO planes(uuid, station, kind, strike, dip, typed, notation, north, "
                           "measured_strike, measured_dip, declination, facing, created, updated, device) VALUES "
                           "('x', 'no-such-station', 'joint', 1, 1, '1/1', 'text', 'true', 1, 1, 0, 'unknown', '', "
                           "'', '')"),
               SqlError);
}

// A bulk write's larger page cache is the connection's only while it lasts,
// and an import leaves the connection's own size as it found it. Sizes are
// pages when positive and -KiB when negative (SQLite documentation, "PRAGMA
// cache_size").
TEST(Durability, ABulkWritesPageCacheIsGivenBack) {
  TempDir dir;
  Project p = Project::create(dir.file("c.cairn"), NewProject{"c", "", North::True, 0}, quiet());
  p.db().exec("PRAGMA cache_size = 123");
  {
    BulkWriteCache cache(p.db(), 4096);
    EXPECT_EQ(p.db().query_int("PRAGMA cache_size"), -4096);
  }
  EXPECT_EQ(p.db().query_int("PRAGMA cache_size"), 123);
  p.db().exec("PRAGMA cache_size = -2000");
  {
    BulkWriteCache cache(p.db());
    EXPECT_EQ(p.db().query_int("PRAGMA cache_size"), -BulkWriteCache::kDefaultKib);
  }
  EXPECT_EQ(p.db().query_int("PRAGMA cache_size"), -2000);
}
TEST(Durability, MigratesAVersion1FileWithoutLoss) {
  TempDir dir;
  const std::string path = dir.file("old.cairn");
  write_v1(path);
  OpenOptions o = quiet();
  Project p = Project::open(path, o);
  EXPECT_FALSE(p.read_only()) << p.problem();
  EXPECT_EQ(p.schema_version(), kSchemaVersion);
  EXPECT_TRUE(p.integrity_check().empty());
  // A backup of the file as it was, taken before migrating (even with backups off).
  auto backups = p.backups();
  ASSERT_EQ(backups.size(), 1u);
  {
    Db old(backups[0], SQLITE_OPEN_READONLY);
    EXPECT_EQ(old.query_int("PRAGMA user_version"), 1);
  }
  const ProjectInfo info = p.info();
  EXPECT_EQ(info.name, "Old season");
  EXPECT_EQ(info.north_default, North::Magnetic);
  EXPECT_DOUBLE_EQ(info.declination, 4.5);
  auto s = find_station(p, "S7");
  ASSERT_TRUE(s);
  EXPECT_DOUBLE_EQ(*s->elevation, 1200.5);
  EXPECT_EQ(s->observer, "e0000000-0000-4000-8000-000000000001");
  EXPECT_EQ(s->meta.updated, "2025-05-02T09:10:00.000Z");
  auto pl = get_plane(p, "70000000-0000-4000-8000-000000000001");
  ASSERT_TRUE(pl);
  EXPECT_DOUBLE_EQ(pl->strike, 34.5);
  EXPECT_EQ(pl->typed, "030/40");
  EXPECT_EQ(pl->declination_source, "project setting");
  auto ln = get_line(p, "80000000-0000-4000-8000-000000000001");
  ASSERT_TRUE(ln);
  EXPECT_TRUE(ln->meta.deleted);  // a soft delete survives the migration
  EXPECT_EQ(list_points(p).size(), 1u);
  EXPECT_EQ(list_photos(p)[0].caption, "fold hinge");
  EXPECT_EQ(audit_trail(p, s->meta.uuid).size(), 1u);
  EXPECT_EQ(p.db().query_int("SELECT count(*) FROM pragma_table_info('planes') WHERE name = 'import_key'"), 1);
  EXPECT_EQ(p.db().query_int("SELECT count(*) FROM merges"), 0);
  // And the migrated file takes new records.
  Station n;
  n.code = "S8";
  n.lat = 46.6;
  n.lon = 14.3;
  add(p, n);
  EXPECT_EQ(list_stations(p).size(), 2u);
}

TEST(Durability, RefusesANewerFileAndLeavesItAlone) {
  TempDir dir;
  const std::string path = dir.file("new.cairn");
  { Project::create(path, NewProject{"n", "", North::True, 0}, quiet()); }
  {
    Db db(path, SQLITE_OPEN_READWRITE);
    db.exec("PRAGMA user_version = " + std::to_string(kSchemaVersion + 1));
  }
  const std::string before = sha256_hex(read_file(path));
  try {
    Project::open(path, quiet());
    FAIL() << "a newer file was opened";
  } catch (const std::runtime_error& e) {
    EXPECT_EQ(std::string(e.what()), path + " was written by a newer version of Cairn (schema version " +
                                         std::to_string(kSchemaVersion + 1) + "; this Cairn reads versions up to " +
                                         std::to_string(kSchemaVersion) +
                                         "); open it with a newer Cairn. The file has not been changed.");
  }
  EXPECT_EQ(sha256_hex(read_file(path)), before);
}

TEST(Durability, RefusesOtherSqliteFiles) {
  TempDir dir;
  const std::string path = dir.file("other.db");
  {
    Db db(path, SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE);
    db.exec("CREATE TABLE t(x)");
  }
  try {
    Project::open(path, quiet());
    FAIL();
  } catch (const std::runtime_error& e) {
    EXPECT_NE(std::string(e.what()).find("is not a Cairn project file"), std::string::npos) << e.what();
  }
  EXPECT_THROW(Project::open(dir.file("missing.cairn"), quiet()), std::runtime_error);
}

TEST(Durability, DamagedFileOpensReadOnlyNamingTheNewestBackup) {
  TempDir dir;
  const std::string path = dir.file("hurt.cairn");
  OpenOptions o = quiet();
  o.backups = true;
  int64_t root = 0, page = 0;
  {
    Project p = Project::create(path, NewProject{"hurt", "", North::True, 0}, o);
    for (int i = 0; i < 40; ++i) {
      Station s;
      s.code = "S" + std::to_string(i);
      s.lat = 1;
      s.lon = 2;
      s.notes = std::string(200, 'x');
      add(p, s);
    }
    p.backup_now();
    root = p.db().query_int("SELECT rootpage FROM sqlite_schema WHERE name = 'stations'");
    page = p.db().query_int("PRAGMA page_size");
  }  // closing the last connection checkpoints the WAL into the file
  ASSERT_FALSE(std::filesystem::exists(path + "-wal"));
  const auto backups = list_backups(path);
  ASSERT_FALSE(backups.empty());
  {
    // "Database File Format": page N starts at (N-1) * page_size; scribble over
    // the b-tree page header of the stations table.
    std::fstream f(path, std::ios::in | std::ios::out | std::ios::binary);
    f.seekp((root - 1) * page);
    const std::string junk(64, '\x5a');
    f.write(junk.data(), static_cast<std::streamsize>(junk.size()));
  }
  Project p = Project::open(path, o);
  EXPECT_TRUE(p.read_only());
  // Either quick_check reports the damage or SQLite stops at it (SQLITE_CORRUPT) first.
  EXPECT_EQ(p.problem().rfind(path + " ", 0), 0u) << p.problem();
  EXPECT_NE(p.problem().find("open read-only"), std::string::npos) << p.problem();
  EXPECT_NE(p.problem().find("the newest backup is " + backups.back()), std::string::npos) << p.problem();
  Station s;
  s.code = "S99";
  s.lat = 1;
  s.lon = 2;
  EXPECT_THROW(add(p, s), std::runtime_error);
  EXPECT_EQ(list_backups(path), backups) << "a damaged file must not become a backup";

  // A file that is no database at all cannot even be opened read-only; the error names the backup.
  const std::string garbage = dir.file("garbage.cairn");
  cairn::store::testing::write_file(garbage, std::string(8192, '\x13'));
  try {
    Project::open(garbage, o);
    FAIL();
  } catch (const std::runtime_error& e) {
    EXPECT_NE(std::string(e.what()).find("no backup was found in " + garbage + ".backups"), std::string::npos)
        << e.what();
  }
}

TEST(Durability, RollingBackupsKeepTheNewestK) {
  TempDir dir;
  const std::string path = dir.file("roll.cairn");
  OpenOptions o = quiet();
  o.backups = true;
  o.backup_keep = 3;
  o.backup_interval_s = 0;  // a backup after every write
  Project p = Project::create(path, NewProject{"roll", "", North::True, 0}, o);
  for (int i = 0; i < 6; ++i) {
    Station s;
    s.code = "S" + std::to_string(i);
    s.lat = 1;
    s.lon = 2;
    add(p, s);
  }
  auto b = p.backups();
  ASSERT_EQ(b.size(), 3u);
  EXPECT_EQ(p.backup_dir(), path + ".backups");
  // The newest backup is a sound project holding the last write.
  Project copy = Project::open(b.back(), [] {
    OpenOptions r = quiet();
    r.read_only = true;
    return r;
  }());
  EXPECT_TRUE(copy.integrity_check().empty());
  EXPECT_TRUE(find_station(copy, "S5"));
  EXPECT_FALSE(std::filesystem::exists(b.back() + "-wal"));
}
