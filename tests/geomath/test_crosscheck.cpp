// The cross-check engine: for every rule a scenario that must raise it and a
// near miss that must not. Scenarios are synthetic (a known plane, points on it
// with stated GPS noise), so the expected answer is known without the engine.
// Sources: Markland test as given by Hoek & Bray, Rock Slope Engineering;
// flexural toppling after Goodman & Bray (1976); the Rayleigh distribution of a
// two-dimensional normal deviation (Mardia & Jupp, Directional Statistics, 2000;
// value from memory); circular mean direction and its standard error from
// Fisher, Statistical Analysis of Circular Data (1993), 4.4.4, with reference
// values computed by numpy (script beside the check); Fisher (1953) alpha95,
// cos a95 = 1 - (N - R)/R ((1/0.05)^(1/(N-1)) - 1); Student's t from
// Abramowitz & Stegun Table 26.10; the rest is common practice, no published source.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "geomath/angles.h"
#include "geomath/crosscheck.h"
#include "geomath/strike_lines.h"

using namespace cairn::geo;

namespace {

// A contact on the plane z = z0 + a*e + b*n, sampled over a 1.2 km square with
// GPS-like noise (h 2 m, v 3 m 1-sigma).
CheckContact planar_contact(const Plane& p, const std::string& id, unsigned seed, int n = 30, double h = 2.0,
                            double v = 3.0, double half = 600.0) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> u(-half, half);
  std::normal_distribution<double> gh(0, h), gv(0, v);
  const Vec3 nrm = plane_normal_up(p);
  CheckContact c;
  c.uuid = id;
  c.name = "contact " + id;
  c.type = "depositional";
  for (int i = 0; i < n; ++i) {
    const double e = u(rng), nn = u(rng);
    const double z = 500.0 - (nrm.x() * e + nrm.y() * nn) / nrm.z();
    c.points.push_back({e + gh(rng), nn + gh(rng), z + gv(rng), h, v});
  }
  return c;
}

CheckStation station(const std::string& id, double e, double n, std::optional<double> z = std::nullopt) {
  CheckStation s;
  s.uuid = id;
  s.code = "S" + id;
  s.e = e;
  s.n = n;
  s.z = z;
  return s;
}

CheckPlane reading(const std::string& id, const std::string& st, const Plane& p, const std::string& kind = "bedding",
                   const std::string& contact = "") {
  CheckPlane r;
  r.uuid = id;
  r.ref = "r" + id;
  r.station = st;
  r.kind = kind;
  r.plane = p;
  r.contact = contact;
  return r;
}

std::vector<Flag> flags_of(const CheckReport& rep, const std::string& rule) {
  std::vector<Flag> out;
  for (const auto& f : rep.flags)
    if (f.rule == rule) out.push_back(f);
  return out;
}

CheckInput one_contact(const Plane& p) {
  CheckInput in;
  in.contacts.push_back(planar_contact(p, "C1", 11));
  in.stations.push_back(station("1", 0, 0));
  return in;
}

}  // namespace

TEST(Crosscheck, ToleranceFollowsRayleighQuantile) {
  // Monte Carlo check of the tolerance's statistical claim: 99% of pole deviations
  // drawn as isotropic 2-D normal errors of sigma 3 degrees fall within it.
  const double tol = comparison_tolerance(3.0, std::nullopt, 0.99);
  std::mt19937_64 rng(5);
  std::normal_distribution<double> g(0, 3.0);
  int inside = 0;
  const int n = 200000;
  for (int i = 0; i < n; ++i) inside += std::hypot(g(rng), g(rng)) <= tol;
  EXPECT_NEAR(inside / double(n), 0.99, 0.002);
  // The fit's cone widens it: a 95% cone of 2.448 sigma adds sigma in quadrature.
  const double k95 = std::sqrt(-2 * std::log(0.05));
  EXPECT_NEAR(comparison_tolerance(3.0, 4.0 * k95, 0.99), 5.0 * std::sqrt(-2 * std::log(0.01)), 1e-9);
  // Poorer grades are wider (common practice): grade 1 is three times grade 5.
  CheckOptions o;
  EXPECT_NEAR(reading_sigma(1, o) / reading_sigma(5, o), 3.0, 1e-12);
  EXPECT_EQ(reading_sigma(std::nullopt, o), o.compass_sigma);
}

TEST(Crosscheck, CleanReadingRaisesNothingAndMisfitIsFlagged) {
  const Plane truth{40, 25};
  CheckInput in = one_contact(truth);
  in.planes.push_back(reading("a", "1", Plane{43, 27}, "bedding", "C1"));  // near miss: 3 degrees off
  in.planes.push_back(reading("b", "1", Plane{80, 50}, "bedding", "C1"));  // local structure
  CheckReport rep = run_crosscheck(in);
  ASSERT_EQ(rep.fits.size(), 1u);
  EXPECT_TRUE(rep.fits[0].usable) << rep.fits[0].verdict;
  EXPECT_LT(angle_between_planes(*rep.fits[0].plane, truth), 2.0);
  auto m = flags_of(rep, "misfit");
  ASSERT_EQ(m.size(), 1u);
  EXPECT_EQ(m[0].reading, "b");
  EXPECT_EQ(m[0].severity, Severity::Conflict);
  EXPECT_NEAR(*m[0].misfit, angle_between_planes(Plane{80, 50}, *rep.fits[0].plane), 1e-9);
  EXPECT_EQ(rep.flags.size(), 1u);
}

