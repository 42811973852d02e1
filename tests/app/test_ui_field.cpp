// The touch UI driven like a mapper drives it (taps and finger touches pushed
// through SDL's event queue by an event script, on a virtual display (tests/tools/xvfb-do)), checked in the
// project file afterwards: a new station with typed coordinates, readings
// entered on the Reading pad's keypad in three notations, an invalid reading
// that shows the parser's exact error and writes nothing, and undo.
//
// Outside sources named beside the checks:
//  - the right-hand rule and quadrant notation of structural geology (e.g.
//    Ragan, "Structural Geology: An Introduction to Geometrical Techniques"):
//    strike/dip 030/40 (RHR), dip direction/dip 120/40 and quadrant "N30E 40SE"
//    are one plane, strike 030, dip 40; a dip of 95 degrees does not exist (0..90);
//  - decimal degrees as typed: the stored position is the number typed (WGS84).
#include <cmath>

#include "geomath/notation.h"
#include "storage/repository.h"
#include "tests/app/ui_test_support.h"

using namespace cairn;
using cairn::ui_test::keys;
using cairn::ui_test::UiTest;

namespace {

struct Made {
  std::string path, person, station;
};

// A project in UTM zone 8N with one person (and, when asked, station S1).
Made make_project(const std::string& path, bool with_station) {
  store::OpenOptions o;
  o.backups = false;
  store::Project p = store::Project::create(path, store::NewProject{"UI test", "8N", store::North::True, 0.0}, o);
  Made m;
  m.path = path;
  store::Person who;
  who.name = "Ada Quarry";
  who.initials = "AQ";
  m.person = store::add(p, who);
  store::Unit u;
  u.code = "Kls";
  u.name = "grey limestone";
  u.age_rank = 1;
  store::add(p, u);
  if (with_station) {
    store::Station s;
    s.code = "S1";
    s.lat = 61.18;
    s.lon = -135.59;
    s.elevation = 1000;
    s.source = store::PositionSource::Manual;
    m.station = store::add(p, s);
  }
  return m;
}

}  // namespace

TEST_F(UiTest, NewStationAndReadingsFromTheKeypad) {
  const Made m = make_project(file("field.cairn"), false);
  std::string s = "wait 3\n";
  s += "touch \"+ New station\"\n";  // a finger, not the mouse
  s += "wait-for \"New station S1\"\n";
  s += "tap \"Latitude \xC2\xB0\"\n" + keys("61.182");
  s += "tap \"Longitude \xC2\xB0\"\n" + keys("-135.59");
  s += "tap \"Elevation m\"\n" + keys("1012");
  s += "expect \"Latitude \xC2\xB0: 61.182\"\n";
  s += "tap \"Create station S1\"\n";
  s += "wait-for \"Station S1\"\n";
  s += "tap \"+ New reading\"\n";
  s += keys("030/40");
  s += "expect \"strike 030/40 (right-hand rule), dip direction 120\"\n";
  s += "tap \"Record reading\"\nwait-for \"Recorded P1\"\n";
  s += "tap \"quadrant\"\n" + keys("N30E 40SE");
  s += "tap \"Record reading\"\nwait-for \"Recorded P2\"\n";
  s += "tap \"dip direction/dip\"\n" + keys("120/40");
  s += "tap \"Record reading\"\nwait-for \"Recorded P3\"\n";
  s += "tap \"line\"\ntap \"fold axis\"\n" + keys("120/35");
  s += "expect \"trend 120, plunge 35\"\n";
  s += "tap \"Record reading\"\nwait-for \"Recorded L1\"\n";
  const auto r = gui(m.path, s, "--person AQ");
  ASSERT_EQ(r.status, 0) << r.err;

  store::Project p = store::Project::open(m.path, quiet());
  auto st = store::find_station(p, "S1");
  ASSERT_TRUE(st);
  EXPECT_DOUBLE_EQ(st->lat, 61.182);  // the numbers typed
  EXPECT_DOUBLE_EQ(st->lon, -135.59);
  ASSERT_TRUE(st->elevation);
  EXPECT_DOUBLE_EQ(*st->elevation, 1012);
  EXPECT_EQ(st->source, store::PositionSource::Manual);
  EXPECT_EQ(st->observer, m.person);

  store::ListOptions lo;
  lo.station = st->meta.uuid;
  const auto planes = store::list_planes(p, lo);
  ASSERT_EQ(planes.size(), 3u);
  // One plane in three notations (Ragan): strike 030, dip 40 by the right-hand rule.
  const char* typed[] = {"030/40", "N30E 40SE", "120/40"};
  const store::PlaneNotation notation[] = {store::PlaneNotation::StrikeDip, store::PlaneNotation::Text,
                                           store::PlaneNotation::DipDirectionDip};
  for (size_t i = 0; i < 3; ++i) {
    SCOPED_TRACE(typed[i]);
    EXPECT_EQ(planes[i].typed, typed[i]);
    EXPECT_EQ(planes[i].notation, notation[i]);
    EXPECT_NEAR(planes[i].strike, 30.0, 1e-9);
    EXPECT_NEAR(planes[i].dip, 40.0, 1e-9);
    EXPECT_EQ(planes[i].ref, "P" + std::to_string(i + 1));
    EXPECT_EQ(planes[i].kind, store::PlaneKind::Bedding);
    EXPECT_EQ(planes[i].observer, m.person);
  }
  // A line as trend/plunge: 120/35 is trend 120, plunge 35.
  const auto lines = store::list_lines(p, lo);
  ASSERT_EQ(lines.size(), 1u);
  EXPECT_EQ(lines[0].kind, store::LineKind::FoldAxis);
  EXPECT_NEAR(lines[0].trend, 120.0, 1e-9);
  EXPECT_NEAR(lines[0].plunge, 35.0, 1e-9);
  EXPECT_EQ(lines[0].ref, "L1");
}

