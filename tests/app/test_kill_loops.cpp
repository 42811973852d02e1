// `cairn export` (GeoPackage, GeoJSON, CSV folder, GPX), `cairn report` and
// `cairn merge` killed with SIGKILL at random moments (a fixed seed), again
// and again: afterwards the output is either absent or complete and valid, the
// project file is unchanged, a merge's target is as before or fully merged,
// and once the same command has run again (the next start) no temporary file
// is left anywhere in the folder.
// Sources: POSIX rename() (the target is replaced atomically: IEEE Std
// 1003.1-2017) and SIGKILL (cannot be caught), SQLite documentation "Atomic
// Commit In SQLite" (a killed writer leaves the database as of its last
// commit, which PRAGMA integrity_check confirms), and the GeoPackage 1.3
// standard (OGC 12-128r18: gpkg_contents lists every feature table).
#include <fcntl.h>
#include <signal.h>
#include <spawn.h>
#include <sqlite3.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <fstream>
#include <map>
#include <random>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "formats/sha256.h"
#include "tests/app/cli_test_support.h"

extern char** environ;

using cairn::cli_test::CliTest;
using cairn::cli_test::Outcome;
namespace fs = std::filesystem;

namespace {

constexpr int kRounds = 6;  // kills per command

class KillLoops : public CliTest {
 protected:
  void SetUp() override {
    CliTest::SetUp();
    // The invented demo area's camp file (terrain included): big enough that
    // an export takes a moment.
    for (const char* f : {"camp.cairn", "tablet-a.cairn", "tablet-b.cairn"})
      fs::copy_file(fs::path(CAIRN_SOURCE_DIR) / "demo_project" / f, file(f));
  }

  // Starts `cairn ARGS...` in the test folder, output discarded; returns its pid.
  pid_t start(const std::vector<std::string>& args) const {
    std::vector<std::string> argv_s = {CAIRN_BINARY};
    argv_s.insert(argv_s.end(), args.begin(), args.end());
    std::vector<char*> argv;
    for (auto& a : argv_s) argv.push_back(a.data());
    argv.push_back(nullptr);
    posix_spawn_file_actions_t fa;
    posix_spawn_file_actions_init(&fa);
    posix_spawn_file_actions_addopen(&fa, 1, "/dev/null", O_WRONLY, 0);
    posix_spawn_file_actions_addopen(&fa, 2, "/dev/null", O_WRONLY, 0);
    // Relative paths are the test folder's: the child changes there first.
    const std::string cwd = fs::current_path().string();
    fs::current_path(dir_);
    pid_t pid = -1;
    const int rc = posix_spawn(&pid, argv[0], &fa, nullptr, argv.data(), environ);
    fs::current_path(cwd);
    posix_spawn_file_actions_destroy(&fa);
    return rc == 0 ? pid : -1;
  }

  // Runs the command to its end once and returns how long it took (only to
  // spread the kills over its run; nothing is asserted on it).
  std::chrono::milliseconds time_one_run(const std::vector<std::string>& args) const {
    const auto t0 = std::chrono::steady_clock::now();
    const pid_t pid = start(args);
    int status = 0;
    waitpid(pid, &status, 0);
    EXPECT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << args[0] << " " << args[1] << ": " << status;
    return std::chrono::duration_cast<std::chrono::milliseconds>(std::chrono::steady_clock::now() - t0);
  }

  // Kills `cairn ARGS` after a random moment within about its run time; true
  // when it was killed (false when it had finished first).
  bool run_and_kill(const std::vector<std::string>& args, std::chrono::milliseconds span, std::mt19937& gen) const {
    const pid_t pid = start(args);
    EXPECT_GT(pid, 0);
    const long ms = std::uniform_int_distribution<long>(0, span.count() * 5 / 4)(gen);
    std::this_thread::sleep_for(std::chrono::milliseconds(ms));
    kill(pid, SIGKILL);
    int status = 0;
    waitpid(pid, &status, 0);
    return WIFSIGNALED(status) && WTERMSIG(status) == SIGKILL;
  }

