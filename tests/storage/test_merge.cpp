// Merging tablets' project files into a camp file (storage/merge.h): each
// property the evening camp needs, proven on invented field data.
//
// Outside sources named beside the checks:
//  - concurrent updates are told from successive ones by their histories, as in
//    version vectors (Parker et al., 1983, "Detection of mutual inconsistency in
//    distributed systems", IEEE TSE 9(3)): an edit made after a version was seen
//    replaces it; two edits of one version are a conflict;
//  - "newer" is the later UTC time stamp; ISO 8601 / RFC 3339 (section 5.1)
//    stamps of one form sort in time order as text;
//  - SQLite documentation, "Atomic Commit In SQLite" and "Transaction": a
//    transaction that is rolled back leaves the database as it was;
//  - RFC 9562 section 5.8 for the layout of version-8 UUIDs (conflict ids);
//  - the meridian radius of curvature M = a(1-e^2)/(1-e^2 sin^2 phi)^1.5 of the
//    WGS84 ellipsoid (Snyder 1987, "Map Projections: A Working Manual", eq. 4-18)
//    for the distance between two stations on one meridian.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include "merge_test_support.h"
#include "formats/ids.h"
#include "storage/merge.h"
#include "storage/reviews.h"

using namespace cairn::store;
using namespace cairn::formats;
using namespace cairn::store::testing;

namespace {

Station station_at(const std::string& code, double lat, double lon) {
  Station s;
  s.code = code;
  s.lat = lat;
  s.lon = lon;
  return s;
}

std::string add_station(Project& p, const std::string& code, double lat, double lon) {
  Station s = station_at(code, lat, lon);
  return add(p, s);
}

}  // namespace

TEST(Merge, AddsNewRecordsAndSkipsIdenticalOnes) {
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  std::string s2;
  {
    Project p = Project::open(a, device(kTabletA, "tablet A", c.legend.person_a));
    Station s = station_at("S2", 46.51, 14.91);
    s.observer = c.legend.person_a;
    s2 = add(p, s);
    PlanarReading r;
    r.station = s2;
    r.kind = PlaneKind::Foliation;
    r.measured_strike = 200;
    r.measured_dip = 60;
    add(p, r);
  }
  const MergeReport rep = merge_into(c.camp, {a});
  ASSERT_EQ(rep.sources.size(), 1u);
  // Two new records (station, reading); the camp's own legend came back unchanged.
  EXPECT_EQ(rep.sources[0].counts.added, 2);
  EXPECT_EQ(rep.sources[0].counts.updated, 0);
  EXPECT_EQ(rep.sources[0].counts.conflicts, 0);
  EXPECT_EQ(rep.sources[0].counts.skipped, 7);  // 2 people, 2 units, contact, S1, P1
  EXPECT_TRUE(rep.changed);
  // Counted against the tablet that wrote them and the person at its keyboard.
  EXPECT_EQ(rep.sources[0].by_device.at(kTabletA).added, 2);
  EXPECT_EQ(rep.sources[0].by_person.at(c.legend.person_a).added, 2);

  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  auto st = get_station(p, s2);
  ASSERT_TRUE(st);
  EXPECT_EQ(st->code, "S2");
  EXPECT_EQ(st->meta.device, kTabletA);  // merged records keep who wrote them
  EXPECT_EQ(list_planes(p).size(), 2u);
  // The tablet's audit rows came along: the camp can show who added S2.
  auto trail = audit_trail(p, s2);
  ASSERT_EQ(trail.size(), 1u);
  EXPECT_EQ(trail[0].action, "insert");
  EXPECT_EQ(trail[0].device, kTabletA);
  EXPECT_EQ(trail[0].person, c.legend.person_a);
}

