// Text notations for planes and lines. The notations are the trade's own
// (right-hand-rule strike/dip, dip direction/dip, quadrant notation; common
// practice, e.g. as taught in structural geology field courses — from memory).
#include <gtest/gtest.h>

#include "geomath/angles.h"
#include "geomath/notation.h"

using namespace cairn::geo;

namespace {
Plane ok_plane(const std::string& t, PlaneConvention c = PlaneConvention::Unspecified) {
  auto r = parse_plane(t, c);
  EXPECT_TRUE(r.ok()) << t << ": " << r.error();
  return r.ok() ? *r : Plane{};
}
std::string err_plane(const std::string& t, PlaneConvention c = PlaneConvention::Unspecified) {
  auto r = parse_plane(t, c);
  EXPECT_FALSE(r.ok()) << t << " parsed unexpectedly";
  return r.ok() ? "" : r.error();
}
}  // namespace

TEST(Notation, QuadrantExamples) {
  // N01E 10.5E: strike 001 dipping east -> RHR strike 001, dip direction 091.
  Plane a = ok_plane("N01E 10.5E");
  EXPECT_NEAR(a.strike, 1, 1e-12);
  EXPECT_NEAR(a.dip, 10.5, 1e-12);
  // N30W 45SW: strike line 330/150 dipping SW -> dip direction 240, RHR strike 150.
  Plane b = ok_plane("N30W 45SW");
  EXPECT_NEAR(b.strike, 150, 1e-12);
  EXPECT_NEAR(b.dip, 45, 1e-12);
  // S20E 30W: strike line 160/340, dips to 250 -> RHR strike 160.
  Plane c = ok_plane("S20E 30W");
  EXPECT_NEAR(c.strike, 160, 1e-12);
  // Spacing and degree signs are optional.
  Plane d = ok_plane("N30W45SW");
  EXPECT_NEAR(d.strike, 150, 1e-12);
  Plane e = ok_plane("n30°w 45°sw");
  EXPECT_NEAR(e.strike, 150, 1e-12);
}

TEST(Notation, AzimuthForms) {
  Plane a = ok_plane("030/40", PlaneConvention::StrikeDipRHR);
  EXPECT_NEAR(a.dip_direction(), 120, 1e-12);
  Plane b = ok_plane("120/40", PlaneConvention::DipDirectionDip);
  EXPECT_NEAR(b.strike, 30, 1e-12);
  // With a dip quadrant the text describes itself: no convention needed.
  Plane c = ok_plane("210/40SE");
  EXPECT_NEAR(c.strike, 30, 1e-12);
  Plane d = ok_plane("30 40 nw");
  EXPECT_NEAR(d.strike, 210, 1e-12);
  Plane e = ok_plane("360/10", PlaneConvention::StrikeDipRHR);
  EXPECT_NEAR(e.strike, 0, 1e-12);
  // One dip letter names the side of the strike line (common field usage, no
  // published source): strike N30E dips towards 120 (the S side) or 300 (the N side).
  EXPECT_NEAR(ok_plane("N30E 40S").dip_direction(), 120, 1e-12);
  EXPECT_NEAR(ok_plane("N30E 40N").dip_direction(), 300, 1e-12);
  EXPECT_NEAR(ok_plane("030/40S").dip_direction(), 120, 1e-12);
}

TEST(Notation, InvalidInputTable) {
  // Each invalid input and the exact message that names what is wrong.
  EXPECT_EQ(err_plane("030/95", PlaneConvention::StrikeDipRHR), "dip 95 is out of range: 0 to 90");
  EXPECT_EQ(err_plane("361/40", PlaneConvention::StrikeDipRHR), "strike 361 is out of range: 0 to 360");
  EXPECT_EQ(err_plane("N30E 40NE"),
            "dip quadrant NE contradicts strike N30E: a plane of that strike dips towards S60E or N60W");
  EXPECT_EQ(err_plane("N0E 40N"),  // a letter along the strike line names neither side
            "dip quadrant N contradicts strike N0E: a plane of that strike dips towards N90E or S90W");
  EXPECT_EQ(err_plane(""), "empty attitude: enter strike and dip, e.g. 030/40 or N30E 40SE");
  EXPECT_EQ(err_plane("   "), "empty attitude: enter strike and dip, e.g. 030/40 or N30E 40SE");
  EXPECT_EQ(err_plane("NaN/40"),
            "attitude 'NaN/40' is not understood: expected strike/dip such as 030/40, or N30E 40SE");
  EXPECT_EQ(err_plane("030/nan", PlaneConvention::StrikeDipRHR), "dip 'NAN' is not a number");
  EXPECT_EQ(err_plane("030/40 x", PlaneConvention::StrikeDipRHR), "unexpected 'X' after the dip");
  EXPECT_EQ(err_plane("030/40SE7"), "unexpected '7' after the dip");
  EXPECT_EQ(err_plane("N95E 40S"), "strike: quadrant angle 95 is out of range: 0 to 90");
  EXPECT_EQ(err_plane("N30E 40"), "quadrant notation needs the dip quadrant after the dip: N30E 40SE or N30E 40NW?");
  EXPECT_EQ(
      err_plane("030/40"),
      "attitude '030/40' is ambiguous: as strike/dip (right-hand rule) it dips 40 towards 120; "
      "as dip direction/dip it dips 40 towards 030. Say which convention, or add the dip quadrant (e.g. 030/40SE)");
  EXPECT_EQ(err_plane("120/40NE", PlaneConvention::DipDirectionDip), "dip quadrant NE contradicts dip direction 120");
  EXPECT_EQ(err_plane("030/40Q", PlaneConvention::StrikeDipRHR), "unexpected 'Q' after the dip");
  EXPECT_EQ(err_plane("030/-4", PlaneConvention::StrikeDipRHR), "dip '-4' is not a number");
}

