// The `cairn merge` and `cairn export` verbs, run as a user runs them.
// Sources: the command descriptions; exit status 0 for success, 1 for
// a failure, 2 for a usage error (common practice for command-line tools, as in
// BSD sysexits and GNU tools); RFC 8259 for the shape of the --json output; the
// GeoPackage 1.3 standard (OGC 12-128r18) for the EPSG code of the UTM layers.
#include "tests/app/cli_test_support.h"

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <sys/wait.h>

using cairn::cli_test::CliTest;
using cairn::cli_test::Outcome;

namespace {

class CampVerbs : public CliTest {
 protected:
  // A camp file with a legend, and two tablets copied from it with a station each.
  void camp_and_tablets() {
    ASSERT_EQ(cairn("new camp.cairn --name 'Quartz Gully' --utm 33N").status, 0);
    write("units.csv", "unit,name,age_rank\nGs,grey slate,1\nWq,white quartzite,2\n");
    ASSERT_EQ(cairn("import camp.cairn units units.csv").status, 0);
    std::filesystem::copy_file(file("camp.cairn"), file("tabletA.cairn"));
    std::filesystem::copy_file(file("camp.cairn"), file("tabletB.cairn"));
    write("a.csv", "station,lat,lon,elevation,unit\nA1,46.50,16.20,1200,Gs\nA2,46.51,16.21,1210,Wq\n");
    write("b.csv", "station,lat,lon\nB1,46.52,16.22\n");
    ASSERT_EQ(cairn("import tabletA.cairn stations a.csv").status, 0);
    ASSERT_EQ(cairn("import tabletB.cairn stations b.csv").status, 0);
  }
};

}  // namespace

TEST_F(CampVerbs, MergeReportsWhatCameFromEachFile) {
  camp_and_tablets();
  Outcome r = cairn("merge camp.cairn tabletA.cairn tabletB.cairn");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("Merged 2 files into camp.cairn"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("tabletA.cairn (\"Quartz Gully\"): 2 added, 0 updated, 2 skipped, 0 conflicts"),
            std::string::npos)
      << r.out;
  EXPECT_NE(r.out.find("tabletB.cairn (\"Quartz Gully\"): 1 added, 0 updated, 2 skipped, 0 conflicts"),
            std::string::npos)
      << r.out;
  EXPECT_NE(r.out.find("by device"), std::string::npos);
  EXPECT_NE(r.out.find("by person"), std::string::npos);
  r = cairn("list camp.cairn stations");
  EXPECT_NE(r.out.find("A1"), std::string::npos);
  EXPECT_NE(r.out.find("B1"), std::string::npos);
  // Again, as JSON: nothing new.
  r = cairn("merge camp.cairn tabletA.cairn tabletB.cairn --json");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(r.out.rfind("{\"target\":\"camp.cairn\",\"changed\":false,\"sources\":[{", 0), 0u) << r.out;
  EXPECT_NE(r.out.find("\"added\":0,\"updated\":0,\"skipped\":4,\"conflicts\":0"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("\"conflicts\":[],\"clashes\":[],\"warnings\":[]}"), std::string::npos) << r.out;
  r = cairn("merge camp.cairn --conflicts");
  EXPECT_EQ(r.status, 0);
  EXPECT_EQ(r.out, "0 open conflicts in camp.cairn\n");
}

TEST_F(CampVerbs, SharedStationCodesAreReportedWithASuggestion) {
  camp_and_tablets();
  write("b2.csv", "station,lat,lon\nA1,46.60,16.30\n");  // crew B also used A1, elsewhere
  ASSERT_EQ(cairn("import tabletB.cairn stations b2.csv").status, 0);
  Outcome r = cairn("merge camp.cairn tabletA.cairn tabletB.cairn");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("Shared codes (1)"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("stations code A1"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("suggested new code: A1b"), std::string::npos) << r.out;
}

TEST_F(CampVerbs, AFailedMergeLeavesTheCampFileAsItWas) {
  camp_and_tablets();
  const std::string before = slurp(file("camp.cairn"));
  Outcome r = cairn("merge camp.cairn tabletA.cairn tabletB.cairn", "CAIRN_MERGE_FAIL_AFTER=3");
  EXPECT_EQ(r.status, 1);
  EXPECT_NE(r.err.find("test hook after 3 writes"), std::string::npos) << r.err;
  EXPECT_EQ(slurp(file("camp.cairn")), before);
  EXPECT_EQ(cairn("list camp.cairn stations").out.find("A1"), std::string::npos);
  // Usage errors.
  EXPECT_EQ(cairn("merge camp.cairn").status, 2);
  EXPECT_EQ(cairn("merge camp.cairn tabletA.cairn --bogus").status, 2);
  EXPECT_EQ(cairn("merge camp.cairn missing.cairn").status, 1);
}

TEST_F(CampVerbs, ProgressGoesToStderrWhenAsked) {
  camp_and_tablets();
  // Forced (no two seconds' wait, and --progress off a terminal): the progress
  // line of app/core/progress.h, its last figures when the source is done.
  Outcome r = cairn("merge camp.cairn tabletA.cairn --progress --json", "CAIRN_PROGRESS_AFTER=0");
  ASSERT_EQ(r.status, 0) << r.err;
  const size_t at = r.err.rfind("merging tabletA.cairn (1/1): ");
  ASSERT_NE(at, std::string::npos) << r.err;
  const std::string last = r.err.substr(at, r.err.find('\n', at) - at);
  // "N of N rows": every row of the source looked at.
  const size_t of = last.find(" of ");
  ASSERT_NE(of, std::string::npos) << last;
  const std::string done = last.substr(last.find(": ") + 2, of - last.find(": ") - 2);
  EXPECT_EQ(last.compare(of + 4, done.size() + 5, done + " rows"), 0) << last;
  EXPECT_EQ(r.out.find("merging"), std::string::npos);
  // Without --progress, off a terminal: quiet, however long.
  r = cairn("merge camp.cairn tabletB.cairn", "CAIRN_PROGRESS_AFTER=0");
  EXPECT_EQ(r.err, "");
  // With --progress, but a merge shorter than the two seconds: quiet.
  r = cairn("merge camp.cairn tabletB.cairn --progress", "CAIRN_PROGRESS_AFTER=3600");
  EXPECT_EQ(r.err, "");
}

TEST_F(CampVerbs, ExportWritesEachFormat) {
  camp_and_tablets();
  ASSERT_EQ(cairn("merge camp.cairn tabletA.cairn tabletB.cairn").status, 0);
  Outcome r = cairn("export camp.cairn camp.gpkg --json");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(r.out.rfind("{\"path\":\"camp.gpkg\",\"format\":\"GeoPackage\",\"epsg\":32633,\"layers\":[", 0), 0u)
      << r.out;
  EXPECT_NE(r.out.find("{\"name\":\"stations\",\"count\":3}"), std::string::npos) << r.out;
  r = cairn("export camp.cairn camp.geojson");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("wrote GeoJSON camp.geojson (EPSG:4326)"), std::string::npos) << r.out;
  r = cairn("export camp.cairn csv");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("stations.csv: 3"), std::string::npos) << r.out;
  EXPECT_TRUE(std::filesystem::exists(file("csv/units.csv")));
  r = cairn("export camp.cairn camp.kml");
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find("name a .gpkg or .geojson file, or a folder for CSV files"), std::string::npos) << r.err;
}

