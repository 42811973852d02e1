// Round trips of every record kind through a project file, injection strings
// stored literally, the audit trail, soft delete / restore and undo.
//
// Outside sources named beside the checks:
//  - SQLite documentation, "Binding Values To Prepared Statements": bound
//    parameters are data, never SQL, so injection strings must come back as typed;
//  - the right-hand rule and quadrant notation as defined in structural geology
//    textbooks (e.g. Ragan, "Structural Geology: An Introduction to Geometrical
//    Techniques"): "N30E 40SE" is strike 030 / dip 40 by the right-hand rule;
//  - declination as NOAA defines it: east positive, true bearing = magnetic bearing + declination;
//  - RFC 4122 for the UUID layout.
#include <gtest/gtest.h>

#include <cmath>

#include "formats/ids.h"
#include "storage/project.h"
#include "storage/each.h"
#include "storage/repository.h"
#include "storage_test_util.h"

using namespace cairn::store;
using namespace cairn::formats;
using cairn::store::testing::TempDir;

namespace {

OpenOptions quiet() {
  OpenOptions o = cairn::store::testing::quiet();
  o.device_id = "0b7c1a52-3f7e-4c55-9d6e-8f1a2b3c4d5e";
  o.device_name = "tablet one";
  return o;
}

struct Fixture {
  TempDir dir;
  std::string path = dir.file("ridge.cairn");
  Project p = Project::create(path, NewProject{"Ridge traverse", "33N", North::True, 10.0}, quiet());
  std::string unit_a, unit_b, contact, station;

  Fixture() {
    Unit a;
    a.code = "Pgs";
    a.name = "grey schist";
    a.age_rank = 1;
    unit_a = add(p, a);
    Unit b;
    b.code = "Qm";
    b.name = "pale marble";
    b.age_rank = 2;
    b.colour = "#56B4E9";
    unit_b = add(p, b);
    Contact c;
    c.name = "schist-marble";
    c.lower_unit = unit_a;
    c.upper_unit = unit_b;
    c.type = ContactType::Depositional;
    contact = add(p, c);
    Station s;
    s.code = "S1";
    s.lat = 46.5;
    s.lon = 14.25;
    s.elevation = 1210.5;
    s.h_accuracy = 3.5;
    s.v_accuracy = 6;
    s.unit = unit_a;
    s.time = "2025-06-14T09:30:00Z";
    s.notes = "knob above the stream";
    station = add(p, s);
  }
};

}  // namespace

TEST(Records, UuidsAreVersion4) {
  // RFC 4122 4.4: version nibble 4, variant bits 10.
  for (int i = 0; i < 50; ++i) {
    const std::string u = new_uuid();
    ASSERT_TRUE(is_uuid(u)) << u;
    EXPECT_EQ(u[14], '4');
    EXPECT_TRUE(u[19] == '8' || u[19] == '9' || u[19] == 'a' || u[19] == 'b') << u;
  }
  EXPECT_NE(new_uuid(), new_uuid());
}

