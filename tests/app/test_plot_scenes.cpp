// Scenes shared by the UI and the report, read back through a RecordingCanvas.
//
// Outside references:
//  - Snyder, J. P. (1987), Map Projections - A Working Manual, USGS Professional
//    Paper 1395: polar Lambert azimuthal equal-area rho = 2R sin(chi/2) and polar
//    stereographic rho = 2R tan(chi/2) (chi the angle from the pole); with the
//    primitive of radius 1, a direction 90 - plunge from the vertical lies at
//    sqrt(2) sin((90 - plunge)/2) (equal area) or tan((90 - plunge)/2) (equal angle)
//    from the centre: 0 for plunge 90, 1 for plunge 0.
//  - Right-hand rule: the dip direction is the strike + 90 degrees (common practice,
//    e.g. Ragan, Structural Geology: An Introduction to Geometrical Techniques);
//    the pole trends opposite the dip direction and plunges 90 - dip.
//  - FGDC-STD-013-2006 (FGDC Digital Cartographic Standard for Geologic Map
//    Symbolization), bedding symbols: the strike line runs along the strike and the
//    dip tick and dip value stand on the dip-direction side; vertical beds carry the
//    tick on both sides and no value; horizontal beds a circle with a cross.
//  - Meridian convergence: grid azimuth = true azimuth - convergence, where the
//    convergence is the azimuth of grid north from true north (Snyder 1987, UTM).
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "app/plot/net_scene.h"
#include "app/plot/plan_scene.h"
#include "app/plot/recording_canvas.h"

using namespace cairn::plot;

namespace {

constexpr double kPi = 3.14159265358979323846;
double rad(double d) { return d * kPi / 180; }

bool same(Rgba a, Rgba b) { return a.r == b.r && a.g == b.g && a.b == b.b && a.a == b.a; }

// The primitive circle: the largest stroked circle drawn.
const DrawOp* primitive(const RecordingCanvas& c) {
  const DrawOp* best = nullptr;
  for (const auto& op : c.ops())
    if (op.kind == DrawOp::Circle && op.width > 0 && (!best || op.size > best->size)) best = &op;
  return best;
}

// The filled marker drawn in colour `ink` (each pole gets its own colour below).
const DrawOp* marker_in(const RecordingCanvas& c, Rgba ink) {
  for (const auto& op : c.ops())
    if (op.kind == DrawOp::Marker && op.filled && same(op.colour, ink)) return &op;
  return nullptr;
}

// Azimuth (degrees clockwise from up) of the canvas vector (dx, dy), y down.
double page_azimuth(double dx, double dy) {
  double a = std::atan2(dx, -dy) * 180 / kPi;
  return a < 0 ? a + 360 : a;
}

double axial_difference(double a, double b) {  // for undirected lines, 0..90
  double d = std::fmod(std::fabs(a - b), 180.0);
  return std::min(d, 180 - d);
}

}  // namespace

class NetPoles : public ::testing::TestWithParam<cairn::geo::NetKind> {};