TEST(Notation, QuadrantRoundTripEveryHalfDegree) {
  // Every strike and dip in 0.5 degree steps survives format -> parse.
  for (int s2 = 0; s2 < 720; ++s2) {
    for (int d2 = 0; d2 <= 180; ++d2) {
      Plane p{s2 * 0.5, d2 * 0.5};
      const std::string q = format_quadrant(p);
      auto back = parse_plane(q);
      ASSERT_TRUE(back.ok()) << q << ": " << back.error();
      EXPECT_NEAR(angle_between_planes(p, *back), 0, 1e-9) << q;
      if (d2 > 0 && d2 < 180) {
        EXPECT_NEAR(std::abs(azimuth_difference(back->strike, p.strike)), 0, 1e-9) << q;
      }
      auto rhr = parse_plane(format_strike_dip(p), PlaneConvention::StrikeDipRHR);
      ASSERT_TRUE(rhr.ok());
      EXPECT_NEAR(std::abs(azimuth_difference(rhr->strike, p.strike)), 0, 1e-9);
      EXPECT_NEAR(rhr->dip, p.dip, 1e-12);
      auto dd = parse_plane(format_dip_direction(p), PlaneConvention::DipDirectionDip);
      ASSERT_TRUE(dd.ok());
      EXPECT_NEAR(std::abs(azimuth_difference(dd->strike, p.strike)), 0, 1e-9);
    }
  }
}

TEST(Notation, Formatting) {
  EXPECT_EQ(format_strike_dip({30, 40}), "030/40");
  EXPECT_EQ(format_strike_dip({30.5, 10.5}), "030.5/10.5");
  EXPECT_EQ(format_dip_direction({30, 40}), "120/40");
  EXPECT_EQ(format_quadrant({30, 40}), "N30E 40SE");
  EXPECT_EQ(format_quadrant({150, 45}), "N30W 45SW");
  EXPECT_EQ(format_quadrant({1, 10.5}), "N01E 10.5E");
  EXPECT_EQ(format_quadrant_azimuth(200), "S20W");
  EXPECT_EQ(format_strike_dip({359.97, 5}), "000/05");
}

TEST(Notation, Lines) {
  auto a = parse_line("120/35");
  ASSERT_TRUE(a.ok());
  EXPECT_NEAR(a->trend, 120, 1e-12);
  EXPECT_NEAR(a->plunge, 35, 1e-12);
  auto b = parse_line("S60E 35");
  ASSERT_TRUE(b.ok());
  EXPECT_NEAR(b->trend, 120, 1e-12);
  EXPECT_EQ(parse_line("120/95").error(), "plunge 95 is out of range: 0 to 90");
  EXPECT_EQ(parse_line("").error(), "empty line attitude: enter trend/plunge, e.g. 120/35");
  EXPECT_EQ(parse_line("120/35 up").error(), "unexpected 'UP' after the plunge");
  EXPECT_EQ(format_trend_plunge({5, 7.25}), "005/07.3");
}

TEST(Notation, Rake) {
  // Rake measured in the plane from the RHR strike direction (definition of rake; common practice).
  Plane host{90, 30};  // strikes east, dips south
  auto r90 = parse_rake("90", host);
  ASSERT_TRUE(r90.ok());
  EXPECT_NEAR(r90->trend, 180, 1e-9);
  EXPECT_NEAR(r90->plunge, 30, 1e-9);
  // 30 from the east end vs 30 from the west end are mirror images about the dip line.
  auto e = parse_rake("30E", host), w = parse_rake("30W", host);
  ASSERT_TRUE(e.ok() && w.ok());
  EXPECT_NEAR(rake_of_line(host, *e), 30, 1e-9);
  EXPECT_NEAR(rake_of_line(host, *w), 150, 1e-9);
  // Format back: every rake in 0.5 degree steps survives format -> parse on several hosts.
  for (const Plane h : {Plane{90, 30}, Plane{213, 71}, Plane{5, 12.5}}) {
    for (int r2 = 0; r2 < 360; ++r2) {
      const Line l = line_from_rake(h, r2 * 0.5);
      auto back = parse_rake(format_rake(h, l), h);
      ASSERT_TRUE(back.ok()) << format_rake(h, l) << ": " << back.error();
      EXPECT_NEAR(angle_between_lines(l, *back), 0, 1e-9) << format_rake(h, l);
    }
  }
  EXPECT_EQ(format_rake(host, *e), "30");
  EXPECT_EQ(parse_rake("30N", host).error(), "strike end N is ambiguous for strike 090");
  EXPECT_EQ(parse_rake("190", host).error(), "rake 190 is out of range: 0 to 180");
}
