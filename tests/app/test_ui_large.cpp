// What the Logbook, Net, Plan and Crosscheck derive from the records is built
// on a worker thread (app/ui/background.h) and the Net's and Plan's pictures
// drawn into pixels there (app/ui/soft_raster.h); with CAIRN_BUILD_IN_FRAME=1
// in the frame, through OpenGL. Both ways the screens show the same content.
// And the file is opened on the job worker: a file that is not a project
// still ends `cairn gui FILE` with status 1 and the reason, as it did before
// the window opened. The stations show before the file's integrity check
// ends, and nothing is written until it has.
// Source: the expected texts are the screens' own (the demo's station codes,
// the Net's and Plan's summary lines); no published source.
#include <cstdlib>
#include <fstream>

#include <sqlite3.h>

#include "tests/app/ui_test_support.h"

using cairn::ui_test::keys;
using cairn::ui_test::UiTest;

namespace {

// Sets an environment variable for the UI runs of one test.
struct ScopedEnv {
  std::string name;
  ScopedEnv(const char* n, const char* v) : name(n) { setenv(n, v, 1); }
  ~ScopedEnv() { unsetenv(name.c_str()); }
};

// The first column of the first row of SQL on the file at PATH, read through
// SQLite itself; -1 when it cannot be read.
long long count(const std::string& path, const std::string& sql) {
  sqlite3* db = nullptr;
  sqlite3_open_v2(path.c_str(), &db, SQLITE_OPEN_READONLY, nullptr);
  sqlite3_stmt* st = nullptr;
  long long n = -1;
  if (sqlite3_prepare_v2(db, sql.c_str(), -1, &st, nullptr) == SQLITE_OK && sqlite3_step(st) == SQLITE_ROW)
    n = sqlite3_column_int64(st, 0);
  sqlite3_finalize(st);
  sqlite3_close(db);
  return n;
}

// Runs SQL on the file at PATH (the tests' own changes, made outside Cairn).
void run_sql(const std::string& path, const std::string& sql) {
  sqlite3* db = nullptr;
  ASSERT_EQ(sqlite3_open(path.c_str(), &db), SQLITE_OK);
  char* err = nullptr;
  const int rc = sqlite3_exec(db, sql.c_str(), nullptr, nullptr, &err);
  EXPECT_EQ(rc, SQLITE_OK) << (err ? err : "") << " in " << sql;
  sqlite3_free(err);
  sqlite3_close(db);
}

}  // namespace

TEST_F(UiTest, ScreensBuiltOnAWorkerOrInTheFrameShowTheSameContent) {
  const std::string project = file("camp.cairn");
  std::filesystem::copy_file(std::string(CAIRN_SOURCE_DIR) + "/demo_project/camp.cairn", project);
  std::string s = "wait 3\nwait-idle\n";
  s += "expect \"22 stations\"\n";  // the newest day's heading, a Logbook row
  s += "tap \"Net\"\nwait 2\n";
  s += "expect \"planar readings shown\"\n";  // the net's summary
  s += "tap \"Plan\"\nwait 2\n";
  s += "expect \"84 stations\"\n";  // from the plan's layers
  s += "expect \"2 km\"\n";         // the scale bar: a text of the picture
  s += "tap \"Zoom in\"\nwait 2\n";
  s += "expect \"1 km\"\n";  // a new picture for the new view
  s += "tap \"Crosscheck\"\nwait 2\n";
  s += "expect \"contacts fitted\"\n";
  s += "tap \"not-planar\"\nwait 2\n";  // a row of the list opens its flag
  s += "expect \"Action:\"\n";
  {
    const auto r = gui(project, s);  // on a worker, as always in use
    ASSERT_EQ(r.status, 0) << r.err;
  }
  ScopedEnv in_the_frame("CAIRN_BUILD_IN_FRAME", "1");
  const auto r = gui(project, s);
  ASSERT_EQ(r.status, 0) << r.err;
}

TEST_F(UiTest, AFileThatIsNotAProjectEndsTheUiWithItsReason) {
  const std::string path = file("notes.cairn");
  std::ofstream(path) << "field notes, not a database\n";
  const auto r = gui(path, "wait 3\nexpect \"Logbook\"\n");
  EXPECT_EQ(r.status, 1) << r.err;
  EXPECT_NE(r.err.find("notes.cairn cannot be read (file is not a database)"), std::string::npos) << r.err;
}