TEST(Merge, MergingTheSameFileTwiceChangesNothing) {
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    add_station(p, "S2", 46.51, 14.91);
    auto s1 = *get_station(p, c.legend.station);
    s1.notes = "spur, east side";
    update(p, s1);
    soft_delete(p, Kind::Plane, c.legend.plane);
  }
  merge_into(c.camp, {a});
  const std::string before = dump(c.camp);
  int merges_before;
  {
    Db db(c.camp, SQLITE_OPEN_READONLY);
    merges_before = static_cast<int>(db.query_int("SELECT count(*) FROM merges"));
  }
  const MergeReport again = merge_into(c.camp, {a});
  EXPECT_FALSE(again.changed);
  EXPECT_EQ(again.sources[0].counts.added + again.sources[0].counts.updated + again.sources[0].counts.conflicts, 0);
  EXPECT_EQ(dump(c.camp), before);
  Db db(c.camp, SQLITE_OPEN_READONLY);
  EXPECT_EQ(db.query_int("SELECT count(*) FROM merges"), merges_before);  // not even a log line
}

TEST(Merge, AnEditOnOneDeviceReplacesTheVersionItStartedFrom) {
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    auto s1 = *get_station(p, c.legend.station);
    s1.notes = "spur, schistose";
    update(p, s1);
  }
  const MergeReport rep = merge_into(c.camp, {a});
  EXPECT_EQ(rep.sources[0].counts.updated, 1);
  EXPECT_EQ(rep.sources[0].counts.conflicts, 0);
  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  EXPECT_EQ(get_station(p, c.legend.station)->notes, "spur, schistose");
  EXPECT_TRUE(list_conflicts(p).empty());
}

TEST(Merge, AnOlderVersionNeverOverwritesANewerOne) {
  Camp c;
  const std::string b = c.tablet("tabletB.cairn");  // B keeps the morning's S1
  {
    Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
    auto s1 = *get_station(p, c.legend.station);
    s1.notes = "spur; corrected in camp";
    update(p, s1);
  }
  const MergeReport rep = merge_into(c.camp, {b});
  EXPECT_EQ(rep.sources[0].counts.updated, 0);
  EXPECT_EQ(rep.sources[0].counts.conflicts, 0);
  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  EXPECT_EQ(get_station(p, c.legend.station)->notes, "spur; corrected in camp");
}

TEST(Merge, EditsOnTwoDevicesAreAConflictWithBothVersionsKept) {
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  const std::string b = c.tablet("tabletB.cairn");
  std::string a_updated;
  {
    Project p = Project::open(a, device(kTabletA, "tablet A", c.legend.person_a));
    auto s1 = *get_station(p, c.legend.station);
    s1.notes = "spur, slaty cleavage";
    s1.elevation = 1205;
    update(p, s1);
    a_updated = s1.meta.updated;
  }
  tick();
  std::string b_updated;
  {
    Project p = Project::open(b, device(kTabletB, "tablet B", c.legend.person_b));
    auto s1 = *get_station(p, c.legend.station);
    s1.notes = "spur, quartz veins";
    update(p, s1);
    b_updated = s1.meta.updated;
  }
  ASSERT_LT(a_updated, b_updated);  // ISO 8601 text order is time order

  const MergeReport rep = merge_into(c.camp, {a, b});
  EXPECT_EQ(rep.sources[0].counts.updated, 1);    // A's edit: one device only so far
  EXPECT_EQ(rep.sources[1].counts.conflicts, 1);  // B's edit of the same version
  EXPECT_EQ(rep.sources[1].by_device.at(kTabletB).conflicts, 1);
  EXPECT_EQ(rep.sources[1].by_person.at(c.legend.person_b).conflicts, 1);
  ASSERT_EQ(rep.conflicts.size(), 1u);
  const MergeConflict& k = rep.conflicts[0];
  EXPECT_EQ(k.table, "stations");
  EXPECT_EQ(k.record, c.legend.station);
  EXPECT_EQ(k.label, "station S1");
  // The newer version (B's) is current; A's is kept aside, named with its device and person.
  EXPECT_EQ(k.current.device, kTabletB);
  EXPECT_EQ(k.current.device_name, "tablet B");
  EXPECT_EQ(k.current.person_name, "Bo Sample (BS)");
  EXPECT_EQ(k.other.device, kTabletA);
  EXPECT_EQ(k.other.person_name, "Ana Example (AE)");
  EXPECT_EQ(k.other.updated, a_updated);
  std::map<std::string, std::pair<std::string, std::string>> f;
  for (const auto& x : k.fields) f[x.field] = {x.current, x.other};
  ASSERT_EQ(f.size(), 2u);
  EXPECT_EQ(f["notes"], std::make_pair(std::string("spur, quartz veins"), std::string("spur, slaty cleavage")));
  EXPECT_EQ(f["elevation"], std::make_pair(std::string("1200"), std::string("1205")));
  // RFC 9562: version 8, variant 10.
  ASSERT_TRUE(is_uuid(k.id));
  EXPECT_EQ(k.id[14], '8');

  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  EXPECT_EQ(get_station(p, c.legend.station)->notes, "spur, quartz veins");
  const auto listed = list_conflicts(p);
  ASSERT_EQ(listed.size(), 1u);
  EXPECT_EQ(listed[0].id, k.id);
  EXPECT_EQ(listed[0].other.device_name, "tablet A");
  // The losing version is kept whole and exactly (elevation as a real, notes as text).
  Stmt v(p.db(), "SELECT value FROM conflict_values WHERE conflict = ? AND col = 'elevation'");
  v.bind(1, k.id);
  ASSERT_TRUE(v.step());
  EXPECT_EQ(v.real(0), 1205.0);

  // Settled by a person: it is no longer listed, and merging A again does not bring it back.
  resolve_conflict(p, k.id);
  EXPECT_TRUE(list_conflicts(p).empty());
  auto again = merge_files(p, {a});
  EXPECT_TRUE(again.conflicts.empty());
  EXPECT_FALSE(again.changed);
}

