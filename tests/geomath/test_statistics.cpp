// Tests of orientation statistics (geomath/statistics.h).
//
// Outside sources:
//  - Fisher, R. A. (1953). Dispersion on a sphere. Proc. R. Soc. Lond. A 217: the
//    estimate k = (N - 1)/(N - R) and the cone cos(a95) = 1 - (N-R)/R ((1/p)^(1/(N-1)) - 1),
//    evaluated here from the definitions; the usual large-k approximation
//    a95 ~ 140 deg / sqrt(k N) (it follows from the cone formula as N grows:
//    (20^(1/(N-1)) - 1)(N - 1) -> ln 20; value of the constant from memory, checked
//    here by that limit); and the 95% coverage of the cone for Fisher-distributed data.
//  - Simulation of the Fisher distribution by inversion, cos(angle) = 1 + ln(u + (1-u)
//    e^(-2k))/k (Fisher, Lewis & Embleton 1987, Statistical analysis of spherical data).
//  - Woodcock (1977): K = ln(l1/l2)/ln(l2/l3), C = ln(l1/l3); girdles K < 1, clusters
//    K > 1, a perfect girdle l3 = 0, a perfect cluster l2 = l3 = 0.
//  - Scheidegger (1965): T = (1/N) sum v v^T; its eigenvalues for data set up along the
//    coordinate axes are the fractions of the data along each axis.
//  - The percentile bootstrap (Efron 1979): its cone should cover the true axis in about
//    the stated share of repeated samples.
// The eigen analysis is also compared with numpy.linalg.eigh in
// tests/reference/test_statistics_numpy.py.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "geomath/statistics.h"
#include "tests/geomath/net_test_support.h"

