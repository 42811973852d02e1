// `cairn declination`: the real binary against the WMM2025 test values.
//
// Outside source: tests/reference/data/wmm2025_test_values.csv, the WMM2025 test
// points carried by the npm package `geomagnetism` 0.2.0 (declinations
// confirmed by `magvar` 2.2.0; see shared/reference/README.md).
#include <sys/wait.h>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

namespace {

struct CairnRun {
  int status;       // exit code
  std::string out;  // stdout (and stderr when merged)
};

// Runs `cairn ARGS` through the shell; `redirect` is appended (e.g. "2>&1").
CairnRun cairn(const std::string& args, const std::string& redirect = "2>/dev/null", const std::string& env = "") {
  const std::string cmd = env + " '" + std::string(CAIRN_BINARY) + "' " + args + " " + redirect;
  CairnRun r{-1, {}};
  FILE* p = popen(cmd.c_str(), "r");
  if (!p) return r;
  char buf[4096];
  size_t n;
  while ((n = fread(buf, 1, sizeof buf, p)) > 0) r.out.append(buf, n);
  const int st = pclose(p);
  r.status = WIFEXITED(st) ? WEXITSTATUS(st) : -1;
  return r;
}

// The number after "key": in a flat JSON object.
double json_number(const std::string& json, const std::string& key) {
  const auto k = json.find("\"" + key + "\":");
  EXPECT_NE(k, std::string::npos) << key << " missing in " << json;
  if (k == std::string::npos) return NAN;
  return std::strtod(json.c_str() + k + key.size() + 3, nullptr);
}

std::string json_string(const std::string& json, const std::string& key) {
  const auto k = json.find("\"" + key + "\": \"");
  EXPECT_NE(k, std::string::npos) << key << " missing in " << json;
  if (k == std::string::npos) return {};
  const auto b = k + key.size() + 5;
  return json.substr(b, json.find('"', b) - b);
}

std::vector<std::vector<std::string>> reference_rows() {
  std::ifstream in(std::string(CAIRN_REFERENCE_DIR) + "/wmm2025_test_values.csv");
  EXPECT_TRUE(in.good());
  std::vector<std::vector<std::string>> rows;
  std::string line;
  std::getline(in, line);  // header
  while (std::getline(in, line)) {
    if (line.empty()) continue;
    std::vector<std::string> cells;
    std::istringstream ls(line);
    std::string c;
    while (std::getline(ls, c, ',')) cells.push_back(c);
    rows.push_back(cells);
  }
  return rows;
}

}  // namespace

TEST(CmdDeclination, JsonMatchesEveryReferenceRow) {
  // Columns: decimal_year,height_km,lat_deg,lon_deg,x,y,z,h,f,incl_deg,decl_deg.
  const auto rows = reference_rows();
  ASSERT_EQ(rows.size(), 50u);
  for (const auto& row : rows) {
    ASSERT_EQ(row.size(), 11u);
    const std::string height_m = std::to_string(std::stod(row[1]) * 1000.0);
    const CairnRun r =
        cairn("declination " + row[2] + " " + row[3] + " --date " + row[0] + " --height " + height_m + " --json");
    SCOPED_TRACE(row[0] + " " + row[2] + " " + row[3] + ": " + r.out);
    ASSERT_EQ(r.status, 0);
    EXPECT_NEAR(json_number(r.out, "declination"), std::stod(row[10]), 0.01);
    EXPECT_NEAR(json_number(r.out, "inclination"), std::stod(row[9]), 0.01);
    EXPECT_EQ(json_string(r.out, "model"), "WMM2025");
  }
}

TEST(CmdDeclination, CalendarDateAndText) {
  // A 2028.0 row of the reference given as the calendar date 2028-01-01
  // (decimal year = year + (day - 1) / days, WMM convention, value from memory).
  for (const auto& row : reference_rows()) {
    if (row[0] != "2028.000000") continue;
    const std::string height_m = std::to_string(std::stod(row[1]) * 1000.0);
    const CairnRun j =
        cairn("declination " + row[2] + " " + row[3] + " --date 2028-01-01 --height " + height_m + " --json");
    ASSERT_EQ(j.status, 0) << j.out;
    EXPECT_EQ(json_string(j.out, "date"), "2028-01-01");
    EXPECT_NEAR(json_number(j.out, "decimal_year"), 2028.0, 1e-9);
    EXPECT_NEAR(json_number(j.out, "declination"), std::stod(row[10]), 0.01);

    // The text form names the compass setting as "N.N° E" or "N.N° W".
    const CairnRun t = cairn("declination " + row[2] + " " + row[3] + " --date 2028-01-01 --height " + height_m);
    ASSERT_EQ(t.status, 0) << t.out;
    const double d = std::stod(row[10]);
    char want[32];
    std::snprintf(want, sizeof want, "%.1f° %s", std::abs(d), d > 0 ? "E" : "W");
    if (std::abs(d) >= 0.05) {
      EXPECT_NE(t.out.find(want), std::string::npos) << t.out;
    }
    EXPECT_NE(t.out.find("WMM2025"), std::string::npos) << t.out;
    EXPECT_NE(t.out.find("2028-01-01"), std::string::npos) << t.out;
    return;
  }
  FAIL() << "no 2028.0 row in the reference";
}