TEST_P(NetPoles, PlungeNinetyAtTheCentreAndZeroOnThePrimitive) {
  const auto kind = GetParam();
  NetData d;
  const Rgba c_flat{10, 0, 0, 255}, c_ns{20, 0, 0, 255}, c_ew{30, 0, 0, 255}, c_60{40, 0, 0, 255};
  d.planes.push_back({cairn::geo::Plane{0, 0}, c_flat, Shape::Circle});  // pole plunges 90
  d.planes.push_back({cairn::geo::Plane{0, 90}, c_ns, Shape::Circle});   // pole 270/00: west
  d.planes.push_back({cairn::geo::Plane{90, 90}, c_ew, Shape::Circle});  // pole 000/00: north
  d.planes.push_back({cairn::geo::Plane{0, 60}, c_60, Shape::Circle});   // pole 270/30
  NetOptions o;
  o.kind = kind;
  o.legend = false;
  o.statistics = false;
  o.contours = false;
  RecordingCanvas c;
  draw_net(c, Rect{20, 30, 300, 340}, d, o);

  const DrawOp* prim = primitive(c);
  ASSERT_TRUE(prim);
  const double cx = prim->pts[0].x, cy = prim->pts[0].y, R = prim->size;
  ASSERT_GT(R, 100);
  const double tol = 1e-9 * R;

  const DrawOp* flat = marker_in(c, c_flat);
  ASSERT_TRUE(flat);
  EXPECT_NEAR(flat->pts[0].x, cx, tol);
  EXPECT_NEAR(flat->pts[0].y, cy, tol);

  const DrawOp* ns = marker_in(c, c_ns);
  ASSERT_TRUE(ns);
  EXPECT_NEAR(ns->pts[0].x, cx - R, tol) << "pole trending 270 lies on the primitive to the west";
  EXPECT_NEAR(ns->pts[0].y, cy, tol);

  const DrawOp* ew = marker_in(c, c_ew);
  ASSERT_TRUE(ew);
  EXPECT_NEAR(ew->pts[0].x, cx, tol);
  EXPECT_NEAR(ew->pts[0].y, cy - R, tol) << "north is up on the canvas";

  // Snyder (1987): plunge 30, 60 degrees from the vertical.
  const double r60 = kind == cairn::geo::NetKind::EqualArea ? std::sqrt(2.0) * std::sin(rad(30)) : std::tan(rad(30));
  const DrawOp* p60 = marker_in(c, c_60);
  ASSERT_TRUE(p60);
  EXPECT_NEAR(p60->pts[0].x, cx - r60 * R, 1e-9 * R);
  EXPECT_NEAR(p60->pts[0].y, cy, tol);
}

INSTANTIATE_TEST_SUITE_P(BothNets, NetPoles,
                         ::testing::Values(cairn::geo::NetKind::EqualArea, cairn::geo::NetKind::EqualAngle),
                         [](const ::testing::TestParamInfo<cairn::geo::NetKind>& i) {
                           return std::string(i.param == cairn::geo::NetKind::EqualArea ? "EqualArea" : "EqualAngle");
                         });

// A season's poles: at most max_pole_markers markers are drawn, the last (newest)
// ones, and every pole still counts in the statistics (a display limit, common
// practice with no published source; the mean itself is checked against
// Fisher (1953) in tests/geomath).
TEST(NetScene, MarkerLimitDrawsTheNewestPolesAndCountsThemAll) {
  NetData d;
  for (int i = 0; i < 5; ++i)
    d.planes.push_back({cairn::geo::Plane{10.0 * i, 30.0 + 5 * i}, Rgba{static_cast<unsigned char>(10 + i), 0, 0, 255},
                        Shape::Circle});
  NetOptions o;
  o.legend = false;
  o.statistics = true;
  RecordingCanvas all, limited;
  const NetStatistics s_all = draw_net(all, Rect{0, 0, 300, 300}, d, o);
  o.max_pole_markers = 2;
  const NetStatistics s_lim = draw_net(limited, Rect{0, 0, 300, 300}, d, o);
  for (int i = 0; i < 5; ++i) {
    const Rgba ink{static_cast<unsigned char>(10 + i), 0, 0, 255};
    EXPECT_TRUE(marker_in(all, ink)) << "pole " << i << " without a limit";
    EXPECT_EQ(marker_in(limited, ink) != nullptr, i >= 3) << "pole " << i << " with a limit of 2";
  }
  EXPECT_EQ(s_lim.poles, 5);
  ASSERT_TRUE(s_all.pole_mean && s_lim.pole_mean);
  EXPECT_EQ(s_lim.pole_mean->mean.trend, s_all.pole_mean->mean.trend);
  EXPECT_EQ(s_lim.pole_mean->mean.plunge, s_all.pole_mean->mean.plunge);
  // Without statistics shown the means are not computed; the count still is.
  o.statistics = false;
  RecordingCanvas plain;
  const NetStatistics s_plain = draw_net(plain, Rect{0, 0, 300, 300}, d, o);
  EXPECT_EQ(s_plain.poles, 5);
  EXPECT_FALSE(s_plain.pole_mean);
}

