// Text formats storage relies on: SHA-256 digests and ISO 8601 times.
// Sources: the FIPS 180-2 standard, Appendix B (SHA-256 examples "abc", the 448-bit message
// and one million 'a'), the empty-message digest as listed by NIST's example
// values; ISO 8601-1:2019 (calendar dates, extended format, UTC designator and
// offsets), the Gregorian leap-year rule, and RFC 3339 section 5.6 (space for T).
#include <gtest/gtest.h>

#include "formats/iso8601.h"
#include "formats/sha256.h"

using namespace cairn::formats;

TEST(Sha256, Fips180Examples) {
  EXPECT_EQ(sha256_hex("abc"), "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  EXPECT_EQ(sha256_hex(""), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
  EXPECT_EQ(sha256_hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
            "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
  EXPECT_EQ(sha256_hex(std::string(1000000, 'a')), "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
}

TEST(Iso8601, AcceptsAndNormalises) {
  struct Case {
    const char* in;
    const char* out;
  };
  for (const Case& c :
       {Case{"2025-06-14", "2025-06-14"}, Case{"2025-06-14T09:30", "2025-06-14T09:30:00"},
        Case{"2025-06-14T09:30:05Z", "2025-06-14T09:30:05Z"},
        Case{"2025-06-14T09:30:05.250+0200", "2025-06-14T09:30:05.250+02:00"},
        Case{"2025-06-14T09:30:05-03", "2025-06-14T09:30:05-03:00"},
        Case{"2025-06-14T09:30:05+00:00", "2025-06-14T09:30:05Z"}, Case{"2025-06-14 09:30:05z", "2025-06-14T09:30:05Z"},
        Case{"2024-02-29", "2024-02-29"},                    // divisible by 4: leap year
        Case{"2000-02-29T00:00", "2000-02-29T00:00:00"}}) {  // divisible by 400: leap
    auto t = parse_iso8601(c.in);
    ASSERT_TRUE(t) << c.in << ": " << t.error();
    EXPECT_EQ(t->text, c.out) << c.in;
  }
  auto t = parse_iso8601("2025-07-02T23:59:59+14:00");
  ASSERT_TRUE(t);
  EXPECT_EQ(t->day, date::year{2025} / 7 / 2);  // the date as written, not converted to UTC
  EXPECT_EQ(t->utc_offset, std::chrono::minutes{14 * 60});
  EXPECT_EQ(t->time_of_day, std::chrono::hours{23} + std::chrono::minutes{59} + std::chrono::seconds{59});
}

TEST(Iso8601, Rejects) {
  for (const char* bad : {"2025-02-29",  // not a leap year
                          "1900-02-29",  // divisible by 100, not 400: not a leap year
                          "2025-04-31", "2025-00-10", "2025-6-14", "14.06.2025", "2025-06-14T24:00", "2025-06-14T12:60",
                          "2025-06-14T12:00:60", "2025-06-14T12", "2025-06-14T12:00+15:00", "2025-06-14T12:00:00.",
                          "2025-06-14T12:00 UTC", "", "today"}) {
    EXPECT_FALSE(parse_iso8601(bad)) << bad;
  }
}
