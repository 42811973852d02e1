// World Magnetic Model evaluator against the published WMM2025 test values.
//
// Outside sources:
//  - wmm2025_test_values.csv (tests/reference/data): 50 test points for WMM2025 as
//    carried by the npm package `geomagnetism` 0.2.0, declinations confirmed by
//    `magvar` 2.2.0 (see shared/reference/README.md).
//  - wmm2025.cof: the WMM2025 coefficients (NOAA NCEI / BGS, public domain).
//  - The WMM2025 Technical Report for the validity interval 2025.0-2030.0 and
//    the decimal-year convention (value from memory).
#include <cmath>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "geomath/magnetic.h"

using cairn::geo::MagneticField;
using cairn::geo::MagneticModel;

namespace {

std::string slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  EXPECT_TRUE(in.good()) << "cannot open " << path;
  std::ostringstream os;
  os << in.rdbuf();
  return os.str();
}

const std::string kReference = std::string(CAIRN_REFERENCE_DIR) + "/";

const MagneticModel& shipped_model() {
  static const MagneticModel model = [] {
    auto r = MagneticModel::parse(slurp(std::string(CAIRN_SOURCE_DIR) + "/assets/wmm2025.cof"));
    if (!r) throw std::runtime_error(r.error());
    return r.value();
  }();
  return model;
}

struct TestPoint {
  int line;
  double year, height_km, lat, lon, X, Y, Z, H, F, incl, decl;
};

std::vector<TestPoint> test_points() {
  std::istringstream in(slurp(kReference + "wmm2025_test_values.csv"));
  std::string line;
  std::getline(in, line);  // header
  EXPECT_EQ(line, "decimal_year,height_km,lat_deg,lon_deg,x_nT,y_nT,z_nT,h_nT,f_nT,incl_deg,decl_deg");
  std::vector<TestPoint> rows;
  int n = 1;
  while (std::getline(in, line)) {
    ++n;
    if (line.empty()) continue;
    TestPoint p{};
    p.line = n;
    char c;
    std::istringstream ls(line);
    ls >> p.year >> c >> p.height_km >> c >> p.lat >> c >> p.lon >> c >> p.X >> c >> p.Y >> c >> p.Z >> c >> p.H >> c >>
        p.F >> c >> p.incl >> c >> p.decl;
    EXPECT_FALSE(ls.fail()) << "bad reference row " << n << ": " << line;
    rows.push_back(p);
  }
  return rows;
}

// Replaces the first occurrence of `from` in `text` (which must contain it).
std::string replaced(std::string text, const std::string& from, const std::string& to) {
  auto pos = text.find(from);
  EXPECT_NE(pos, std::string::npos) << from;
  return text.replace(pos, from.size(), to);
}

}  // namespace

TEST(MagneticModel, ShippedCoefficientsAreTheReferenceFile) {
  // The app ships assets/wmm2025.cof; it must be the NOAA/BGS file unchanged.
  EXPECT_EQ(slurp(std::string(CAIRN_SOURCE_DIR) + "/assets/wmm2025.cof"), slurp(kReference + "wmm2025.cof"));
}

TEST(MagneticModel, HeaderAndValidity) {
  // WMM2025 Technical Report: epoch 2025.0, valid 2025.0-2030.0, degree 12.
  const auto& m = shipped_model();
  EXPECT_EQ(m.name(), "WMM2025");
  EXPECT_DOUBLE_EQ(m.epoch(), 2025.0);
  EXPECT_DOUBLE_EQ(m.valid_from(), 2025.0);
  EXPECT_DOUBLE_EQ(m.valid_to(), 2030.0);
  EXPECT_EQ(m.degree(), 12);
  EXPECT_TRUE(m.in_validity(2025.0));
  EXPECT_TRUE(m.in_validity(2027.5));
  EXPECT_TRUE(m.in_validity(2030.0));
  EXPECT_FALSE(m.in_validity(2024.999));
  EXPECT_FALSE(m.in_validity(2030.001));
}

