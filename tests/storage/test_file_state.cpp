// Damage is said, not hidden (storage/file_state.h): a -wal that does not
// belong to its file, one damaged or cut short so that SQLite would drop
// committed changes without a word, and a project on read-only media. Each
// opens read-only and unchanged, with a message that says what and what to do;
// the states a crash leaves (a -wal with its -shm, a torn last frame) open
// normally.
// Sources: SQLite documentation, "Database File Format" section 4 (the -wal: a
// 32-byte header, then frames of a 24-byte header and one page; salts and
// checksums) and "WAL-mode File Format" (the -shm index); SQLite itself, opened
// on a copy of the damaged files, as the witness that it would apply a foreign
// -wal or drop the committed changes; mount(2) and access(2) for read-only
// media (EROFS, and root passing permission bits).
#include <gtest/gtest.h>
#include <sqlite3.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <set>
#include <string>
#include <vector>

#include "read_only_media.h"
#include "formats/sha256.h"
#include "storage/file_state.h"
#include "storage/project.h"
#include "storage/repository.h"
#include "storage_test_util.h"

using namespace cairn::store;
using namespace cairn::store::testing;
namespace fs = std::filesystem;

namespace {

constexpr long kFrame = 24 + 4096;  // a frame at SQLite's default page size of 4096 bytes

// A project with station S0, closed cleanly (no -wal), then PREFIX1..PREFIXn
// added one transaction each by a process that ends without closing the file:
// its -wal and -shm stay as a crash leaves them.
void make_with_wal(const std::string& path, int n, const std::string& prefix) {
  {
    Project p = Project::create(path, NewProject{"files " + prefix, "33N", North::True, 0}, quiet());
    Station s;
    s.code = "S0";
    s.lat = 46.5;
    s.lon = 14.9;
    add(p, s);
  }
  const pid_t pid = fork();
  if (pid == 0) {
    try {
      Project p = Project::open(path, quiet());
      for (int i = 1; i <= n; ++i) {
        Station s;
        s.code = prefix + std::to_string(i);
        s.lat = 46.5 + i * 1e-4;
        s.lon = 14.9;
        add(p, s);
      }
      _exit(0);  // no destructor: the connection is never closed
    } catch (...) {
      _exit(3);
    }
  }
  int status = 0;
  waitpid(pid, &status, 0);
  ASSERT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << status;
  ASSERT_GT(fs::file_size(path + "-wal"), 0u);
}

// The station codes SQLite itself reads from a copy of PATH with its -wal and
// -shm (the copy keeps the originals untouched), sorted and joined; "error: ..."
// when it cannot.
std::string sqlite_sees(const std::string& path) {
  TempDir copy;
  const std::string c = copy.file("copy.cairn");
  for (const char* s : {"", "-wal", "-shm"})
    if (fs::exists(path + s)) fs::copy_file(path + s, c + s);
  sqlite3* db = nullptr;
  std::string out;
  if (sqlite3_open_v2(c.c_str(), &db, SQLITE_OPEN_READONLY, nullptr) == SQLITE_OK) {
    sqlite3_stmt* st = nullptr;
    if (sqlite3_prepare_v2(db, "SELECT code FROM stations WHERE deleted IS NULL ORDER BY code", -1, &st, nullptr) ==
        SQLITE_OK) {
      int rc;
      while ((rc = sqlite3_step(st)) == SQLITE_ROW)
        out += (out.empty() ? "" : ",") + std::string(reinterpret_cast<const char*>(sqlite3_column_text(st, 0)));
      if (rc != SQLITE_DONE) out = std::string("error: ") + sqlite3_errmsg(db);
    } else {
      out = std::string("error: ") + sqlite3_errmsg(db);
    }
    sqlite3_finalize(st);
  }
  sqlite3_close(db);
  return out;
}

std::string codes(Project& p) {
  std::vector<std::string> c;
  for (const auto& s : list_stations(p)) c.push_back(s.code);
  std::sort(c.begin(), c.end());
  std::string out;
  for (const auto& x : c) out += (out.empty() ? "" : ",") + x;
  return out;
}

std::string digest(const std::string& path) { return cairn::formats::sha256_hex(read_file(path)); }

void overwrite(const std::string& path, long offset, const std::string& bytes) {
  std::fstream f(path, std::ios::binary | std::ios::in | std::ios::out);
  f.seekp(offset);
  f.write(bytes.data(), static_cast<std::streamsize>(bytes.size()));
}

std::set<std::string> names_in(const fs::path& folder) {
  std::set<std::string> out;
  for (const auto& e : fs::directory_iterator(folder)) out.insert(e.path().filename().string());
  return out;
}

// Opens PATH (asking to write) and checks the safe mode: read-only, the
// problem names MUST, the records are those of the file alone (FILE_ALONE), a
// write is refused, and the file and its -wal are byte for byte unchanged.
void expect_safe_mode(const std::string& path, const std::string& must, const std::string& file_alone) {
  const std::string before = digest(path), wal_before = digest(path + "-wal");
  {
    Project p = Project::open(path, quiet());
    EXPECT_TRUE(p.read_only());
    EXPECT_NE(p.problem().find(must), std::string::npos) << p.problem();
    EXPECT_NE(p.problem().find("read-only"), std::string::npos) << p.problem();
    EXPECT_NE(p.problem().find("out of the folder"), std::string::npos) << "says what to do: " << p.problem();
    EXPECT_EQ(codes(p), file_alone);
    Station s;
    s.code = "NEW";
    s.lat = 46.6;
    s.lon = 14.9;
    try {
      add(p, s);
      ADD_FAILURE() << "a write was accepted";
    } catch (const std::exception& e) {
      EXPECT_NE(std::string(e.what()).find("read-only"), std::string::npos) << e.what();
    }
  }
  EXPECT_EQ(digest(path), before) << "the file was changed (a checkpoint over it?)";
  EXPECT_EQ(digest(path + "-wal"), wal_before) << "the -wal was changed";
}

}  // namespace

