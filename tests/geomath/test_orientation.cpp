// Orientation vectors and the relations between planes and lines.
// Sources named beside each check. Hand-worked cases use only trigonometry
// that can be done on paper; the relations are the standard ones of
// structural geology textbooks (e.g. Ragan, Structural Geology: An
// Introduction to Geometrical Techniques) — cited from memory.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "geomath/angles.h"
#include "geomath/orientation.h"

using namespace cairn::geo;

namespace {
double azdiff(double a, double b) { return std::abs(azimuth_difference(a, b)); }
}  // namespace

TEST(Orientation, LineVectorCardinalDirections) {
  // ENU frame definition: trend 0 = north (+y), 90 = east (+x); plunge down (-z).
  Vec3 n = line_vector({0, 0}), e = line_vector({90, 0}), d = line_vector({123, 90});
  EXPECT_NEAR(n.y(), 1, 1e-15);
  EXPECT_NEAR(e.x(), 1, 1e-15);
  EXPECT_NEAR(d.z(), -1, 1e-15);
  Line l = line_from_vector(Vec3(1, 1, -std::sqrt(2.0)));  // hand-worked: trend 45, plunge 45
  EXPECT_NEAR(l.trend, 45, 1e-12);
  EXPECT_NEAR(l.plunge, 45, 1e-12);
  // Upward vectors are the same (undirected) line.
  Line u = line_from_vector(Vec3(-1, -1, std::sqrt(2.0)));
  EXPECT_NEAR(u.trend, 45, 1e-12);
}

TEST(Orientation, PoleOfPlaneRightHandRule) {
  // Right-hand rule (common practice): strike 030 dips to 120; pole trends 300, plunges 90-dip.
  Plane p{30, 40};
  EXPECT_NEAR(p.dip_direction(), 120, 1e-12);
  Line pl = pole(p);
  EXPECT_NEAR(pl.trend, 300, 1e-9);
  EXPECT_NEAR(pl.plunge, 50, 1e-9);
  Plane back = plane_from_pole(pl);
  EXPECT_NEAR(azdiff(back.strike, 30), 0, 1e-9);
  EXPECT_NEAR(back.dip, 40, 1e-9);
}

TEST(Orientation, DipAndStrikeVectorsAreOrthogonalAndInPlane) {
  std::mt19937 rng(7);
  std::uniform_real_distribution<double> az(0, 360), dip(0.5, 89.5);
  for (int i = 0; i < 500; ++i) {
    Plane p{az(rng), dip(rng)};
    Vec3 n = plane_normal_up(p), dv = dip_vector(p), sv = strike_vector(p);
    EXPECT_NEAR(n.dot(dv), 0, 1e-12);
    EXPECT_NEAR(n.dot(sv), 0, 1e-12);
    EXPECT_NEAR(dv.dot(sv), 0, 1e-12);
    // Right-hand rule: strike x dip points down the normal's opposite (pole, down).
    EXPECT_NEAR(sv.cross(dv).dot(pole_vector(p)), 1.0, 1e-12);
    Plane q = plane_from_normal(n);
    EXPECT_NEAR(angle_between_planes(p, q), 0, 1e-7);
    EXPECT_NEAR(azdiff(q.strike, p.strike), 0, 1e-7);
  }
}

TEST(Orientation, AngleBetweenPlanesAndLines) {
  // Hand-worked: two vertical planes striking 000 and 060 meet at 60 degrees;
  // a horizontal and a vertical plane at 90; acute angle is reported (0..90).
  EXPECT_NEAR(angle_between_planes({0, 90}, {60, 90}), 60, 1e-9);
  EXPECT_NEAR(angle_between_planes({0, 0}, {200, 90}), 90, 1e-9);
  EXPECT_NEAR(angle_between_planes({0, 90}, {150, 90}), 30, 1e-9);
  // Same plane written with opposite strikes (dip 90) is the same plane.
  EXPECT_NEAR(angle_between_planes({10, 90}, {190, 90}), 0, 1e-9);
  EXPECT_NEAR(angle_between_lines({10, 0}, {190, 0}), 0, 1e-9);
  EXPECT_NEAR(angle_between_lines({0, 0}, {0, 90}), 90, 1e-9);
  EXPECT_NEAR(angle_between_lines({0, 30}, {0, 50}), 20, 1e-9);
}

