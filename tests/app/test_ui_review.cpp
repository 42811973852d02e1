// The Review screen: read-only until unlocked; a flag marked accepted needs a
// comment; a day is signed off; both are saved in the project file.
//
// Outside sources named beside the checks:
//  - a duplicate reading as the issue defines it (same station and kind,
//    attitude within 2 degrees, time within 10 minutes): bedding 030/40 at 10:00
//    and 031/40 at 10:05 at one station are a duplicate;
//  - the ISO 8601 standard: the field day of "2026-07-05T10:00:00-07:00" is 2026-07-05 (the
//    date as written, in the station's local time).
#include "storage/repository.h"
#include "storage/reviews.h"
#include "tests/app/ui_test_support.h"

using namespace cairn;
using cairn::ui_test::UiTest;

TEST_F(UiTest, ReviewIsReadOnlyUntilUnlockedThenSavesReviewsAndSignOffs) {
  const std::string path = file("review.cairn");
  std::string person;
  {
    store::Project p =
        store::Project::create(path, store::NewProject{"Review", "8N", store::North::True, 0.0}, quiet());
    store::Person who;
    who.name = "Ada Quarry";
    who.initials = "AQ";
    person = store::add(p, who);
    store::Station s;
    s.code = "S3";
    s.lat = 61.2;
    s.lon = -135.6;
    s.time = "2026-07-05T10:00:00-07:00";
    const std::string st = store::add(p, s);
    const char* typed[] = {"030/40", "031/40"};
    const char* times[] = {"2026-07-05T10:00:00-07:00", "2026-07-05T10:05:00-07:00"};
    for (int i = 0; i < 2; ++i) {
      store::PlanarReading r;
      r.station = st;
      r.typed = typed[i];
      r.notation = store::PlaneNotation::StrikeDip;
      r.time = times[i];
      r.ref = "P" + std::to_string(i + 1);
      store::add(p, r);
    }
  }
  std::string s = "wait 3\nwait-idle\n";
  s += "tap \"Review\"\n";
  s += "expect \"Read-only\"\n";
  s += "tap \"duplicate P2\"\n";
  s += "expect \"Not reviewed yet.\"\n";
  s += "expect-not \"Mark accepted\"\n";  // read-only: no way to change anything
  s += "tap \"Unlock reviewing\"\n";
  s += "tap \"Mark accepted\"\n";
  s += "expect \"needs a comment\"\n";  // storage's validation, shown; nothing written
  s += "tap \"comment\"\n";
  s += "type \"entered twice, keep P1\"\n";
  s += "tap \"Mark accepted\"\n";
  s += "wait-for \"Saved: marked accepted\"\n";
  s += "expect \"entered twice, keep P1\"\n";
  s += "tap \"Days\"\n";
  s += "tap \"Sign off 2026-07-05\"\n";
  s += "wait-for \"signed off by AQ\"\n";
  const auto r = gui(path, s, "--person AQ");
  ASSERT_EQ(r.status, 0) << r.err;

  store::Project p = store::Project::open(path, quiet());
  const auto reviews = store::list_flag_reviews(p);
  ASSERT_EQ(reviews.size(), 1u);  // the refused attempt left nothing
  EXPECT_EQ(reviews[0].rule, "duplicate");
  EXPECT_EQ(reviews[0].status, store::ReviewStatus::Accepted);
  EXPECT_EQ(reviews[0].comment, "entered twice, keep P1");
  EXPECT_EQ(reviews[0].person, person);
  const auto days = store::list_signoffs(p);
  ASSERT_EQ(days.size(), 1u);
  EXPECT_EQ(days[0].day, "2026-07-05");
  EXPECT_EQ(days[0].person, person);
}
