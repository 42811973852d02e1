// Flag reviews and day sign-offs (storage/reviews.h): the tables appear only
// when a review is first written, a bad review writes nothing, sign-offs are
// once per day, withdrawn rows stay in the file, and the record schema version
// is not touched.
//
// Outside sources named beside the checks:
//  - SQLite documentation, "The Schema Table" (sqlite_schema, also known as
//    sqlite_master, lists every table) and "PRAGMA user_version";
//  - ISO 8601 calendar dates (2026-02-30 does not exist; 2028-02-29 does, 2028
//    being a leap year in the Gregorian calendar).
#include <gtest/gtest.h>

#include "storage/project.h"
#include "storage/repository.h"
#include "storage/reviews.h"
#include "storage/schema.h"
#include "storage/sqlite.h"
#include "storage_test_util.h"

using namespace cairn::store;
using cairn::store::testing::TempDir;

namespace {

struct Fixture {
  TempDir dir;
  std::string path = dir.file("review.cairn");
  Project p = Project::create(path, NewProject{"Review test", "33N", North::True, 0.0}, cairn::store::testing::quiet());
  std::string person;
  Fixture() {
    Person who;
    who.name = "Ada Quarry";
    who.initials = "AQ";
    person = add(p, who);
  }
  // Whether SQLite's schema table lists a table of this name.
  bool has_table(const char* name) {
    Stmt s(p.db(), "SELECT count(*) FROM sqlite_master WHERE type = 'table' AND name = ?");
    s.bind(1, name);
    s.step();
    return s.int64(0) == 1;
  }
  int64_t rows(const char* table) { return p.db().query_int(std::string("SELECT count(*) FROM ") + table); }
};

FlagReview review(const std::string& person, ReviewStatus st, const std::string& comment) {
  FlagReview r;
  r.rule = "misfit";
  r.station = "S4";
  r.reading = "6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f";
  r.contact = "Kls/Klm";
  r.flag_key = flag_key(r.rule, r.station, r.reading, r.contact);
  r.status = st;
  r.comment = comment;
  r.person = person;
  return r;
}

}  // namespace

TEST(Reviews, TablesAppearWithTheFirstReviewOnly) {
  Fixture f;
  // A file that was never reviewed has no review tables (SQLite's schema table).
  EXPECT_FALSE(f.has_table("flag_reviews"));
  EXPECT_FALSE(f.has_table("day_signoffs"));
  EXPECT_TRUE(list_flag_reviews(f.p).empty());
  EXPECT_TRUE(list_signoffs(f.p).empty());

  FlagReview r = review(f.person, ReviewStatus::Accepted, "cross-bedding in a channel fill");
  const std::string id = add_flag_review(f.p, r);
  EXPECT_TRUE(f.has_table("flag_reviews"));
  EXPECT_TRUE(f.has_table("day_signoffs"));
  // PRAGMA user_version (the record schema) is left as the storage module set it.
  EXPECT_EQ(f.p.db().query_int("PRAGMA user_version"), kSchemaVersion);

  const auto all = list_flag_reviews(f.p);
  ASSERT_EQ(all.size(), 1u);
  EXPECT_EQ(all[0].meta.uuid, id);
  EXPECT_EQ(all[0].flag_key, "misfit|S4|6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f|Kls/Klm");
  EXPECT_EQ(all[0].status, ReviewStatus::Accepted);
  EXPECT_EQ(all[0].comment, "cross-bedding in a channel fill");
  EXPECT_EQ(all[0].person, f.person);
  EXPECT_EQ(all[0].meta.device, f.p.device());
}

TEST(Reviews, ReviewsSurviveClosingAndReopeningTheFile) {
  {
    Fixture f;
    FlagReview r = review(f.person, ReviewStatus::Resolved, "re-measured: 212/34");
    add_flag_review(f.p, r);
    f.p = Project::open(f.path, cairn::store::testing::quiet());
    const auto all = list_flag_reviews(f.p);
    ASSERT_EQ(all.size(), 1u);
    EXPECT_EQ(all[0].status, ReviewStatus::Resolved);
    EXPECT_EQ(all[0].comment, "re-measured: 212/34");
  }
}