  // Sends SIG to `cairn ARGS` the moment a temporary file of its appears in the
  // folder (polling), up to five tries; true when one died of it so.
  bool kill_while_writing(const std::vector<std::string>& args, int sig = SIGKILL) const {
    for (int attempt = 0; attempt < 5; ++attempt) {
      const pid_t pid = start(args);
      int status = 0;
      bool killed = false;
      while (waitpid(pid, &status, WNOHANG) == 0) {
        if (!leftovers().empty()) {
          kill(pid, sig);
          waitpid(pid, &status, 0);
          killed = WIFSIGNALED(status) && WTERMSIG(status) == sig;
          break;
        }
        std::this_thread::sleep_for(std::chrono::microseconds(200));
      }
      if (killed) return true;
    }
    return false;
  }

  std::string digest(const std::string& name) const { return cairn::formats::sha256_hex(slurp(file(name))); }

  // Names in the folder (recursively) that are temporary files: formats/temp_files.h's
  // (NAME.tmp-PID-xxxxxxxx) or any other "*.tmp".
  std::vector<std::string> leftovers() const {
    std::vector<std::string> out;
    for (const auto& e : fs::recursive_directory_iterator(dir_)) {
      const std::string n = e.path().filename().string();
      if (n.find(".tmp-") != std::string::npos || e.path().extension() == ".tmp") out.push_back(e.path().string());
    }
    return out;
  }

  // "ok" or SQLite's first complaint about a database file.
  static std::string integrity(const std::string& path) {
    sqlite3* db = nullptr;
    std::string r = "cannot open";
    if (sqlite3_open_v2(path.c_str(), &db, SQLITE_OPEN_READONLY, nullptr) == SQLITE_OK) {
      sqlite3_stmt* st = nullptr;
      if (sqlite3_prepare_v2(db, "PRAGMA integrity_check", -1, &st, nullptr) == SQLITE_OK &&
          sqlite3_step(st) == SQLITE_ROW)
        r = reinterpret_cast<const char*>(sqlite3_column_text(st, 0));
      sqlite3_finalize(st);
    }
    sqlite3_close(db);
    return r;
  }
  static long long count(const std::string& path, const std::string& sql) {
    sqlite3* db = nullptr;
    long long n = -1;
    if (sqlite3_open_v2(path.c_str(), &db, SQLITE_OPEN_READONLY, nullptr) == SQLITE_OK) {
      sqlite3_stmt* st = nullptr;
      if (sqlite3_prepare_v2(db, sql.c_str(), -1, &st, nullptr) == SQLITE_OK && sqlite3_step(st) == SQLITE_ROW)
        n = sqlite3_column_int64(st, 0);
      sqlite3_finalize(st);
    }
    sqlite3_close(db);
    return n;
  }
  // A GeoPackage's feature tables and their row counts (gpkg_contents), or
  // {"!": ...} when it fails its integrity check.
  static std::map<std::string, long long> layers(const std::string& path) {
    std::map<std::string, long long> out;
    const std::string ic = integrity(path);
    if (ic != "ok") return {{"!integrity: " + ic, 0}};
    sqlite3* db = nullptr;
    sqlite3_open_v2(path.c_str(), &db, SQLITE_OPEN_READONLY, nullptr);
    sqlite3_stmt* st = nullptr;
    std::vector<std::string> names;
    if (sqlite3_prepare_v2(db, "SELECT table_name FROM gpkg_contents ORDER BY table_name", -1, &st, nullptr) ==
        SQLITE_OK)
      while (sqlite3_step(st) == SQLITE_ROW)
        names.emplace_back(reinterpret_cast<const char*>(sqlite3_column_text(st, 0)));
    sqlite3_finalize(st);
    sqlite3_close(db);
    for (const auto& n : names) out[n] = count(path, "SELECT count(*) FROM \"" + n + "\"");
    return out;
  }

