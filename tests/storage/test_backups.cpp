// Backups that keep history (storage/project.h): one per writable session, of
// the file before its first change; none for a refused import; no two with
// the same bytes; the newest N kept plus the newest of each older day; and a
// restore that first keeps the present state.
// Sources: SQLite documentation, "Using the SQLite Online Backup API" (a backup
// is a page-for-page copy of one consistent state) and "PRAGMA
// integrity_check"; FIPS 180-4 SHA-256 for "same bytes"; the retention rule is
// common practice for rolling backups (as in grandfather-father-son rotation),
// no published source.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include "storage/import.h"
#include "storage/project.h"
#include "storage/repository.h"
#include "storage_test_util.h"

using namespace cairn::store;
using namespace cairn::store::testing;
namespace fs = std::filesystem;

namespace {

OpenOptions with_backups(int keep = 10) {
  OpenOptions o = quiet();
  o.backups = true;
  o.backup_keep = keep;
  return o;
}

void add_station(Project& p, const std::string& code) {
  Station s;
  s.code = code;
  s.lat = 46.5;
  s.lon = 14.9;
  add(p, s);
}

int stations_in(const std::string& file) {
  OpenOptions r = quiet();
  r.read_only = true;
  Project p = Project::open(file, r);
  return static_cast<int>(p.db().query_int("SELECT count(*) FROM stations"));
}

}  // namespace

TEST(Backups, OnePerSessionNoneForARefusedImportAndNoTwoAlike) {
  TempDir d;
  const std::string f = d.file("camp.cairn");
  { Project p = Project::create(f, NewProject{"camp", "", North::True, 0}, with_backups()); }
  EXPECT_TRUE(list_backups(f).empty()) << "making a file is no change of a file";
  {
    Project p = Project::open(f, with_backups());
    for (int i = 0; i < 3; ++i) {
      const ImportReport r = import_csv(p, ImportKind::Stations, "station,lat,lon\nS9,95,14\n", "bad.csv");
      ASSERT_FALSE(r.ok());
    }
    EXPECT_TRUE(list_backups(f).empty()) << "a refused import leaves no backup";
    add_station(p, "S1");
    add_station(p, "S2");
  }
  auto b = list_backups(f);
  ASSERT_EQ(b.size(), 1u) << "one per session";
  EXPECT_EQ(stations_in(b[0]), 0) << "the file as it was before the session's first change";
  {
    Project p = Project::open(f, with_backups());
    add_station(p, "S3");
    b = list_backups(f);
    ASSERT_EQ(b.size(), 2u);
    EXPECT_EQ(stations_in(b[1]), 2);
    const std::string now = p.backup_now();
    EXPECT_EQ(list_backups(f).size(), 3u);
    EXPECT_EQ(p.backup_now(), now) << "the same bytes are not kept twice";
    EXPECT_EQ(list_backups(f).size(), 3u);
  }
}

TEST(Backups, RollingBackupsCanBeLeftToTheCaller) {
  // rolling_backups = false: the session's backup is still made before the
  // first change, but later writes make none however long after; backup_due
  // says when one would have been made, and a backup made on another
  // connection (as the touch UI does on a worker) resets it.
  TempDir d;
  const std::string f = d.file("camp.cairn");
  { Project::create(f, NewProject{"camp", "", North::True, 0}, quiet()); }
  OpenOptions o = with_backups();
  o.rolling_backups = false;
  o.backup_interval_s = 0;  // every write would be due
  Project p = Project::open(f, o);
  EXPECT_TRUE(p.backup_due()) << "no backup yet this session";
  add_station(p, "S1");
  ASSERT_EQ(list_backups(f).size(), 1u) << "the session's backup";
  EXPECT_EQ(stations_in(list_backups(f)[0]), 0);
  add_station(p, "S2");
  add_station(p, "S3");
  EXPECT_EQ(list_backups(f).size(), 1u) << "no rolling backups";
  EXPECT_TRUE(p.backup_due());
  {
    OpenOptions ro = quiet();
    ro.read_only = true;
    Project other = Project::open(f, ro);
    other.backup_now();  // what the caller does instead, through its own connection
  }
  const auto b = list_backups(f);
  ASSERT_EQ(b.size(), 2u);
  EXPECT_EQ(stations_in(b[1]), 3) << "the file as committed";
  o.backup_interval_s = 3600;
  Project q = Project::open(f, o);
  q.backup_made();
  EXPECT_FALSE(q.backup_due()) << "made a moment ago, due in an hour";
  OpenOptions none = quiet();
  Project r = Project::open(f, none);
  EXPECT_FALSE(r.backup_due()) << "backups off";
}