TEST_F(CampVerbs, ExportNeverReplacesAProjectFileNorFillsAFolderUnlessAsked) {
  // Issue: `cairn export` overwrote the project file given as OUT, and CSV
  // files in an existing folder. A project file is told by its SQLite header
  // (SQLite documentation, "Database File Format", 1.3: application id at offset 68).
  camp_and_tablets();
  const std::string camp_before = slurp(file("camp.cairn"));
  std::filesystem::copy_file(file("camp.cairn"), file("camp.geojson"));
  Outcome r = cairn("export tabletA.cairn camp.geojson --overwrite");
  EXPECT_EQ(r.status, 1);
  EXPECT_NE(r.err.find("camp.geojson is a Cairn project file; an export never replaces one"), std::string::npos)
      << r.err;
  EXPECT_EQ(slurp(file("camp.geojson")), camp_before);
  std::filesystem::create_directory(file("out"));
  write("out/notes.txt", "field notes\n");
  r = cairn("export camp.cairn out");
  EXPECT_EQ(r.status, 1);
  EXPECT_NE(r.err.find("out is a folder that is not empty"), std::string::npos) << r.err;
  EXPECT_FALSE(std::filesystem::exists(file("out/units.csv")));
  r = cairn("export camp.cairn out --overwrite");
  EXPECT_EQ(r.status, 0) << r.err;
  EXPECT_TRUE(std::filesystem::exists(file("out/units.csv")));
  ASSERT_EQ(cairn("export camp.cairn a.gpkg").status, 0);
  r = cairn("export camp.cairn a.gpkg");
  EXPECT_EQ(r.status, 1);
  EXPECT_NE(r.err.find("a.gpkg exists; name another file, or add --overwrite"), std::string::npos) << r.err;
}

TEST_F(CampVerbs, TheFirstEveningMakesTheCampFile) {
  camp_and_tablets();
  Outcome r = cairn("merge evening.cairn tabletA.cairn tabletB.cairn");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.err.find("created evening.cairn with the settings of tabletA.cairn"), std::string::npos) << r.err;
  r = cairn("list evening.cairn stations");
  EXPECT_NE(r.out.find("A1"), std::string::npos);
  EXPECT_NE(r.out.find("B1"), std::string::npos);
  // A failed first merge leaves no camp file behind.
  r = cairn("merge other.cairn tabletA.cairn", "CAIRN_MERGE_FAIL_AFTER=2");
  EXPECT_EQ(r.status, 1);
  EXPECT_FALSE(std::filesystem::exists(file("other.cairn")));
  EXPECT_FALSE(std::filesystem::exists(file("other.cairn.backups")));
}
