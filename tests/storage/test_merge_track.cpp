// The day track and the pick-lists in a merge (storage/merge.h, storage/track.h):
// a tablet's fixes come into the camp file so that a supervisor sees where a
// crew has been; a fix the camp has already is not added twice, whatever the
// order or number of merges; a bad fix refuses the whole merge before anything
// is written; a tablet's pick-list codes are reported, never adopted.
//
// Source: WGS84 coordinate ranges (latitude -90..90, longitude -180..180);
// ISO 8601 for what a time is; the SQLite documentation ("PRAGMA
// ignore_check_constraints") for writing a value the schema's CHECK would
// refuse, as a hand-edited or hostile file may hold; what counts as the same
// fix (same person, receiver, time, place, elevation and accuracy) is common
// practice, no published source.
#include <gtest/gtest.h>
#include <sqlite3.h>

#include "merge_test_support.h"
#include "storage/pick_lists.h"
#include "storage/track.h"

using namespace cairn::store;
using namespace cairn::store::testing;

namespace {

// A tablet whose person walked a few fixes on 2026-07-06.
std::string walked(Camp& c, const std::string& name, const char* device_id, const std::string& person, double lat0) {
  const std::string path = c.tablet(name);
  Project p = Project::open(path, device(device_id, name));
  add_track_point(p, {person, "2026-07-06T09:00:00Z", lat0, 14.9, 1200.0, 4.0});
  add_track_point(p, {person, "2026-07-06T09:00:30Z", lat0 + 0.0002, 14.9, std::nullopt, 4.0});
  add_track_point(p, {person, "2026-07-06T09:01:10Z", lat0 + 0.0004, 14.9001, 1210.5, std::nullopt});
  return path;
}

}  // namespace

TEST(MergeTrack, TabletFixesComeIntoTheCampOnceWhateverTheOrder) {
  Camp c;
  const std::string a = walked(c, "tabletA.cairn", kTabletA, c.legend.person_a, 46.5);
  const std::string b = walked(c, "tabletB.cairn", kTabletB, c.legend.person_b, 46.6);
  const std::string camp2 = c.copy(c.camp, "camp2.cairn");

  const MergeReport r = merge_into(c.camp, {a, b});
  ASSERT_EQ(r.sources.size(), 2u);
  EXPECT_EQ(r.sources[0].track_added, 3);
  EXPECT_EQ(r.sources[1].track_added, 3);
  EXPECT_TRUE(r.changed);
  {
    Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
    const auto ana = list_track(p, c.legend.person_a, "2026-07-06");
    ASSERT_EQ(ana.size(), 3u);
    EXPECT_EQ(ana[0].time, "2026-07-06T09:00:00Z");
    EXPECT_EQ(ana[0].elevation, 1200.0);
    EXPECT_EQ(ana[2].h_accuracy, std::nullopt);
    EXPECT_EQ(list_track(p, c.legend.person_b).size(), 3u);
    const auto days = day_tracks(p, "2026-07-06");
    ASSERT_EQ(days.size(), 2u);  // one per person
  }
  // The same files again: every fix is already there; the file is unchanged.
  const std::string once = dump(c.camp);
  const MergeReport again = merge_into(c.camp, {b, a});
  EXPECT_EQ(again.sources[0].track_added, 0);
  EXPECT_EQ(again.sources[0].track_skipped, 3);
  EXPECT_FALSE(again.changed);
  EXPECT_EQ(dump(c.camp), once);
  // The other order, one at a time, gives the same fixes.
  merge_into(camp2, {b});
  merge_into(camp2, {a});
  EXPECT_EQ(dump(camp2), once) << dump_difference(dump(camp2), once);
}

TEST(MergeTrack, AFixThatDiffersInAnythingIsKeptAsItsOwnFix) {
  Camp c;
  const std::string a = walked(c, "tabletA.cairn", kTabletA, c.legend.person_a, 46.5);
  merge_into(c.camp, {a});
  {
    // The tablet goes on: one more fix, and one at the same second as an
    // earlier one but a metre away (a different fix, not a copy).
    Project p = Project::open(a, device(kTabletA, "tabletA.cairn"));
    add_track_point(p, {c.legend.person_a, "2026-07-06T09:05:00Z", 46.501, 14.9, std::nullopt, std::nullopt});
    add_track_point(p, {c.legend.person_a, "2026-07-06T09:00:00Z", 46.50001, 14.9, 1200.0, 4.0});
  }
  const MergeReport r = merge_into(c.camp, {a});
  EXPECT_EQ(r.sources[0].track_added, 2);
  EXPECT_EQ(r.sources[0].track_skipped, 3);
  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  EXPECT_EQ(list_track(p, c.legend.person_a).size(), 5u);
}