TEST(Crosscheck, ReversedDip) {
  const Plane truth{120, 35};
  CheckInput in = one_contact(truth);
  in.planes.push_back(reading("a", "1", Plane{300, 35}, "bedding", "C1"));  // right-hand-rule slip
  // Near miss: wrong, and reversing it does not help either.
  in.planes.push_back(reading("b", "1", Plane{300, 70}, "bedding", "C1"));
  CheckReport rep = run_crosscheck(in);
  auto r = flags_of(rep, "reversed-dip");
  ASSERT_EQ(r.size(), 1u);
  EXPECT_EQ(r[0].reading, "a");
  EXPECT_GT(*r[0].misfit, 60);
  EXPECT_LT(*r[0].misfit_corrected, 3);
  ASSERT_TRUE(r[0].corrected);
  EXPECT_NEAR(angle_between_planes(*r[0].corrected, Plane{120, 35}), 0, 1e-9);
  EXPECT_NEAR(r[0].corrected->strike, 120, 1e-9);
  auto m = flags_of(rep, "misfit");
  ASSERT_EQ(m.size(), 1u);
  EXPECT_EQ(m[0].reading, "b");
}

TEST(Crosscheck, DeclinationSuspect) {
  const Plane truth{70, 40};
  CheckInput in = one_contact(truth);
  // Magnetic reading stored as if true: strike short by a 22 degree east declination.
  CheckPlane a = reading("a", "1", Plane{48, 40}, "bedding", "C1");
  a.local_declination = 22.0;
  in.planes.push_back(a);
  // Near miss: the same error where the local declination is only 1 degree cannot be
  // blamed on it; it stays a misfit.
  CheckPlane b = reading("b", "1", Plane{48, 40}, "bedding", "C1");
  b.local_declination = 1.0;
  in.planes.push_back(b);
  CheckReport rep = run_crosscheck(in);
  auto d = flags_of(rep, "declination-suspect");
  ASSERT_EQ(d.size(), 1u);
  EXPECT_EQ(d[0].reading, "a");
  EXPECT_LT(*d[0].misfit_corrected, 3);
  ASSERT_TRUE(d[0].corrected);
  EXPECT_NEAR(d[0].corrected->strike, 48 + 22, 1e-9);  // the declination added back
  ASSERT_EQ(flags_of(rep, "misfit").size(), 1u);
  EXPECT_EQ(flags_of(rep, "misfit")[0].reading, "b");
}

TEST(Crosscheck, WeakGeometry) {
  CheckInput in;
  CheckContact c;
  c.uuid = "C1";
  c.name = "line";
  for (int i = 0; i < 8; ++i) c.points.push_back({i * 50.0, i * 50.0, 400 + i * 5.0, 0.5, 0.5});  // collinear
  in.contacts.push_back(c);
  in.contacts.push_back(planar_contact(Plane{10, 30}, "C2", 3));  // near miss
  CheckReport rep = run_crosscheck(in);
  auto w = flags_of(rep, "weak-geometry");
  ASSERT_EQ(w.size(), 1u);
  EXPECT_EQ(w[0].contact, "line");
  EXPECT_FALSE(rep.fits[0].usable);
  EXPECT_TRUE(rep.fits[1].usable);
}

TEST(Crosscheck, NotPlanarFoldedAndMislocated) {
  CheckInput in;
  // A folded contact: two limbs dipping 40 degrees either way off a hinge line along n.
  CheckContact fold;
  fold.uuid = "F";
  fold.name = "folded";
  std::mt19937_64 rng(9);
  std::uniform_real_distribution<double> u(-500, 500);
  std::normal_distribution<double> g(0, 1.0);
  for (int i = 0; i < 30; ++i) {
    const double e = u(rng), n = u(rng);
    fold.points.push_back({e + g(rng), n + g(rng), 600 - std::abs(e) * std::tan(deg2rad(40)) + g(rng), 1, 1});
  }
  in.contacts.push_back(fold);
  // One point mapped 40 m off a clean plane.
  CheckContact one = planar_contact(Plane{200, 30}, "M", 4, 25, 1.0, 1.0);
  one.name = "mislocated";
  one.points[7].z += 40;
  in.contacts.push_back(one);
  in.contacts.push_back(planar_contact(Plane{200, 30}, "OK", 4, 25, 1.0, 1.0));  // near miss
  CheckReport rep = run_crosscheck(in);
  auto np = flags_of(rep, "not-planar");
  ASSERT_EQ(np.size(), 2u);
  EXPECT_EQ(np[0].contact, "folded");
  EXPECT_EQ(np[1].contact, "mislocated");
  EXPECT_FALSE(np[0].misfit);  // misfit is an angle between poles; a contact-wide flag has none
  ASSERT_FALSE(rep.fits[1].worst_points.empty());
  EXPECT_EQ(rep.fits[1].worst_points, std::vector<size_t>{7u});  // only the moved point
  EXPECT_TRUE(rep.fits[2].usable);
}