TEST(Orientation, IntersectionOfPlanes) {
  // Hand-worked: two vertical planes meet in a vertical line.
  auto l = intersection_line({0, 90}, {90, 90});
  ASSERT_TRUE(l.ok());
  EXPECT_NEAR(l->plunge, 90, 1e-9);
  // A horizontal plane and a plane striking 040: the line is the strike line (plunge 0).
  auto s = intersection_line({0, 0}, {40, 35});
  ASSERT_TRUE(s.ok());
  EXPECT_NEAR(s->plunge, 0, 1e-9);
  EXPECT_NEAR(std::fmod(s->trend, 180.0), 40, 1e-9);
  // Parallel planes have no line of intersection: an explicit refusal.
  auto none = intersection_line({10, 20}, {10, 20});
  EXPECT_FALSE(none.ok());
  EXPECT_NE(none.error().find("parallel"), std::string::npos);
}

TEST(Orientation, PlaneThroughTwoLines) {
  // Lines lying in a known plane recover it.
  Plane p{75, 33};
  Line a = line_from_rake(p, 20), b = line_from_rake(p, 130);
  auto q = plane_through_lines(a, b);
  ASSERT_TRUE(q.ok());
  EXPECT_NEAR(angle_between_planes(p, *q), 0, 1e-9);
  EXPECT_FALSE(plane_through_lines(a, a).ok());
  // Rake round trip: rake 90 is the dip line (definition of rake).
  Line dl = line_from_rake(p, 90);
  EXPECT_NEAR(dl.trend, p.dip_direction(), 1e-9);
  EXPECT_NEAR(dl.plunge, p.dip, 1e-9);
  EXPECT_NEAR(rake_of_line(p, a), 20, 1e-9);
  EXPECT_NEAR(rake_of_line(p, b), 130, 1e-9);
}

TEST(Orientation, ApparentDipRelation) {
  // tan(alpha) = tan(delta) * |cos(beta)|, beta the angle between the section and the
  // dip direction (standard textbook relation; value from memory).
  Plane p{0, 40};  // dips 40 due east
  EXPECT_NEAR(apparent_dip(p, 90), 40, 1e-12);
  EXPECT_NEAR(apparent_dip(p, 0), 0, 1e-12);
  EXPECT_NEAR(apparent_dip(p, 270), 40, 1e-12);
  const double expected = rad2deg(std::atan(std::tan(deg2rad(40)) * std::cos(deg2rad(30))));
  EXPECT_NEAR(apparent_dip(p, 120), expected, 1e-12);
  // An independent check from the plane's vectors: the plunge of the line in the plane
  // whose trend is the section azimuth.
  std::mt19937 rng(3);
  std::uniform_real_distribution<double> az(0, 360), dip(1, 89);
  for (int i = 0; i < 200; ++i) {
    Plane q{az(rng), dip(rng)};
    double sec = az(rng);
    // Line in the plane within the vertical section: normal x section-normal.
    Vec3 secn(std::cos(deg2rad(sec)), -std::sin(deg2rad(sec)), 0);
    Line in = line_from_vector(plane_normal_up(q).cross(secn));
    EXPECT_NEAR(apparent_dip(q, sec), in.plunge, 1e-7);
  }
}

TEST(Orientation, TrueDipFromTwoApparentDips) {
  // Inverse of the relation above: apparent dips computed from a known plane give it back.
  Plane p{130, 55};
  // The apparent dip is downward in the section direction only on the dipping side;
  // choose azimuths on that side (within 90 of the dip direction 220).
  auto r = plane_from_apparent_dips(200, apparent_dip(p, 200), 260, apparent_dip(p, 260));
  ASSERT_TRUE(r.ok());
  EXPECT_NEAR(angle_between_planes(p, *r), 0, 1e-9);
  EXPECT_NEAR(r->dip, 55, 1e-9);
  EXPECT_FALSE(plane_from_apparent_dips(10, 20, 190, 20).ok());  // same section, both ways
}