  // Export ARGS (writing OUT) killed kRounds times: OUT absent or the same as
  // REFERENCE by SAME; the project unchanged; after a last full run no leftovers.
  template <class Same>
  void kill_loop(const std::vector<std::string>& args, const std::string& out, const std::string& reference,
                 Same same) {
    const std::string project = digest("camp.cairn");
    std::mt19937 gen(20261203);  // fixed seed: the same kill moments on every run
    const auto span = time_one_run(args);
    ASSERT_TRUE(fs::exists(file(out)));
    fs::rename(file(out), file(reference));
    int killed = 0, complete = 0;
    for (int round = 0; round < kRounds; ++round) {
      std::error_code ec;
      fs::remove_all(file(out), ec);
      if (run_and_kill(args, span, gen)) ++killed;
      if (fs::exists(file(out))) {
        ++complete;
        EXPECT_TRUE(same(file(out), file(reference))) << out << " is there but not complete, round " << round;
      }
      EXPECT_EQ(digest("camp.cairn"), project) << "round " << round;
      for (const auto& l : leftovers())  // only temporary names are left by a kill
        EXPECT_NE(l.find(".tmp-"), std::string::npos);
    }
    // And once while it writes: SIGKILL cannot be caught, so its temporary file stays.
    std::error_code ec;
    fs::remove_all(file(out), ec);
    const bool mid_write = kill_while_writing(args);
    if (mid_write) {
      EXPECT_FALSE(leftovers().empty());
    }
    EXPECT_FALSE(fs::exists(file(out))) << "killed before its rename";
    EXPECT_EQ(digest("camp.cairn"), project);
    std::cout << "[ info     ] " << args[0] << " " << args.back() << ": " << killed << " of " << kRounds
              << " runs killed at random, " << complete << " left a complete output; "
              << (mid_write ? "one killed while writing left its temporary file" : "none caught while writing") << "\n";
    EXPECT_GT(killed, 0) << "no run was killed: the kills came too late";
    // The next start: the same command, to its end.
    time_one_run(args);
    EXPECT_TRUE(same(file(out), file(reference)));
    EXPECT_EQ(leftovers(), std::vector<std::string>{});
    EXPECT_EQ(digest("camp.cairn"), project);
  }
};

std::string bytes_of(const std::string& path) {
  std::ifstream f(path, std::ios::binary);
  std::stringstream ss;
  ss << f.rdbuf();
  return ss.str();
}

bool same_bytes(const std::string& a, const std::string& b) {
  return bytes_of(a) == bytes_of(b) && !bytes_of(a).empty();
}

}  // namespace

TEST_F(KillLoops, GeoPackageExport) {
  kill_loop({"export", "camp.cairn", "out.gpkg"}, "out.gpkg", "ref.gpkg",
            [](const std::string& a, const std::string& b) {
              const auto la = layers(a), lb = layers(b);
              EXPECT_EQ(la, lb);
              return la == lb && !la.empty();
            });
}

TEST_F(KillLoops, GeoJsonExport) {
  kill_loop({"export", "camp.cairn", "out.geojson"}, "out.geojson", "ref.geojson", same_bytes);
}

TEST_F(KillLoops, CsvFolderExport) {
  kill_loop({"export", "camp.cairn", "out"}, "out", "ref", [](const std::string& a, const std::string& b) {
    int files = 0;
    for (const char* f : {"units.csv", "contacts.csv", "stations.csv", "planes.csv", "lines.csv", "points.csv"}) {
      if (!same_bytes(a + "/" + f, b + "/" + f)) return false;
      ++files;
    }
    return files == 6;
  });
}

TEST_F(KillLoops, GpxExport) { kill_loop({"export", "camp.cairn", "out.gpx"}, "out.gpx", "ref.gpx", same_bytes); }

TEST_F(KillLoops, Report) {
  kill_loop({"report", "camp.cairn", "-o", "out.html"}, "out.html", "ref.html",
            [](const std::string& a, const std::string& b) {
              // The report names the moment it was made; the rest must be the same.
              const std::string x = bytes_of(a), y = bytes_of(b);
              return x.size() == y.size() && x.rfind("</html>") != std::string::npos &&
                     x.substr(x.size() - 16) == y.substr(y.size() - 16);
            });
}

TEST_F(KillLoops, MergeIntoANewCampFile) {
  // No camp file yet: a killed merge leaves none, or a complete one.
  const std::vector<std::string> args = {"merge", "new.cairn", "tablet-a.cairn", "tablet-b.cairn"};
  const std::string a = digest("tablet-a.cairn"), b = digest("tablet-b.cairn");
  std::mt19937 gen(20261204);
  const auto span = time_one_run(args);
  const long long stations = count(file("new.cairn"), "SELECT count(*) FROM stations");
  ASSERT_GT(stations, 0);
  int killed = 0, complete = 0;
  for (int round = 0; round < kRounds; ++round) {
    std::error_code ec;
    for (const char* s : {"", "-wal", "-shm"}) fs::remove(file(std::string("new.cairn") + s), ec);
    fs::remove_all(file("new.cairn.backups"), ec);
    if (run_and_kill(args, span, gen)) ++killed;
    if (fs::exists(file("new.cairn"))) {
      ++complete;
      EXPECT_EQ(integrity(file("new.cairn")), "ok");
      EXPECT_EQ(count(file("new.cairn"), "SELECT count(*) FROM stations"), stations) << "round " << round;
    }
    EXPECT_EQ(digest("tablet-a.cairn"), a);
    EXPECT_EQ(digest("tablet-b.cairn"), b);
  }
  std::cout << "[ info     ] merge into a new camp: " << killed << " of " << kRounds << " killed, " << complete
            << " left a complete file\n";
  EXPECT_GT(killed, 0);
  std::error_code ec;
  for (const char* s : {"", "-wal", "-shm"}) fs::remove(file(std::string("new.cairn") + s), ec);
  // Killed while its new camp file is being written: none appears, and its
  // temporary file stays until the next start.
  if (kill_while_writing(args)) {
    EXPECT_FALSE(leftovers().empty());
  }
  EXPECT_FALSE(fs::exists(file("new.cairn")));
  time_one_run(args);  // the next start
  EXPECT_EQ(count(file("new.cairn"), "SELECT count(*) FROM stations"), stations);
  EXPECT_EQ(leftovers(), std::vector<std::string>{});
}