TEST(Crosscheck, FacingConflict) {
  // Contact dipping 30 towards 090; the younger unit U lies above (east and higher).
  const Plane truth{0, 30};
  auto build = [&](bool younger_above) {
    CheckInput in;
    CheckContact c = planar_contact(truth, "C1", 21);
    c.lower_unit = "L";
    c.upper_unit = "U";
    in.contacts.push_back(c);
    const Vec3 nrm = plane_normal_up(truth);
    for (int i = 0; i < 6; ++i) {
      const double e = -300 + 120 * i, n = 50.0 * i;
      const double zc = 500.0 - (nrm.x() * e + nrm.y() * n) / nrm.z();
      CheckStation up = station("u" + std::to_string(i), e, n, zc + (younger_above ? 40 : -40));
      up.unit = "U";
      CheckStation low = station("l" + std::to_string(i), e, n + 10, zc + (younger_above ? -40 : 40));
      low.unit = "L";
      in.stations.push_back(up);
      in.stations.push_back(low);
    }
    return in;
  };
  EXPECT_EQ(flags_of(run_crosscheck(build(true)), "facing-conflict").size(), 0u);  // near miss
  CheckInput bad = build(false);
  EXPECT_EQ(flags_of(run_crosscheck(bad), "facing-conflict").size(), 1u);
  // Readings marked overturned say the limb is overturned: then younger-below is expected.
  // Near miss: the same stations far along strike from the mapped points do not vote.
  CheckInput far = bad;
  // The plane strikes north, so moving 3 km north keeps each station on its side.
  for (auto& s : far.stations) s.n += 3000;
  EXPECT_EQ(flags_of(run_crosscheck(far), "facing-conflict").size(), 0u);
  CheckPlane o = reading("o", "u0", truth, "bedding", "C1");
  o.facing = CheckFacing::Overturned;
  bad.planes.push_back(o);
  EXPECT_EQ(flags_of(run_crosscheck(bad), "facing-conflict").size(), 0u);
}

TEST(Crosscheck, MarklandPlanarSlidingHandWorked) {
  // Hoek & Bray's conditions worked by hand: face dips 60 towards 150.
  const Plane face = plane_from_dip_direction(150, 60);
  EXPECT_TRUE(planar_sliding_possible(plane_from_dip_direction(160, 40), face, 30, 20));   // all met
  EXPECT_FALSE(planar_sliding_possible(plane_from_dip_direction(175, 40), face, 30, 20));  // 25 off strike
  EXPECT_FALSE(planar_sliding_possible(plane_from_dip_direction(150, 65), face, 30, 20));  // does not daylight
  EXPECT_FALSE(planar_sliding_possible(plane_from_dip_direction(150, 25), face, 30, 20));  // below friction
}

TEST(Crosscheck, FlexuralToppingHandWorked) {
  // Goodman & Bray (1976): (90 - dip) + friction <= face dip, dipping into the face.
  const Plane face = plane_from_dip_direction(150, 60);
  EXPECT_TRUE(flexural_toppling_possible(plane_from_dip_direction(330, 70), face, 30, 10));   // 20+30 <= 60
  EXPECT_FALSE(flexural_toppling_possible(plane_from_dip_direction(330, 55), face, 30, 10));  // 35+30 > 60
  EXPECT_FALSE(flexural_toppling_possible(plane_from_dip_direction(345, 80), face, 30, 10));  // 15 off
}

TEST(Crosscheck, SafetyScreeningFlagsCarryCautions) {
  CheckInput in;
  in.stations.push_back(station("1", 0, 0));
  in.planes.push_back(reading("face", "1", plane_from_dip_direction(150, 60), "slope"));
  in.planes.push_back(reading("bed", "1", plane_from_dip_direction(155, 40), "bedding"));
  in.planes.push_back(reading("jt", "1", plane_from_dip_direction(330, 75), "joint"));
  in.planes.push_back(reading("safe", "1", plane_from_dip_direction(60, 40), "joint"));  // near miss
  CheckReport rep = run_crosscheck(in);
  auto d = flags_of(rep, "daylighting");
  auto t = flags_of(rep, "toppling");
  ASSERT_EQ(d.size(), 1u);
  ASSERT_EQ(t.size(), 1u);
  EXPECT_EQ(d[0].reading, "bed");
  EXPECT_EQ(t[0].reading, "jt");
  for (const auto& f : {d[0], t[0]}) {
    EXPECT_EQ(f.severity, Severity::Hazard);
    EXPECT_NE(f.caution.find("not a slope-stability assessment"), std::string::npos);
    EXPECT_NE(f.caution.find("licensed engineering geologist"), std::string::npos);
  }
  EXPECT_EQ(rep.flags.size(), 2u);
}