TEST(Merge, ADeleteOnOneTabletAgainstAnEditOnAnotherIsAConflict) {
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  const std::string b = c.tablet("tabletB.cairn");
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    auto r = *get_plane(p, c.legend.plane);
    r.notes = "measured on a large slab";
    update(p, r);
  }
  tick();
  {
    Project p = Project::open(b, device(kTabletB, "tablet B"));
    soft_delete(p, Kind::Plane, c.legend.plane);
  }
  const MergeReport rep = merge_into(c.camp, {a, b});
  ASSERT_EQ(rep.conflicts.size(), 1u);
  const MergeConflict& k = rep.conflicts[0];
  EXPECT_EQ(k.label, "planar reading P1 at station S1");
  EXPECT_TRUE(k.current.deleted);  // the delete is newer
  EXPECT_FALSE(k.other.deleted);
  bool saw_deleted = false, saw_notes = false;
  for (const auto& x : k.fields) {
    if (x.field == "deleted") saw_deleted = x.other == "live" && x.current.rfind("deleted ", 0) == 0;
    if (x.field == "notes") saw_notes = x.other == "measured on a large slab";
  }
  EXPECT_TRUE(saw_deleted);
  EXPECT_TRUE(saw_notes);
  // Not lost: the edited reading can be read back from the conflict.
  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  EXPECT_TRUE(get_plane(p, c.legend.plane)->meta.deleted.has_value());
  Stmt v(p.db(), "SELECT value FROM conflict_values WHERE conflict = ? AND col = 'notes'");
  v.bind(1, k.id);
  ASSERT_TRUE(v.step());
  EXPECT_EQ(v.text(0), "measured on a large slab");
}

TEST(Merge, AnEditAfterTheLastCommonMergeIsNoConflict) {
  // Camp merges A and B; A takes the camp file back; A then edits a station B
  // created. A had seen B's version, so the edit simply replaces it.
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  const std::string b = c.tablet("tabletB.cairn");
  std::string s5;
  {
    Project p = Project::open(b, device(kTabletB, "tablet B"));
    s5 = add_station(p, "S5", 46.52, 14.92);
  }
  merge_into(c.camp, {a, b});
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    merge_files(p, {c.camp});  // the morning copy back to the tablet
    auto s = *get_station(p, s5);
    s.notes = "revisited: fold hinge";
    update(p, s);
  }
  const MergeReport rep = merge_into(c.camp, {a, b});
  EXPECT_TRUE(rep.conflicts.empty());
  EXPECT_EQ(rep.sources[0].counts.updated, 1);
  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  EXPECT_EQ(get_station(p, s5)->notes, "revisited: fold hinge");
}

