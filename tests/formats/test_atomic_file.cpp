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

TEST(AtomicFile, TheTemporaryNameIsBesideTheTarget) {
  const std::string t = temporary_path_beside("/some/folder/camp.gpkg");
  EXPECT_EQ(fs::path(t).parent_path(), fs::path("/some/folder"));
  EXPECT_EQ(fs::path(t).filename().string().rfind("camp.gpkg.tmp-" + std::to_string(getpid()) + "-", 0), 0u) << t;
  EXPECT_NE(t, temporary_path_beside("/some/folder/camp.gpkg"));  // random part
}