TEST(CmdDeclination, DecimalYearIsShownAsItsCalendarDate) {
  // 2027.5 -> day floor(0.5 * 365) + 1 = 183 of 2027 = 2 July; 2028.5 -> day
  // floor(0.5 * 366) + 1 = 184 of the leap year 2028 = 2 July as well; 2025.0 ->
  // 1 January (WMM decimal-year convention, value from memory).
  EXPECT_EQ(json_string(cairn("declination 10 20 --date 2027.5 --json").out, "date"), "2027-07-02");
  EXPECT_EQ(json_string(cairn("declination 10 20 --date 2028.5 --json").out, "date"), "2028-07-02");
  EXPECT_EQ(json_string(cairn("declination 10 20 --date 2025 --json").out, "date"), "2025-01-01");
}

TEST(CmdDeclination, LatitudeOutOfRangeIsAnError) {
  const CairnRun r = cairn("declination 95 10 --json", "2>&1");
  EXPECT_NE(r.status, 0);
  EXPECT_NE(r.out.find("latitude 95"), std::string::npos) << r.out;
  EXPECT_EQ(r.out.find("\"declination\""), std::string::npos) << "no result on failure: " << r.out;
}

TEST(CmdDeclination, OtherBadInputNamesWhat) {
  CairnRun r = cairn("declination 45 abc", "2>&1");
  EXPECT_NE(r.status, 0);
  EXPECT_NE(r.out.find("longitude 'abc'"), std::string::npos) << r.out;
  r = cairn("declination 45 400", "2>&1");  // -180..360 are accepted
  EXPECT_NE(r.status, 0);
  EXPECT_NE(r.out.find("longitude 400"), std::string::npos) << r.out;
  r = cairn("declination 45 7 --date 2025-02-30", "2>&1");  // 2025 is not a leap year
  EXPECT_NE(r.status, 0);
  EXPECT_NE(r.out.find("2025-02-30"), std::string::npos) << r.out;
  r = cairn("declination 45 7 --date tomorrow", "2>&1");
  EXPECT_NE(r.status, 0);
  EXPECT_NE(r.out.find("tomorrow"), std::string::npos) << r.out;
  r = cairn("declination 45 7 --height 12x", "2>&1");
  EXPECT_NE(r.status, 0);
  EXPECT_NE(r.out.find("height"), std::string::npos) << r.out;
  r = cairn("declination 45", "2>&1");
  EXPECT_NE(r.status, 0);
}

TEST(CmdDeclination, WarnsOutsideValidityOnStderr) {
  // WMM2025 is valid 2025.0-2030.0 (WMM2025 Technical Report).
  CairnRun out_only = cairn("declination 43 93 --date 2031-03-01 --json", "2>/dev/null");
  EXPECT_EQ(out_only.status, 0);
  EXPECT_EQ(out_only.out.find("warning"), std::string::npos) << "warning belongs on stderr";
  CairnRun err_only = cairn("declination 43 93 --date 2031-03-01 --json", "2>&1 >/dev/null");
  EXPECT_NE(err_only.out.find("warning"), std::string::npos) << err_only.out;
  EXPECT_NE(err_only.out.find("validity"), std::string::npos) << err_only.out;
  CairnRun inside = cairn("declination 43 93 --date 2026-03-01 --json", "2>&1 >/dev/null");
  EXPECT_EQ(inside.out.find("validity"), std::string::npos) << inside.out;
}

TEST(CmdDeclination, BadCoefficientFileIsReportedWithItsLine) {
  // CAIRN_ASSETS takes precedence; a damaged copy must fail naming the line.
  const std::string dir = testing::TempDir() + "cairn_wmm_bad";
  std::system(("mkdir -p '" + dir + "'").c_str());
  {
    std::ifstream in(std::string(CAIRN_REFERENCE_DIR) + "/wmm2025.cof");
    std::ofstream out(dir + "/wmm2025.cof");
    std::string line;
    int n = 0;
    while (std::getline(in, line)) {
      if (++n == 5) line = "  2  1     2951.1    -31;3.6       -5.2      -27.7";
      out << line << "\n";
    }
  }
  const CairnRun r = cairn("declination 43 93 --json", "2>&1", "CAIRN_ASSETS='" + dir + "'");
  EXPECT_NE(r.status, 0);
  EXPECT_NE(r.out.find("line 5"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("wmm2025.cof"), std::string::npos) << r.out;
}