// The opening reads the stations through a read-only connection while the
// writable opening checks the file: the Logbook shows them before the check
// ends, and nothing is written until it has. Here another program holds the
// file's write lock for longer than Cairn waits (busy_timeout 5 s): the stations
// were shown, the writable opening fails saying so, and the file is unchanged
// (this tablet was not even registered as a device).
// Source: SQLite documentation, "Write-Ahead Logging" (readers do not block on
// a writer) and "sqlite3_busy_timeout"; no published source for the rest.
TEST_F(UiTest, StationsShowBeforeTheCheckAndNothingIsWrittenWithoutIt) {
  const std::string project = file("camp.cairn");
  std::filesystem::copy_file(std::string(CAIRN_SOURCE_DIR) + "/demo_project/camp.cairn", project);
  auto devices = [&] { return count(project, "SELECT count(*) FROM devices"); };
  const long long before = devices();
  ASSERT_GT(before, 0);
  sqlite3* holder = nullptr;
  ASSERT_EQ(sqlite3_open(project.c_str(), &holder), SQLITE_OK);
  ASSERT_EQ(sqlite3_exec(holder, "BEGIN IMMEDIATE", nullptr, nullptr, nullptr), SQLITE_OK);
  const auto r = gui(project, "expect \"Logbook\"\n", "--frame-stats");
  sqlite3_exec(holder, "ROLLBACK", nullptr, nullptr, nullptr);
  sqlite3_close(holder);
  EXPECT_EQ(r.status, 1) << r.err;
  EXPECT_NE(r.err.find("is locked by another program"), std::string::npos) << r.err;
  // --frame-stats: "the records after R ms, the file checked after K ms"; R is
  // -1 when the records were never shown, K when the check never ended.
  const auto records_at = r.err.find("the records after ");
  ASSERT_NE(records_at, std::string::npos) << r.err;
  EXPECT_NE(r.err.compare(records_at, 21, "the records after -1 "), 0) << r.err;
  EXPECT_NE(r.err.find("the file checked after -1 ms"), std::string::npos) << r.err;
  EXPECT_EQ(devices(), before);
}

// A file that fails its integrity check is shown as before the stations were
// read beside the check: read-only, its problem said, nothing written. The
// damage: an audit row whose action breaks the table's CHECK constraint, made
// by editing the schema (SQLite documentation, "PRAGMA writable_schema"), which
// PRAGMA quick_check reports (SQLite documentation, "PRAGMA quick_check": CHECK
// constraints are verified on a writable connection).
TEST_F(UiTest, AFileThatFailsItsCheckIsShownReadOnly) {
  const std::string project = file("camp.cairn");
  std::filesystem::copy_file(std::string(CAIRN_SOURCE_DIR) + "/demo_project/camp.cairn", project);
  const std::string edit = "PRAGMA writable_schema=ON; UPDATE sqlite_schema SET sql = replace(sql, ";
  run_sql(project, edit + "'''restore'')', '''restore'',''tampered'')') WHERE name = 'audit';");
  run_sql(project, "UPDATE audit SET action = 'tampered' WHERE rowid = (SELECT min(rowid) FROM audit);");
  run_sql(project, edit + "'''restore'',''tampered'')', '''restore'')') WHERE name = 'audit';");
  const long long stations = count(project, "SELECT count(*) FROM stations");
  const long long devices = count(project, "SELECT count(*) FROM devices");
  ASSERT_GT(stations, 0);
  std::string s = "expect \"failed its integrity check (CHECK constraint failed in audit)\"\n";
  s += "expect \"22 stations\"\n";         // the newest day's heading: the stations are shown
  s += "tap \"+ New station\"\nwait 1\n";  // off: nothing to create
  s += "expect-not \"Create station\"\n";
  const auto r = gui(project, s);
  EXPECT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(count(project, "SELECT count(*) FROM stations"), stations);
  EXPECT_EQ(count(project, "SELECT count(*) FROM devices"), devices);
  EXPECT_EQ(count(project, "SELECT count(*) FROM audit WHERE action = 'tampered'"), 1);
}

// The session's backup, made when the file is opened, fails when the backup
// folder's name is taken by a plain file: the top bar shows "No backup" for as
// long as there is none, tapped it says why, and changes are still saved. With
// the folder free again the next opening makes one and shows nothing.
TEST_F(UiTest, AFailedBackupIsSaidUntilOneIsMade) {
  const std::string project = file("camp.cairn");
  std::filesystem::copy_file(std::string(CAIRN_SOURCE_DIR) + "/demo_project/camp.cairn", project);
  { std::ofstream(project + ".backups") << "not a folder"; }
  const long long stations = count(project, "SELECT count(*) FROM stations");
  std::string s = "wait 3\nwait-idle\n";
  s += "expect \"\xE2\x96\xB2 No backup\"\n";
  s += "tap \"+ New station\"\nwait 1\n";
  s += "tap \"Latitude \xC2\xB0\"\n" + keys("61.182") + "tap \"Longitude \xC2\xB0\"\n" + keys("-135.59");
  s += "tap \"Create station MT-41\"\nwait 2\nwait-idle\n";  // the demo's next free code
  s += "tap \"\xE2\x96\xB2 No backup\"\nwait 1\n";           // tried again with the change, and failed again
  s += "expect \"No backup of this file could be made: \"\n";
  s += "expect \"Not a directory\"\n";  // why, in the system's words
  auto r = gui(project, s);
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(count(project, "SELECT count(*) FROM stations"), stations + 1) << "the change is saved";
  std::filesystem::remove(project + ".backups");
  r = gui(project, "wait 3\nwait-idle\nexpect \"22 stations\"\nexpect-not \"\xE2\x96\xB2 No backup\"\n");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_TRUE(std::filesystem::is_directory(project + ".backups"));
}