namespace cairn::geo {
namespace {

using namespace test;
constexpr double kPiT = test::kPi;

// One draw from a Fisher distribution of precision k about the unit vector mu.
Vec3 fisher_draw(std::mt19937_64& rng, const Vec3& mu, double k) {
  const double u = uniform(rng);
  const double w = 1.0 + std::log(u + (1.0 - u) * std::exp(-2.0 * k)) / k;
  const double phi = 2.0 * kPiT * uniform(rng);
  const Vec3 a = mu.unitOrthogonal(), b = mu.cross(a);
  const double s = std::sqrt(std::max(0.0, 1.0 - w * w));
  return w * mu + s * (std::cos(phi) * a + std::sin(phi) * b);
}

TEST(Fisher, TwoVectorsFromTheDefinitions) {
  // Two unit vectors 10 degrees apart: R = 2 cos 5; k = 1/(2 - R);
  // cos a95 = 1 - (2 - R)/R * (20^(1/1) - 1)  (Fisher 1953, N = 2, p = 0.05).
  const std::vector<Vec3> v = {dir(0, 30), dir(0, 40)};
  auto f = fisher_mean_directions(v);
  ASSERT_TRUE(f.ok()) << f.error();
  const double R = 2 * std::cos(rad(5));
  EXPECT_EQ(f->n, 2);
  EXPECT_NEAR(f->resultant, R, 1e-12);
  EXPECT_NEAR(f->kappa, 1.0 / (2.0 - R), 1e-6);
  ASSERT_TRUE(f->alpha95.has_value());
  EXPECT_NEAR(*f->alpha95, deg(std::acos(1.0 - (2.0 - R) / R * 19.0)), 1e-9);
  EXPECT_NEAR(f->mean.trend, 0.0, 1e-9);
  EXPECT_NEAR(f->mean.plunge, 35.0, 1e-9);
}

TEST(Fisher, Alpha95ApproachesTheLargeKappaApproximation) {
  // a95 ~ 140 / sqrt(k N) degrees for large k and N (see file header).
  std::mt19937_64 rng(1953);
  const Vec3 mu = dir(120, 55);
  std::vector<Vec3> v;
  for (int i = 0; i < 4000; ++i) v.push_back(fisher_draw(rng, mu, 200.0));
  auto f = fisher_mean_directions(v);
  ASSERT_TRUE(f.ok());
  ASSERT_TRUE(f->alpha95.has_value());
  EXPECT_NEAR(*f->alpha95 / (140.0 / std::sqrt(f->kappa * f->n)), 1.0, 0.02);
  EXPECT_NEAR(f->kappa / 200.0, 1.0, 0.1);  // the estimate is consistent (Fisher 1953)
  EXPECT_LT(axial_angle(f->mean_vector, mu), 0.5);
}

TEST(Fisher, ConeCoversTheTrueMeanAboutNinetyFivePercentOfTheTime) {
  // Fisher (1953): for Fisher-distributed data a95 is a 95% confidence cone.
  std::mt19937_64 rng(42);
  const Vec3 mu = dir(300, 65);
  const int reps = 600;
  int covered = 0;
  for (int r = 0; r < reps; ++r) {
    std::vector<Line> lines;
    for (int i = 0; i < 15; ++i) lines.push_back(as_line(fisher_draw(rng, mu, 25.0)));
    auto f = fisher_mean(lines);
    ASSERT_TRUE(f.ok());
    ASSERT_TRUE(f->alpha95.has_value());
    covered += axial_angle(line_vector(f->mean), mu) <= *f->alpha95;
  }
  // Binomial sd of the share is 0.009 at 600 replicates.
  EXPECT_NEAR(double(covered) / reps, 0.95, 0.03);
}

TEST(Fisher, AxialLinesAreFlippedToTheClusterBeforeSumming) {
  // Near-horizontal lines about an east-west axis fall on both sides of the net. Summed
  // as given (all pointing down) they half cancel; as axes they form a tight cluster.
  const std::vector<Line> lines = {{88, 5}, {272, 3}, {91, 2}, {269, 4}, {93, 1}, {267, 6}};
  auto f = fisher_mean(lines);
  ASSERT_TRUE(f.ok()) << f.error();
  EXPECT_GT(f->kappa, 100.0);
  EXPECT_LT(axial_angle(line_vector(f->mean), dir(90, 0)), 4.0);
  // Hand sum of the flipped vectors, for the resultant (definition of R).
  Vec3 s = Vec3::Zero();
  for (const Line& l : lines) {
    Vec3 d = dir(l.trend, l.plunge);
    if (d.x() < 0) d = -d;  // the east half
    s += d;
  }
  EXPECT_NEAR(f->resultant, s.norm(), 1e-12);
}

TEST(Fisher, FailsWithReasons) {
  EXPECT_FALSE(fisher_mean({Line{10, 10}}).ok());
  EXPECT_NE(fisher_mean({}).error().find("at least 2"), std::string::npos);
  auto zero = fisher_mean_directions({Vec3(1, 0, 0), Vec3(0, 0, 0)});
  ASSERT_FALSE(zero.ok());
  EXPECT_NE(zero.error().find("vector 2"), std::string::npos) << zero.error();
  auto cancel = fisher_mean_directions({Vec3(1, 0, 0), Vec3(-1, 0, 0)});
  ASSERT_FALSE(cancel.ok());
  EXPECT_NE(cancel.error().find("resultant"), std::string::npos);
}

TEST(Fisher, ConeUndefinedForVeryDispersedData) {
  // Three orthogonal vectors: R = sqrt 3, cos a95 = 1 - (3 - sqrt3)/sqrt3 (sqrt 20 - 1) < -1.
  auto f = fisher_mean_directions({Vec3(1, 0, 0), Vec3(0, 1, 0), Vec3(0, 0, 1)});
  ASSERT_TRUE(f.ok());
  EXPECT_NEAR(f->resultant, std::sqrt(3.0), 1e-12);
  EXPECT_FALSE(f->alpha95.has_value());
  EXPECT_FALSE(fisher_cone_angle(1, 1.0).has_value());
}

TEST(Fisher, IdenticalVectorsHaveInfinitePrecision) {
  auto f = fisher_mean({Line{45, 45}, Line{45, 45}, Line{45, 45}});
  ASSERT_TRUE(f.ok());
  EXPECT_TRUE(std::isinf(f->kappa));
  ASSERT_TRUE(f->alpha95.has_value());
  EXPECT_NEAR(*f->alpha95, 0.0, 1e-4);
}

TEST(OrientationTensor, DataAlongTheAxesGiveTheirShares) {
  // Scheidegger (1965): 5 lines east, 3 north, 2 vertical -> eigenvalues 0.5, 0.3, 0.2
  // along east, north, vertical. Woodcock (1977): K = ln(5/3)/ln(3/2), C = ln(5/2).
  std::vector<Line> lines;
  for (int i = 0; i < 5; ++i) lines.push_back(Line{90, 0});
  for (int i = 0; i < 3; ++i) lines.push_back(Line{i % 2 ? 180.0 : 0.0, 0});
  for (int i = 0; i < 2; ++i) lines.push_back(Line{0, 90});
  auto t = orientation_tensor(lines);
  ASSERT_TRUE(t.ok());
  EXPECT_NEAR(t->eigenvalues[0], 0.5, 1e-12);
  EXPECT_NEAR(t->eigenvalues[1], 0.3, 1e-12);
  EXPECT_NEAR(t->eigenvalues[2], 0.2, 1e-12);
  EXPECT_NEAR(axial_angle(t->eigenvectors[0], Vec3(1, 0, 0)), 0.0, 1e-6);
  EXPECT_NEAR(axial_angle(t->eigenvectors[1], Vec3(0, 1, 0)), 0.0, 1e-6);
  EXPECT_NEAR(t->axes[2].plunge, 90.0, 1e-6);
  for (const Vec3& e : t->eigenvectors) EXPECT_LE(e.z(), 0.0);
  auto w = woodcock_shape(*t);
  ASSERT_TRUE(w.ok());
  EXPECT_NEAR(w->k, std::log(5.0 / 3.0) / std::log(1.5), 1e-9);
  EXPECT_NEAR(w->c, std::log(2.5), 1e-9);
}

TEST(Woodcock, PerfectClusterIsInfiniteKAndC) {
  // Woodcock (1977): all axes parallel, l1 = 1, l2 = l3 = 0: the cluster end-member.
  // (90, 0) and (270, 0) are the same axis.
  auto t = orientation_tensor({Line{90, 0}, Line{270, 0}, Line{90, 0}});
  ASSERT_TRUE(t.ok());
  EXPECT_NEAR(t->eigenvalues[0], 1.0, 1e-12);
  EXPECT_NEAR(axial_angle(t->eigenvectors[0], dir(90, 0)), 0.0, 1e-6);
  auto w = woodcock_shape(*t);
  ASSERT_TRUE(w.ok()) << w.error();
  EXPECT_TRUE(std::isinf(w->k) && w->k > 0);
  EXPECT_TRUE(std::isinf(w->c) && w->c > 0);
}

TEST(Woodcock, PerfectGirdleIsZeroKInfiniteC) {
  // Woodcock (1977): axes all in one plane, l3 = 0: the girdle end-member K = 0.
  // Lines in the vertical east-west plane; the normal is north-south.
  std::vector<Line> even, uneven;
  for (double a = 0; a < 180; a += 45) {  // evenly spread: l1 = l2 = 1/2
    const Vec3 v(std::cos(rad(a)), 0, -std::sin(rad(a)));
    even.push_back(as_line(v));
  }
  for (double a : {5.0, 20.0, 30.0, 70.0, 150.0}) {
    uneven.push_back(as_line(Vec3(std::cos(rad(a)), 0, -std::sin(rad(a)))));
  }
  for (const auto* set : {&even, &uneven}) {
    auto t = orientation_tensor(*set);
    ASSERT_TRUE(t.ok());
    EXPECT_NEAR(t->eigenvalues[2], 0.0, 1e-12);
    EXPECT_NEAR(axial_angle(t->eigenvectors[2], Vec3(0, 1, 0)), 0.0, 1e-6);
    auto w = woodcock_shape(*t);
    ASSERT_TRUE(w.ok());
    EXPECT_EQ(w->k, 0.0);
    EXPECT_TRUE(std::isinf(w->c));
  }
}

TEST(Woodcock, SymmetricClusterIsInfiniteKAndUniformIsUndefined) {
  // l2 = l3 > 0: ln(l2/l3) = 0, K infinite (Woodcock 1977 cluster side).
  std::vector<Line> sym = {{0, 90}, {0, 90}, {0, 90}, {0, 90}, {90, 0}, {0, 0}};
  auto t = orientation_tensor(sym);
  ASSERT_TRUE(t.ok());
  auto w = woodcock_shape(*t);
  ASSERT_TRUE(w.ok());
  EXPECT_TRUE(std::isinf(w->k));
  EXPECT_NEAR(w->c, std::log((4.0 / 6.0) / (1.0 / 6.0)), 1e-9);
  // l1 = l2 = l3 = 1/3: K = 0/0.
  auto u = orientation_tensor({Line{0, 90}, Line{90, 0}, Line{0, 0}});
  ASSERT_TRUE(u.ok());
  auto wu = woodcock_shape(*u);
  ASSERT_FALSE(wu.ok());
  EXPECT_NE(wu.error().find("uniform"), std::string::npos);
}

TEST(OrientationTensor, FailsWithReasons) {
  EXPECT_FALSE(orientation_tensor({}).ok());
  auto t = orientation_tensor_vectors({Vec3(1, 0, 0), Vec3(0, std::nan(""), 0)});
  ASSERT_FALSE(t.ok());
  EXPECT_NE(t.error().find("vector 2"), std::string::npos);
}

// Poles of planes containing the fold axis `axis`, scattered off the girdle by a
// normal angle of sd degrees.
std::vector<Line> girdle_poles(std::mt19937_64& rng, const Vec3& axis, int n, double sd) {
  std::normal_distribution<double> noise(0.0, rad(sd));  // only the statistics matter here
  const Vec3 a = axis.unitOrthogonal(), b = axis.cross(a);
  std::vector<Line> out;
  for (int i = 0; i < n; ++i) {
    const double phi = rad(-60 + 120 * uniform(rng));  // a partial girdle
    const Vec3 in_girdle = std::cos(phi) * a + std::sin(phi) * b;
    const double off = noise(rng);
    out.push_back(as_line(std::cos(off) * in_girdle + std::sin(off) * axis));
  }
  return out;
}

TEST(Girdle, FindsTheFoldAxis) {
  std::mt19937_64 rng(77);
  const Vec3 axis = dir(30, 20);
  const auto poles = girdle_poles(rng, axis, 40, 3.0);
  auto g = fit_girdle(poles);
  ASSERT_TRUE(g.ok()) << g.error();
  EXPECT_LT(axial_angle(line_vector(g->beta), axis), 3.0);
  EXPECT_GT(g->beta_cone, 0.0);
  EXPECT_LT(g->beta_cone, 10.0);
  // The girdle is the plane whose pole is beta (written out: pole trend = dip dir + 180).
  EXPECT_LT(axial_angle(dir(g->girdle.strike + 270.0, 90.0 - g->girdle.dip), line_vector(g->beta)), 1e-6);
  // Same seed, same cone; another seed, another (bootstrap) cone.
  auto again = fit_girdle(poles);
  ASSERT_TRUE(again.ok());
  EXPECT_EQ(again->beta_cone, g->beta_cone);
  GirdleOptions other;
  other.seed = 12345;
  auto g2 = fit_girdle(poles, other);
  ASSERT_TRUE(g2.ok());
  EXPECT_NE(g2->beta_cone, g->beta_cone);
}

TEST(Girdle, BootstrapConeCoversTheTrueAxis) {
  // Efron (1979): a 95% percentile-bootstrap cone should hold the true beta in about 95%
  // of repeated samples; small samples under-cover a little, hence the wide band.
  std::mt19937_64 rng(2024);
  const Vec3 axis = dir(200, 35);
  GirdleOptions opt;
  opt.bootstrap_samples = 400;
  const int reps = 200;
  int covered = 0;
  for (int r = 0; r < reps; ++r) {
    auto g = fit_girdle(girdle_poles(rng, axis, 30, 5.0), opt);
    ASSERT_TRUE(g.ok());
    covered += axial_angle(line_vector(g->beta), axis) <= g->beta_cone;
  }
  EXPECT_GE(double(covered) / reps, 0.86);
  EXPECT_LE(double(covered) / reps, 0.99);
}

TEST(Girdle, FailsWithReasons) {
  auto few = fit_girdle({Line{0, 10}, Line{90, 10}});
  ASSERT_FALSE(few.ok());
  EXPECT_NE(few.error().find("at least 3"), std::string::npos);
  auto cluster = fit_girdle({Line{0, 10}, Line{0, 10}, Line{0, 10}});
  ASSERT_FALSE(cluster.ok());
  EXPECT_NE(cluster.error().find("no girdle"), std::string::npos);
  GirdleOptions bad;
  bad.confidence = 1.0;
  auto b = fit_girdle({Line{0, 10}, Line{90, 10}, Line{45, 80}}, bad);
  ASSERT_FALSE(b.ok());
  EXPECT_NE(b.error().find("confidence"), std::string::npos);
}

}  // namespace
}  // namespace cairn::geo