TEST(Records, RoundTripOfEveryKind) {
  Fixture f;
  Person who;
  who.name = "Ada Example";
  who.initials = "AE";
  const std::string person = add(f.p, who);

  PlanarReading pl;
  pl.station = f.station;
  pl.kind = PlaneKind::Bedding;
  pl.typed = "N30E 40SE";  // quadrant notation: strike 030 RHR, dip 40 (textbook definition)
  pl.notation = PlaneNotation::Text;
  pl.quality = 4;
  pl.facing = Facing::Upright;
  pl.contact = f.contact;
  pl.ref = "p17";
  pl.time = "2025-06-14T09:41:00+02:00";
  pl.observer = person;
  pl.notes = "top surface";
  const std::string plane = add(f.p, pl);

  LinearReading ln;
  ln.station = f.station;
  ln.kind = LineKind::Lineation;
  ln.typed = "120/35";
  ln.ref = "l3";
  const std::string line = add(f.p, ln);

  // A rake of 90 on a plane lies down its dip: trend = dip direction, plunge = dip
  // (definition of rake, measured in the plane from the strike direction).
  PlanarReading host;
  host.station = f.station;
  host.kind = PlaneKind::Fault;
  host.measured_strike = 90;
  host.measured_dip = 30;
  host.ref = "f1";
  const std::string fault = add(f.p, host);
  LinearReading slick;
  slick.station = f.station;
  slick.kind = LineKind::Slickenline;
  slick.host_plane = fault;
  slick.rake = 90;
  add(f.p, slick);

  ContactPoint pt;
  pt.contact = f.contact;
  pt.lat = 46.501;
  pt.lon = 14.2501;
  pt.elevation = 1190;
  pt.h_accuracy = 4;
  pt.source = PointSource::Map;
  pt.time = "2025-06-14";
  add(f.p, pt);

  Photo ph;
  ph.station = f.station;
  ph.path = "photos/IMG_0001.jpg";
  ph.sha256 = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad";
  ph.caption = "looking north";
  add(f.p, ph);

  // Reopen the file: everything must come back as written.
  const std::string path = f.path;
  f.p = Project::open(path, quiet());
  Project& p = f.p;
  EXPECT_EQ(p.info().name, "Ridge traverse");
  EXPECT_EQ(p.info().utm_zone, "33N");
  EXPECT_DOUBLE_EQ(p.info().declination, 10.0);

  auto units = list_units(p);
  ASSERT_EQ(units.size(), 2u);
  EXPECT_EQ(units[0].code, "Pgs");
  EXPECT_EQ(units[0].colour, "#E69F00");  // Okabe & Ito (2008): first colour after black
  EXPECT_EQ(units[1].colour, "#56B4E9");
  auto contacts = list_contacts(p);
  ASSERT_EQ(contacts.size(), 1u);
  EXPECT_EQ(contacts[0].lower_unit, f.unit_a);
  EXPECT_EQ(contacts[0].upper_unit, f.unit_b);

  auto stations = list_stations(p);
  ASSERT_EQ(stations.size(), 1u);
  const Station& s = stations[0];
  EXPECT_EQ(s.code, "S1");
  EXPECT_DOUBLE_EQ(s.lat, 46.5);
  EXPECT_DOUBLE_EQ(s.lon, 14.25);
  EXPECT_DOUBLE_EQ(*s.elevation, 1210.5);
  EXPECT_DOUBLE_EQ(*s.h_accuracy, 3.5);
  EXPECT_DOUBLE_EQ(*s.v_accuracy, 6);
  EXPECT_EQ(s.unit, f.unit_a);
  EXPECT_EQ(s.time, "2025-06-14T09:30:00Z");
  EXPECT_EQ(s.notes, "knob above the stream");
  EXPECT_EQ(s.meta.device, "0b7c1a52-3f7e-4c55-9d6e-8f1a2b3c4d5e");
  EXPECT_EQ(s.meta.created, s.meta.updated);
  EXPECT_FALSE(s.meta.deleted);

  auto planes = list_planes(p);
  ASSERT_EQ(planes.size(), 2u);
  const PlanarReading& a = planes[0];
  EXPECT_EQ(a.meta.uuid, plane);
  EXPECT_EQ(a.typed, "N30E 40SE");
  EXPECT_NEAR(a.strike, 30, 1e-9);  // right-hand rule: dips SE, to the right of 030
  EXPECT_NEAR(a.dip, 40, 1e-9);
  EXPECT_EQ(a.north, North::True);
  EXPECT_EQ(a.declination, 0);
  EXPECT_EQ(*a.quality, 4);
  EXPECT_EQ(a.facing, Facing::Upright);
  EXPECT_EQ(a.contact, f.contact);
  EXPECT_EQ(a.ref, "p17");
  EXPECT_EQ(a.time, "2025-06-14T09:41:00+02:00");
  EXPECT_EQ(a.observer, person);
  EXPECT_EQ(planes[1].typed, "090/30");

  auto lines = list_lines(p);
  ASSERT_EQ(lines.size(), 2u);
  EXPECT_NEAR(lines[0].trend, 120, 1e-9);
  EXPECT_NEAR(lines[0].plunge, 35, 1e-9);
  EXPECT_EQ(lines[0].ref, "l3");
  EXPECT_EQ(lines[1].host_plane, fault);
  EXPECT_NEAR(lines[1].trend, 180, 1e-9);  // strike 090 RHR dips south
  EXPECT_NEAR(lines[1].plunge, 30, 1e-9);
  EXPECT_NEAR(*lines[1].rake, 90, 1e-9);

  auto points = list_points(p);
  ASSERT_EQ(points.size(), 1u);
  EXPECT_DOUBLE_EQ(points[0].lat, 46.501);
  EXPECT_EQ(points[0].source, PointSource::Map);
  EXPECT_EQ(points[0].time, "2025-06-14");
  EXPECT_FALSE(points[0].v_accuracy);

  auto photos = list_photos(p);
  ASSERT_EQ(photos.size(), 1u);
  EXPECT_EQ(photos[0].sha256, "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  EXPECT_EQ(photos[0].caption, "looking north");

  auto people = list_people(p);
  ASSERT_EQ(people.size(), 1u);
  EXPECT_EQ(people[0].initials, "AE");
  auto devices = list_devices(p);
  ASSERT_EQ(devices.size(), 1u);
  EXPECT_EQ(devices[0].name, "tablet one");
}

TEST(Records, MagneticReadingKeepsRawAndDeclination) {
  Fixture f;  // project declination setting: 10 degrees east
  PlanarReading r;
  r.station = f.station;
  r.typed = "030/40";
  r.notation = PlaneNotation::StrikeDip;
  r.north = North::Magnetic;
  add(f.p, r);
  // NOAA's definition: true bearing = magnetic bearing + east declination.
  EXPECT_NEAR(r.strike, 40, 1e-9);
  EXPECT_NEAR(r.measured_strike, 30, 1e-9);
  EXPECT_EQ(r.declination_source, "project setting");
  auto back = get_plane(f.p, r.meta.uuid);
  EXPECT_NEAR(back->strike, 40, 1e-9);
  EXPECT_EQ(back->typed, "030/40");
  EXPECT_EQ(back->north, North::Magnetic);
  EXPECT_DOUBLE_EQ(back->declination, 10);

  // A provider (the app's magnetic model) wins over the setting; it is asked
  // with the station's place and the reading's date as a decimal year.
  const std::string path = f.path;
  OpenOptions o = quiet();
  double seen_lat = 0, seen_year = 0;
  o.declination = [&](double lat, double, double year) {
    seen_lat = lat;
    seen_year = year;
    return Declination{-7.5, "test model"};
  };
  f.p = Project::open(path, o);
  LinearReading l;
  l.station = f.station;
  l.typed = "005/20";
  l.north = North::Magnetic;
  l.time = "2025-07-02T10:00:00Z";
  add(f.p, l);
  EXPECT_NEAR(l.trend, 357.5, 1e-9);  // 5 + (-7.5), wrapped into [0, 360)
  EXPECT_EQ(l.declination_source, "test model");
  EXPECT_DOUBLE_EQ(seen_lat, 46.5);
  EXPECT_NEAR(seen_year, 2025.0 + 182.0 / 365.0, 1e-9);  // 2 July = day 183 of 365
}

TEST(Records, InjectionStringsAreStoredLiterally) {
  // SQLite documentation: bound parameters are never parsed as SQL.
  Fixture f;
  const std::vector<std::string> nasty = {"'); DROP TABLE stations;--", "\"; DELETE FROM planes; --", "S2' OR '1'='1",
                                          "Robert'); DROP TABLE units;--", "x\"); PRAGMA writable_schema=1;--"};
  for (size_t i = 0; i < nasty.size(); ++i) {
    Station s;
    s.code = nasty[i];
    s.lat = 46.6;
    s.lon = 14.3;
    s.notes = nasty[(i + 1) % nasty.size()];
    add(f.p, s);
    Unit u;
    u.code = nasty[i];
    u.name = nasty[i];
    u.age_rank = static_cast<int>(i) + 3;
    add(f.p, u);
  }
  const std::string path = f.path;
  f.p = Project::open(path, quiet());
  auto stations = list_stations(f.p);
  ASSERT_EQ(stations.size(), nasty.size() + 1);
  for (size_t i = 0; i < nasty.size(); ++i) {
    EXPECT_EQ(stations[i + 1].code, nasty[i]);
    EXPECT_EQ(stations[i + 1].notes, nasty[(i + 1) % nasty.size()]);
    ASSERT_TRUE(find_station(f.p, nasty[i]));
    ASSERT_TRUE(find_unit(f.p, nasty[i]));
  }
  EXPECT_EQ(list_units(f.p).size(), nasty.size() + 2);
  EXPECT_TRUE(f.p.integrity_check().empty());
}

TEST(Records, AuditTrailSoftDeleteRestoreAndUndo) {
  Fixture f;
  Person who;
  who.name = "Bea Example";
  who.initials = "BE";
  f.p.set_person(add(f.p, who));

  Station s = *find_station(f.p, "S1");
  const std::string before_updated = s.meta.updated;
  EXPECT_FALSE(update(f.p, s)) << "an update that changes nothing writes nothing";
  s.elevation = 1215;
  s.notes = "re-measured";
  ASSERT_TRUE(update(f.p, s));
  EXPECT_GE(s.meta.updated, before_updated);

  PlanarReading r;
  r.station = s.meta.uuid;
  r.typed = "200/15";
  r.notation = PlaneNotation::DipDirectionDip;
  const std::string plane = add(f.p, r);
  EXPECT_NEAR(r.strike, 110, 1e-9);  // dip direction 200 -> RHR strike 110 (strike = dip direction - 90)

  // A station with live readings cannot be deleted.
  try {
    soft_delete(f.p, Kind::Station, s.meta.uuid);
    FAIL() << "expected a refusal";
  } catch (const ValidationError& e) {
    EXPECT_EQ(e.rule(), "in-use");
  }
  soft_delete(f.p, Kind::Plane, plane);
  EXPECT_TRUE(list_planes(f.p).empty());
  ListOptions all;
  all.include_deleted = true;
  ASSERT_EQ(list_planes(f.p, all).size(), 1u);
  EXPECT_TRUE(list_planes(f.p, all)[0].meta.deleted);
  restore(f.p, Kind::Plane, plane);
  ASSERT_EQ(list_planes(f.p).size(), 1u);

  auto trail = audit_trail(f.p, s.meta.uuid);
  ASSERT_EQ(trail.size(), 2u);
  EXPECT_EQ(trail[0].action, "insert");
  EXPECT_EQ(trail[1].action, "update");
  EXPECT_EQ(trail[1].device, f.p.device());
  EXPECT_EQ(trail[1].person, f.p.person());
  EXPECT_NE(trail[1].old_values.find("\"elevation\":1210.5"), std::string::npos) << trail[1].old_values;
  EXPECT_NE(trail[1].new_values.find("\"elevation\":1215"), std::string::npos) << trail[1].new_values;
  EXPECT_NE(trail[1].new_values.find("\"notes\":\"re-measured\""), std::string::npos);

  auto ptrail = audit_trail(f.p, plane);
  ASSERT_EQ(ptrail.size(), 3u);
  EXPECT_EQ(ptrail[1].action, "delete");
  EXPECT_EQ(ptrail[2].action, "restore");

  // Undo the restore (-> deleted again), then undo the station update.
  auto undone = undo_last(f.p);
  ASSERT_TRUE(undone);
  EXPECT_EQ(undone->action, "restore");
  EXPECT_TRUE(list_planes(f.p).empty());
  undo(f.p, trail[1]);
  Station back = *find_station(f.p, "S1");
  EXPECT_DOUBLE_EQ(*back.elevation, 1210.5);
  EXPECT_EQ(back.notes, "knob above the stream");

  // A soft-deleted code can be reused; restoring the old one then collides.
  Unit u;
  u.code = "Tx";
  u.name = "dyke";
  u.age_rank = 3;
  const std::string old_unit = add(f.p, u);
  soft_delete(f.p, Kind::Unit, old_unit);
  Unit u2 = u;
  u2.meta = RecordMeta{};
  add(f.p, u2);
  try {
    restore(f.p, Kind::Unit, old_unit);
    FAIL() << "expected a duplicate refusal";
  } catch (const ValidationError& e) {
    EXPECT_EQ(e.rule(), "duplicate");
  }
}

TEST(Records, ApiRejectsBadValuesAndWritesNothing) {
  Fixture f;
  auto count = [&] { return f.p.db().query_int("SELECT count(*) FROM stations"); };
  const auto before = count();
  auto rule_of = [&](Station s) -> std::string {
    try {
      add(f.p, s);
    } catch (const ValidationError& e) {
      return e.rule();
    }
    return "accepted";
  };
  Station good;
  good.code = "S9";
  good.lat = 10;
  good.lon = 10;
  Station s = good;
  s.lat = 90.5;  // WGS84 latitude is within -90..90
  EXPECT_EQ(rule_of(s), "lat-range");
  s = good;
  s.lon = -180.01;
  EXPECT_EQ(rule_of(s), "lon-range");
  s = good;
  s.elevation = 9000.5;  // issue's bound: -500..9000 m
  EXPECT_EQ(rule_of(s), "elevation-range");
  s = good;
  s.h_accuracy = -1;
  EXPECT_EQ(rule_of(s), "accuracy-range");
  s = good;
  s.time = "2025-02-30";  // ISO 8601 calendar: no 30 February
  EXPECT_EQ(rule_of(s), "time");
  s = good;
  s.code = "S1";
  EXPECT_EQ(rule_of(s), "duplicate");
  s = good;
  s.unit = "00000000-0000-4000-8000-000000000000";
  EXPECT_EQ(rule_of(s), "unknown-unit");
  EXPECT_EQ(count(), before);

  PlanarReading r;
  r.station = "00000000-0000-4000-8000-000000000000";
  r.typed = "030/40";
  EXPECT_THROW(add(f.p, r), ValidationError);
  EXPECT_EQ(f.p.db().query_int("SELECT count(*) FROM planes"), 0);
  EXPECT_EQ(f.p.db().query_int("SELECT count(*) FROM audit WHERE tbl = 'planes'"), 0);
}

// for_each_station/plane/point visit the live records one at a time, in the
// order the lists give, and count_* counts them. Checked against SQLite's
// own count(*) and soft-delete column read directly (SQLite documentation,
// "Aggregate Functions"), and against the lists.
TEST(Records, ForEachVisitsTheLiveRecordsInListOrder) {
  Fixture f;
  std::vector<std::string> planes;
  for (int i = 0; i < 4; ++i) {
    PlanarReading r;
    r.station = f.station;
    r.ref = "R" + std::to_string(i);
    r.typed = std::to_string(100 + 10 * i) + "/" + std::to_string(20 + i);
    r.notation = PlaneNotation::DipDirectionDip;
    planes.push_back(add(f.p, r));
  }
  for (int i = 0; i < 3; ++i) {
    ContactPoint q;
    q.contact = f.contact;
    q.lat = 46.5 + 0.001 * i;
    q.lon = 14.25;
    q.elevation = 1200 + i;
    add(f.p, q);
  }
  soft_delete(f.p, Kind::Plane, planes[1]);
  EXPECT_EQ(f.p.db().query_int("SELECT count(*) FROM planes WHERE deleted IS NULL"), 3);
  EXPECT_EQ(count_planes(f.p), 3u);
  EXPECT_EQ(count_points(f.p), 3u);
  EXPECT_EQ(count_stations(f.p), 1u);
  std::vector<std::string> seen;
  for_each_plane(f.p, {}, [&](const PlanarReading& r) { seen.push_back(r.meta.uuid + " " + r.ref); });
  std::vector<std::string> listed;
  for (const auto& r : list_planes(f.p)) listed.push_back(r.meta.uuid + " " + r.ref);
  EXPECT_EQ(seen, listed);
  EXPECT_EQ(seen, (std::vector<std::string>{planes[0] + " R0", planes[2] + " R2", planes[3] + " R3"}));
  std::vector<double> elevations;
  for_each_point(f.p, {}, [&](const ContactPoint& q) { elevations.push_back(*q.elevation); });
  EXPECT_EQ(elevations, (std::vector<double>{1200, 1201, 1202}));
  std::vector<std::string> codes;
  for_each_station(f.p, {}, [&](const Station& s) { codes.push_back(s.code + " " + s.notes); });
  EXPECT_EQ(codes, (std::vector<std::string>{"S1 knob above the stream"}));
}
