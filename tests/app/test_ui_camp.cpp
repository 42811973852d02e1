// The Camp screen: a CSV file beside the project imported by tapping it, another
// tablet's project file merged, and CSV and GeoPackage exports written, each as
// a job on the worker thread; the results are checked in the files.
//
// Outside sources named beside the checks:
//  - RFC 4180 (CSV): a header row, one record per line;
//  - the import columns documented in storage/import.h (station, lat, lon, ...),
//    the rule that export writes the columns import reads.
#include <filesystem>

#include "storage/repository.h"
#include "storage/sqlite.h"
#include "tests/app/ui_test_support.h"

using namespace cairn;
using cairn::ui_test::UiTest;

TEST_F(UiTest, CampImportsMergesAndExportsOnTheWorker) {
  const std::string camp = file("camp.cairn");
  const std::string tablet = file("tablet.cairn");
  {
    store::Project p = store::Project::create(camp, store::NewProject{"Camp", "8N", store::North::True, 0.0}, quiet());
    store::Project t =
        store::Project::create(tablet, store::NewProject{"Camp", "8N", store::North::True, 0.0}, quiet());
    store::Station s;
    s.code = "T1";
    s.lat = 61.21;
    s.lon = -135.61;
    store::add(t, s);
  }
  std::ofstream(file("stations.csv"))
      << "station,lat,lon,elevation\r\nC1,61.2,-135.6,950\r\nC2,61.201,-135.602,955\r\n";

  std::string s = "wait 3\n";
  s += "tap \"Camp\"\n";
  s += "tap \"stations.csv\"\n";
  s += "tap \"stations\"\n";
  s += "tap \"Import stations.csv\"\n";
  s += "wait-for \"stations.csv: 2 added, 0 already there\" 60\n";
  s += "tap \"tablet.cairn\"\n";
  s += "tap \"Merge tablet.cairn into this project\"\n";
  s += "wait-for \"tablet.cairn: 1 added\" 60\n";
  s += "tap \"Export CSV folder\"\n";
  s += "wait-for \"exported 6 CSV files\" 60\n";
  s += "tap \"Export GeoPackage\"\n";
  s += "wait-for \"camp.gpkg\" 60\n";
  const auto r = gui(camp, s);
  ASSERT_EQ(r.status, 0) << r.err;

  store::Project p = store::Project::open(camp, quiet());
  for (const char* code : {"C1", "C2", "T1"}) EXPECT_TRUE(store::find_station(p, code)) << code;
  auto c1 = store::find_station(p, "C1");
  ASSERT_TRUE(c1 && c1->elevation);
  EXPECT_DOUBLE_EQ(*c1->elevation, 950);

  // The export: one CSV per record kind; stations.csv starts with a header row
  // (RFC 4180) holding the import columns and has one line per station.
  const std::filesystem::path out = dir_ / "camp-export";
  for (const char* kind : {"units", "contacts", "stations", "planes", "lines", "points"})
    EXPECT_TRUE(std::filesystem::exists(out / (std::string(kind) + ".csv"))) << kind;
  const std::string csv = ui_test::slurp((out / "stations.csv").string());
  EXPECT_EQ(csv.rfind("station,", 0), 0u) << csv;
  size_t lines = 0;
  for (char ch : csv) lines += ch == '\n';
  EXPECT_EQ(lines, 4u) << csv;  // header + C1, C2, T1

  // The GeoPackage is an SQLite file whose application_id is "GPKG" (0x47504B47,
  // OGC GeoPackage Encoding Standard 1.3, requirement 2).
  store::Db g(file("camp.gpkg"), 1 /* SQLITE_OPEN_READONLY */);
  EXPECT_EQ(g.query_int("PRAGMA application_id"), 0x47504B47);
}

// A long import shows its progress on the Camp screen with the figures of
// `cairn import`'s progress line (app/core/progress.h): rows checked of the
// rows in the file, and rows per second. The file: 12 000 stations, one per
// CSV record (RFC 4180).
TEST_F(UiTest, ALongImportShowsRowsAndRowsPerSecond) {
  const std::string camp = file("camp.cairn");
  {
    store::Project p = store::Project::create(camp, store::NewProject{"Camp", "8N", store::North::True, 0.0}, quiet());
  }
  {
    std::ofstream csv(file("many.csv"));
    csv << "station,lat,lon\n";
    for (int i = 0; i < 12000; ++i)
      csv << "M" << i << "," << 61.0 + (i % 1000) * 1e-4 << "," << -135.0 - (i / 1000) * 1e-4 << "\n";
  }
  std::string s = "wait 3\n";
  s += "tap \"Camp\"\n";
  s += "tap \"many.csv\"\n";
  s += "tap \"stations\"\n";
  s += "tap \"Import many.csv\"\n";
  s += "wait-for \"of 12000 rows (\" 300\n";
  s += "expect \"rows/s)\"\n";
  s += "wait-for \"many.csv: 12000 added, 0 already there\" 600\n";
  const auto r = gui(camp, s);
  ASSERT_EQ(r.status, 0) << r.err;
}