TEST(Crosscheck, RemeasureOnSteepGroundCarriesCaution) {
  const Plane truth{40, 25};
  CheckInput in = one_contact(truth);
  in.stations.push_back(station("2", 100, 0));
  in.planes.push_back(reading("m1", "1", Plane{80, 50}, "bedding", "C1"));
  in.planes.push_back(reading("m2", "2", Plane{80, 50}, "bedding", "C1"));
  in.planes.push_back(reading("f2", "2", plane_from_dip_direction(10, 45), "slope"));  // 45 > 35
  CheckReport rep = run_crosscheck(in);
  auto m = flags_of(rep, "misfit");
  ASSERT_EQ(m.size(), 2u);
  for (const auto& f : m) EXPECT_EQ(f.caution.empty(), f.reading == "m1") << f.reading;
}

TEST(Crosscheck, Duplicate) {
  CheckInput in;
  in.stations.push_back(station("1", 0, 0));
  auto at = [&](const std::string& id, const Plane& p, double minutes, const std::string& kind = "joint") {
    CheckPlane r = reading(id, "1", p, kind);
    r.time_minutes = minutes;
    in.planes.push_back(r);
  };
  at("a", Plane{100, 60}, 0);
  at("b", Plane{101, 60.5}, 4);        // twice
  at("c", Plane{100, 60}, 30);         // near miss: 26 minutes later
  at("d", Plane{100, 60}, 5, "vein");  // near miss: another kind
  CheckReport rep = run_crosscheck(in);
  auto d = flags_of(rep, "duplicate");
  ASSERT_EQ(d.size(), 1u);
  EXPECT_EQ(d[0].reading, "b");
  EXPECT_EQ(d[0].severity, Severity::Note);
}

TEST(Crosscheck, FalsePositivesOnCleanReadings) {
  // 200 clean readings, 2.5 degrees of noise (1 sigma per axis of the pole) against
  // well-constrained contacts, fixed seed: fewer than 5 misfit-type flags.
  CheckInput in;
  const Plane truths[] = {{30, 20}, {200, 45}, {310, 70}, {95, 8}};
  for (int k = 0; k < 4; ++k) in.contacts.push_back(planar_contact(truths[k], "C" + std::to_string(k), 100 + k, 40));
  in.stations.push_back(station("1", 0, 0));
  std::mt19937_64 rng(42);
  std::normal_distribution<double> g(0, deg2rad(2.5));
  for (int i = 0; i < 200; ++i) {
    const Plane t = truths[i % 4];
    const Vec3 p = pole_vector(t);
    const Vec3 a = p.unitOrthogonal(), b = p.cross(a);
    const Vec3 q = (p + g(rng) * a + g(rng) * b).normalized();
    in.planes.push_back(
        reading(std::to_string(i), "1", plane_from_pole(line_from_vector(q)), "bedding", "C" + std::to_string(i % 4)));
  }
  CheckReport rep = run_crosscheck(in);
  int misfits = 0;
  for (const auto& f : rep.flags)
    misfits += f.rule == "misfit" || f.rule == "reversed-dip" || f.rule == "declination-suspect";
  for (const auto& f : rep.fits) EXPECT_TRUE(f.usable) << f.contact << ": " << f.verdict;
  EXPECT_LT(misfits, 5);
}

TEST(Crosscheck, NearbyOptionComparesUnnamedReadings) {
  const Plane truth{40, 25};
  CheckInput in = one_contact(truth);
  const auto& p0 = in.contacts[0].points[0];
  in.stations.push_back(station("near", p0.e + 20, p0.n));
  in.stations.push_back(station("far", 5000, 5000));
  in.planes.push_back(reading("n", "near", Plane{80, 50}));
  in.planes.push_back(reading("f", "far", Plane{80, 50}));
  EXPECT_TRUE(flags_of(run_crosscheck(in), "misfit").empty());  // option off by default
  CheckOptions o;
  o.nearby_radius = 100;
  auto m = flags_of(run_crosscheck(in, o), "misfit");
  ASSERT_EQ(m.size(), 1u);
  EXPECT_EQ(m[0].reading, "n");
}