TEST_F(KillLoops, MergeIntoAnExistingCampFile) {
  // A camp file with the legend only: a killed merge leaves it as it was or fully merged.
  ASSERT_EQ(cairn("new camp2.cairn --name Camp --utm 8N").status, 0);
  const std::vector<std::string> args = {"merge", "camp2.cairn", "tablet-a.cairn", "tablet-b.cairn"};
  fs::copy_file(file("camp2.cairn"), file("empty.cairn"));
  const std::string a = digest("tablet-a.cairn"), b = digest("tablet-b.cairn");
  std::mt19937 gen(20261205);
  const auto span = time_one_run(args);
  const long long stations = count(file("camp2.cairn"), "SELECT count(*) FROM stations");
  ASSERT_GT(stations, 0);
  int killed = 0, before = 0, after = 0;
  for (int round = 0; round < kRounds; ++round) {
    std::error_code ec;
    for (const char* s : {"-wal", "-shm"}) fs::remove(file(std::string("camp2.cairn") + s), ec);
    fs::copy_file(file("empty.cairn"), file("camp2.cairn"), fs::copy_options::overwrite_existing);
    if (run_and_kill(args, span, gen)) ++killed;
    EXPECT_EQ(integrity(file("camp2.cairn")), "ok");
    const long long n = count(file("camp2.cairn"), "SELECT count(*) FROM stations");
    if (n == 0) ++before;
    if (n == stations) ++after;
    EXPECT_TRUE(n == 0 || n == stations) << n << " stations, round " << round;
    EXPECT_EQ(digest("tablet-a.cairn"), a);
    EXPECT_EQ(digest("tablet-b.cairn"), b);
  }
  std::cout << "[ info     ] merge into a camp file: " << killed << " of " << kRounds << " killed; " << before
            << " as before, " << after << " fully merged\n";
  EXPECT_GT(killed, 0);
  std::error_code ec;
  for (const char* s : {"-wal", "-shm"}) fs::remove(file(std::string("camp2.cairn") + s), ec);
  fs::copy_file(file("empty.cairn"), file("camp2.cairn"), fs::copy_options::overwrite_existing);
  if (kill_while_writing(args)) {  // its copies of the tablets stay until the next start
    EXPECT_FALSE(leftovers().empty());
  }
  EXPECT_EQ(integrity(file("camp2.cairn")), "ok");
  const Outcome r = cairn("merge camp2.cairn tablet-a.cairn tablet-b.cairn");  // the next start
  EXPECT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(count(file("camp2.cairn"), "SELECT count(*) FROM stations"), stations);
  EXPECT_EQ(leftovers(), std::vector<std::string>{});
}

TEST_F(KillLoops, AnExportStoppedWithSigtermRemovesItsTemporaryFileAtOnce) {
  // SIGTERM can be caught (formats/temp_files.h): nothing is left, not even until the next start.
  for (const char* out : {"out.gpkg", "out.geojson"}) {
    const std::string project = digest("camp.cairn");
    if (!kill_while_writing({"export", "camp.cairn", out}, SIGTERM)) {
      std::cout << "[ info     ] " << out << ": no run caught while writing\n";
      continue;
    }
    EXPECT_EQ(leftovers(), std::vector<std::string>{}) << out;
    EXPECT_FALSE(fs::exists(file(out)));
    EXPECT_EQ(digest("camp.cairn"), project);
  }
}