TEST(Backups, AFailedBackupIsKeptUntilOneIsMade) {
  // The backup folder's name taken by a plain file: no backup can be made,
  // and why stays readable (the touch UI shows it) until one is.
  TempDir d;
  const std::string f = d.file("camp.cairn");
  { Project::create(f, NewProject{"camp", "", North::True, 0}, quiet()); }
  { std::ofstream(f + ".backups") << "not a folder"; }
  OpenOptions o = with_backups();
  o.rolling_backups = false;
  Project p = Project::open(f, o);
  EXPECT_EQ(p.backup_error(), "");
  std::string why;
  try {
    p.backup_now();
  } catch (const std::exception& e) {
    why = e.what();
  }
  ASSERT_NE(why, "") << "a backup into a plain file's name cannot be made";
  p.backup_failed(why);
  EXPECT_EQ(p.backup_error(), why);
  EXPECT_TRUE(p.backup_due()) << "none made this session";
  add_station(p, "S1");  // the change is saved all the same
  EXPECT_EQ(p.db().query_int("SELECT count(*) FROM stations"), 1);
  EXPECT_NE(p.backup_error(), "") << "the session's backup before that change failed too";
  fs::remove(f + ".backups");
  p.backup_now();
  EXPECT_EQ(p.backup_error(), "");
  EXPECT_EQ(list_backups(f).size(), 1u);
}

TEST(Backups, TheNewestNAndTheNewestOfEachOlderDayAreKept) {
  TempDir d;
  const std::string f = d.file("camp.cairn");
  Project p = Project::create(f, NewProject{"camp", "", North::True, 0}, with_backups(2));
  add_station(p, "S1");
  const auto first = list_backups(f);
  ASSERT_EQ(first.size(), 1u);
  const fs::path folder = fs::path(first[0]).parent_path();
  // Backups from two earlier days (names carry their UTC time).
  for (const char* stamp : {"20250101T080000000Z", "20250101T170000000Z", "20250102T090000000Z"}) {
    fs::copy_file(first[0], folder / (std::string("camp-") + stamp + ".cairn"));
  }
  for (int i = 2; i < 5; ++i) {
    add_station(p, "S" + std::to_string(i));
    p.backup_now();
  }
  std::vector<std::string> names;
  for (const auto& b : list_backups(f)) names.push_back(fs::path(b).filename().string());
  ASSERT_GE(names.size(), 4u);
  EXPECT_EQ(names[0], "camp-20250101T170000000Z.cairn");  // the newest of 1 January
  EXPECT_EQ(names[1], "camp-20250102T090000000Z.cairn");
  EXPECT_EQ(names.size(), 4u) << "2 newest + one of each older day";
}

TEST(Backups, RestoreKeepsThePresentStateFirst) {
  TempDir d;
  const std::string f = d.file("camp.cairn");
  std::string before_s2;
  {
    Project p = Project::create(f, NewProject{"camp", "", North::True, 0}, with_backups());
    add_station(p, "S1");
  }
  {
    Project p = Project::open(f, with_backups());
    add_station(p, "S2");  // the session's backup holds S1 only
    before_s2 = list_backups(f).back();
  }
  ASSERT_EQ(stations_in(before_s2), 1);
  {
    Project p = Project::open(f, with_backups());
    const std::string kept = restore_from_backup(p, before_s2);
    EXPECT_EQ(stations_in(kept), 2) << "the state the restore replaced";
    EXPECT_TRUE(p.integrity_check().empty());
  }
  EXPECT_EQ(stations_in(f), 1);
  Project p = Project::open(f, with_backups());
  EXPECT_THROW(restore_from_backup(p, d.file("nothing.cairn")), std::runtime_error);
  cairn::store::testing::write_file(d.file("junk.cairn"), std::string(4096, 'j'));
  EXPECT_THROW(restore_from_backup(p, d.file("junk.cairn")), std::runtime_error);
}

TEST(Backups, AZeroLengthFileIsSaidAndNamesTheNewestBackup) {
  // SQLite documentation, "Database File Format": a database file is at least
  // one page; a file of 0 bytes is read by SQLite as a new, empty database.
  TempDir d;
  const std::string f = d.file("camp.cairn");
  {
    Project p = Project::create(f, NewProject{"camp", "", North::True, 0}, with_backups());
    add_station(p, "S1");
  }
  const auto b = list_backups(f);
  ASSERT_EQ(b.size(), 1u);
  cairn::store::testing::write_file(f, "");
  try {
    Project::open(f, with_backups());
    FAIL() << "an empty file opened";
  } catch (const std::runtime_error& e) {
    const std::string m = e.what();
    EXPECT_NE(m.find(f + " is empty (0 bytes)"), std::string::npos) << m;
    EXPECT_NE(m.find("the newest backup is " + b.back()), std::string::npos) << m;
  }
  EXPECT_EQ(fs::file_size(f), 0u) << "left as it was";
}