TEST(MagneticModel, MatchesAllFiftyWmm2025TestValues) {
  // Source: wmm2025_test_values.csv (geomagnetism 0.2.0 test values, see README).
  // Angles there are rounded to 0.01 deg; components are given to 1e-6 nT, so
  // an evaluator of the same equations agrees far below the model's own error
  // (0.01 nT leaves room only for floating-point ordering).
  const auto rows = test_points();
  ASSERT_EQ(rows.size(), 50u);
  const auto& m = shipped_model();
  for (const auto& p : rows) {
    SCOPED_TRACE("reference row " + std::to_string(p.line));
    const MagneticField f = m.evaluate(p.lat, p.lon, p.height_km * 1000.0, p.year);
    EXPECT_NEAR(f.declination, p.decl, 0.01);
    EXPECT_NEAR(f.inclination, p.incl, 0.01);
    EXPECT_NEAR(f.X, p.X, 0.01);
    EXPECT_NEAR(f.Y, p.Y, 0.01);
    EXPECT_NEAR(f.Z, p.Z, 0.01);
    EXPECT_NEAR(f.H, p.H, 0.01);
    EXPECT_NEAR(f.F, p.F, 0.01);
  }
}

TEST(MagneticModel, PolesAreFiniteAndContinuous) {
  // At a geographic pole eq. 11 of the WMM report divides by cos(phi'); the
  // limit must join the values just off the pole (along the same meridian).
  const auto& m = shipped_model();
  for (double pole : {90.0, -90.0}) {
    for (double lon : {0.0, 77.0, -140.0}) {
      SCOPED_TRACE("pole " + std::to_string(pole) + " lon " + std::to_string(lon));
      const MagneticField at = m.evaluate(pole, lon, 0.0, 2026.0);
      const MagneticField near = m.evaluate(pole - std::copysign(1e-7, pole), lon, 0.0, 2026.0);
      EXPECT_TRUE(std::isfinite(at.declination));
      EXPECT_NEAR(at.X, near.X, 0.5);
      EXPECT_NEAR(at.Y, near.Y, 0.5);
      EXPECT_NEAR(at.Z, near.Z, 0.5);
      EXPECT_NEAR(at.declination, near.declination, 0.01);
      // The field vector at the pole does not depend on the meridian chosen:
      // F and Z are the same for every longitude.
      const MagneticField other = m.evaluate(pole, lon + 90.0, 0.0, 2026.0);
      EXPECT_NEAR(at.F, other.F, 1e-6);
      EXPECT_NEAR(at.Z, other.Z, 1e-6);
    }
  }
}

TEST(MagneticModel, RejectsImpossibleLatitude) {
  const auto& m = shipped_model();
  EXPECT_THROW(m.evaluate(95.0, 0.0, 0.0, 2026.0), std::domain_error);
  EXPECT_THROW(m.evaluate(-90.5, 0.0, 0.0, 2026.0), std::domain_error);
  EXPECT_THROW(m.evaluate(NAN, 0.0, 0.0, 2026.0), std::domain_error);
}

TEST(MagneticModelParse, TruncatedFileNamesTheLine) {
  const std::string text = slurp(kReference + "wmm2025.cof");
  // Keep the header and the first 10 coefficient lines (lines 1-11): the text
  // stops inside degree 4, after n=4 m=0 on line 11.
  std::string cut;
  std::istringstream in(text);
  std::string line;
  for (int i = 0; i < 11 && std::getline(in, line); ++i) cut += line + "\n";
  auto r = MagneticModel::parse(cut);
  ASSERT_FALSE(r.ok());
  EXPECT_NE(r.error().find("line 11"), std::string::npos) << r.error();
  EXPECT_NE(r.error().find("9s"), std::string::npos) << r.error();

  // Without the closing lines of 9s at all.
  auto no_end = MagneticModel::parse(replaced(text, "999999999999999999999999999999999999999999999999\n", ""));
  ASSERT_TRUE(no_end.ok()) << "one closing line still remains: " << no_end.error();
  auto r2 = MagneticModel::parse(text.substr(0, text.find("9999")));
  ASSERT_FALSE(r2.ok());
  EXPECT_NE(r2.error().find("line 91"), std::string::npos) << r2.error();
}

TEST(MagneticModelParse, BadNumberNamesTheLine) {
  const std::string text = slurp(kReference + "wmm2025.cof");
  // Line 4 of the file is "  2  0    -2556.6 ...".
  auto r = MagneticModel::parse(replaced(text, "-2556.6", "-25x6.6"));
  ASSERT_FALSE(r.ok());
  EXPECT_NE(r.error().find("line 4"), std::string::npos) << r.error();
  EXPECT_NE(r.error().find("-25x6.6"), std::string::npos) << r.error();
}