TEST(Reviews, AcceptedOrResolvedNeedAComment_NothingWritten) {
  Fixture f;
  for (auto st : {ReviewStatus::Accepted, ReviewStatus::Resolved}) {
    FlagReview r = review(f.person, st, "");
    try {
      add_flag_review(f.p, r);
      FAIL() << "a review without a comment was accepted";
    } catch (const ValidationError& e) {
      EXPECT_EQ(e.field(), "comment");
      EXPECT_NE(std::string(e.what()).find("needs a comment"), std::string::npos) << e.what();
    }
  }
  EXPECT_FALSE(f.has_table("flag_reviews"));  // not even the tables were made

  // An acknowledgement of a caution needs none.
  FlagReview ack = review(f.person, ReviewStatus::Acknowledged, "");
  add_flag_review(f.p, ack);
  EXPECT_EQ(f.rows("flag_reviews"), 1);
}

TEST(Reviews, UnknownPersonIsRefused_NothingWritten) {
  Fixture f;
  FlagReview first = review(f.person, ReviewStatus::Acknowledged, "");
  add_flag_review(f.p, first);
  FlagReview r = review("00000000-0000-4000-8000-000000000000", ReviewStatus::Accepted, "fine");
  EXPECT_THROW(add_flag_review(f.p, r), ValidationError);
  EXPECT_EQ(f.rows("flag_reviews"), 1);
}

TEST(Reviews, NewestReviewOfEachStatusAndWithdrawing) {
  Fixture f;
  FlagReview a = review(f.person, ReviewStatus::Accepted, "first thought");
  add_flag_review(f.p, a);
  FlagReview b = review(f.person, ReviewStatus::Accepted, "second thought");
  const std::string b_id = add_flag_review(f.p, b);
  FlagReview c = review(f.person, ReviewStatus::Acknowledged, "");
  add_flag_review(f.p, c);

  auto v = reviews_of_flag(f.p, a.flag_key);
  ASSERT_EQ(v.size(), 2u);  // one accepted (the newer) and one acknowledged
  EXPECT_EQ(v[0].status, ReviewStatus::Acknowledged);
  EXPECT_EQ(v[1].comment, "second thought");

  EXPECT_TRUE(withdraw_flag_review(f.p, b_id));
  EXPECT_FALSE(withdraw_flag_review(f.p, b_id));  // already withdrawn
  v = reviews_of_flag(f.p, a.flag_key);
  ASSERT_EQ(v.size(), 2u);
  EXPECT_EQ(v[1].comment, "first thought");
  // Withdrawn rows stay in the file.
  EXPECT_EQ(list_flag_reviews(f.p).size(), 2u);
  EXPECT_EQ(list_flag_reviews(f.p, true).size(), 3u);
  EXPECT_EQ(f.rows("flag_reviews"), 3);
}

TEST(Reviews, ADayIsSignedOffOnce) {
  Fixture f;
  DaySignoff d;
  d.day = "2028-02-29";  // a leap day (Gregorian calendar)
  d.person = f.person;
  d.comment = "all flags reviewed";
  const std::string id = sign_off_day(f.p, d);
  auto all = list_signoffs(f.p);
  ASSERT_EQ(all.size(), 1u);
  EXPECT_EQ(all[0].day, "2028-02-29");
  EXPECT_EQ(all[0].person, f.person);

  DaySignoff again;
  again.day = "2028-02-29";
  again.person = f.person;
  try {
    sign_off_day(f.p, again);
    FAIL() << "a day was signed off twice";
  } catch (const ValidationError& e) {
    EXPECT_EQ(e.field(), "day");
  }
  EXPECT_EQ(f.rows("day_signoffs"), 1);

  // Withdrawn, the day can be signed off again.
  EXPECT_TRUE(withdraw_signoff(f.p, id));
  sign_off_day(f.p, again);
  EXPECT_EQ(list_signoffs(f.p).size(), 1u);
  EXPECT_EQ(f.rows("day_signoffs"), 2);
}

TEST(Reviews, SignOffNeedsARealDateAndAPerson) {
  Fixture f;
  for (const char* day : {"2026-02-30", "2026-7-5", "yesterday", "2026-07-05T10:00"}) {
    DaySignoff d;
    d.day = day;
    d.person = f.person;
    EXPECT_THROW(sign_off_day(f.p, d), ValidationError) << day;
  }
  DaySignoff nobody;
  nobody.day = "2026-07-05";
  try {
    sign_off_day(f.p, nobody);
    FAIL() << "a sign-off without a person was accepted";
  } catch (const ValidationError& e) {
    EXPECT_EQ(e.field(), "person");
  }
  EXPECT_FALSE(f.has_table("day_signoffs"));
}