TEST(Merge, StationCodesSharedByTwoCrewsAreReportedAndNeverFused) {
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  const std::string b = c.tablet("tabletB.cairn");
  std::string sa, sb, ra, rb;
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    sa = add_station(p, "S12", 46.50, 14.90);
    PlanarReading r;
    r.station = sa;
    r.measured_strike = 10;
    r.measured_dip = 20;
    ra = add(p, r);
  }
  tick();
  {
    Project p = Project::open(b, device(kTabletB, "tablet B"));
    sb = add_station(p, "S12", 46.51, 14.90);  // 0.01 degree further north
    PlanarReading r;
    r.station = sb;
    r.measured_strike = 300;
    r.measured_dip = 70;
    rb = add(p, r);
  }
  const MergeReport rep = merge_into(c.camp, {b, a});
  ASSERT_EQ(rep.clashes.size(), 1u);
  const KeyClash& k = rep.clashes[0];
  EXPECT_EQ(k.table, "stations");
  EXPECT_EQ(k.code, "S12");
  EXPECT_EQ(k.kept, sa);  // created first
  EXPECT_EQ(k.renamed, sb);
  EXPECT_EQ(k.renamed_device, "tablet B");
  EXPECT_EQ(k.stored_as, "S12~" + sb.substr(0, 6));
  EXPECT_EQ(k.suggestion, "S12b");
  // Snyder (1987) eq. 4-18 at 46.505 N: M = 6 369 090 m, so 0.01 degree = 1111.6 m;
  // the UTM grid distance near the central meridian is 0.9996 of that.
  ASSERT_TRUE(k.distance_m);
  const double a_ = 6378137, e2 = 0.0066943799901, phi = 46.505 * M_PI / 180;
  const double M = a_ * (1 - e2) / std::pow(1 - e2 * std::sin(phi) * std::sin(phi), 1.5);
  EXPECT_NEAR(*k.distance_m, M * 0.01 * M_PI / 180, 2.0);

  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  auto st_a = *get_station(p, sa), st_b = *get_station(p, sb);
  EXPECT_EQ(st_a.code, "S12");
  EXPECT_EQ(st_b.code, k.stored_as);
  EXPECT_FALSE(st_b.meta.deleted);
  // Each reading still belongs to its own station.
  EXPECT_EQ(get_plane(p, ra)->station, sa);
  EXPECT_EQ(get_plane(p, rb)->station, sb);
  // Merging both again reports nothing new and changes nothing.
  const std::string before = dump(c.camp);
  auto again = merge_files(p, {a, b});
  EXPECT_TRUE(again.clashes.empty());
  EXPECT_FALSE(again.changed);
  EXPECT_EQ(dump(c.camp), before);
}