TEST(FileState, WhatACrashLeavesOpensNormallyWithEveryCommit) {
  TempDir d;
  const std::string a = d.file("a.cairn");
  make_with_wal(a, 20, "A");
  // A last frame torn by the crash (half a frame of junk at the end) is normal.
  {
    std::ofstream w(a + "-wal", std::ios::binary | std::ios::app);
    w << std::string(2000, '\xab');
  }
  Project p = Project::open(a, quiet());
  EXPECT_FALSE(p.read_only()) << p.problem();
  EXPECT_EQ(p.problem(), "");
  EXPECT_EQ(list_stations(p).size(), 21u);
}

TEST(FileState, AWalOfAnotherProjectIsSaidAndNotApplied) {
  TempDir d;
  const std::string a = d.file("a.cairn"), b = d.file("b.cairn");
  make_with_wal(a, 5, "A");
  make_with_wal(b, 5, "B");
  // B's -wal beside A's file, without an index (copied alone).
  fs::copy_file(b + "-wal", a + "-wal", fs::copy_options::overwrite_existing);
  fs::remove(a + "-shm");
  // SQLite itself would read B's stations in A.
  EXPECT_EQ(sqlite_sees(a), "B1,B2,B3,B4,B5,S0");
  expect_safe_mode(a, "belongs to another project", "S0");
}

TEST(FileState, AWalTheFilesIndexDoesNotKnowIsSaid) {
  TempDir d;
  const std::string a = d.file("a.cairn"), b = d.file("b.cairn");
  make_with_wal(a, 5, "A");
  make_with_wal(b, 5, "B");
  fs::copy_file(b + "-wal", a + "-wal", fs::copy_options::overwrite_existing);  // A's -shm stays
  expect_safe_mode(a, "does not match", "S0");
}

TEST(FileState, AWalWithAnotherPageSizeIsSaid) {
  TempDir d;
  const std::string a = d.file("a.cairn"), other = d.file("other.db");
  make_with_wal(a, 3, "A");
  // Another program's database with 8192-byte pages, its -wal taken while it is open.
  sqlite3* db = nullptr;
  ASSERT_EQ(sqlite3_open(other.c_str(), &db), SQLITE_OK);
  ASSERT_EQ(sqlite3_exec(db,
                         "PRAGMA page_size = 8192; PRAGMA journal_mode = WAL; PRAGMA wal_autocheckpoint = 0;"
                         "CREATE TABLE t(x); INSERT INTO t VALUES (1);",
                         nullptr, nullptr, nullptr),
            SQLITE_OK);
  fs::copy_file(other + "-wal", a + "-wal", fs::copy_options::overwrite_existing);
  sqlite3_close(db);
  fs::remove(a + "-shm");
  expect_safe_mode(a, "belongs to another database", "S0");
}

