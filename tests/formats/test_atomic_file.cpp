// formats/atomic_file.h: a replaced file is either the old one or the new one.
// Source: POSIX.1-2017, rename() ("If the link named by the new argument exists, it
// shall be removed and old renamed to new ... a link named new shall remain visible
// to other threads throughout the renaming operation"); common practice for the
// temporary name beside the target (same file system) and the fsync of the folder.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <stdexcept>
#include <unistd.h>

#include "formats/atomic_file.h"

namespace fs = std::filesystem;
using namespace cairn::formats;

namespace {

struct Scratch {
  fs::path dir = fs::temp_directory_path() / ("cairn-atomic-" + std::to_string(::getpid()));
  Scratch() { fs::create_directories(dir); }
  ~Scratch() { fs::remove_all(dir); }
  size_t entries() const {
    return static_cast<size_t>(std::distance(fs::directory_iterator(dir), fs::directory_iterator()));
  }
};

std::string slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

}  // namespace

TEST(AtomicFile, WritesAndReplacesLeavingNoTemporaryFile) {
  Scratch s;
  const std::string target = (s.dir / "out.txt").string();
  write_file_atomically(target, "first");
  EXPECT_EQ(slurp(target), "first");
  write_file_atomically(target, std::string("second\0with nul", 15));
  EXPECT_EQ(slurp(target), std::string("second\0with nul", 15));
  EXPECT_EQ(s.entries(), 1u);
}

TEST(AtomicFile, AFailingWriterLeavesTheOldFileAndNoTemporaryFile) {
  Scratch s;
  const std::string target = (s.dir / "keep.gpkg").string();
  write_file_atomically(target, "old");
  EXPECT_THROW(replace_file_atomically(target,
                                       [](const std::string& tmp) {
                                         std::ofstream(tmp) << "half";
                                         std::ofstream(tmp + "-journal") << "j";
                                         throw std::runtime_error("disk full");
                                       }),
               std::runtime_error);
  EXPECT_EQ(slurp(target), "old");
  EXPECT_EQ(s.entries(), 1u);
}

TEST(AtomicFile, AMissingFolderIsNamed) {
  Scratch s;
  const std::string target = (s.dir / "no" / "such" / "r.html").string();
  try {
    write_file_atomically(target, "x");
    FAIL() << "no error";
  } catch (const std::runtime_error& e) {
    EXPECT_NE(std::string(e.what()).find("no folder"), std::string::npos) << e.what();
    EXPECT_NE(std::string(e.what()).find(target), std::string::npos) << e.what();
  }
}

TEST(AtomicFile, TheTemporaryFileIsBesideTheTargetAndRegistered) {
  Scratch s;
  const std::string target = (s.dir / "camp.gpkg").string();
  std::string seen;
  write_file_atomically(target, "x");  // warm: the writer itself works
  replace_file_atomically(target, [&](const std::string& tmp) {
    seen = tmp;
    std::ofstream(tmp) << "y";
  });
  EXPECT_EQ(fs::path(seen).parent_path(), s.dir);
  // The temp registry's name (formats/temp_files.h): TARGET.tmp-PID-xxxxxxxx, so that a
  // later run can clean it up after a SIGKILL.
  EXPECT_EQ(fs::path(seen).filename().string().rfind("camp.gpkg.tmp-" + std::to_string(::getpid()) + "-", 0), 0u)
      << seen;
  EXPECT_EQ(slurp(target), "y");
}

TEST(AtomicFile, MoveIntoPlaceReplacesTheTargetAndKeepsTheSourceOnFailure) {
  Scratch s;
  const fs::path tmp = s.dir / "staged.tmp", target = s.dir / "backup.cairn";
  std::ofstream(tmp) << "new state";
  std::ofstream(target) << "old state";
  move_into_place(tmp.string(), target.string());
  EXPECT_EQ(slurp(target), "new state");
  EXPECT_FALSE(fs::exists(tmp));
  // rename() into a folder that does not exist fails (POSIX: ENOENT); the staged
  // file stays for its owner to remove, and the message names both paths.
  std::ofstream(tmp) << "again";
  const std::string nowhere = (s.dir / "gone" / "b.cairn").string();
  try {
    move_into_place(tmp.string(), nowhere);
    FAIL() << "no error";
  } catch (const std::runtime_error& e) {
    EXPECT_NE(std::string(e.what()).find(nowhere), std::string::npos) << e.what();
  }
  EXPECT_EQ(slurp(tmp), "again");
}
