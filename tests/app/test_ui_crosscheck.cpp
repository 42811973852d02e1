// A hazard flag in the touch UI: the Crosscheck screen lists it, opening it
// shows its field-safety caution, and it cannot be closed until the caution is
// acknowledged; the acknowledgement is saved (storage/reviews.h).
//
// Outside sources named beside the checks:
//  - the Markland test for planar sliding (Hoek & Bray, Rock Slope
//    Engineering): a plane dipping toward the slope face (dip direction within
//    20 degrees of the face's), less steeply than the face and more steeply than
//    the friction angle (30 degrees) can slide out of it. Here bedding 090/40
//    (dip direction 180, right-hand rule) under a face 090/60 (dip direction 180).
//  - the wording of the caution: a screening indication only, not a
//    slope-stability assessment.
//  - WMM2025 is valid from 2025.0 to 2030.0 (the WMM2025 technical report): a
//    reading dated 2021 lies outside it, and the Crosscheck says so as
//    `cairn check` does.
#include "geomath/crosscheck.h"
#include "storage/repository.h"
#include "storage/reviews.h"
#include "tests/app/ui_test_support.h"

using namespace cairn;
using cairn::ui_test::UiTest;

TEST_F(UiTest, HazardFlagShowsItsCautionAndNeedsAnAcknowledgement) {
  const std::string path = file("face.cairn");
  {
    store::OpenOptions o;
    o.backups = false;
    store::Project p = store::Project::create(path, store::NewProject{"Face", "8N", store::North::True, 0.0}, o);
    store::Person who;
    who.name = "Ada Quarry";
    who.initials = "AQ";
    store::add(p, who);
    store::Station s;
    s.code = "S7";
    s.lat = 61.2;
    s.lon = -135.6;
    s.elevation = 900;
    const std::string st = store::add(p, s);
    store::PlanarReading slope;
    slope.station = st;
    slope.kind = store::PlaneKind::Slope;
    slope.typed = "090/60";
    slope.notation = store::PlaneNotation::StrikeDip;
    slope.ref = "P1";
    store::add(p, slope);
    store::PlanarReading bed;
    bed.station = st;
    bed.kind = store::PlaneKind::Bedding;
    bed.typed = "090/40";
    bed.notation = store::PlaneNotation::StrikeDip;
    bed.ref = "P2";
    store::add(p, bed);
  }
  const std::string caution = geo::kSlopeCaution;
  ASSERT_NE(caution.find("not a slope-stability assessment"), std::string::npos);  // the words

  std::string s = "wait 3\nwait-idle\n";
  s += "tap \"Crosscheck\"\n";
  s += "wait-for \"HAZARD\"\n";
  s += "tap \"daylighting P2\"\n";
  s += "wait-for \"" + caution + "\"\n";
  s += "expect \"Acknowledge the caution to close this flag.\"\n";
  // Close is there but does nothing before the acknowledgement.
  s += "tap \"Close\"\n";
  s += "expect \"" + caution + "\"\n";
  s += "tap \"I have read this caution\"\n";
  s += "wait-for \"Caution acknowledged\"\n";
  s += "tap \"Close\"\n";
  s += "expect-not \"" + caution + "\"\n";
  s += "expect-not \"Acknowledge the caution\"\n";
  s += "screenshot flag-closed.png\n";
  const auto r = gui(path, s, "--person AQ");
  ASSERT_EQ(r.status, 0) << r.err;

  store::OpenOptions o;
  o.backups = false;
  store::Project p = store::Project::open(path, o);
  const auto reviews = store::list_flag_reviews(p);
  ASSERT_EQ(reviews.size(), 1u);
  EXPECT_EQ(reviews[0].rule, "daylighting");
  EXPECT_EQ(reviews[0].status, store::ReviewStatus::Acknowledged);
  EXPECT_EQ(reviews[0].station, "S7");
  ASSERT_TRUE(store::find_person(p, "AQ"));
  EXPECT_EQ(reviews[0].person, store::find_person(p, "AQ")->meta.uuid);
}

