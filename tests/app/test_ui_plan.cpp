// The Plan screen: a tap on the map gives the contact's predicted elevation
// there, and a two-finger pinch zooms (the scale bar shortens).
//
// The contact's four mapped points sit at the corners of a 200 m square in UTM
// zone 8N, on the plane z = 1000 + 0.1 (E - E0) (points at 990 m to the west and
// 1010 m to the east). A total-least-squares plane passes through the centroid
// of its points (Pearson, 1901, "On lines and planes of closest fit"), here the
// square's centre at 1000 m, and the Plan shows the data's bounds centred, so a
// tap at the middle of the map must read 1000 m. The scale bar's length is a
// 1, 2 or 5 times a power of ten (common practice in cartography): a pinch
// that doubles the scale halves it from 100 m to 50 m.
#include "geomath/geodesy.h"
#include "storage/repository.h"
#include "tests/app/ui_test_support.h"

using namespace cairn;
using cairn::ui_test::UiTest;

TEST_F(UiTest, TapOnThePlanGivesTheContactElevationAndAPinchZooms) {
  const std::string path = file("plan.cairn");
  {
    store::Project p = store::Project::create(path, store::NewProject{"Plan", "8N", store::North::True, 0.0}, quiet());
    store::Unit lo, up;
    lo.code = "Ka";
    lo.name = "lower";
    lo.age_rank = 1;
    up.code = "Kb";
    up.name = "upper";
    up.age_rank = 2;
    store::Contact c;
    c.name = "Westdip contact";
    c.lower_unit = store::add(p, lo);
    c.upper_unit = store::add(p, up);
    const std::string contact = store::add(p, c);
    const double e0 = 500000, n0 = 6780000;
    const double de[] = {-100, 100, 100, -100}, dn[] = {-100, -100, 100, 100};
    for (int i = 0; i < 4; ++i) {
      auto ll = geo::from_utm(geo::UtmPoint{8, true, e0 + de[i], n0 + dn[i]});
      ASSERT_TRUE(ll.ok()) << ll.error();
      store::ContactPoint pt;
      pt.contact = contact;
      pt.lat = ll->lat;
      pt.lon = ll->lon;
      pt.elevation = 1000 + 0.1 * de[i];
      pt.h_accuracy = 1;
      pt.v_accuracy = 1;
      store::add(p, pt);
    }
  }
  std::string s = "wait 3\nwait-idle\n";
  s += "tap \"Plan\"\nwait 3\n";
  s += "expect \"100 m\"\n";  // the scale bar at first
  s += "expect-not \"50 m\"\n";
  s += "tap \"plan map\"\n";  // the middle of the map
  s += "wait-for \"Westdip contact: 1000 m\"\n";
  s += "pinch 640 500 2\n";
  s += "wait 3\n";
  s += "expect \"50 m\"\n";
  const auto r = gui(path, s);
  ASSERT_EQ(r.status, 0) << r.err;
}
