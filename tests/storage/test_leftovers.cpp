// Temporary files are made beside their target and never left behind
// (formats/temp_files.h): a merge stopped with SIGTERM removes its copy at
// once; one killed with SIGKILL leaves it until the camp file's next opening,
// which removes it. Sources: POSIX signal semantics (SIGTERM can be caught,
// SIGKILL cannot: IEEE Std 1003.1, <signal.h>), and SQLite documentation
// "Atomic Commit In SQLite" (a killed writer leaves the file as of its last
// commit, which PRAGMA integrity_check confirms).
#include <gtest/gtest.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <random>
#include <thread>

#include "formats/temp_files.h"
#include "merge_test_support.h"
#include "storage/merge.h"

using namespace cairn::store;
using namespace cairn::store::testing;
namespace fs = std::filesystem;

namespace {

// Every temporary name (".tmp-") in FOLDER and its subfolders.
std::vector<std::string> leftovers(const fs::path& folder) {
  std::vector<std::string> out;
  for (const auto& e : fs::recursive_directory_iterator(folder))
    if (e.path().filename().string().find(".tmp-") != std::string::npos) out.push_back(e.path().string());
  return out;
}

// A tablet with enough records that merging it takes a while.
std::string busy_tablet(Camp& c) {
  const std::string a = c.tablet("tabletA.cairn");
  Project t = Project::open(a, device(kTabletA, "tablet A"));
  t.write([&] {
    for (int i = 0; i < 300; ++i) {
      Station s;
      s.code = "A" + std::to_string(i);
      s.lat = 46.5 + i * 1e-4;
      s.lon = 14.9;
      add(t, s);
    }
  });
  return a;
}

// Runs a merge in a child process that sends itself SIG once the merge has
// begun (its copy of the source exists); returns the child's wait status.
int merge_and_signal(const std::string& camp, const std::string& src, int sig) {
  const pid_t pid = fork();
  if (pid == 0) {
    try {
      Project p = Project::open(camp, device(kCampDevice, "camp laptop"));
      MergeOptions o;
      o.progress = [&](const MergeProgress& pr) {
        if (pr.done >= 100) raise(sig);
      };
      merge_files(p, {src}, o);
    } catch (...) {
      _exit(3);
    }
    _exit(0);
  }
  int status = 0;
  waitpid(pid, &status, 0);
  return status;
}

}  // namespace

TEST(Leftovers, TempPathIsBesideItsTargetAndGoneWithIt) {
  TempDir d;
  const std::string target = d.file("camp.cairn");
  std::string p;
  {
    cairn::formats::TempPath t(target);
    p = t.path();
    EXPECT_EQ(fs::path(p).parent_path(), fs::path(target).parent_path());
    write_file(p, "x");
    write_file(p + "-wal", "x");
  }
  EXPECT_FALSE(fs::exists(p));
  EXPECT_FALSE(fs::exists(p + "-wal"));
}

TEST(Leftovers, AMergeStoppedWithSigtermRemovesItsCopyAtOnce) {
  Camp c;
  const std::string a = busy_tablet(c);
  const std::string before = dump(c.camp);
  const int status = merge_and_signal(c.camp, a, SIGTERM);
  ASSERT_TRUE(WIFSIGNALED(status)) << "status " << status;
  EXPECT_EQ(WTERMSIG(status), SIGTERM);
  EXPECT_EQ(leftovers(c.dir.path()), std::vector<std::string>{});
  EXPECT_EQ(dump(c.camp), before);  // all or nothing
}

TEST(Leftovers, AMergeKilledWithSigkillLeavesNothingAfterTheNextOpening) {
  Camp c;
  const std::string a = busy_tablet(c);
  // Killed where the copy certainly exists, then at random moments.
  int status = merge_and_signal(c.camp, a, SIGKILL);
  ASSERT_TRUE(WIFSIGNALED(status));
  EXPECT_FALSE(leftovers(c.dir.path()).empty()) << "SIGKILL cannot be caught: the copy is still there";
  std::mt19937 gen(20251203);
  for (int round = 0; round < 8; ++round) {
    const pid_t pid = fork();
    if (pid == 0) {
      try {
        Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
        for (;;) merge_files(p, {a});
      } catch (...) {
        _exit(3);
      }
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(std::uniform_int_distribution<int>(5, 300)(gen)));
    kill(pid, SIGKILL);
    waitpid(pid, &status, 0);
  }
  {
    Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
    EXPECT_TRUE(p.integrity_check().empty());
  }
  EXPECT_EQ(leftovers(c.dir.path()), std::vector<std::string>{});
}
