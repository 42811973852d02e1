// Photo matching (app/core/photo_match.h) on a planted set with a clock offset.
// Source: hand-worked expected matches (each photo's window and distance worked
// out in the comments below); distances from the length of a degree of
// latitude, 111132.954 - 559.822 cos 2φ + 1.175 cos 4φ m (the usual series for
// the WGS84 meridian arc, value from memory), and of longitude,
// 111412.84 cos φ - 93.5 cos 3φ m (same series).
#include <gtest/gtest.h>

#include "app/core/photo_match.h"

using namespace cairn::core;
using std::chrono::seconds;

namespace {

// Person A's day: S1 09:00, S2 09:40, S3 11:30 (gap over an hour); person B's S4 09:45 beside S2.
std::vector<MatchStation> planted() {
  return {
      {"u1", "S1", "A", 46.50000, 14.25000, "2026-07-14T09:00:00"},
      {"u2", "S2", "A", 46.50500, 14.25000, "2026-07-14T09:40:00"},
      {"u3", "S3", "A", 46.51000, 14.26000, "2026-07-14T11:30:00"},
      {"u4", "S4", "B", 46.50500, 14.25010, "2026-07-14T09:45:00"},
  };
}

TEST(PhotoMatch, PlantedSetWithClockOffset) {
  MatchRules r;
  r.clock_offset = seconds{130};  // +00:02:10: the camera is 2 min 10 s behind
  r.person = "A";
  // Windows (lead 10 min, max gap 60 min): S1 [08:50, 09:40), S2 [09:30, 10:40), S3 [11:20, 12:30).
  const std::vector<MatchPhoto> photos = {
      // P1 08:48:00 -> 08:50:10: only in S1's lead; at S1's position -> S1, 9 min 50 s before it.
      {"P1", "2026-07-14T08:48:00", 46.50000, 14.25000},
      // P2 09:33:00 -> 09:35:10: in S1's window and S2's lead, no GPS -> not guessed.
      {"P2", "2026-07-14T09:33:00", std::nullopt, std::nullopt},
      // P3 same time, 0.0001° south of S2 (11.12 m) and 0.0049° north of S1 (545 m) -> S2.
      {"P3", "2026-07-14T09:33:00", 46.50490, 14.25000},
      // P4 10:50:00 -> 10:52:10: after S2's window closed (10:40), before S3's opens (11:20).
      {"P4", "2026-07-14T10:50:00", 46.50500, 14.25000},
      // P5 no EXIF time.
      {"P5", "", 46.5, 14.25},
      // P6 11:40:00 -> 11:42:10 in S3's window, but 0.01° of latitude (1111.6 m) from it.
      {"P6", "2026-07-14T11:40:00", 46.52000, 14.26000},
      // P7 09:46:00 -> 09:48:10 at S4's position: S4 is B's; A's S2 is 0.0001° of longitude
      // (7.66 m) away -> S2.
      {"P7", "2026-07-14T09:46:00", 46.50500, 14.25010},
  };
  const auto m = match_photos(planted(), photos, r);
  ASSERT_EQ(m.size(), photos.size());
  EXPECT_EQ(m[0].code, "S1");
  EXPECT_EQ(m[0].time, "2026-07-14T08:50:10");
  EXPECT_DOUBLE_EQ(m[0].seconds_after, -590);
  EXPECT_NEAR(*m[0].distance, 0, 1e-6);
  EXPECT_EQ(m[1].station, "");
  EXPECT_NE(m[1].reason.find("no GPS position to choose between S1, S2"), std::string::npos) << m[1].reason;
  EXPECT_EQ(m[2].code, "S2");
  EXPECT_NEAR(*m[2].distance, 11.12, 0.05);
  EXPECT_DOUBLE_EQ(m[2].seconds_after, -290);
  EXPECT_EQ(m[3].station, "");
  EXPECT_NE(m[3].reason.find("no station's time window holds 2026-07-14T10:52:10"), std::string::npos) << m[3].reason;
  EXPECT_NE(m[5 - 1].reason.find("no EXIF time"), std::string::npos);
  EXPECT_EQ(m[5].station, "");
  EXPECT_NE(m[5].reason.find("S3, is 1112 m from the photo's position, beyond the 250 m limit"), std::string::npos)
      << m[5].reason;
  EXPECT_EQ(m[6].code, "S2");
  EXPECT_NEAR(*m[6].distance, 7.66, 0.05);

  // Without the offset P1 (08:48:00) is before S1's window opens: unmatched.
  r.clock_offset = seconds{0};
  EXPECT_EQ(match_photos(planted(), {photos[0]}, r)[0].station, "");
  // Person B: P7 goes to S4 (0 m, 3 min 10 s after it).
  r.clock_offset = seconds{130};
  r.person = "B";
  const auto b = match_photos(planted(), {photos[6]}, r);
  EXPECT_EQ(b[0].code, "S4");
  EXPECT_DOUBLE_EQ(b[0].seconds_after, 190);
}

TEST(PhotoMatch, UtcWhenBothCarryAnOffset) {
  // 09:01:00+02:00 is 07:01:00Z, 60 s after a station at 07:00:00Z.
  const std::vector<MatchStation> s = {{"u", "S9", "A", 46.5, 14.25, "2026-07-14T07:00:00Z"}};
  const auto m = match_photos(s, {{"P", "2026-07-14T09:01:00+02:00", std::nullopt, std::nullopt}}, {});
  EXPECT_EQ(m[0].code, "S9");
  EXPECT_DOUBLE_EQ(m[0].seconds_after, 60);
  EXPECT_EQ(m[0].time, "2026-07-14T09:01:00+02:00");
}

TEST(PhotoMatch, ClockOffsetsParsedStrictly) {
  EXPECT_EQ(parse_clock_offset("+00:02:10")->count(), 130);
  EXPECT_EQ(parse_clock_offset("-01:00:00")->count(), -3600);
  for (const char* bad : {"00:02:10", "+0:02:10", "+00:60:00", "+00:02:10 ", "+00:02", "", "+aa:bb:cc", "++0:02:10"})
    EXPECT_FALSE(parse_clock_offset(bad).ok()) << bad;
  EXPECT_EQ(clock_offset_text(seconds{130}), "+00:02:10");
  EXPECT_EQ(clock_offset_text(seconds{-3725}), "-01:02:05");
  // A photo of the tablet's clock: EXIF 10:29:55, the clock showed 10:32:05 -> +130 s.
  EXPECT_EQ(clock_offset_from("2026-07-14T10:29:55", "2026-07-14T10:32:05")->count(), 130);
  EXPECT_EQ(clock_offset_from("2026-07-14T00:00:10", "2026-07-13T23:59:50")->count(), -20);
  EXPECT_FALSE(clock_offset_from("", "2026-07-14T10:32:05").ok());
  EXPECT_FALSE(clock_offset_from("2026-07-14T10:29:55", "10:32").ok());
}

}  // namespace