TEST(Merge, TheResultDoesNotDependOnTheOrderOfMerging) {
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  const std::string b = c.tablet("tabletB.cairn");
  const std::string t3 = c.tablet("tabletC.cairn");
  {
    Project p = Project::open(a, device(kTabletA, "tablet A", c.legend.person_a));
    auto s1 = *get_station(p, c.legend.station);
    s1.notes = "A's notes";
    update(p, s1);
    add_station(p, "S12", 46.50, 14.90);
    auto r = *get_plane(p, c.legend.plane);
    r.quality = 4;
    update(p, r);
  }
  tick();
  {
    Project p = Project::open(b, device(kTabletB, "tablet B", c.legend.person_b));
    auto s1 = *get_station(p, c.legend.station);
    s1.notes = "B's notes";
    update(p, s1);
    add_station(p, "S12", 46.51, 14.90);
    soft_delete(p, Kind::Plane, c.legend.plane);
    Unit u;
    u.code = "Db";
    u.name = "dolerite dyke";
    u.age_rank = 3;
    add(p, u);
  }
  tick();
  {
    Project p = Project::open(t3, device(kTabletC, "tablet C"));
    auto s1 = *get_station(p, c.legend.station);
    s1.notes = "C's notes";
    s1.elevation = 1190;
    update(p, s1);
    add_station(p, "S12", 46.52, 14.90);
    Unit u;
    u.code = "Db";  // the same unit code, made independently: a clash too
    u.name = "dolerite";
    u.age_rank = 3;
    add(p, u);
  }
  // Every order of the three tablets, one file at a time, gives the same records.
  std::vector<std::string> order = {a, b, t3};
  std::sort(order.begin(), order.end());
  std::string first;
  int n = 0;
  do {
    const std::string target = c.copy(c.camp, "order" + std::to_string(n++) + ".cairn");
    for (const auto& s : order) merge_into(target, {s});
    const std::string d = dump(target);
    if (first.empty()) first = d;
    EXPECT_EQ(dump_difference(d, first), "") << "order " << n;
  } while (std::next_permutation(order.begin(), order.end()));
  EXPECT_EQ(n, 6);
  // ... and so does merging all of them in one go.
  const std::string together = c.copy(c.camp, "together.cairn");
  const MergeReport rep = merge_into(together, {t3, a, b});
  EXPECT_EQ(dump_difference(dump(together), first), "");
  // Sanity of that common result: C's S1 is newest; A's and B's are kept aside;
  // three S12 and two Db coexist under distinct codes.
  Project p = Project::open(together, device(kCampDevice, "camp laptop"));
  EXPECT_EQ(get_station(p, c.legend.station)->notes, "C's notes");
  int s1_conflicts = 0;
  for (const auto& k : list_conflicts(p)) s1_conflicts += k.record == c.legend.station;
  EXPECT_EQ(s1_conflicts, 2);
  int s12 = 0, db = 0;
  for (const auto& s : list_stations(p)) s12 += s.code.rfind("S12", 0) == 0;
  for (const auto& u : list_units(p)) db += u.code.rfind("Db", 0) == 0;
  EXPECT_EQ(s12, 3);
  EXPECT_EQ(db, 2);
}

TEST(Merge, AFailurePartWayLeavesTheTargetAsItWas) {
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  const std::string b = c.tablet("tabletB.cairn");
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    for (int i = 0; i < 5; ++i) add_station(p, "A" + std::to_string(i), 46.5 + i * 0.001, 14.9);
    auto s1 = *get_station(p, c.legend.station);
    s1.notes = "from A";
    update(p, s1);
  }
  tick();
  {
    Project p = Project::open(b, device(kTabletB, "tablet B"));
    add_station(p, "A1", 46.6, 14.9);  // a clash with A's A1
    auto s1 = *get_station(p, c.legend.station);
    s1.notes = "from B";
    update(p, s1);
  }
  // Register the camp device once, so that opening the target writes nothing itself.
  { Project p = Project::open(c.camp, device(kCampDevice, "camp laptop")); }
  const std::string records = dump(c.camp);
  const std::string bytes = read_file(c.camp);
  // How many writes the whole merge makes: the smallest limit it gets through,
  // found on fresh scratch copies.
  auto succeeds_with = [&](long n) {
    const std::string scratch = c.copy(c.camp, "scratch.cairn");
    MergeOptions o;
    o.fail_after = n;
    try {
      merge_into(scratch, {a, b}, o);
      return true;
    } catch (const std::runtime_error&) {
      return false;
    }
  };
  long hi = 1;
  while (!succeeds_with(hi)) hi *= 2;
  long lo = hi / 2;  // fails (or 0)
  while (hi - lo > 1) {
    const long mid = (lo + hi) / 2;
    (succeeds_with(mid) ? hi : lo) = mid;
  }
  const long total_writes = hi;
  ASSERT_GT(total_writes, 10);
  // A failure injected after 1, 2, ... writes: every time, nothing changed.
  for (long n : {0L, 1L, 2L, 5L, 10L, total_writes / 2, total_writes - 1}) {
    MergeOptions o;
    o.fail_after = n;
    EXPECT_THROW(merge_into(c.camp, {a, b}, o), std::runtime_error) << n;
    EXPECT_EQ(dump_difference(dump(c.camp), records), "") << "after a failure at write " << n;
    EXPECT_EQ(read_file(c.camp), bytes) << "after a failure at write " << n;
  }
  // The same merge without the failure goes through.
  EXPECT_NO_THROW(merge_into(c.camp, {a, b}));
  EXPECT_NE(dump(c.camp), records);
}

