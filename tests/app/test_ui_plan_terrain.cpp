// Source: the expected trace is worked by hand (common practice: a plane meets
// flat ground along its structure contour at the ground's height).
// The Plan with a terrain: a tap gives the nearest stretch of each contact's
// predicted outcrop trace ("Where next on the ground").
//
// The contact's four points sit at the corners of a 200 m square in UTM zone 8N
// on the plane z = 1000 + 0.1 (E - E0); the terrain is flat at 1000 m. The plane
// meets that ground along the straight line E = E0 (solved by hand), which runs
// through the middle of the map (the Plan centres the data's bounds), so a tap
// there finds the trace under the finger: "0 m".
#include <cmath>
#include <limits>

#include "geomath/geodesy.h"
#include "storage/repository.h"
#include "storage/terrain.h"
#include "tests/app/ui_test_support.h"

using namespace cairn;
using cairn::ui_test::UiTest;

TEST_F(UiTest, TapOnThePlanGivesTheNearestPredictedTrace) {
  const std::string path = file("ground.cairn");
  const double e0 = 500000, n0 = 6780000;
  {
    store::Project p =
        store::Project::create(path, store::NewProject{"Ground", "8N", store::North::True, 0.0}, quiet());
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
    geo::TerrainGrid g;
    g.nx = g.ny = 101;
    g.cell = 10;
    g.west = e0 - 505;
    g.north = n0 + 505;
    g.z.assign(static_cast<std::size_t>(g.nx) * g.ny, 1000.0f);
    store::store_terrain(p, g, 32608, "flat", 1.0);
  }
  std::string s = "wait 3\nwait-idle\n";
  s += "tap \"Plan\"\nwait 3\n";
  s += "tap \"plan map\"\n";
  s += "wait-for \"Westdip contact trace: \"\n";
  s += "expect \"Westdip contact trace: 0 m\"\n";  // the trace runs through the tapped middle
  const auto r = gui(path, s);
  ASSERT_EQ(r.status, 0) << r.err;
}