TEST(NetScene, FitIsDrawnWithItsConeAroundThePole) {
  // A fitted plane 000/60 with a 10 degree cone: the cone is the small circle of
  // 10 degrees about the pole 270/30, so every point of it is 10 degrees from the
  // pole (checked by inverting the projection with Snyder's equal-area formula).
  NetData d;
  NetFit f;
  f.plane = {0, 60};
  f.cone95 = 10;
  f.colour = {1, 2, 3, 255};
  d.fits.push_back(f);
  NetOptions o;
  o.legend = false;
  RecordingCanvas c;
  draw_net(c, Rect{0, 0, 400, 400}, d, o);
  const DrawOp* prim = primitive(c);
  ASSERT_TRUE(prim);
  const double cx = prim->pts[0].x, cy = prim->pts[0].y, R = prim->size;
  // Pole 270/30 as a unit vector (east, north, up).
  const double pe = -std::cos(rad(30)), pn = 0, pu = -std::sin(rad(30));
  int cone_points = 0;
  for (const auto& op : c.ops()) {
    if (op.kind != DrawOp::Polyline || !same(op.colour, f.colour)) continue;
    for (const auto& p : op.pts) {
      const double x = (p.x - cx) / R, y = (cy - p.y) / R, r = std::hypot(x, y);
      if (r < 1e-9) continue;
      // Equal-area inverse (Snyder 1987): angle from the downward vertical.
      const double theta = 2 * std::asin(std::min(1.0, r / std::sqrt(2.0)));
      const double ve = std::sin(theta) * x / r, vn = std::sin(theta) * y / r, vu = -std::cos(theta);
      const double ang = std::acos(std::min(1.0, std::fabs(ve * pe + vn * pn + vu * pu))) * 180 / kPi;
      if (std::fabs(ang - 10) < 1e-6) ++cone_points;
    }
  }
  EXPECT_GT(cone_points, 100) << "the 10 degree cone was not drawn";
}

// ---------------------------------------------------------------- FGDC symbols

namespace {

struct Symbol {
  const DrawOp* strike = nullptr;    // the strike line
  std::vector<const DrawOp*> marks;  // everything else that is a stroke or fill
  const DrawOp* label = nullptr;
  const DrawOp* ring = nullptr;
};

Symbol read_symbol(const RecordingCanvas& c, Pt at, double length) {
  Symbol s;
  for (const auto& op : c.ops()) {
    if (op.kind == DrawOp::Text) s.label = &op;
    if (op.kind == DrawOp::Circle) s.ring = &op;
    if (op.kind != DrawOp::Polyline && op.kind != DrawOp::Fill) continue;
    if (op.kind == DrawOp::Polyline && op.pts.size() == 2) {
      const Pt a = op.pts[0], b = op.pts[1];
      const bool centred = std::hypot((a.x + b.x) / 2 - at.x, (a.y + b.y) / 2 - at.y) < 1e-9;
      if (centred && std::fabs(std::hypot(b.x - a.x, b.y - a.y) - length) < 1e-9 && !s.strike) {
        s.strike = &op;
        continue;
      }
    }
    s.marks.push_back(&op);
  }
  return s;
}

// Signed distance of p from `at` along the azimuth `az` on the page.
double along(Pt at, Pt p, double az) { return (p.x - at.x) * std::sin(rad(az)) - (p.y - at.y) * std::cos(rad(az)); }

}  // namespace

TEST(FgdcSymbols, StrikeLineAlongStrikeAndTickOnTheDipSide) {
  const Pt at{200, 150};
  const double length = 30;
  for (double strike : {0.0, 30.0, 90.0, 135.0, 200.0, 315.0, 359.0}) {
    RecordingCanvas c;
    draw_attitude_symbol(c, at, strike, 40, AttitudeSymbol::Bedding, length, kInk, 1, 10);
    const Symbol s = read_symbol(c, at, length);
    ASSERT_TRUE(s.strike) << strike;
    const auto& p = s.strike->pts;
    EXPECT_LT(axial_difference(page_azimuth(p[1].x - p[0].x, p[1].y - p[0].y), strike), 1e-9) << strike;
    // The tick: a stroke from the place out to the dip-direction side (RHR: strike + 90).
    ASSERT_EQ(s.marks.size(), 1u) << strike;
    const auto& t = s.marks[0]->pts;
    ASSERT_EQ(t.size(), 2u);
    const Pt far = std::hypot(t[0].x - at.x, t[0].y - at.y) > std::hypot(t[1].x - at.x, t[1].y - at.y) ? t[0] : t[1];
    const double tick_az = page_azimuth(far.x - at.x, far.y - at.y);
    EXPECT_LT(std::fabs(std::remainder(tick_az - (strike + 90), 360.0)), 1e-9) << strike;
    // The dip value, on the same side.
    ASSERT_TRUE(s.label) << strike;
    EXPECT_EQ(s.label->text, "40");
    const Pt label_mid{s.label->pts[0].x, s.label->pts[0].y + s.label->size / 2};
    EXPECT_GT(along(at, label_mid, strike + 90), length / 4) << strike;
  }
}

