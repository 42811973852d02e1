// geomath/decimal.h: the one number reader. Its rules are the project's own
// (storage/SCHEMA.md, bad-input table, rule "number"; common practice for field
// values, no published source); what it refuses is checked against the forms
// ISO C's strtod (C11 7.22.1.3) and C++17's from_chars would otherwise accept:
// exponents, hexadecimal, infinity and NaN. Expected values are the decimal
// literals themselves, read by the compiler.
#include <gtest/gtest.h>

#include "geomath/decimal.h"

using cairn::geo::parse_decimal;

TEST(Decimal, ReadsPlainDecimals) {
  EXPECT_EQ(parse_decimal("40"), 40.0);
  EXPECT_EQ(parse_decimal("-3.5"), -3.5);
  EXPECT_EQ(parse_decimal("+0.25"), 0.25);
  EXPECT_EQ(parse_decimal(".5"), 0.5);
  EXPECT_EQ(parse_decimal("12."), 12.0);
  EXPECT_EQ(parse_decimal("  271.25\t"), 271.25);
  EXPECT_EQ(parse_decimal("-0"), 0.0);
  EXPECT_EQ(parse_decimal("5200000.123456"), 5200000.123456);
}

TEST(Decimal, RefusesWhatStrtodWouldTake) {
  for (const char* bad : {"1e3", "1E3", "0x1A", "0X1a", "inf", "-inf", "nan", "NAN", "infinity"})
    EXPECT_FALSE(parse_decimal(bad)) << bad;
}

TEST(Decimal, RefusesCommasSignsAndEmpty) {
  for (const char* bad : {"", " ", "3,5", "1,000", "--1", "+-1", "1.2.3", ".", "+", "-", "1 2", "40°", "1-"})
    EXPECT_FALSE(parse_decimal(bad)) << bad;
}

TEST(Decimal, RefusesWhatOverflows) {
  EXPECT_FALSE(parse_decimal(std::string(400, '9')));  // 1e400 is not finite as a double
}

// format_decimal: printf conversion specifications as ISO C defines them (C11
// 7.21.6.1: precision, '+' flag, zero padding, %g's shortest form); the decimal
// point is '.' whatever the locale (the "C" locale's, C11 7.11.1.1).
TEST(Decimal, FormatsOneNumberByAPrintfSpec) {
  using cairn::geo::format_decimal;
  EXPECT_EQ(format_decimal("%.1f", 10.26), "10.3");
  EXPECT_EQ(format_decimal("%+.1f", 3.0), "+3.0");
  EXPECT_EQ(format_decimal("%05.1f", 7.5), "007.5");
  EXPECT_EQ(format_decimal("%02.0f", 3), "03");  // an int converts to double, as the old helpers did
  EXPECT_EQ(format_decimal("%g", 100000.0), "100000");
  EXPECT_EQ(format_decimal("%g", 1e-5), "1e-05");
  EXPECT_EQ(format_decimal("%.3g", 538.46), "538");
}