TEST(Crosscheck, CircularMeanRotationMatchesNumpy) {
  // Reference values from numpy (Fisher 1993, 2.3 and 4.4.4):
  //   t = np.radians(d); S, C = np.sin(t).sum(), np.cos(t).sum(); m = np.arctan2(S, C)
  //   R = np.hypot(S, C) / n; rho2 = np.mean(np.cos(2 * (t - m)))
  //   se = np.sqrt((1 - rho2) / (2 * R * R) / n)
  struct Case {
    std::vector<double> d;
    double mean, r, se, t975;
  };
  const Case cases[] = {
      {{11.0, 14.5, 9.0, 13.0, 12.5, 10.0}, 11.666651385780376, 0.9994712318667321, 0.7608935024559901, 2.571},
      {{-8.0, -11.5, -6.0, -9.5, -12.0}, -9.40015451085927, 0.9992477516411548, 0.9943159517248229, 2.776},
      // across +/-180: the circular mean, not the arithmetic one
      {{175.0, -178.0, 179.0, -176.0}, -179.9993138095822, 0.9982493177033542, 1.6968731007206204, 3.182},
  };
  for (const auto& c : cases) {
    auto m = circular_mean_rotation(c.d);
    ASSERT_TRUE(m.ok()) << m.error();
    EXPECT_NEAR(azimuth_difference(m->mean, c.mean), 0.0, 1e-9);
    EXPECT_NEAR(m->resultant, c.r, 1e-12);
    EXPECT_NEAR(m->standard_error, c.se, 1e-9);
    // Interval: mean +/- arcsin(t_0.975(n-1) SE), t from A&S Table 26.10.
    const double half = rad2deg(std::asin(c.t975 * deg2rad(c.se)));
    EXPECT_NEAR(m->high - m->mean, half, 0.001);
    EXPECT_NEAR(m->mean - m->low, half, 0.001);
  }
  EXPECT_FALSE(circular_mean_rotation({5.0}).ok());
}

namespace {

// A steep contact striking 015, readings by one observer on one day. `stored`
// gives each reading's strike error; quality 3 (tolerance about 18 degrees).
CheckInput observer_day(const std::vector<double>& stored_error, double local_declination) {
  const Plane truth{15, 65};
  CheckInput in = one_contact(truth);
  for (size_t i = 0; i < stored_error.size(); ++i) {
    CheckPlane r = reading("g" + std::to_string(i), "1", Plane{wrap360(truth.strike + stored_error[i]), truth.dip},
                           "bedding", "C1");
    r.quality = 3;
    r.observer = "AB";
    r.day = "2026-07-14";
    r.local_declination = local_declination;
    in.planes.push_back(r);
  }
  // Another crew member's readings the same day, unbiased: never part of the group.
  const double noise[] = {1.5, -2.0, 0.5, -1.0};
  for (int i = 0; i < 4; ++i) {
    CheckPlane r =
        reading("o" + std::to_string(i), "1", Plane{wrap360(truth.strike + noise[i]), truth.dip}, "bedding", "C1");
    r.quality = 3;
    r.observer = "CD";
    r.day = "2026-07-14";
    r.local_declination = local_declination;
    in.planes.push_back(r);
  }
  return in;
}

}  // namespace

TEST(Crosscheck, DeclinationDiagnosisEastAndWestSingleReadings) {
  // true azimuth = magnetic azimuth + declination (east positive). A magnetic
  // reading stored as true lacks the declination: stored = true - D, and the
  // turn that fixes it is +D ("not applied"), east or west. A reading corrected
  // twice carries it twice: stored = true + D, turn -D ("applied twice").
  for (double D : {+20.0, -20.0}) {
    const Plane truth{70, 65};
    CheckInput in = one_contact(truth);
    CheckPlane a = reading("a", "1", Plane{wrap360(truth.strike - D), truth.dip}, "bedding", "C1");
    CheckPlane b = reading("b", "1", Plane{wrap360(truth.strike + D), truth.dip}, "bedding", "C1");
    a.local_declination = b.local_declination = D;
    in.planes.push_back(a);
    in.planes.push_back(b);
    CheckReport rep = run_crosscheck(in);
    auto d = flags_of(rep, "declination-suspect");
    ASSERT_EQ(d.size(), 2u) << "D = " << D;
    for (const auto& f : d) {
      ASSERT_TRUE(f.corrected);
      EXPECT_NEAR(angle_between_planes(*f.corrected, truth), 0.0, 2.0);
      if (f.reading == "a") {
        EXPECT_EQ(f.cause, "declination-not-applied") << "D = " << D;
        EXPECT_NEAR(azimuth_difference(f.corrected->strike, a.plane.strike), D, 1e-9);
      } else {
        EXPECT_EQ(f.reading, "b");
        EXPECT_EQ(f.cause, "declination-applied-twice") << "D = " << D;
        EXPECT_NEAR(azimuth_difference(f.corrected->strike, b.plane.strike), -D, 1e-9);
      }
      EXPECT_NE(f.message.find(D > 0 ? "east" : "west"), std::string::npos) << f.message;
    }
  }
}