TEST_F(UiTest, InvalidReadingShowsTheParsersErrorAndWritesNothing) {
  const Made m = make_project(file("field.cairn"), true);
  const size_t audit_before = [&] {
    store::Project p = store::Project::open(m.path, quiet());
    return store::audit_log(p).size();
  }();
  // A dip of 95 degrees does not exist (dips run 0..90); in "N30E 40NE" the
  // dip quadrant NE is not one of the two sides (SE, NW) of a N30E strike line.
  const auto err95 = geo::parse_plane("030/95", geo::PlaneConvention::StrikeDipRHR);
  const auto err_q = geo::parse_plane("N30E 40NE", geo::PlaneConvention::Unspecified);
  ASSERT_FALSE(err95.ok());
  ASSERT_FALSE(err_q.ok());
  EXPECT_NE(err95.error().find("95"), std::string::npos) << err95.error();

  std::string s = "wait 3\n" + keys("030/95");
  s += "expect \"" + err95.error() + "\"\n";
  s += "tap \"Record reading\"\n";
  s += "expect \"Not recorded: " + err95.error() + "\"\n";
  s += "expect-not \"Recorded P\"\n";
  s += "tap \"key Clear\"\ntap \"quadrant\"\n" + keys("N30E 40NE");
  s += "expect \"" + err_q.error() + "\"\n";
  s += "tap \"Record reading\"\n";
  s += "expect \"Not recorded: " + err_q.error() + "\"\n";
  const auto r = gui(m.path, s, "--station S1 --view pad");
  ASSERT_EQ(r.status, 0) << r.err;

  store::Project p = store::Project::open(m.path, quiet());
  store::ListOptions lo;
  lo.include_deleted = true;
  EXPECT_TRUE(store::list_planes(p, lo).empty());
  EXPECT_EQ(store::audit_log(p).size(), audit_before);  // not one row written
}

TEST_F(UiTest, AScriptThatExpectsWhatIsNotThereFails) {
  // The harness itself can fail: an expectation the screen does not meet ends
  // the program with status 3 and names the script line.
  const Made m = make_project(file("field.cairn"), true);
  const auto r = gui(m.path, "wait 3\nexpect \"no such words on any screen\"\n");
  EXPECT_EQ(r.status, 3);
  EXPECT_NE(r.err.find("events.txt:2"), std::string::npos) << r.err;
  const auto r2 = gui(m.path, "wait 3\ntap \"No such button\"\n");
  EXPECT_EQ(r2.status, 3);
}

TEST_F(UiTest, UndoTakesBackTheLastReading) {
  const Made m = make_project(file("field.cairn"), true);
  std::string s = "wait 3\n" + keys("210/35");
  s += "tap \"Record reading\"\nwait-for \"Recorded P1\"\n";
  s += "tap \"Undo: reading P1 210/35 at S1\"\n";
  s += "wait-for \"Undone: reading P1 210/35 at S1\"\n";
  const auto r = gui(m.path, s, "--station S1 --view pad");
  ASSERT_EQ(r.status, 0) << r.err;

  store::Project p = store::Project::open(m.path, quiet());
  store::ListOptions lo;
  lo.include_deleted = true;
  const auto all = store::list_planes(p, lo);
  ASSERT_EQ(all.size(), 1u);
  EXPECT_TRUE(all[0].meta.deleted.has_value());  // soft-deleted: undo is itself undoable from the audit trail
  EXPECT_TRUE(store::list_planes(p).empty());
}