TEST(FgdcSymbols, OverturnedHooksOnTheDipSide) {
  const Pt at{100, 100};
  RecordingCanvas c;
  draw_attitude_symbol(c, at, 60, 70, AttitudeSymbol::BeddingOverturned, 30, kInk, 1, 10);
  const Symbol s = read_symbol(c, at, 30);
  ASSERT_TRUE(s.strike);
  ASSERT_EQ(s.marks.size(), 1u);
  const auto& hook = s.marks[0]->pts;
  EXPECT_GT(hook.size(), 3u) << "a hook, not a straight tick";
  double reach = 0;
  for (const auto& p : hook) {
    EXPECT_GT(along(at, p, 150), -1e-9) << "every part of the hook stays on the dip side";
    reach = std::max(reach, along(at, p, 150));
  }
  EXPECT_GT(reach, 30 * 0.25);
  ASSERT_TRUE(s.label);
  EXPECT_EQ(s.label->text, "70");
}

TEST(FgdcSymbols, VerticalHasTicksOnBothSidesAndNoValue) {
  const Pt at{100, 100};
  RecordingCanvas c;
  draw_attitude_symbol(c, at, 20, 90, AttitudeSymbol::Bedding, 30, kInk, 1, 10);
  const Symbol s = read_symbol(c, at, 30);
  ASSERT_TRUE(s.strike);
  EXPECT_LT(axial_difference(
                page_azimuth(s.strike->pts[1].x - s.strike->pts[0].x, s.strike->pts[1].y - s.strike->pts[0].y), 20),
            1e-9);
  double lo = 0, hi = 0;
  for (const auto* m : s.marks)
    for (const auto& p : m->pts) lo = std::min(lo, along(at, p, 110)), hi = std::max(hi, along(at, p, 110));
  EXPECT_GT(hi, 5);
  EXPECT_LT(lo, -5);
  EXPECT_FALSE(s.label);
}

TEST(FgdcSymbols, HorizontalIsACircleWithACross) {
  const Pt at{100, 100};
  RecordingCanvas c;
  draw_attitude_symbol(c, at, 0, 0, AttitudeSymbol::Bedding, 30, kInk, 1, 10);
  const Symbol s = read_symbol(c, at, 30);
  ASSERT_TRUE(s.ring);
  EXPECT_NEAR(s.ring->pts[0].x, at.x, 1e-9);
  EXPECT_NEAR(s.ring->pts[0].y, at.y, 1e-9);
  EXPECT_EQ(s.marks.size(), 2u) << "the two arms of the cross";
  EXPECT_FALSE(s.label);
}

TEST(FgdcSymbols, FoliationTriangleOnTheDipSide) {
  const Pt at{100, 100};
  RecordingCanvas c;
  draw_attitude_symbol(c, at, 250, 55, AttitudeSymbol::Foliation, 30, kInk, 1, 10);
  const DrawOp* fill = nullptr;
  for (const auto& op : c.ops())
    if (op.kind == DrawOp::Fill) fill = &op;
  ASSERT_TRUE(fill);
  Pt centroid{0, 0};
  for (const auto& p : fill->pts) centroid.x += p.x / fill->pts.size(), centroid.y += p.y / fill->pts.size();
  EXPECT_GT(along(at, centroid, 340), 1) << "dip direction 250 + 90 = 340";
  EXPECT_NEAR(along(at, centroid, 250), 0, 1e-9) << "centred on the strike line";
}

TEST(FgdcSymbols, TrueStrikeTurnedOntoTheGrid) {
  // Convergence 2 (grid north lies 2 degrees east of true north): a true strike of 030
  // is 028 on the grid.
  EXPECT_NEAR(grid_azimuth(30, 2), 28, 1e-12);
  EXPECT_NEAR(grid_azimuth(1, 2), 359, 1e-12);
  EXPECT_NEAR(grid_azimuth(359, -2), 1, 1e-12);
}
