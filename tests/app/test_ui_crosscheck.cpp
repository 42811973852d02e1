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
