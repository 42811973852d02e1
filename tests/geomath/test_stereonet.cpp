// Tests of the lower-hemisphere nets (geomath/stereonet.h).
//
// Outside sources:
//  - Snyder, J. P. (1987). Map Projections - A Working Manual. USGS Professional
//    Paper 1395: polar Lambert azimuthal equal-area rho = 2R sin(chi/2), polar
//    stereographic rho = 2R tan(chi/2) (chi the colatitude), x = rho sin(lon),
//    y = rho cos(lon) for the south polar aspect; the equal-area property of the
//    first and the conformality (circles map to circles, angles kept) of the second.
//  - Spherical geometry: solid angle of a band between colatitudes t1 and t2 is
//    2 pi (cos t1 - cos t2).
// Expected values are evaluated here with trigonometry from those formulas, not
// with the (trigonometry-free) forms the implementation uses.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "geomath/stereonet.h"
#include "tests/geomath/net_test_support.h"

namespace cairn::geo {
namespace {

using namespace test;
constexpr double kPiT = test::kPi;

// Snyder (1987) polar aspect, scaled to a unit primitive circle.
NetPoint snyder(NetKind kind, double trend, double plunge) {
  const double chi = rad(90.0 - plunge);  // colatitude from the downward vertical
  const double rho =
      kind == NetKind::EqualArea ? 2.0 * (1.0 / std::sqrt(2.0)) * std::sin(chi / 2) : 2.0 * 0.5 * std::tan(chi / 2);
  return {rho * std::sin(rad(trend)), rho * std::cos(rad(trend))};
}

double radius(const NetPoint& p) { return std::hypot(p[0], p[1]); }

const NetKind kKinds[] = {NetKind::EqualArea, NetKind::EqualAngle};

TEST(Stereonet, VerticalLineAtCentreHorizontalOnPrimitive) {
  // Snyder (1987): rho = 0 at the projection's pole, and the hemisphere's rim (chi = 90)
  // at rho = 2R sin 45 = 1 (equal-area, R = 1/sqrt2) or 2R tan 45 = 1 (equal-angle, R = 1/2).
  for (NetKind k : kKinds) {
    const NetPoint c = project(k, Line{123.0, 90.0});
    EXPECT_NEAR(c[0], 0.0, 1e-12);
    EXPECT_NEAR(c[1], 0.0, 1e-12);
    for (double trend : {0.0, 37.0, 90.0, 181.0, 300.0}) {
      const NetPoint p = project(k, Line{trend, 0.0});
      EXPECT_NEAR(radius(p), 1.0, 1e-12);
      EXPECT_NEAR(p[0], std::sin(rad(trend)), 1e-12);  // x east
      EXPECT_NEAR(p[1], std::cos(rad(trend)), 1e-12);  // y north
    }
  }
}

TEST(Stereonet, MatchesSnyderPolarFormulas) {
  std::mt19937_64 rng(7);
  for (NetKind k : kKinds) {
    for (int i = 0; i < 500; ++i) {
      const double trend = 360.0 * uniform(rng), plunge = 90.0 * uniform(rng);
      const NetPoint got = project(k, Line{trend, plunge});
      const NetPoint want = snyder(k, trend, plunge);
      EXPECT_NEAR(got[0], want[0], 1e-12);
      EXPECT_NEAR(got[1], want[1], 1e-12);
      EXPECT_NEAR(net_radius(k, 90.0 - plunge), radius(want), 1e-12);
    }
  }
}

TEST(Stereonet, UpwardVectorIsDrawnByItsAntipode) {
  for (NetKind k : kKinds) {
    const Vec3 down = dir(250.0, 35.0);
    const NetPoint a = project_vector(k, -down * 3.0);
    const NetPoint b = snyder(k, 250.0, 35.0);
    EXPECT_NEAR(a[0], b[0], 1e-12);
    EXPECT_NEAR(a[1], b[1], 1e-12);
  }
}

TEST(Stereonet, InverseProjectionRoundTrip) {
  std::mt19937_64 rng(11);
  for (NetKind k : kKinds) {
    for (int i = 0; i < 500; ++i) {
      const double trend = 360.0 * uniform(rng), plunge = 89.0 * uniform(rng);
      const NetPoint p = snyder(k, trend, plunge);
      auto v = unproject_vector(k, p);
      ASSERT_TRUE(v.ok()) << v.error();
      EXPECT_NEAR((*v - dir(trend, plunge)).norm(), 0.0, 1e-12);
      auto l = unproject(k, p);
      ASSERT_TRUE(l.ok());
      EXPECT_NEAR(l->plunge, plunge, 1e-9);
      EXPECT_NEAR(std::remainder(l->trend - trend, 360.0), 0.0, 1e-9);
    }
  }
}

TEST(Stereonet, InverseProjectionRejectsPointsOutsideThePrimitive) {
  for (NetKind k : kKinds) {
    auto v = unproject_vector(k, NetPoint{0.9, 0.9});
    ASSERT_FALSE(v.ok());
    EXPECT_NE(v.error().find("outside the primitive"), std::string::npos) << v.error();
    EXPECT_FALSE(unproject(k, NetPoint{std::nan(""), 0.0}).ok());
    EXPECT_TRUE(unproject(k, NetPoint{1.0, 0.0}).ok());  // on the primitive
  }
}

TEST(Stereonet, EqualAreaBandsOfEqualSolidAngleHaveEqualAreas) {
  // Split the lower hemisphere into bands of equal solid angle: cos(chi_k) = 1 - k/K
  // (solid angle 2 pi (cos chi1 - cos chi2)). Each band's annulus on the net must take
  // 1/K of the net's area pi (the primitive has radius 1).
  const int K = 12;
  for (int k = 0; k < K; ++k) {
    const double chi1 = std::acos(1.0 - double(k) / K), chi2 = std::acos(1.0 - double(k + 1) / K);
    const double r1 = radius(project(NetKind::EqualArea, Line{40.0, 90.0 - deg(chi1)}));
    const double r2 = radius(project(NetKind::EqualArea, Line{40.0, 90.0 - deg(chi2)}));
    const double area = kPiT * (r2 * r2 - r1 * r1);
    EXPECT_NEAR(area / (kPiT / K), 1.0, 0.005) << "band " << k;
  }
  // The same bands on the equal-angle net are not equal: the test can tell the nets apart.
  const double inner = std::pow(radius(project(NetKind::EqualAngle, Line{0, 90.0 - deg(std::acos(1.0 - 1.0 / K))})), 2);
  const double outer = 1.0 - std::pow(radius(project(NetKind::EqualAngle, Line{0, 90.0 - deg(std::acos(1.0 / K))})), 2);
  EXPECT_GT(std::abs(inner / outer - 1.0), 0.5);
}

// Shoelace area of the net image of the spherical rectangle
// trend in [a0, a1], cos(chi) in [c0, c1], its boundary sampled densely.
double projected_area(NetKind k, double a0, double a1, double c0, double c1) {
  const int n = 400;
  std::vector<NetPoint> ring;
  auto at = [&](double az, double c) { return project(k, Line{az, 90.0 - deg(std::acos(c))}); };
  for (int i = 0; i < n; ++i) ring.push_back(at(a0 + (a1 - a0) * i / n, c0));
  for (int i = 0; i < n; ++i) ring.push_back(at(a1, c0 + (c1 - c0) * i / n));
  for (int i = 0; i < n; ++i) ring.push_back(at(a1 - (a1 - a0) * i / n, c1));
  for (int i = 0; i < n; ++i) ring.push_back(at(a0, c1 - (c1 - c0) * i / n));
  double s = 0;
  for (std::size_t i = 0; i < ring.size(); ++i) {
    const NetPoint& p = ring[i];
    const NetPoint& q = ring[(i + 1) % ring.size()];
    s += p[0] * q[1] - q[0] * p[1];
  }
  return std::abs(s) / 2.0;
}

TEST(Stereonet, EqualAreaRandomCellsKeepTheirShareOfTheArea) {
  // A cell [a0, a1] x [c0, c1] in (azimuth, cos chi) has solid angle (a1 - a0)(c1 - c0)
  // (radians), a fraction of the hemisphere's 2 pi; its image must take that fraction of
  // the net's area pi.
  std::mt19937_64 rng(3);
  for (int t = 0; t < 200; ++t) {
    const double a0 = 360.0 * uniform(rng), da = 5.0 + 80.0 * uniform(rng);
    const double c0 = 0.9 * uniform(rng), dc = 0.02 + (1.0 - c0 - 0.02) * uniform(rng);
    const double want = kPiT * (rad(da) * dc) / (2.0 * kPiT);
    const double got = projected_area(NetKind::EqualArea, a0, a0 + da, c0, c0 + dc);
    EXPECT_NEAR(got / want, 1.0, 0.005) << "cell " << t;
  }
}

// Centre and radius of the circle through three points.
void circumcircle(const NetPoint& a, const NetPoint& b, const NetPoint& c, NetPoint& centre, double& r) {
  const double d = 2 * (a[0] * (b[1] - c[1]) + b[0] * (c[1] - a[1]) + c[0] * (a[1] - b[1]));
  const double a2 = a[0] * a[0] + a[1] * a[1], b2 = b[0] * b[0] + b[1] * b[1], c2 = c[0] * c[0] + c[1] * c[1];
  centre = {(a2 * (b[1] - c[1]) + b2 * (c[1] - a[1]) + c2 * (a[1] - b[1])) / d,
            (a2 * (c[0] - b[0]) + b2 * (a[0] - c[0]) + c2 * (b[0] - a[0])) / d};
  r = std::hypot(a[0] - centre[0], a[1] - centre[1]);
}

// Largest relative departure of the points from the circle through three of them.
double circle_misfit(const std::vector<NetPoint>& pts) {
  NetPoint centre;
  double r;
  const std::size_t n = pts.size() - 1;  // closed: last == first
  circumcircle(pts[0], pts[n / 3], pts[2 * n / 3], centre, r);
  double worst = 0;
  for (const NetPoint& p : pts) {
    worst = std::max(worst, std::abs(std::hypot(p[0] - centre[0], p[1] - centre[1]) / r - 1.0));
  }
  return worst;
}

TEST(Stereonet, EqualAngleMapsSmallCirclesToCircles) {
  // Snyder (1987): the stereographic projection is conformal and maps circles on the
  // sphere to circles on the plane.
  std::mt19937_64 rng(5);
  int tried = 0;
  while (tried < 100) {
    const double trend = 360.0 * uniform(rng), plunge = 90.0 * uniform(rng);
    const double alpha = 1.0 + 40.0 * uniform(rng);
    if (plunge - alpha < 2.0) continue;  // keep the whole cone below the horizontal
    ++tried;
    auto sc = small_circle(NetKind::EqualAngle, Line{trend, plunge}, alpha, 720);
    ASSERT_TRUE(sc.ok());
    ASSERT_EQ(sc->size(), 1u);
    ASSERT_TRUE((*sc)[0].closed());
    EXPECT_LT(circle_misfit((*sc)[0].pts), 1e-9) << trend << "/" << plunge << " a=" << alpha;
  }
  // On the equal-area net an inclined cone is not a circle: the check can fail.
  auto ea = small_circle(NetKind::EqualArea, Line{30.0, 45.0}, 30.0, 720);
  ASSERT_TRUE(ea.ok());
  EXPECT_GT(circle_misfit((*ea)[0].pts), 1e-3);
}

TEST(Stereonet, EqualAngleKeepsAnglesBetweenGreatCircles) {
  // Conformality (Snyder 1987): two great circles cross on the net at the angle between
  // their planes. Tangents on the sphere at the intersection L: n x L.
  std::mt19937_64 rng(9);
  for (int t = 0; t < 100; ++t) {
    const Vec3 n1 = dir(360 * uniform(rng), 90 * uniform(rng));
    const Vec3 n2 = dir(360 * uniform(rng), 90 * uniform(rng));
    Vec3 L = n1.cross(n2);
    if (L.norm() < 0.2) continue;
    L.normalize();
    if (L.z() > 0) L = -L;
    if (L.z() > -0.05) continue;  // stay clear of the primitive
    const Vec3 t1 = n1.cross(L).normalized(), t2 = n2.cross(L).normalized();
    const double want = deg(std::acos(std::abs(t1.dot(t2))));
    const double h = 1e-6;
    auto tangent = [&](const Vec3& tv) {
      const NetPoint a = project_vector(NetKind::EqualAngle, (L + h * tv).normalized());
      const NetPoint b = project_vector(NetKind::EqualAngle, (L - h * tv).normalized());
      return std::array<double, 2>{a[0] - b[0], a[1] - b[1]};
    };
    const auto u = tangent(t1), w = tangent(t2);
    const double got =
        deg(std::acos(std::abs(u[0] * w[0] + u[1] * w[1]) / (std::hypot(u[0], u[1]) * std::hypot(w[0], w[1]))));
    EXPECT_NEAR(got, want, 1e-4);
  }
}

TEST(Stereonet, GreatCirclePointsLieInThePlane) {
  const Plane planes[] = {{30, 40}, {0, 90}, {215.5, 12}, {100, 0}, {359, 89}};
  for (NetKind k : kKinds) {
    for (const Plane& p : planes) {
      const NetPolyline gc = great_circle(k, p, 360);
      ASSERT_EQ(gc.pts.size(), 181u);
      // Pole written out: trend = dip direction + 180, plunge = 90 - dip.
      const Vec3 pole = dir(p.strike + 90.0 + 180.0, 90.0 - p.dip);
      for (const NetPoint& q : gc.pts) {
        auto v = unproject_vector(k, q);
        ASSERT_TRUE(v.ok()) << v.error();
        EXPECT_NEAR(v->dot(pole), 0.0, 1e-9);
      }
      // Ends on the primitive at the strike and its opposite; middle at the dip line.
      const NetPoint s0 = snyder(k, p.strike, 0), s1 = snyder(k, p.strike + 180, 0);
      EXPECT_NEAR(gc.pts.front()[0], s0[0], 1e-12);
      EXPECT_NEAR(gc.pts.front()[1], s0[1], 1e-12);
      EXPECT_NEAR(gc.pts.back()[0], s1[0], 1e-12);
      EXPECT_NEAR(gc.pts.back()[1], s1[1], 1e-12);
      const NetPoint mid = snyder(k, p.strike + 90, p.dip);
      EXPECT_NEAR(gc.pts[90][0], mid[0], 1e-12);
      EXPECT_NEAR(gc.pts[90][1], mid[1], 1e-12);
    }
  }
}

TEST(Stereonet, HorizontalPlaneIsThePrimitive) {
  for (NetKind k : kKinds) {
    for (const NetPoint& q : great_circle(k, Plane{70, 0}).pts) EXPECT_NEAR(radius(q), 1.0, 1e-12);
  }
  const NetPolyline prim = primitive_circle(100);
  EXPECT_TRUE(prim.closed());
  EXPECT_EQ(prim.pts.size(), 101u);
  for (const NetPoint& q : prim.pts) EXPECT_NEAR(radius(q), 1.0, 1e-12);
}

TEST(Stereonet, SmallCirclePointsAreAtTheHalfAngleFromTheAxis) {
  std::mt19937_64 rng(13);
  for (NetKind k : kKinds) {
    for (int t = 0; t < 200; ++t) {
      const double trend = 360 * uniform(rng), plunge = 90 * uniform(rng);
      const double alpha = 90 * uniform(rng);
      auto sc = small_circle(k, Line{trend, plunge}, alpha, 180);
      ASSERT_TRUE(sc.ok());
      const Vec3 a = dir(trend, plunge);
      for (const NetPolyline& pl : *sc) {
        ASSERT_GE(pl.pts.size(), 2u);
        for (const NetPoint& q : pl.pts) {
          auto v = unproject_vector(k, q);
          ASSERT_TRUE(v.ok()) << v.error();
          // Axial: the upper part is drawn by antipodes.
          EXPECT_NEAR(deg(std::acos(std::min(1.0, std::abs(v->dot(a))))), alpha, 1e-6);
        }
        if (!pl.closed()) {  // open pieces end on the primitive
          EXPECT_NEAR(radius(pl.pts.front()), 1.0, 1e-9);
          EXPECT_NEAR(radius(pl.pts.back()), 1.0, 1e-9);
        }
      }
    }
  }
}

TEST(Stereonet, SmallCircleThroughTheHorizontalWrapsByAntipodes) {
  // A cone about a horizontal axis (trend 90) of half-angle 30: on a lower-hemisphere
  // net two arcs, one about trend 90 and one about trend 270, each ending on the primitive
  // at azimuths 90 +- 30 and 270 -+ 30.
  for (NetKind k : kKinds) {
    auto sc = small_circle(k, Line{90, 0}, 30.0);
    ASSERT_TRUE(sc.ok());
    ASSERT_EQ(sc->size(), 2u);
    int east = 0, west = 0;
    for (const NetPolyline& pl : *sc) {
      EXPECT_FALSE(pl.closed());
      const NetPoint mid = pl.pts[pl.pts.size() / 2];
      (mid[0] > 0 ? east : west)++;
      for (const NetPoint* end : {&pl.pts.front(), &pl.pts.back()}) {
        const double az = std::fmod(deg(std::atan2((*end)[0], (*end)[1])) + 360.0, 360.0);
        const bool ok = std::abs(az - 60) < 1e-6 || std::abs(az - 120) < 1e-6 || std::abs(az - 240) < 1e-6 ||
                        std::abs(az - 300) < 1e-6;
        EXPECT_TRUE(ok) << az;
      }
    }
    EXPECT_EQ(east, 1);
    EXPECT_EQ(west, 1);
  }
}

TEST(Stereonet, SmallCircleRejectsBadHalfAngles) {
  for (double a : {-1.0, 180.5, std::nan("")}) {
    auto sc = small_circle(NetKind::EqualArea, Line{0, 45}, a);
    ASSERT_FALSE(sc.ok());
    EXPECT_NE(sc.error().find("half-angle"), std::string::npos);
    auto cc = confidence_cone(NetKind::EqualArea, Line{0, 45}, a);
    ASSERT_FALSE(cc.ok());
    EXPECT_NE(cc.error().find("confidence cone"), std::string::npos);
  }
}

TEST(Stereonet, ConfidenceConeIsTheSmallCircleOfAlpha95) {
  auto cc = confidence_cone(NetKind::EqualArea, Line{200, 70}, 8.0, 90);
  ASSERT_TRUE(cc.ok());
  ASSERT_EQ(cc->size(), 1u);
  EXPECT_TRUE((*cc)[0].closed());
  const Vec3 a = dir(200, 70);
  for (const NetPoint& q : (*cc)[0].pts) {
    auto v = unproject_vector(NetKind::EqualArea, q);
    ASSERT_TRUE(v.ok());
    EXPECT_NEAR(deg(std::acos(v->dot(a))), 8.0, 1e-6);
  }
}

}  // namespace
}  // namespace cairn::geo