TEST(FileState, ADamagedFrameThatWouldDropCommitsIsSaid) {
  TempDir d;
  const std::string a = d.file("a.cairn");
  make_with_wal(a, 20, "A");
  overwrite(a + "-wal", 32 + 2 * kFrame + 24 + 1000, "\x01\x02\x03\x04");  // inside frame 3's page
  const std::string seen = sqlite_sees(a);
  EXPECT_LT(std::count(seen.begin(), seen.end(), ','), 20) << "SQLite still reads every station: " << seen;
  expect_safe_mode(a, "is damaged at frame 3", "S0");
}

TEST(FileState, AWalCutShortIsSaidByItsIndex) {
  TempDir d;
  const std::string a = d.file("a.cairn");
  make_with_wal(a, 20, "A");
  fs::resize_file(a + "-wal", 32 + 10 * kFrame);
  const std::string seen = sqlite_sees(a);
  EXPECT_LT(std::count(seen.begin(), seen.end(), ','), 20) << seen;
  expect_safe_mode(a, "cut short", "S0");
}

TEST(FileState, AWalWithADamagedHeaderIsSaid) {
  TempDir d;
  const std::string a = d.file("a.cairn");
  make_with_wal(a, 5, "A");
  overwrite(a + "-wal", 0, std::string(4, '\0'));
  fs::remove(a + "-shm");
  EXPECT_EQ(sqlite_sees(a), "S0") << "SQLite ignores the whole -wal";
  expect_safe_mode(a, "damaged header", "S0");
}

TEST(FileState, AProjectOnReadOnlyMediaIsListedAndChecked) {
  TempDir d;
  const fs::path folder = d.path() / "card";
  fs::create_directory(folder);
  const std::string a = (folder / "a.cairn").string();
  {
    Project p = Project::create(a, NewProject{"card", "33N", North::True, 0}, quiet());
    Station s;
    s.code = "S1";
    s.lat = 46.5;
    s.lon = 14.9;
    add(p, s);
  }
  const auto before = names_in(folder);
  const std::string bytes = digest(a);
  ReadOnlyFolder ro(folder.string());
  if (!ro.why_not().empty()) GTEST_SKIP() << ro.why_not();
  OpenOptions o;  // the defaults: asking to write, with backups
  Project p = Project::open(a, o);
  EXPECT_TRUE(p.read_only()) << ro.how();
  EXPECT_NE(p.problem().find(geteuid() == 0 ? "read-only media" : "may not be written"), std::string::npos)
      << p.problem();
  EXPECT_NE(p.problem().find("copy it"), std::string::npos) << "says what to do: " << p.problem();
  EXPECT_EQ(codes(p), "S1");
  EXPECT_TRUE(p.integrity_check().empty());
  try {
    Station s;
    s.code = "S2";
    s.lat = 46.6;
    s.lon = 14.9;
    add(p, s);
    ADD_FAILURE() << "a write was accepted";
  } catch (const std::exception& e) {
    EXPECT_NE(std::string(e.what()).find("open read-only"), std::string::npos) << e.what();
  }
  EXPECT_EQ(names_in(folder), before) << "nothing is made beside the file";
  EXPECT_EQ(digest(a), bytes);
}

TEST(FileState, OnReadOnlyMediaAWalIsReadWhenItsIndexIsThere) {
  TempDir d;
  const fs::path folder = d.path() / "card";
  fs::create_directory(folder);
  const std::string a = (folder / "a.cairn").string();
  make_with_wal(a, 4, "A");
  {
    ReadOnlyFolder ro(folder.string());
    if (!ro.why_not().empty()) GTEST_SKIP() << ro.why_not();
    OpenOptions o;
    o.read_only = true;
    Project p = Project::open(a, o);
    EXPECT_EQ(codes(p), "A1,A2,A3,A4,S0");  // SQLite reads the -wal with the -shm beside it
  }
  // Without its -shm SQLite cannot read the -wal there: the file alone, said.
  fs::remove(a + "-shm");
  ReadOnlyFolder ro(folder.string());
  OpenOptions o;
  o.read_only = true;
  Project p = Project::open(a, o);
  EXPECT_TRUE(p.read_only());
  EXPECT_EQ(codes(p), "S0");
  EXPECT_NE(p.problem().find("cannot be read from here"), std::string::npos) << p.problem();
}
