// A tablet's project file is untrusted input to a merge (storage/merge.h,
// "Trust"): edited by hand with the sqlite3 shell, damaged, or hostile.
//
// Outside sources named beside the checks:
//  - SQLite documentation, "Defense Against The Dark Arts" (section 1.2:
//    SQLITE_DBCONFIG_DEFENSIVE, PRAGMA trusted_schema=OFF, triggers and views
//    of untrusted files) and the C API pages of sqlite3_db_config
//    (SQLITE_DBCONFIG_ENABLE_TRIGGER, SQLITE_DBCONFIG_ENABLE_VIEW);
//  - RFC 3629 section 3 (0xC3 alone is not UTF-8) and ECMA-48 (ESC, 0x1B,
//    starts a terminal control sequence);
//  - the value ranges of storage/SCHEMA.md, which are common practice for
//    compass readings (strike 0..360, dip 0..90), no published source;
//  - ISO 8601 for what a time is.
#include <gtest/gtest.h>
#include <sqlite3.h>

#include <algorithm>
#include <functional>

#include "merge_test_support.h"
#include "storage/merge.h"

using namespace cairn::store;
using namespace cairn::store::testing;

namespace {

std::string merge_error(const std::string& camp, const std::vector<std::string>& sources) {
  try {
    merge_into(camp, sources);
  } catch (const std::exception& e) {
    return e.what();
  }
  return "no error";
}

bool contains(const std::vector<std::string>& v, const std::string& x) {
  return std::find(v.begin(), v.end(), x) != v.end();
}

}  // namespace

TEST(Untrusted, AnUntrustedConnectionRunsNoTriggerAndReadsNoView) {
  // SQLite documentation, sqlite3_db_config: with ENABLE_TRIGGER off triggers
  // are not run; with ENABLE_VIEW off a view cannot be read.
  TempDir d;
  const std::string f = d.file("x.sqlite");
  {
    Db db(f, SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE);
    db.exec(
        "CREATE TABLE t(x); CREATE TABLE log(y);"
        "CREATE TRIGGER t_log AFTER INSERT ON t BEGIN INSERT INTO log VALUES (new.x); END;"
        "CREATE VIEW v AS SELECT x FROM t;");
    db.exec("INSERT INTO t VALUES (1)");
    EXPECT_EQ(db.query_int("SELECT count(*) FROM log"), 1);  // an own connection runs it
  }
  Db db(f, SQLITE_OPEN_READWRITE, Trust::Untrusted);
  db.exec("INSERT INTO t VALUES (2)");
  EXPECT_EQ(db.query_int("SELECT count(*) FROM log"), 1);
  EXPECT_THROW(db.query_int("SELECT count(*) FROM v"), SqlError);
  // Defensive: the schema cannot be written as data (PRAGMA writable_schema).
  db.exec("PRAGMA writable_schema = ON");
  EXPECT_THROW(db.exec("UPDATE sqlite_master SET sql = 'x' WHERE name = 't'"), SqlError);
}

TEST(Untrusted, TablesTriggersAndViewsOfASourceAreNamedNeverAdopted) {
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  {
    Db db(a, SQLITE_OPEN_READWRITE);
    db.exec(
        "CREATE TABLE field_sketches (uuid TEXT PRIMARY KEY, caption TEXT NOT NULL, created TEXT NOT NULL, "
        "updated TEXT NOT NULL, device TEXT NOT NULL, deleted TEXT);"
        "INSERT INTO field_sketches VALUES ('5a0c1e2d-0000-4000-8000-000000000001', 'fold hinge', "
        "'2025-06-14T10:00:00.000Z', '2025-06-14T10:00:00.000Z', 'a0000000-0000-4000-8000-00000000000a', NULL);"
        "CREATE TABLE \"odd\"\"name\" (uuid TEXT, updated TEXT, device TEXT, deleted TEXT, created TEXT);"
        "CREATE TRIGGER tamper AFTER INSERT ON devices BEGIN UPDATE stations SET notes = 'tampered'; END;"
        "CREATE VIEW every_station AS SELECT * FROM stations;");
  }
  const MergeReport rep = merge_into(c.camp, {a});
  const auto& ign = rep.sources.at(0).ignored;
  EXPECT_TRUE(contains(ign, "table field_sketches"));
  EXPECT_TRUE(contains(ign, "table odd\"name"));
  EXPECT_TRUE(contains(ign, "trigger tamper"));
  EXPECT_TRUE(contains(ign, "view every_station"));
  Db camp(c.camp, SQLITE_OPEN_READONLY);
  EXPECT_EQ(camp.query_int("SELECT count(*) FROM sqlite_master WHERE name IN "
                           "('field_sketches', 'odd\"name', 'tamper', 'every_station')"),
            0);
  EXPECT_EQ(camp.query_int("SELECT count(*) FROM stations WHERE notes = 'tampered'"), 0);
}