TEST(Crosscheck, ObserverDayWithoutDeclinationEastAndWest) {
  // Each reading alone is within its tolerance (12 degrees at quality 3), but
  // together they need the same turn: the group is flagged with its cause.
  const std::vector<double> scatter = {1.0, -1.5, 2.0, -0.5, 1.5, -2.0};
  for (double D : {+12.0, -12.0}) {
    for (bool twice : {false, true}) {
      std::vector<double> err;
      for (double e : scatter) err.push_back((twice ? D : -D) + e);
      CheckReport rep = run_crosscheck(observer_day(err, D));
      EXPECT_TRUE(flags_of(rep, "misfit").empty());
      std::vector<Flag> groups;
      for (const auto& f : rep.flags)
        if (!f.readings.empty()) groups.push_back(f);
      ASSERT_EQ(groups.size(), 1u) << "D = " << D << (twice ? " twice" : "");
      const Flag& g = groups[0];
      EXPECT_EQ(g.rule, "declination-suspect");
      EXPECT_EQ(g.cause, twice ? "declination-applied-twice" : "declination-not-applied") << "D = " << D;
      EXPECT_EQ(g.observer, "AB");
      EXPECT_EQ(g.day, "2026-07-14");
      EXPECT_EQ(g.refs, (std::vector<std::string>{"rg0", "rg1", "rg2", "rg3", "rg4", "rg5"}));
      ASSERT_TRUE(g.rotation && g.rotation_interval);
      EXPECT_NEAR(*g.rotation, twice ? -D : D, 1.5);
      EXPECT_LE(g.rotation_interval->first, *g.rotation);
      EXPECT_GE(g.rotation_interval->second, *g.rotation);
      // No single reading of the group is flagged on its own.
      for (const auto& f : rep.flags) EXPECT_TRUE(f.reading.empty() || f.reading[0] != 'g') << f.message;
    }
  }
}

TEST(Crosscheck, CompassOffsetIsNamedWhenDeclinationDoesNotExplainIt) {
  const std::vector<double> err = {-7.0, -9.5, -8.0, -6.5, -9.0, -8.0};  // needs about +8
  CheckReport rep = run_crosscheck(observer_day(err, 20.0));
  auto c = flags_of(rep, "compass-offset");
  ASSERT_EQ(c.size(), 1u);
  EXPECT_EQ(c[0].cause, "compass-offset");
  EXPECT_EQ(c[0].readings.size(), 6u);
  ASSERT_TRUE(c[0].rotation);
  EXPECT_NEAR(*c[0].rotation, 8.0, 1.5);
  EXPECT_NE(c[0].message.find("+8"), std::string::npos) << c[0].message;
  // Near miss: readings scattered about zero are not a group error.
  CheckReport clean = run_crosscheck(observer_day({3.0, -2.5, 1.0, -3.5, 2.0, 0.5}, 20.0));
  for (const auto& f : clean.flags) EXPECT_TRUE(f.readings.empty()) << f.message;
}

TEST(Crosscheck, SteepContactFacingIsNotDecided) {
  // A contact dipping 89 degrees, mapped along 600 m of strike over 60 m of
  // relief with 3 m GPS: its 95% cone includes the vertical. Whichever way the
  // fit leans, and whichever side the younger unit is on, the facing test must
  // not decide (no false conflict, no false all-clear) and says so in a note.
  for (double strike : {0.0, 180.0}) {
    for (bool younger_east : {true, false}) {
      const Plane truth{strike, 89};
      const Vec3 nrm = plane_normal_up(truth);
      CheckInput in;
      CheckContact c;
      c.uuid = "V";
      c.name = "steep";
      c.type = "depositional";
      c.lower_unit = "L";
      c.upper_unit = "U";
      std::mt19937_64 rng(17);
      std::uniform_real_distribution<double> along(-300, 300), up(-30, 30);
      std::normal_distribution<double> g(0, 3.0);
      for (int i = 0; i < 30; ++i) {
        const double n = along(rng), z = 500 + up(rng);
        const double e = -(nrm.y() * n + nrm.z() * (z - 500)) / nrm.x();  // on the plane through (0, 0, 500)
        c.points.push_back({e + g(rng), n + g(rng), z + g(rng), 3, 3});
      }
      in.contacts.push_back(c);
      for (int i = 0; i < 5; ++i) {
        CheckStation east = station("e" + std::to_string(i), 60, -200 + 100.0 * i, 500);
        CheckStation west = station("w" + std::to_string(i), -60, -200 + 100.0 * i, 500);
        east.unit = younger_east ? "U" : "L";
        west.unit = younger_east ? "L" : "U";
        in.stations.push_back(east);
        in.stations.push_back(west);
      }
      CheckReport rep = run_crosscheck(in);
      ASSERT_TRUE(rep.fits[0].fit && rep.fits[0].fit->cone95);
      EXPECT_GE(rep.fits[0].fit->plane.dip + *rep.fits[0].fit->cone95, 90.0);
      EXPECT_TRUE(flags_of(rep, "facing-conflict").empty()) << strike << " " << younger_east;
      auto notes = flags_of(rep, "weak-geometry");
      ASSERT_EQ(notes.size(), 1u) << strike << " " << younger_east;
      EXPECT_EQ(notes[0].cause, "facing-undecided");
      EXPECT_EQ(notes[0].severity, Severity::Note);
      EXPECT_NE(notes[0].action.find("way-up"), std::string::npos);
      EXPECT_FALSE(notes[0].caution.empty());
    }
  }
}