TEST(Merge, BadSourcesAreRefusedBeforeAnythingIsWritten) {
  Camp c;
  { Project p = Project::open(c.camp, device(kCampDevice, "camp laptop")); }
  const std::string before = dump(c.camp);
  const std::string a = c.tablet("tabletA.cairn");
  const std::string junk = c.dir.file("notes.txt");
  write_file(junk, "S12 strike 120 dip 35\n");
  const std::string other = c.dir.file("other.sqlite");
  {
    Db db(other, SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE);
    db.exec("CREATE TABLE t(x)");
  }
  const std::string newer = c.tablet("newer.cairn");
  {
    Db db(newer, SQLITE_OPEN_READWRITE);
    db.exec("PRAGMA user_version = " + std::to_string(99));
  }
  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  auto message = [&](const std::vector<std::string>& s) {
    try {
      merge_files(p, s);
    } catch (const std::exception& e) {
      return std::string(e.what());
    }
    return std::string("no error");
  };
  EXPECT_EQ(message({a, c.dir.file("missing.cairn")}), "no project file " + c.dir.file("missing.cairn"));
  EXPECT_NE(message({a, junk}).find(junk + " is not a Cairn project file"), std::string::npos);
  EXPECT_EQ(message({other}), other + " is not a Cairn project file");
  EXPECT_NE(message({newer}).find("newer version of Cairn"), std::string::npos);
  EXPECT_NE(message({c.camp}).find("is the target file itself"), std::string::npos);
  EXPECT_EQ(dump(c.camp), before);
}

TEST(Merge, AnOlderTabletFileIsMergedAndLeftUntouched) {
  // A tablet still on schema version 2 (no conflict tables): the copy is
  // migrated, the tablet's own file is only read.
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    add_station(p, "S7", 46.53, 14.93);
  }
  {
    Db db(a, SQLITE_OPEN_READWRITE);
    // Back to version 2: without the v3 tables, the v4 project setting, the
    // v5 screening settings and repeat_of, the v6 terrain, the v7 pick-lists and track
    // and the v8 key indexes.
    db.exec(
        "DROP INDEX people_initials_any; DROP INDEX units_code_any; DROP INDEX contacts_name_any; "
        "DROP INDEX stations_code_any; "
        "DROP TABLE pick_lists; DROP TABLE track_points; DROP TABLE terrain_tiles; DROP TABLE terrain; "
        "DROP TABLE conflict_values; DROP TABLE conflicts; DROP TABLE key_clashes; "
        "ALTER TABLE project DROP COLUMN nearby_radius; ALTER TABLE project DROP COLUMN friction_angle; "
        "ALTER TABLE project DROP COLUMN sliding_window; ALTER TABLE project DROP COLUMN toppling_window; "
        "ALTER TABLE planes DROP COLUMN repeat_of; PRAGMA user_version = 2");
    db.exec("PRAGMA journal_mode = DELETE");
  }
  const std::string bytes = read_file(a);
  const MergeReport rep = merge_into(c.camp, {a});
  EXPECT_EQ(rep.sources[0].counts.added, 1);
  EXPECT_EQ(read_file(a), bytes);
  EXPECT_FALSE(std::filesystem::exists(a + ".backups"));
}

TEST(Merge, ReportsProgress) {
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    for (int i = 0; i < 120; ++i) add_station(p, "N" + std::to_string(i), 46.5, 14.9 + i * 1e-4);
  }
  std::vector<MergeProgress> seen;
  MergeOptions o;
  o.progress = [&](const MergeProgress& m) { seen.push_back(m); };
  merge_into(c.camp, {a}, o);
  ASSERT_GE(seen.size(), 3u);
  for (size_t i = 1; i < seen.size(); ++i) EXPECT_GT(seen[i].done, seen[i - 1].done);
  EXPECT_EQ(seen.back().done, seen.back().total);
  EXPECT_EQ(seen.back().source, a);
}