TEST(MergeTrack, ABadFixRefusesTheMergeNamingTableRowAndRuleAndWritesNothing) {
  struct Case {
    const char* what;
    const char* sql;
    std::string expect;  // in the message
  };
  // Values the schema's CHECK constraints refuse are found by SQLite's
  // integrity check (SQLite documentation, "PRAGMA integrity_check": it
  // verifies CHECK constraints) before the merge reads a row; the others by the
  // merge's own validation, which names the row and the rule.
  const std::string integrity = "failed its integrity check";
  const Case cases[] = {
      {"latitude 95", "UPDATE track_points SET lat = 95 WHERE id = 2", integrity},
      {"a negative accuracy", "UPDATE track_points SET h_accuracy = -3 WHERE id = 2", integrity},
      {"elevation as text", "UPDATE track_points SET elevation = 'high' WHERE id = 2", "record 2: type: "},
      {"a time that is not a time", "UPDATE track_points SET time = 'after lunch' WHERE id = 2", "record 2: time: "},
      {"an escape sequence for a person", "UPDATE track_points SET person = 'AE' || char(27) || '[2J' WHERE id = 2",
       "record 2: control: "},
      {"a device that is not a UUID", "UPDATE track_points SET device = 'tablet' WHERE id = 2", "record 2: uuid: "},
  };
  for (const Case& k : cases) {
    SCOPED_TRACE(k.what);
    Camp c;
    const std::string a = walked(c, "tabletA.cairn", kTabletA, c.legend.person_a, 46.5);
    const std::string before = dump(c.camp);
    {
      Db db(a, SQLITE_OPEN_READWRITE);
      db.exec("PRAGMA ignore_check_constraints = ON");
      db.exec(k.sql);
      ASSERT_EQ(db.changes(), 1);
    }
    std::string e = "no error";
    try {
      merge_into(c.camp, {a});
    } catch (const std::exception& x) {
      e = x.what();
    }
    if (k.expect == integrity) {
      EXPECT_NE(e.find(a + " " + integrity), std::string::npos) << e;
      EXPECT_EQ(dump(c.camp), before);
      continue;
    }
    EXPECT_NE(e.find(a + ": table track_points, " + k.expect), std::string::npos) << e;
    EXPECT_NE(e.find("nothing was merged"), std::string::npos) << e;
    EXPECT_EQ(e.find('\x1b'), std::string::npos) << "the message carries the raw escape";
    EXPECT_EQ(dump(c.camp), before);
  }
}

TEST(MergeTrack, ATabletsPickListCodesAreReportedNotAdopted) {
  Camp c;
  {
    Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
    add_pick(p, PickList::Lithology, "slate");
    add_pick(p, PickList::Structure, "bedding");
  }
  const std::string a = c.tablet("tabletA.cairn");
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    add_pick(p, PickList::Lithology, "phyllite");
    add_pick(p, PickList::Lithology, "vein quartz");
    add_pick(p, PickList::Structure, "joint");
  }
  const MergeReport r = merge_into(c.camp, {a});
  std::string all;
  for (const auto& w : r.warnings) all += w + "\n";
  EXPECT_NE(all.find("lithology list has 2 codes this file's list has not (phyllite, vein quartz)"), std::string::npos)
      << all;
  EXPECT_NE(all.find("structure list has 1 code this file's list has not (joint)"), std::string::npos) << all;
  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  EXPECT_EQ(pick_list(p, PickList::Lithology), std::vector<std::string>{"slate"});
  EXPECT_EQ(pick_list(p, PickList::Structure), std::vector<std::string>{"bedding"});
}

// The survey store's mirror keeps no day track and no pick-lists
// (MergeOptions::track, pick_list_report off): nothing of either comes in or is reported.
TEST(MergeTrack, AMergeAskedToLeaveTheTrackAndTheListsAloneDoesSo) {
  Camp c;
  const std::string a = walked(c, "tabletA.cairn", kTabletA, c.legend.person_a, 46.5);
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    add_pick(p, PickList::Lithology, "phyllite");
  }
  MergeOptions o;
  o.track = false;
  o.pick_list_report = false;
  const MergeReport r = merge_into(c.camp, {a}, o);
  EXPECT_EQ(r.sources[0].track_added, 0);
  for (const auto& w : r.warnings) EXPECT_EQ(w.find("phyllite"), std::string::npos) << w;
  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  EXPECT_TRUE(list_track(p).empty());
}