TEST(MagneticModelParse, OtherLayoutErrors) {
  const std::string text = slurp(kReference + "wmm2025.cof");
  // A missing row (n=2, m=0 dropped): line 4 then holds n=2 m=1.
  auto missing = MagneticModel::parse(replaced(text, "  2  0    -2556.6        0.0      -11.6        0.0\n", ""));
  ASSERT_FALSE(missing.ok());
  EXPECT_NE(missing.error().find("line 4"), std::string::npos) << missing.error();
  EXPECT_NE(missing.error().find("expected n=2 m=0"), std::string::npos) << missing.error();
  // A short row.
  auto short_row = MagneticModel::parse(
      replaced(text, "  1  1    -1410.8     4545.4        9.7      -21.5", "  1  1    -1410.8     4545.4        9.7"));
  ASSERT_FALSE(short_row.ok());
  EXPECT_NE(short_row.error().find("line 3"), std::string::npos) << short_row.error();
  // No header.
  auto no_header = MagneticModel::parse(text.substr(text.find('\n') + 1));
  ASSERT_FALSE(no_header.ok());
  EXPECT_NE(no_header.error().find("line 1"), std::string::npos) << no_header.error();
  EXPECT_FALSE(MagneticModel::parse("").ok());
}

TEST(DecimalYear, WmmConvention) {
  // WMM software convention (value from memory): year + (day_of_year - 1) / days_in_year.
  EXPECT_DOUBLE_EQ(cairn::geo::decimal_year(2025, 1, 1), 2025.0);
  EXPECT_DOUBLE_EQ(cairn::geo::decimal_year(2025, 7, 2), 2025.0 + 182.0 / 365.0);  // day 183
  EXPECT_DOUBLE_EQ(cairn::geo::decimal_year(2025, 12, 31), 2025.0 + 364.0 / 365.0);
  EXPECT_DOUBLE_EQ(cairn::geo::decimal_year(2024, 3, 1), 2024.0 + 60.0 / 366.0);  // leap year, day 61
  EXPECT_DOUBLE_EQ(cairn::geo::decimal_year(2024, 12, 31), 2024.0 + 365.0 / 366.0);
  EXPECT_DOUBLE_EQ(cairn::geo::decimal_year(2000, 2, 29), 2000.0 + 59.0 / 366.0);  // 2000 is leap
  EXPECT_THROW(cairn::geo::decimal_year(2025, 2, 29), std::domain_error);          // 2025 is not
  EXPECT_THROW(cairn::geo::decimal_year(2100, 2, 29), std::domain_error);          // nor is 2100
  EXPECT_THROW(cairn::geo::decimal_year(2025, 13, 1), std::domain_error);
  EXPECT_THROW(cairn::geo::decimal_year(2025, 4, 31), std::domain_error);
  EXPECT_THROW(cairn::geo::decimal_year(2025, 1, 0), std::domain_error);
}

TEST(DecimalYear, CalendarDateIsTheInverse) {
  // Same convention: the day a decimal year falls on.
  using cairn::geo::calendar_date;
  auto same = [](cairn::geo::CalendarDate c, int y, int m, int d) { return c.year == y && c.month == m && c.day == d; };
  EXPECT_TRUE(same(calendar_date(2025.0), 2025, 1, 1));
  EXPECT_TRUE(same(calendar_date(2027.5), 2027, 7, 2));  // floor(182.5) + 1 = day 183
  EXPECT_TRUE(same(calendar_date(2028.5), 2028, 7, 2));  // floor(183) + 1 = day 184 of a leap year
  EXPECT_TRUE(same(calendar_date(2025.0 + 364.0 / 365.0), 2025, 12, 31));
  EXPECT_TRUE(same(calendar_date(2024.0 + 59.0 / 366.0), 2024, 2, 29));
  // Every day of a common and a leap year goes there and back.
  for (int y : {2025, 2028, 2100})
    for (int m = 1; m <= 12; ++m)
      for (int d = 1; d <= 31; ++d)
        if (cairn::geo::valid_date(y, m, d)) {
          EXPECT_TRUE(same(calendar_date(cairn::geo::decimal_year(y, m, d)), y, m, d)) << y << "-" << m << "-" << d;
        }
  EXPECT_THROW(calendar_date(NAN), std::domain_error);
}