TEST(Crosscheck, GentleContactIsComparedAndFindsTheBadReading) {
  // 2 degrees of dip over 700 x 700 m, GPS 2 m / 3 m: relief of a few metres,
  // but a cone well under 1 degree, so a bedding reading 15 degrees off is found.
  const Plane truth{120, 2};
  CheckInput in;
  in.contacts.push_back(planar_contact(truth, "C1", 5, 30, 2.0, 3.0, 350.0));
  in.stations.push_back(station("1", 0, 0));
  in.planes.push_back(reading("bad", "1", Plane{120, 17}, "bedding", "C1"));
  in.planes.push_back(reading("ok", "1", Plane{150, 4}, "bedding", "C1"));  // near miss: 2.4 degrees off
  CheckReport rep = run_crosscheck(in);
  ASSERT_TRUE(rep.fits[0].usable) << rep.fits[0].verdict;
  ASSERT_TRUE(rep.fits[0].fit->cone95);
  EXPECT_LT(*rep.fits[0].fit->cone95, 1.0);
  EXPECT_TRUE(flags_of(rep, "weak-geometry").empty());
  auto m = flags_of(rep, "misfit");
  ASSERT_EQ(m.size(), 1u);
  EXPECT_EQ(m[0].reading, "bad");
}

TEST(Crosscheck, ThreePointsWithoutAccuraciesAreNotUsable) {
  CheckInput in;
  CheckContact c;
  c.uuid = "T";
  c.name = "three";
  c.points = {{0, 0, 100, 0, 0}, {300, 0, 130, 0, 0}, {0, 300, 90, 0, 0}};
  in.contacts.push_back(c);
  in.stations.push_back(station("1", 0, 0));
  in.planes.push_back(reading("r", "1", Plane{200, 60}, "bedding", "T"));
  CheckReport rep = run_crosscheck(in);
  EXPECT_FALSE(rep.fits[0].usable);
  auto w = flags_of(rep, "weak-geometry");
  ASSERT_EQ(w.size(), 1u);
  EXPECT_NE(w[0].message.find("uncertainty is unknown"), std::string::npos);
  EXPECT_TRUE(flags_of(rep, "misfit").empty());
}

TEST(Crosscheck, ConvergencePerContact) {
  // Grid azimuths gain the convergence (definition of meridian convergence): a
  // contact given its own grid factors is turned by them, not the project's.
  CheckInput in;
  in.contacts.push_back(planar_contact(Plane{40, 30}, "A", 8));
  in.contacts.push_back(planar_contact(Plane{40, 30}, "B", 8));
  in.contacts[1].grid = GridFactors{2.5, 1.0};
  CheckReport rep = run_crosscheck(in);
  ASSERT_TRUE(rep.fits[0].plane && rep.fits[1].plane);
  EXPECT_NEAR(azimuth_difference(rep.fits[1].plane->strike, rep.fits[0].plane->strike), 2.5, 1e-6);
}

TEST(Crosscheck, RepeatMeanIsTheFisherMean) {
  // Four poles tilted 3 degrees either way about two axes at right angles to the
  // true pole: their mean is the true pole, and R = 4 cos 3 (Fisher 1953).
  const Plane truth{130, 40};
  const Vec3 p = pole_vector(truth);
  const Vec3 a = p.unitOrthogonal(), b = p.cross(a);
  std::vector<Plane> ps;
  for (const Vec3& axis : std::vector<Vec3>{a, -a, b, -b}) {
    const Vec3 q = std::cos(deg2rad(3)) * p + std::sin(deg2rad(3)) * axis;
    ps.push_back(plane_from_pole(line_from_vector(q)));
  }
  auto m = repeat_mean(ps);
  ASSERT_TRUE(m.ok()) << m.error();
  EXPECT_NEAR(angle_between_planes(m->plane, truth), 0.0, 1e-6);
  EXPECT_EQ(m->n, 4u);
  const double N = 4, R = 4 * std::cos(deg2rad(3));
  const double a95 = rad2deg(std::acos(1 - (N - R) / R * (std::pow(20.0, 1 / (N - 1)) - 1)));
  ASSERT_TRUE(m->alpha95);
  EXPECT_NEAR(*m->alpha95, a95, 1e-6);
  EXPECT_FALSE(repeat_mean({truth}).ok());
}

