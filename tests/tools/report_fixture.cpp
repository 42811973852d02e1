// report_fixture PATH: writes a small invented project through the storage API for
// tests/reference/test_report.py (`cairn report` on it). Everything is invented:
// two mappers, two units, one contact mapped with eight points on a plane that dips
// 30 degrees toward 120 (strike 030 by the right-hand rule), bedding near that
// attitude at twenty stations over two days, one overturned bed, foliation and
// lineations, a magnetic reading, and a slope face under which the bedding
// daylights (so the cross-check raises a hazard with its caution). Names carry
// XML's special characters and non-ASCII letters, so the report's escaping is tested.
#include <cmath>
#include <cstdio>
#include <iostream>
#include <string>

#include "storage/project.h"
#include "storage/repository.h"

using namespace cairn::store;

namespace {

constexpr double kPi = 3.14159265358979323846;
constexpr double kLat0 = 46.5, kLon0 = 8.0, kZ0 = 1500;

// Local offsets in metres -> latitude/longitude (a spherical approximation is
// enough: the fixture only needs plausible, distinct places).
void place(double east, double north, double& lat, double& lon) {
  lat = kLat0 + north / 111320.0;
  lon = kLon0 + east / (111320.0 * std::cos(kLat0 * kPi / 180));
}

// Elevation of the contact plane (dip 30 toward azimuth 120) at an offset.
double contact_z(double east, double north) {
  const double dd = 120 * kPi / 180;
  const double down_dip = east * std::sin(dd) + north * std::cos(dd);
  return kZ0 - std::tan(30 * kPi / 180) * down_dip;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc != 2) {
    std::cerr << "usage: report_fixture PATH.cairn\n";
    return 2;
  }
  try {
    OpenOptions oo;
    oo.backups = false;
    Project p = Project::create(argv[1], NewProject{"Test ridge <&> \"α\" 'q'", "32N", North::True, 2.5}, oo);
    p.write([&] {
      Person a;
      a.name = "Ana Quill";
      a.initials = "AQ";
      const std::string aq = add(p, a);
      Person b;
      b.name = "Bo Reed";
      b.initials = "BR";
      const std::string br = add(p, b);

      Unit lower;
      lower.code = "Ka";
      lower.name = "lower sandstone";
      lower.age_rank = 1;
      const std::string ka = add(p, lower);
      Unit upper;
      upper.code = "Kb<&>";
      upper.name = "\"upper\" marl & 'shale' – ä";
      upper.age_rank = 2;
      upper.colour = "#CC79A7";
      const std::string kb = add(p, upper);

      Contact c;
      c.name = "Ka/Kb <base>";
      c.lower_unit = ka;
      c.upper_unit = kb;
      c.type = ContactType::Depositional;
      const std::string contact = add(p, c);

      // Eight points on the plane, spread in both directions (not collinear).
      for (double e : {-300.0, -100.0, 100.0, 300.0})
        for (double n : {-200.0, 200.0}) {
          ContactPoint q;
          q.contact = contact;
          place(e, n, q.lat, q.lon);
          q.elevation = contact_z(e, n);
          q.h_accuracy = 2;
          q.v_accuracy = 3;
          q.time = "2026-07-06T15:00:00Z";
          q.observer = aq;
          add(p, q);
        }

      // Twenty stations along two traverses; bedding scattered about 030/30.
      for (int i = 0; i < 20; ++i) {
        const bool day1 = i < 12;
        Station s;
        s.code = (day1 ? "AQ-" : "BR-") + std::to_string(i + 1);
        const double e = -400 + 40 * i, n = day1 ? -260 + 15 * i : 240 - 10 * i;
        place(e, n, s.lat, s.lon);
        s.elevation = contact_z(e, n) + (day1 ? -20 : 20);
        s.h_accuracy = 3;
        s.v_accuracy = 5;
        s.unit = day1 ? ka : kb;
        s.observer = day1 ? aq : br;
        char when[32];
        std::snprintf(when, sizeof when, "%sT%02d:00:00Z", day1 ? "2026-07-06" : "2026-07-07", 8 + i % 12);
        s.time = when;
        const std::string st = add(p, s);

        PlanarReading r;
        r.station = st;
        r.kind = PlaneKind::Bedding;
        r.measured_strike = 30 + 7 * std::sin(i * 1.7);
        r.measured_dip = 30 + 5 * std::cos(i * 2.3);
        r.quality = 4;
        r.time = s.time;
        r.observer = s.observer;
        r.ref = "b" + std::to_string(i + 1);
        if (i % 4 == 0) r.contact = contact;
        if (i == 7) {
          r.facing = Facing::Overturned;
          r.measured_strike = 210;
          r.measured_dip = 75;
        }
        if (i == 9) r.north = North::Magnetic;  // declination from the project setting
        add(p, r);

        if (i % 5 == 1) {
          PlanarReading f;
          f.station = st;
          f.kind = PlaneKind::Foliation;
          f.measured_strike = 100 + 3 * i;
          f.measured_dip = 60;
          f.time = s.time;
          f.ref = "f" + std::to_string(i + 1);
          add(p, f);
        }
        if (i % 3 == 0) {
          LinearReading l;
          l.station = st;
          l.kind = LineKind::Lineation;
          l.measured_trend = 120 + 2 * (i % 5);
          l.measured_plunge = 28 + (i % 4);
          l.time = s.time;
          l.ref = "l" + std::to_string(i + 1);
          add(p, l);
        }
        if (i == 15) {
          // A steep slope face dipping the same way as the bedding: the bedding
          // daylights and is steeper than the friction angle (planar sliding).
          PlanarReading face;
          face.station = st;
          face.kind = PlaneKind::Slope;
          face.measured_strike = 30;
          face.measured_dip = 55;
          face.ref = "slope";
          face.time = s.time;
          add(p, face);
          PlanarReading bed;
          bed.station = st;
          bed.kind = PlaneKind::Bedding;
          bed.measured_strike = 32;
          bed.measured_dip = 40;
          bed.ref = "b-face";
          bed.time = s.time;
          add(p, bed);
        }
      }
    });
    std::cout << "wrote " << argv[1] << "\n";
  } catch (const std::exception& e) {
    std::cerr << "report_fixture: " << e.what() << "\n";
    return 1;
  }
  return 0;
}
