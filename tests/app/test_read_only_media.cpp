// A project on read-only media (a write-protected card, a folder Cairn may not
// write): `cairn list` and `cairn check` read it, a verb that writes is refused
// with the reason and what to do, and nothing is written beside the file.
// Sources: mount(2) (a read-only mount refuses every write with EROFS, root's
// too) and access(2) (root passes permission bits), used through
// tests/storage/read_only_media.h; exit statuses 0 for success and 1 for a
// failure (common practice for command-line tools, as in BSD sysexits and GNU
// tools).
#include <filesystem>
#include <set>

#include "tests/app/cli_test_support.h"
#include "tests/storage/read_only_media.h"

using cairn::cli_test::CliTest;
using cairn::cli_test::Outcome;
namespace fs = std::filesystem;

namespace {

class ReadOnlyMedia : public CliTest {};

std::set<std::string> names_in(const fs::path& folder) {
  std::set<std::string> out;
  for (const auto& e : fs::directory_iterator(folder)) out.insert(e.path().filename().string());
  return out;
}

}  // namespace

TEST_F(ReadOnlyMedia, ListAndCheckWorkAndWritesAreRefused) {
  fs::create_directory(file("card"));
  ASSERT_EQ(cairn("new card/field.cairn --name Card --utm 33N").status, 0);
  write("stations.csv", "station,lat,lon,elevation\nR1,46.50,14.90,1200\nR2,46.51,14.91,1210\n");
  ASSERT_EQ(cairn("import card/field.cairn stations stations.csv").status, 0);
  write("more.csv", "station,lat,lon\nR3,46.52,14.92\n");
  const auto before = names_in(file("card"));
  cairn::store::testing::ReadOnlyFolder ro(file("card"));
  if (!ro.why_not().empty()) GTEST_SKIP() << ro.why_not();

  Outcome r = cairn("list card/field.cairn stations");
  EXPECT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("R1"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("R2"), std::string::npos) << r.out;

  r = cairn("check card/field.cairn");
  EXPECT_EQ(r.status, 0) << r.err;

  r = cairn("import card/field.cairn stations more.csv");
  EXPECT_EQ(r.status, 1) << r.out << r.err;
  EXPECT_NE(r.err.find("open read-only"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("copy it"), std::string::npos) << "says what to do: " << r.err;
  EXPECT_EQ(names_in(file("card")), before) << ro.how();
}