TEST(Untrusted, AViewStandingInForARecordTableIsRefused) {
  Camp c;
  { Project p = Project::open(c.camp, device(kCampDevice, "camp laptop")); }
  const std::string before = dump(c.camp);
  const std::string a = c.tablet("tabletA.cairn");
  {
    Db db(a, SQLITE_OPEN_READWRITE);
    db.exec("DROP TABLE photos; CREATE VIEW photos AS SELECT uuid, code AS path FROM stations");
  }
  const std::string e = merge_error(c.camp, {a});
  EXPECT_NE(e.find(a + " is not a Cairn project file: 'photos' is a view, not a table"), std::string::npos) << e;
  EXPECT_EQ(dump(c.camp), before);
}

TEST(Untrusted, EveryBadValueOfASourceRefusesTheMergeWithTableUuidAndRule) {
  struct Case {
    const char* what;
    const char* table;
    const char* sql;  // run on the tablet; ?1 is the record's UUID
    const char* rule;
  };
  const Case cases[] = {
      {"dip of -999", "planes", "UPDATE planes SET measured_dip = -999 WHERE uuid = ?1", "angle"},
      {"strike of 1e308", "planes", "UPDATE planes SET measured_strike = 1e308 WHERE uuid = ?1", "angle"},
      {"declination stored as text", "planes", "UPDATE planes SET declination = 'east' WHERE uuid = ?1", "type"},
      {"a time that is not a time", "stations", "UPDATE stations SET time = 'after lunch' WHERE uuid = ?1", "time"},
      {"an escape sequence in notes", "stations",
       "UPDATE stations SET notes = 'spur' || char(27) || '[2J' WHERE uuid = ?1", "control"},
      {"a code that is not UTF-8", "stations", "UPDATE stations SET code = CAST(X'53C3' AS TEXT) WHERE uuid = ?1",
       "utf8"},
      {"a photo path out of the folder", "photos", "UPDATE photos SET path = '../../outside.jpg' WHERE uuid = ?1",
       "photo-path"},
      {"a digest that is not hex", "photos",
       "UPDATE photos SET sha256 = 'zzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzzz' WHERE uuid = ?1",
       "sha256"},
      {"an observer that is not a UUID", "stations", "UPDATE stations SET observer = 'AE' WHERE uuid = ?1", "uuid"},
  };
  for (const Case& k : cases) {
    SCOPED_TRACE(k.what);
    Camp c;
    std::string photo;
    {
      Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
      Photo ph;
      ph.station = c.legend.station;
      ph.path = "photos/s1.jpg";
      ph.sha256 = std::string(64, 'a');
      photo = add(p, ph);
    }
    const std::string before = dump(c.camp);
    const std::string a = c.tablet("tabletA.cairn");
    const std::string table = k.table;
    const std::string id = table == "planes" ? c.legend.plane : table == "photos" ? photo : c.legend.station;
    {
      Db db(a, SQLITE_OPEN_READWRITE);
      Stmt s(db, k.sql);
      s.bind(1, id);
      s.run();
      ASSERT_EQ(db.changes(), 1);
    }
    const std::string e = merge_error(c.camp, {a});
    EXPECT_NE(e.find(a + ": table " + table + ", record " + id + ": " + k.rule + ": "), std::string::npos) << e;
    EXPECT_NE(e.find("nothing was merged"), std::string::npos) << e;
    EXPECT_EQ(e.find('\x1b'), std::string::npos) << "the message carries the raw escape";
    EXPECT_EQ(dump(c.camp), before);
  }
}

TEST(Untrusted, ADamagedSourceIsRefusedBeforeAnythingIsWritten) {
  // SQLite documentation, "PRAGMA integrity_check": a page of garbage in the
  // middle of the file is reported; the file format's header stays readable.
  Camp c;
  {
    Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
    for (int i = 0; i < 200; ++i) {
      Station s;
      s.code = "T" + std::to_string(i);
      s.lat = 46.5;
      s.lon = 14.9;
      s.notes = std::string(300, 'n');
      add(p, s);
    }
  }
  const std::string before = dump(c.camp);
  const std::string a = c.tablet("tabletA.cairn");
  {
    Db db(a, SQLITE_OPEN_READWRITE);
    db.exec("PRAGMA wal_checkpoint(TRUNCATE); PRAGMA journal_mode = DELETE");
  }
  std::string bytes = read_file(a);
  ASSERT_GT(bytes.size(), 40000u);
  for (size_t i = 20000; i < 24000; ++i) bytes[i] = static_cast<char>(i * 7);
  write_file(a, bytes);
  const std::string e = merge_error(c.camp, {a});
  EXPECT_TRUE(e.find(a + " failed its integrity check") != std::string::npos ||
              e.find(a + " cannot be read") != std::string::npos)
      << e;
  EXPECT_EQ(dump(c.camp), before);
}