TEST(Merge, AReadingAddedToAStationDeletedElsewhereIsReported) {
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  const std::string b = c.tablet("tabletB.cairn");
  std::string s3;
  {
    Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
    s3 = add_station(p, "S3", 46.54, 14.94);
  }
  copy_file(c.camp, a);
  copy_file(c.camp, b);
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    soft_delete(p, Kind::Station, s3);
  }
  {
    Project p = Project::open(b, device(kTabletB, "tablet B"));
    LinearReading l;
    l.station = s3;
    l.kind = LineKind::Lineation;
    l.typed = "045/10";
    add(p, l);
  }
  const MergeReport rep = merge_into(c.camp, {a, b});
  bool warned = false;
  for (const auto& w : rep.warnings) warned = warned || w.find("points at deleted station S3") != std::string::npos;
  EXPECT_TRUE(warned);
}

TEST(Merge, DeletesAndRestoresTravelLikeEditsAndTheAuditTrailComesAlong) {
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    soft_delete(p, Kind::Plane, c.legend.plane);
  }
  merge_into(c.camp, {a});
  {
    Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
    EXPECT_TRUE(get_plane(p, c.legend.plane)->meta.deleted.has_value());
    EXPECT_TRUE(list_conflicts(p).empty());
  }
  {
    Project p = Project::open(a, device(kTabletA, "tablet A"));
    restore(p, Kind::Plane, c.legend.plane);
  }
  const MergeReport rep = merge_into(c.camp, {a});
  EXPECT_EQ(rep.sources[0].counts.updated, 1);
  Project p = Project::open(c.camp, device(kCampDevice, "camp laptop"));
  EXPECT_FALSE(get_plane(p, c.legend.plane)->meta.deleted.has_value());
  // Every audit row of the tablet is in the camp file, unchanged.
  Db tablet(a, SQLITE_OPEN_READONLY);
  Stmt s(tablet, "SELECT uuid, action, new_values FROM audit");
  int rows = 0;
  while (s.step()) {
    ++rows;
    Stmt q(p.db(), "SELECT action, new_values FROM audit WHERE uuid = ?");
    q.bind(1, s.text(0));
    ASSERT_TRUE(q.step()) << s.text(0);
    EXPECT_EQ(q.text(0), s.text(1));
    EXPECT_EQ(q.text(1), s.text(2));
  }
  EXPECT_GE(rows, 9);  // the legend's inserts, the delete and the restore
  auto trail = audit_trail(p, c.legend.plane);
  ASSERT_EQ(trail.size(), 3u);
  EXPECT_EQ(trail[1].action, "delete");
  EXPECT_EQ(trail[2].action, "restore");
}

TEST(Merge, TablesOtherModulesKeepBesideTheRecordsMergeByUuid) {
  // A module's table beside the records (flag reviews): made in the camp file
  // by the module's own function, its rows merged by UUID.
  Camp c;
  const std::string a = c.tablet("tabletA.cairn");
  {
    Project t = Project::open(a, device(kTabletA, "tablet A"));
    FlagReview r;
    r.flag_key = flag_key("misfit", "S1", "", "slate-quartzite");
    r.rule = "misfit";
    r.station = "S1";
    r.status = ReviewStatus::Accepted;
    r.comment = "local fold hinge";
    add_flag_review(t, r);
  }
  const MergeReport rep = merge_into(c.camp, {a});
  EXPECT_EQ(rep.sources[0].counts.added, 1);
  {
    Db camp(c.camp, SQLITE_OPEN_READONLY);
    EXPECT_EQ(camp.query_text("SELECT comment FROM flag_reviews"), "local fold hinge");
  }
  const std::string before = dump(c.camp);
  EXPECT_FALSE(merge_into(c.camp, {a}).changed);
  EXPECT_EQ(dump(c.camp), before);
}
