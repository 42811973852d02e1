// Applying a flag's suggested correction to its reading. The expected attitudes
// follow from the right-hand rule (a reading dipping the other way has its strike
// turned by 180 degrees; common practice) and from the sign of the declination
// (true azimuth = magnetic azimuth + east declination; NOAA's definition, as in
// the World Magnetic Model reports).
#include <gtest/gtest.h>

#include <filesystem>

#include "geomath/angles.h"
#include "app/core/corrections.h"
#include "storage/repository.h"

using namespace cairn;

namespace {

struct Fixture {
  std::string dir, path;
  double decl = 15.0;
  explicit Fixture(double declination = 15.0) : decl(declination) {
    dir = (std::filesystem::temp_directory_path() / ("cairn-corr-" + std::to_string(::getpid()))).string();
    std::filesystem::remove_all(dir);
    std::filesystem::create_directories(dir);
    path = dir + "/c.cairn";
  }
  ~Fixture() { std::filesystem::remove_all(dir); }
  store::OpenOptions opts() const {
    store::OpenOptions o;
    o.backups = false;
    // A fixed declination (15 degrees east unless told) stands in for the magnetic model.
    o.declination = [d = decl](double, double, double) { return store::Declination{d, "given"}; };
    return o;
  }
};

std::string add_reading(store::Project& p, const std::string& typed, store::North north,
                        std::string* station = nullptr) {
  store::Station s;
  s.code = "S" + std::to_string(store::list_stations(p).size() + 1);
  s.lat = 61.2;
  s.lon = -135.6;
  const std::string st = store::add(p, s);
  if (station) *station = st;
  store::PlanarReading r;
  r.station = st;
  r.kind = store::PlaneKind::Bedding;
  r.typed = typed;
  r.notation = store::PlaneNotation::StrikeDip;
  r.north = north;
  r.ref = "R1";
  r.time = "2026-07-06T10:00:00-07:00";
  return store::add(p, r);
}

geo::Flag flag(const std::string& rule, const std::string& reading, geo::Plane corrected) {
  geo::Flag f;
  f.rule = rule;
  f.reading = reading;
  f.ref = "R1";
  f.corrected = corrected;
  return f;
}

}  // namespace

TEST(Corrections, ReversedDipTurnsTheStrikeAndIsAudited) {
  Fixture fx;
  store::Project p = store::Project::create(fx.path, {"C", "8N", store::North::True, 0}, fx.opts());
  const std::string id = add_reading(p, "218/37", store::North::True);
  auto done = core::apply_correction(p, flag("reversed-dip", id, geo::Plane{38, 37}));
  ASSERT_TRUE(done.ok()) << done.error();
  auto r = store::get_plane(p, id);
  EXPECT_EQ(r->typed, "038/37");
  EXPECT_NEAR(r->strike, 38, 1e-9);
  EXPECT_NEAR(r->dip, 37, 1e-9);
  EXPECT_NE(r->notes.find("reversed-dip"), std::string::npos);
  EXPECT_EQ(store::audit_trail(p, id).back().action, "update");
  // Applied twice: the stored reading no longer matches the flag, nothing is written.
  auto again = core::apply_correction(p, flag("reversed-dip", id, geo::Plane{38, 37}));
  EXPECT_FALSE(again.ok());
  EXPECT_EQ(again.error(), "reading R1 has changed since the check; run it again");
  EXPECT_EQ(store::get_plane(p, id)->typed, "038/37");
}

TEST(Corrections, DeclinationNotAppliedBecomesMagnetic) {
  Fixture fx;
  store::Project p = store::Project::create(fx.path, {"C", "8N", store::North::True, 0}, fx.opts());
  // Read 020/50 off a compass without declination but recorded as true north.
  const std::string id = add_reading(p, "020/50", store::North::True);
  auto done = core::apply_correction(p, flag("declination-suspect", id, geo::Plane{35, 50}));
  ASSERT_TRUE(done.ok()) << done.error();
  auto r = store::get_plane(p, id);
  EXPECT_EQ(r->north, store::North::Magnetic);
  EXPECT_NEAR(r->declination, 15, 1e-9);
  EXPECT_NEAR(r->strike, 35, 1e-9);  // 020 magnetic + 15 east = 035 true
  EXPECT_NEAR(r->measured_strike, 20, 1e-9);
}

TEST(Corrections, DeclinationAppliedTwiceBecomesTrue) {
  Fixture fx;
  store::Project p = store::Project::create(fx.path, {"C", "8N", store::North::True, 0}, fx.opts());
  // The compass already had the declination set; recorded as magnetic, so applied twice.
  const std::string id = add_reading(p, "035/50", store::North::Magnetic);
  EXPECT_NEAR(store::get_plane(p, id)->strike, 50, 1e-9);
  auto done = core::apply_correction(p, flag("declination-suspect", id, geo::Plane{35, 50}));
  ASSERT_TRUE(done.ok()) << done.error();
  auto r = store::get_plane(p, id);
  EXPECT_EQ(r->north, store::North::True);
  EXPECT_NEAR(r->strike, 35, 1e-9);
  EXPECT_NEAR(r->declination, 0, 1e-12);
}