// The demo's right-hand-rule slip (demo_project/README.md): bedding RO-07a typed
// with the strike's other end. Opening its reversed-dip flag offers the
// correction; one tap re-enters it dipping the other way (strike + 180, the
// right-hand rule; common practice), and the flag is gone from the next check.
TEST_F(UiTest, ReversedDipIsCorrectedWithOneTap) {
  const std::string dir = file("auska");
  ASSERT_EQ(std::system((std::string(CAIRN_BINARY) + " demo " + dir + " > /dev/null").c_str()), 0);
  const std::string path = dir + "/camp.cairn";
  std::string before;
  {
    store::OpenOptions o;
    o.read_only = true;
    store::Project p = store::Project::open(path, o);
    const auto st = store::find_station(p, "RO-07");
    ASSERT_TRUE(st);
    const auto r = store::find_plane_by_ref(p, st->meta.uuid, "RO-07a");
    ASSERT_TRUE(r);
    before = r->typed;
  }
  std::string s = "wait 3\nwait-idle\n";
  s += "wait-for \"Apply the correction\"\n";
  s += "expect \"RO-07a\"\n";
  s += "tap \"Apply the correction\"\n";
  s += "wait-for \"Corrected RO-07a\"\n";
  s += "wait-idle\n";
  const auto run = gui(path, s, "--person RO --view crosscheck --flag reversed-dip");
  ASSERT_EQ(run.status, 0) << run.err;
  // The next check no longer raises it.
  std::string out;
  {
    FILE* f = ::popen((std::string(CAIRN_BINARY) + " check " + path + " --json").c_str(), "r");
    ASSERT_TRUE(f);
    char buf[4096];
    size_t n;
    while ((n = std::fread(buf, 1, sizeof buf, f)) > 0) out.append(buf, n);
    ASSERT_EQ(::pclose(f), 0);
  }
  EXPECT_NE(out.find("\"rule\":\"misfit\""), std::string::npos);  // the other flags are still there
  EXPECT_EQ(out.find("reversed-dip"), std::string::npos);

  store::OpenOptions o;
  o.read_only = true;
  store::Project p = store::Project::open(path, o);
  const auto st = store::find_station(p, "RO-07");
  const auto r = store::find_plane_by_ref(p, st->meta.uuid, "RO-07a");
  ASSERT_TRUE(r);
  const int b_strike = std::stoi(before.substr(0, 3)), a_strike = std::stoi(r->typed.substr(0, 3));
  EXPECT_EQ((b_strike + 180) % 360, a_strike) << before << " -> " << r->typed;
  EXPECT_EQ(before.substr(3), r->typed.substr(3));  // the dip is unchanged
}

TEST_F(UiTest, CrosscheckShowsTheMagneticModelsValidityWarning) {
  const std::string path = file("old.cairn");
  {
    store::OpenOptions o;
    o.backups = false;
    store::Project p = store::Project::create(path, store::NewProject{"Old", "8N", store::North::True, 0.0}, o);
    store::Station s;
    s.code = "S1";
    s.lat = 61.2;
    s.lon = -135.6;
    s.elevation = 900;
    const std::string st = store::add(p, s);
    store::PlanarReading bed;
    bed.station = st;
    bed.kind = store::PlaneKind::Bedding;
    bed.typed = "030/40";
    bed.notation = store::PlaneNotation::StrikeDip;
    bed.time = "2021-06-01T10:00:00Z";
    store::add(p, bed);
  }
  std::string s = "wait 3\nwait-idle\n";
  s += "tap \"Crosscheck\"\n";
  s += "wait-for \"1 reading is dated outside WMM2025's validity (2025 to 2030)\"\n";
  const auto r = gui(path, s);
  ASSERT_EQ(r.status, 0) << r.err;
}