TEST(Crosscheck, RepeatedReadingsAreComparedByTheirMeasuredSpread) {
  // Three careful readings of one surface, all about 8 degrees off the contact
  // and within half a degree of each other: one alone is within a grade-5
  // tolerance (about 9 degrees), but their mean, known to a degree or so, is not.
  const Plane truth{40, 25};
  auto build = [&](bool marked) {
    CheckInput in = one_contact(truth);
    const Plane off[] = {{48, 31}, {48.5, 30.6}, {47.6, 31.3}};
    for (int i = 0; i < 3; ++i) {
      CheckPlane r = reading(std::string(1, char('a' + i)), "1", off[i], "bedding", "C1");
      r.time_minutes = 100.0 + i;  // minutes apart: would look like entries made twice
      if (marked && i > 0) r.repeat_of = "a";
      in.planes.push_back(r);
    }
    return in;
  };
  // Near miss: not marked as repeats, each reading is judged alone and passes.
  CheckReport alone = run_crosscheck(build(false));
  EXPECT_TRUE(flags_of(alone, "misfit").empty());
  CheckReport rep = run_crosscheck(build(true));
  auto m = flags_of(rep, "misfit");
  ASSERT_EQ(m.size(), 1u);
  EXPECT_EQ(m[0].reading, "a");  // one flag for the surface, on its first reading
  EXPECT_NE(m[0].message.find("Fisher mean of 3 readings"), std::string::npos) << m[0].message;
  EXPECT_FALSE(m[0].corrected);
  EXPECT_TRUE(flags_of(rep, "duplicate").empty());  // marked repeats are not entries made twice
}

TEST(Crosscheck, WithoutAFitACrewMembersDayIsComparedWithTheCrew) {
  // CD's readings agree with the contact's fit, so CD's day can be a reference.
  // AB's readings name no contact; at a station 50 m away they are compared with
  // CD's readings of the same surface and need a common turn of about +12 (a
  // 12 degree east declination not applied).
  auto build = [](double ab_station_east, bool cd_on_contact) {
    const Plane truth{15, 65};
    CheckInput in = one_contact(truth);
    in.stations.push_back(station("2", ab_station_east, 0));
    const double noise[] = {1.0, -1.5, 0.5, -0.5, 1.5};
    for (int i = 0; i < 4; ++i) {
      CheckPlane r = reading("cd" + std::to_string(i), "1", Plane{truth.strike + noise[i], truth.dip}, "bedding",
                             cd_on_contact ? "C1" : "");
      r.observer = "CD";
      r.day = "2026-07-14";
      in.planes.push_back(r);
    }
    for (int i = 0; i < 5; ++i) {
      CheckPlane r = reading("ab" + std::to_string(i), "2", Plane{truth.strike - 12 + noise[4 - i], truth.dip});
      r.observer = "AB";
      r.day = "2026-07-14";
      r.quality = 3;
      r.local_declination = 12.0;
      in.planes.push_back(r);
    }
    return in;
  };
  auto groups = [](const CheckReport& rep) {
    std::vector<Flag> g;
    for (const auto& f : rep.flags)
      if (!f.readings.empty()) g.push_back(f);
    return g;
  };
  auto g = groups(run_crosscheck(build(50, true)));
  ASSERT_EQ(g.size(), 1u);
  EXPECT_EQ(g[0].observer, "AB");
  EXPECT_EQ(g[0].rule, "declination-suspect");
  EXPECT_EQ(g[0].cause, "declination-not-applied");
  EXPECT_EQ(g[0].readings.size(), 5u);
  ASSERT_TRUE(g[0].rotation);
  EXPECT_NEAR(*g[0].rotation, 12.0, 1.5);
  // Near misses: no one within reach, or a reference day never checked against a fit.
  EXPECT_TRUE(groups(run_crosscheck(build(500, true))).empty());
  EXPECT_TRUE(groups(run_crosscheck(build(50, false))).empty());
}

// The report keeps each contact's fit as fit_plane made it, Monte Carlo draws
// included (they move into the report, once, instead of being copied): the
// same draws, cone and intervals as fitting the same points directly. Source:
// fit_plane on the same points (a fixed seed gives the same draws).
TEST(Crosscheck, ReportKeepsTheFitsDrawsUnchanged) {
  const CheckInput in = one_contact(Plane{40, 35});
  const CheckReport rep = run_crosscheck(in);
  ASSERT_EQ(rep.fits.size(), 1u);
  ASSERT_TRUE(rep.fits[0].fit);
  const PlaneFit& kept = *rep.fits[0].fit;
  const auto direct = fit_plane(in.contacts[0].points);
  ASSERT_TRUE(direct);
  ASSERT_EQ(direct->draws.size(), 1000u);
  ASSERT_EQ(kept.draws.size(), direct->draws.size());
  for (size_t i = 0; i < kept.draws.size(); ++i) {
    EXPECT_EQ(kept.draws[i].point, direct->draws[i].point) << "draw " << i;
    EXPECT_EQ(kept.draws[i].normal, direct->draws[i].normal) << "draw " << i;
  }
  EXPECT_EQ(*kept.cone95, *direct->cone95);
  const auto a = elevation_at(kept, 300, -250), b = elevation_at(*direct, 300, -250);
  ASSERT_TRUE(a && b && a->half_width95 && b->half_width95);
  EXPECT_EQ(*a->half_width95, *b->half_width95);
  EXPECT_GT(*a->half_width95, 0.0);
}