TEST(Corrections, OtherRulesAndMismatchesWriteNothing) {
  Fixture fx;
  store::Project p = store::Project::create(fx.path, {"C", "8N", store::North::True, 0}, fx.opts());
  const std::string id = add_reading(p, "020/50", store::North::True);
  geo::Flag m = flag("misfit", id, geo::Plane{35, 50});
  EXPECT_FALSE(core::has_correction(m));
  EXPECT_EQ(core::apply_correction(p, m).error(), "flag misfit suggests no correction to apply");
  // A true-north reading cannot have had the declination applied twice.
  auto wrong = core::apply_correction(p, flag("declination-suspect", id, geo::Plane{5, 50}));
  EXPECT_FALSE(wrong.ok());
  EXPECT_EQ(wrong.error(), "the suggested turn of -15.0 degrees does not match the reading's north reference");
  EXPECT_EQ(store::get_plane(p, id)->typed, "020/50");
  EXPECT_EQ(store::audit_trail(p, id).size(), 1u);  // the insert only
}

TEST(Corrections, WestDeclinationIsDiagnosedBySignNotAlone) {
  // West declination -15: true = magnetic - 15. A magnetic reading of 050 stored
  // as true should be 035: the turn is -15 (the declination), so it becomes magnetic.
  Fixture fx(-15.0);
  store::Project p = store::Project::create(fx.path, {"C", "8N", store::North::True, 0}, fx.opts());
  const std::string a = add_reading(p, "050/50", store::North::True);
  geo::Flag fa = flag("declination-suspect", a, geo::Plane{35, 50});
  fa.cause = "declination-not-applied";
  auto done = core::apply_correction(p, fa);
  ASSERT_TRUE(done.ok()) << done.error();
  EXPECT_EQ(store::get_plane(p, a)->north, store::North::Magnetic);
  EXPECT_NEAR(store::get_plane(p, a)->strike, 35, 1e-9);
  // Applied twice (compass set to -15, recorded magnetic): 035 stored as 020; the turn +15 takes it off.
  const std::string b = add_reading(p, "035/50", store::North::Magnetic);
  EXPECT_NEAR(store::get_plane(p, b)->strike, 20, 1e-9);
  geo::Flag fb = flag("declination-suspect", b, geo::Plane{35, 50});
  fb.cause = "declination-applied-twice";
  done = core::apply_correction(p, fb);
  ASSERT_TRUE(done.ok()) << done.error();
  EXPECT_EQ(store::get_plane(p, b)->north, store::North::True);
  EXPECT_NEAR(store::get_plane(p, b)->strike, 35, 1e-9);
}

TEST(Corrections, GroupCorrectionIsOneAuditedChangeAllOrNothing) {
  Fixture fx;
  store::Project p = store::Project::create(fx.path, {"C", "8N", store::North::True, 0}, fx.opts());
  std::vector<std::string> ids;
  for (const char* t : {"020/50", "100/35", "250/70"}) ids.push_back(add_reading(p, t, store::North::True));
  geo::Flag g;
  g.rule = "declination-suspect";
  g.cause = "declination-not-applied";
  g.readings = ids;
  g.refs = {"R1", "R1", "R1"};
  g.observer = "AB";
  g.day = "2026-07-06";
  g.rotation = 14.6;  // the group's estimate, within a degree of the 15 east applied
  ASSERT_TRUE(core::has_correction(g));
  auto done = core::apply_correction(p, g);
  ASSERT_TRUE(done.ok()) << done.error();
  const double want[] = {35, 115, 265};  // typed + 15 east
  for (size_t i = 0; i < ids.size(); ++i) {
    auto r = store::get_plane(p, ids[i]);
    EXPECT_EQ(r->north, store::North::Magnetic);
    EXPECT_NEAR(r->strike, want[i], 1e-9);
    EXPECT_EQ(store::audit_trail(p, ids[i]).back().action, "update");
  }
  // A compass offset turns each measured strike; one reading gone: nothing is written.
  const std::string c = add_reading(p, "040/30", store::North::True);
  const std::string d = add_reading(p, "140/30", store::North::True);
  store::soft_delete(p, store::Kind::Plane, d);
  geo::Flag o;
  o.rule = "compass-offset";
  o.cause = "compass-offset";
  o.readings = {c, d};
  o.refs = {"R1", "R1"};
  o.observer = "CD";
  o.rotation = 8.0;
  auto refused = core::apply_correction(p, o);
  EXPECT_FALSE(refused.ok());
  EXPECT_NE(refused.error().find("nothing was changed"), std::string::npos) << refused.error();
  EXPECT_EQ(store::get_plane(p, c)->typed, "040/30");
  o.readings = {c};
  o.refs = {"R1"};
  done = core::apply_correction(p, o);
  ASSERT_TRUE(done.ok()) << done.error();
  EXPECT_NEAR(store::get_plane(p, c)->strike, 48, 1e-9);
}