TEST(Fisher, PublishedWorkedExample) {
  // Worked example published with PmagPy (Tauxe et al., 2016, G-cubed 17, 2450:
  // ipmag.fisher_mean documentation): four directions, declination / inclination
  // 140/21, 127/23, 142/19, 136/22 give the mean 136.308/21.348, R = 3.98121,
  // k = 159.69 and a95 = 7.2929 degrees. Downward inclinations are lower-hemisphere
  // lines (trend = declination, plunge = inclination).
  const double dec[] = {140, 127, 142, 136}, inc[] = {21, 23, 19, 22};
  std::vector<cairn::geo::Vec3> v;
  for (int i = 0; i < 4; ++i) v.push_back(cairn::geo::line_vector({dec[i], inc[i]}));
  auto f = cairn::geo::fisher_mean_directions(v);
  ASSERT_TRUE(f.ok()) << f.error();
  EXPECT_NEAR(f->mean.trend, 136.30838974272072, 1e-9);
  EXPECT_NEAR(f->mean.plunge, 21.34778402689999, 1e-9);
  EXPECT_NEAR(f->resultant, 3.9812138971889026, 1e-12);
  EXPECT_NEAR(f->kappa, 159.69251473636305, 1e-8);
  ASSERT_TRUE(f->alpha95);
  EXPECT_NEAR(*f->alpha95, 7.292891411309177, 1e-9);
}
