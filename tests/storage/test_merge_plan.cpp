// How SQLite answers the merge's lookup of the records holding a code
// (storage/merge.h code_holders_sql): by index, for every keyed table, so that
// merging a season of stations is not one scan of the whole table per record.
//
// Source: the SQLite documentation, "EXPLAIN QUERY PLAN": a line "SCAN t" is a
// full scan of table t, "SEARCH t USING INDEX i (...)" a lookup through index i.
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "merge_test_support.h"
#include "storage/merge.h"
#include "storage/sqlite.h"

using namespace cairn::store;
using namespace cairn::store::testing;

namespace {

std::vector<std::string> plan_of(Db& db, const std::string& sql) {
  std::vector<std::string> lines;
  Stmt s(db, "EXPLAIN QUERY PLAN " + sql);
  while (s.step()) lines.push_back(s.text(3));
  return lines;
}

std::string joined(const std::vector<std::string>& v) {
  std::string s;
  for (const auto& l : v) s += "\n  " + l;
  return s;
}

}  // namespace

TEST(MergePlan, EveryKeyedTableIsSearchedByIndexNeverScanned) {
  Camp c;
  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  struct Keyed {
    const char* table;
    const char* key;
    const char* scope;
  };
  // The natural keys of storage/SCHEMA.md ("Codes and clashes").
  const Keyed keyed[] = {{"people", "initials", ""}, {"units", "code", ""},        {"contacts", "name", ""},
                         {"stations", "code", ""},   {"planes", "ref", "station"}, {"lines", "ref", "station"}};
  for (const auto& k : keyed) {
    const auto plan = plan_of(p.db(), code_holders_sql(k.table, k.key, k.scope));
    ASSERT_FALSE(plan.empty()) << k.table;
    int searches_of_r = 0, searches_of_kc = 0;
    for (const auto& line : plan) {
      EXPECT_EQ(line.rfind("SCAN r", 0), std::string::npos) << k.table << ": a full scan in" << joined(plan);
      EXPECT_EQ(line.rfind("SCAN kc", 0), std::string::npos) << k.table << ": a full scan in" << joined(plan);
      searches_of_r += line.rfind("SEARCH r ", 0) == 0;
      searches_of_kc += line.rfind("SEARCH kc ", 0) == 0;
    }
    EXPECT_EQ(searches_of_r, 2) << k.table << joined(plan);   // by code, and by uuid from a clash row
    EXPECT_EQ(searches_of_kc, 2) << k.table << joined(plan);  // by record, and by original
  }
}

TEST(MergePlan, TheLookupFindsLiveDeletedAndRenamedHoldersOldestFirst) {
  // What the query returns, on rows written by hand: the live holder of S7, a
  // deleted one, and one renamed S7~abc by an earlier clash (its key_clashes row
  // names S7 as the original); a station with another code is not returned.
  Camp c;
  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  Db& db = p.db();
  p.write([&] {
    db.exec(
        "INSERT INTO stations(uuid, code, lat, lon, source, created, updated, device, deleted) VALUES "
        "('u-live', 'S7', 46.5, 14.9, 'manual', '2026-07-06T10:00:00.000Z', '2026-07-06T10:00:00.000Z', "
        "'" +
        std::string(kCampDevice) +
        "', NULL), "
        "('u-gone', 'S7', 46.5, 14.9, 'manual', '2026-07-06T09:00:00.000Z', '2026-07-06T09:00:00.000Z', "
        "'" +
        std::string(kCampDevice) +
        "', '2026-07-06T09:30:00.000Z'), "
        "('u-renamed', 'S7~abc', 46.5, 14.9, 'manual', '2026-07-06T11:00:00.000Z', '2026-07-06T11:00:00.000Z', "
        "'" +
        std::string(kCampDevice) +
        "', NULL), "
        "('u-other', 'S8', 46.5, 14.9, 'manual', '2026-07-06T08:00:00.000Z', '2026-07-06T08:00:00.000Z', "
        "'" +
        std::string(kCampDevice) + "', NULL)");
    db.exec("INSERT INTO key_clashes(record, tbl, original, stored) VALUES ('u-renamed', 'stations', 'S7', 'S7~abc')");
  });
  Stmt s(db, code_holders_sql("stations", "code", ""));
  s.bind(1, std::string("S7"));
  std::vector<std::string> got;
  while (s.step()) got.push_back(s.text(0) + " " + s.text(1) + " " + (s.int64(3) ? "deleted" : "live"));
  EXPECT_EQ(got, (std::vector<std::string>{"u-gone S7 deleted", "u-live S7 live", "u-renamed S7~abc live"}));
}
