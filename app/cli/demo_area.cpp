#include "app/cli/demo_area.h"

#include <cmath>
#include <cstdio>
#include <random>
#include <stdexcept>
#include <fmt/format.h>

#include "geomath/angles.h"
#include "geomath/geodesy.h"
#include "geomath/notation.h"
#include "geomath/orientation.h"
#include "formats/csv.h"
#include "geomath/decimal.h"

namespace cairn::cli::demo {

using geo::deg2rad;
using geo::Plane;

namespace {

// The area's origin: an invented place at a plausible latitude and longitude in
// the far north-west, where the magnetic declination is large (about 18 degrees east).
constexpr double kLat0 = 61.20, kLon0 = -135.60;
constexpr int kZone = 8;
const char* const kTimeOffset = "-07:00";  // local time of the field area
constexpr int kOffsetMinutes = -7 * 60;

// A portable random source: mt19937_64 is fully specified by the C++ standard,
// and the distributions below are our own, so every machine draws the same demo.
class Rng {
 public:
  explicit Rng(std::uint64_t seed) : g_(seed) {}
  double uniform(double lo, double hi) { return lo + (hi - lo) * (static_cast<double>(g_() >> 11) * 0x1.0p-53); }
  int integer(int lo, int hi) { return lo + static_cast<int>(uniform(0, hi - lo + 1 - 1e-9)); }
  double normal(double sigma) {  // Box-Muller
    const double u1 = std::max(uniform(0, 1), 1e-300), u2 = uniform(0, 1);
    return sigma * std::sqrt(-2.0 * std::log(u1)) * std::cos(2.0 * geo::kPi * u2);
  }
  std::string uuid() {
    const std::uint64_t a = g_(), b = g_();
    return fmt::format("{:08x}-{:04x}-4{:03x}-{:04x}-{:012x}", static_cast<unsigned>(a >> 32),
                       static_cast<unsigned>((a >> 16) & 0xffff), static_cast<unsigned>(a & 0xfff),
                       static_cast<unsigned>(0x8000 | ((b >> 48) & 0x3fff)),
                       static_cast<unsigned long long>(b & 0xffffffffffffULL));
  }

 private:
  std::mt19937_64 g_;
};

// Local frame: metres east and north of the origin in UTM zone 8N (grid).
class Frame {
 public:
  Frame() {
    auto o = geo::to_utm({kLat0, kLon0}, geo::UtmZone{kZone, true});
    if (!o) throw std::logic_error(o.error());
    e0_ = o->easting;
    n0_ = o->northing;
    auto g = geo::utm_grid_factors({kLat0, kLon0}, geo::UtmZone{kZone, true});
    if (!g) throw std::logic_error(g.error());
    convergence_ = g->convergence;
  }
  geo::LatLon latlon(double e, double n) const {
    auto ll = geo::from_utm({kZone, true, e0_ + e, n0_ + n});
    if (!ll) throw std::logic_error(ll.error());
    return *ll;
  }
  // A true-north azimuth as seen on the grid.
  double to_grid(double az) const { return geo::wrap360(az - convergence_); }
  double to_true(double az) const { return geo::wrap360(az + convergence_); }

 private:
  double e0_ = 0, n0_ = 0, convergence_ = 0;
};

// A planar contact: a plane (true north) through an anchor point on the terrain.
struct ContactPlane {
  Plane true_plane;
  double e0, n0, z0;
  double grid_dd;  // dip direction on the grid
  double z_at(double e, double n) const {
    const double dd = deg2rad(grid_dd);
    return z0 - std::tan(deg2rad(true_plane.dip)) * ((e - e0) * std::sin(dd) + (n - n0) * std::cos(dd));
  }
  // Height above the plane (positive on the side its upward normal points to).
  double side(double e, double n, double z) const { return z - z_at(e, n); }
};

struct Pos {
  double e, n, z;
};

// Where the contact meets the terrain, near the anchor shifted `s` metres along strike:
// searched along the dip direction for the sign change closest to the strike line.
Pos trace_point(const ContactPlane& c, double s) {
  const double st = deg2rad(c.grid_dd - 90.0), dd = deg2rad(c.grid_dd);
  const double be = c.e0 + s * std::sin(st), bn = c.n0 + s * std::cos(st);
  auto f = [&](double t) {
    const double e = be + t * std::sin(dd), n = bn + t * std::cos(dd);
    return c.z_at(e, n) - terrain(e, n);
  };
  double best = 1e9;
  for (double t = 0; t <= 1500; t += 5) {
    for (double sgn : {1.0, -1.0}) {
      const double a = sgn * t, b = sgn * (t + 5);
      if ((f(a) <= 0) != (f(b) <= 0)) {
        double lo = a, hi = b;
        for (int i = 0; i < 60; ++i) {
          const double mid = 0.5 * (lo + hi);
          ((f(lo) <= 0) == (f(mid) <= 0) ? lo : hi) = mid;
        }
        if (std::abs(lo) < std::abs(best)) best = lo;
      }
    }
    if (best < 1e8) break;
  }
  if (best > 1e8) throw std::logic_error("demo contact does not meet the terrain");
  const double e = be + best * std::sin(dd), n = bn + best * std::cos(dd);
  return {e, n, terrain(e, n)};
}

// Field days: day 1 is 2026-07-06.
struct Clock {
  int day = 1;
  int minute = 0;  // minutes after local midnight
  std::string local() const {
    return fmt::format("2026-07-{:02d}T{:02d}:{:02d}:00{}", 5 + day, minute / 60, minute % 60, kTimeOffset);
  }
  std::string utc() const {
    const int m = minute - kOffsetMinutes;  // local = UTC + offset
    return fmt::format("2026-07-{:02d}T{:02d}:{:02d}:00.000Z", 5 + day + m / 1440, (m % 1440) / 60, m % 60);
  }
};

store::RecordMeta meta(Rng& rng, const Clock& c, const std::string& device) {
  store::RecordMeta m;
  m.uuid = rng.uuid();
  m.created = m.updated = c.utc();
  m.device = device;
  return m;
}

// A plane with compass noise: the pole turned by a normal deviation of sigma degrees
// about two axes, and the dip kept in range.
Plane noisy(Rng& rng, const Plane& p, double sigma) {
  const geo::Vec3 pole = geo::pole_vector(p);
  const geo::Vec3 a = pole.unitOrthogonal(), b = pole.cross(a);
  const geo::Vec3 q = (pole + deg2rad(rng.normal(sigma)) * a + deg2rad(rng.normal(sigma)) * b).normalized();
  Plane out = geo::plane_from_pole(geo::line_from_vector(q));
  out.strike = std::round(out.strike);
  out.dip = std::round(out.dip);
  return out;
}

std::string typed_rhr(const Plane& p) { return geo::format_strike_dip(p); }

}  // namespace

double terrain(double e, double n) {
  // Documented synthetic topography: a valley floor at 900 m rising 60 m per km to
  // the north, a ridge 280 m high and about 1.4 km wide trending 011 degrees
  // (axis e = 300 + 0.2 n), a hollow 80 m deep in the west, and side gullies and
  // spurs (two sine waves of 90 and 60 m amplitude, 1.1 and 0.8 km wavelength)
  // that make mapped contacts wander across the slopes as real ones do.
  const double u = e - 300.0 - 0.2 * n;
  const double w = e + 1800.0;
  const double k1 = 2.0 * geo::kPi / 1100.0, k2 = 2.0 * geo::kPi / 800.0;
  return 900.0 + 0.06 * n + 280.0 * std::exp(-(u * u) / (2.0 * 600.0 * 600.0)) -
         80.0 * std::exp(-(w * w) / (2.0 * 500.0 * 500.0)) + 90.0 * std::sin(k1 * (0.6 * e + 0.8 * n)) +
         60.0 * std::sin(k2 * (0.9 * e - 0.44 * n) + 1.0);
}

int terrain_epsg() { return 32600 + kZone; }

geo::TerrainGrid terrain_grid(double cell) {
  const Frame frame;
  const geo::LatLon sw = frame.latlon(0, 0);
  auto o = geo::to_utm(sw, geo::UtmZone{kZone, true});
  if (!o) throw std::logic_error(o.error());
  geo::TerrainGrid g;
  g.cell = cell;
  g.west = std::floor((o->easting - 4000) / cell) * cell;
  g.north = std::ceil((o->northing + 3500) / cell) * cell;
  g.nx = static_cast<int>(std::lround(7000 / cell));
  g.ny = static_cast<int>(std::lround(6500 / cell));
  g.z.reserve(static_cast<std::size_t>(g.nx) * g.ny);
  for (int j = 0; j < g.ny; ++j)
    for (int i = 0; i < g.nx; ++i)
      g.z.push_back(static_cast<float>(terrain(g.centre_e(i) - o->easting, g.centre_n(j) - o->northing)));
  return g;
}

namespace {

// Builds the area one field day at a time. The steps run in a fixed order and all
// draw from one random source, so the order of the calls in build_area() is part
// of the demo: moving one changes every record after it.
class AreaBuilder {
 public:
  AreaBuilder() {
    area_.project_name = "Auska valley";
    area_.utm_zone = "8N";
    A_.file = "tablet-a.cairn";
    A_.device_name = "tablet A";
    A_.device_id = rng_.uuid();
    B_.file = "tablet-b.cairn";
    B_.device_name = "tablet B";
    B_.device_id = rng_.uuid();
  }

  void crew_units_and_contacts();
  void contacts_as_planes();
  void tablet_a_slate_base();
  void tablet_a_gneiss_fold();
  void tablet_a_ridge();
  void tablet_b_sandstone_base();
  void tablet_b_unconformity_fault_and_west();
  void notebook_typed_in_camp();
  void handheld_waypoints();

  Area take() { return std::move(area_); }

 private:
  // Magnetic declination of the area (WMM2025 at the origin in July 2026, rounded):
  // tablet B's mapper reads a compass without declination set.
  static constexpr double kDecl = 17.9;
  static constexpr double kSigma = 2.0;  // compass noise of a careful reading, degrees (common practice)

  static Plane magnetic(const Plane& truth) { return Plane{geo::wrap360(truth.strike - kDecl), truth.dip}; }
  std::string uid(const char* code) const;
  ContactPlane make_plane(const Plane& truth, double e0, double n0) const;
  Pos beside(const ContactPlane& c, double s, bool above, double tmin, double tmax);
  void add_point(Tablet& t, const store::Contact& c, const Pos& p, const Clock& clk, const store::Person& who, double h,
                 double v);
  const store::Station& add_station(Tablet& t, const std::string& code, double e, double n, const char* unit,
                                    const Clock& clk, const store::Person& who, const std::string& notes = "");
  void add_plane(Tablet& t, const store::Station& s, store::PlaneKind kind, const Plane& typed, store::North north,
                 const Clock& clk, const std::string& ref, const store::Contact* c = nullptr, int quality = 5,
                 const std::string& notes = "");
  void add_line(Tablet& t, const store::Station& s, store::LineKind kind, const geo::Line& l, store::North north,
                const Clock& clk, const std::string& ref);

  Rng rng_{20260706};
  const Frame frame_;
  Area area_;
  Tablet& A_ = area_.a;
  Tablet& B_ = area_.b;
  store::Person RO_, BK_, MT_;
  std::vector<store::Unit> units_;
  store::Contact C1_, C2_, C3_, C4_, C5_;
  ContactPlane P1_{}, P2_{}, P3_{};
  const Plane joint1_ = geo::plane_from_dip_direction(220, 80), joint2_ = geo::plane_from_dip_direction(40, 75);
  const Plane cleavage_ = geo::plane_from_dip_direction(300, 65);
};

// The season's shared set-up (the same records, same UUIDs, on both tablets).
void AreaBuilder::crew_units_and_contacts() {
  const Clock setup{1, 7 * 60};
  auto person = [&](const std::string& name, const std::string& ini) {
    store::Person p;
    p.meta = meta(rng_, setup, A_.device_id);
    p.name = name;
    p.initials = ini;
    return p;
  };
  RO_ = person("Rhian Ottery", "RO");
  BK_ = person("Benno Kask", "BK");
  MT_ = person("Mira Tallis", "MT");
  struct UnitDef {
    const char* code;
    const char* name;
    const char* colour;
  };
  // Colours from the Okabe & Ito (2008) palette.
  const UnitDef unit_defs[] = {{"Vg", "Vell gneiss", "#CC79A7"},    {"Sq", "Skarra quartzite", "#E69F00"},
                               {"Ss", "Skarra slate", "#56B4E9"},   {"Tc", "Tolm conglomerate", "#009E73"},
                               {"Ts", "Tolm sandstone", "#F0E442"}, {"Hg", "Hvalt granite", "#D55E00"}};
  for (int i = 0; i < 6; ++i) {
    store::Unit u;
    u.meta = meta(rng_, setup, A_.device_id);
    u.code = unit_defs[i].code;
    u.name = unit_defs[i].name;
    u.age_rank = i + 1;
    u.colour = unit_defs[i].colour;
    units_.push_back(u);
  }
  auto contact = [&](const char* name, const char* lower, const char* upper, store::ContactType t) {
    store::Contact c;
    c.meta = meta(rng_, setup, A_.device_id);
    c.name = name;
    c.lower_unit = uid(lower);
    c.upper_unit = uid(upper);
    c.type = t;
    return c;
  };
  C1_ = contact("Skarra slate base", "Sq", "Ss", store::ContactType::Depositional);
  C2_ = contact("Tolm unconformity", "Ss", "Tc", store::ContactType::Unconformity);
  C3_ = contact("Tolm sandstone base", "Tc", "Ts", store::ContactType::Depositional);
  C4_ = contact("Brenn fault", "Sq", "Tc", store::ContactType::Fault);
  C5_ = contact("Vell gneiss margin", "Vg", "Sq", store::ContactType::Unconformity);
  for (Tablet* t : {&A_, &B_}) {
    t->people = {RO_, BK_, MT_};
    t->units = units_;
    t->contacts = {C1_, C2_, C3_, C4_, C5_};
  }
  area_.gpx_contact = C2_.name;
}

// The true attitudes of the three planar contacts, each through an anchor on the ground.
void AreaBuilder::contacts_as_planes() {
  P1_ = make_plane(Plane{40, 35}, -900, -900);
  P2_ = make_plane(Plane{200, 20}, 0, 1400);
  P3_ = make_plane(Plane{10, 58}, 950, 300);
}

std::string AreaBuilder::uid(const char* code) const {
  for (const auto& u : units_)
    if (u.code == code) return u.meta.uuid;
  throw std::logic_error("unit");
}

ContactPlane AreaBuilder::make_plane(const Plane& truth, double e0, double n0) const {
  ContactPlane c;
  c.true_plane = truth;
  c.e0 = e0;
  c.n0 = n0;
  c.z0 = terrain(e0, n0);
  c.grid_dd = frame_.to_grid(truth.dip_direction());
  return c;
}

// A station beside a contact's trace, on the chosen side of the contact and far
// enough from it (15 m in height) that its side is not in doubt.
Pos AreaBuilder::beside(const ContactPlane& c, double s, bool above, double tmin, double tmax) {
  const double dd = deg2rad(c.grid_dd);
  for (int attempt = 0; attempt < 400; ++attempt) {
    const Pos tp = trace_point(c, s + (attempt / 20) * 7.0);
    const double t = (above ? 1 : -1) * rng_.uniform(tmin, tmax);
    const double e = tp.e + t * std::sin(dd), n = tp.n + t * std::cos(dd);
    const double side = c.side(e, n, std::round(terrain(e, n)));
    if ((side > 15.0 && above) || (side < -15.0 && !above)) return {e, n, terrain(e, n)};
  }
  throw std::logic_error("demo station cannot be placed beside its contact");
}

void AreaBuilder::add_point(Tablet& t, const store::Contact& c, const Pos& p, const Clock& clk,
                            const store::Person& who, double h, double v) {
  store::ContactPoint q;
  q.meta = meta(rng_, clk, t.device_id);
  q.contact = c.meta.uuid;
  const double e = p.e + rng_.normal(h), n = p.n + rng_.normal(h);
  const auto ll = frame_.latlon(e, n);
  q.lat = ll.lat;
  q.lon = ll.lon;
  q.elevation = std::round((p.z + rng_.normal(v)) * 10.0) / 10.0;
  q.h_accuracy = h;
  q.v_accuracy = v;
  q.source = store::PointSource::Gps;
  q.time = clk.local();
  q.observer = who.meta.uuid;
  t.points.push_back(q);
}

const store::Station& AreaBuilder::add_station(Tablet& t, const std::string& code, double e, double n, const char* unit,
                                               const Clock& clk, const store::Person& who, const std::string& notes) {
  store::Station s;
  s.meta = meta(rng_, clk, t.device_id);
  s.code = code;
  const auto ll = frame_.latlon(e, n);
  s.lat = ll.lat;
  s.lon = ll.lon;
  s.elevation = std::round(terrain(e, n));
  s.h_accuracy = 3;
  s.v_accuracy = 5;
  s.source = store::PositionSource::Gps;
  s.unit = uid(unit);
  s.observer = who.meta.uuid;
  s.time = clk.local();
  s.notes = notes;
  t.stations.push_back(s);
  return t.stations.back();
}

// A planar reading as typed on the tablet (right-hand rule). Magnetic readings
// are typed as read off the compass; storage applies the declination.
void AreaBuilder::add_plane(Tablet& t, const store::Station& s, store::PlaneKind kind, const Plane& typed,
                            store::North north, const Clock& clk, const std::string& ref, const store::Contact* c,
                            int quality, const std::string& notes) {
  store::PlanarReading r;
  r.meta = meta(rng_, clk, t.device_id);
  r.station = s.meta.uuid;
  r.kind = kind;
  r.typed = typed_rhr(typed);
  r.notation = store::PlaneNotation::StrikeDip;
  r.north = north;
  r.quality = quality;
  r.facing = store::Facing::Unknown;
  r.contact = c ? c->meta.uuid : "";
  r.ref = ref;
  r.time = clk.local();
  r.observer = s.observer;
  r.notes = notes;
  t.planes.push_back(r);
}

void AreaBuilder::add_line(Tablet& t, const store::Station& s, store::LineKind kind, const geo::Line& l,
                           store::North north, const Clock& clk, const std::string& ref) {
  store::LinearReading r;
  r.meta = meta(rng_, clk, t.device_id);
  r.station = s.meta.uuid;
  r.kind = kind;
  r.typed = geo::format_trend_plunge(geo::Line{std::round(l.trend), std::round(l.plunge)});
  r.north = north;
  r.ref = ref;
  r.time = clk.local();
  r.observer = s.observer;
  t.lines.push_back(r);
}

// Tablet A, days 1-2: the Skarra slate base (contact 1), two mappers.
void AreaBuilder::tablet_a_slate_base() {
  for (int day = 1; day <= 2; ++day) {
    const store::Person& who = day == 1 ? RO_ : BK_;
    Clock clk{day, 8 * 60 + 30};
    // PLANTED: on day 2 BK's compass had its declination left at zero: every
    // reading that day is magnetic but recorded as true north, so all are turned
    // by the declination. BK graded the day's readings 3 (wind), so each one alone
    // is within its tolerance; only the whole day shows it.
    const bool no_decl = who.initials == "BK";
    auto as_read = [&](const Plane& p) { return no_decl ? magnetic(p) : p; };
    const int grade = no_decl ? 3 : 5;
    for (int i = 0; i < 20; ++i) {  // contact points walked along the trace
      add_point(A_, C1_, trace_point(P1_, -850 + i * 90.0 + (day - 1) * 45.0), clk, who, 3, 5);
      clk.minute += 6;
    }
    for (int i = 1; i <= 12; ++i) {
      const std::string code = who.initials + "-" + geo::format_decimal("%02.0f", i);
      const double s = -800 + (i - 1) * 140.0 + (day - 1) * 60.0;
      // Alternate sides of the contact: slate above, quartzite below.
      const bool above = (i + day) % 2 == 0;
      const Pos sp = beside(P1_, s, above, 60, 220);
      clk.minute += 12;
      const store::Station& st = add_station(A_, code, sp.e, sp.n, above ? "Ss" : "Sq", clk, who);
      Plane bed = noisy(rng_, P1_.true_plane, kSigma);
      if (who.initials == "RO" && i == 7) {
        bed = Plane{geo::wrap360(bed.strike + 180.0), bed.dip};  // PLANTED: right-hand-rule slip
      }
      bed = as_read(bed);
      add_plane(A_, st, store::PlaneKind::Bedding, bed, store::North::True, clk, code + "a", &C1_, grade);
      clk.minute += 4;
      if (above) {
        const Plane cl = as_read(noisy(rng_, cleavage_, kSigma));
        add_plane(A_, st, store::PlaneKind::Cleavage, cl, store::North::True, clk, code + "b", nullptr, grade);
        auto l = geo::intersection_line(bed, cl);
        if (l && i % 2 == 0) add_line(A_, st, store::LineKind::Intersection, *l, store::North::True, clk, code + "L");
        clk.minute += 4;
        add_plane(A_, st, store::PlaneKind::Joint, as_read(noisy(rng_, joint2_, kSigma)), store::North::True, clk,
                  code + "c", nullptr, grade);
      } else {
        add_plane(A_, st, store::PlaneKind::Joint, as_read(noisy(rng_, i % 4 == 1 ? joint1_ : joint2_, kSigma)),
                  store::North::True, clk, code + "b", nullptr, grade);
      }
      if (who.initials == "BK" && i == 5) {
        // PLANTED: a bedding plane that daylights under a steep slope face.
        clk.minute += 4;
        add_plane(A_, st, store::PlaneKind::Slope,
                  as_read(geo::plane_from_dip_direction(P1_.true_plane.dip_direction(), 62)), store::North::True, clk,
                  code + "s", nullptr, 4, "cliff face above the track");
      }
      clk.minute += 3;
    }
  }
}

// Tablet A, day 3: the Vell gneiss margin, folded (contact 5).
void AreaBuilder::tablet_a_gneiss_fold() {
  Clock clk{3, 8 * 60 + 15};
  // The folded surface: an antiform with its hinge along e = -2000, limbs dipping
  // about 38 degrees either way; its trace is where it meets the terrain.
  auto folded = [](double e, double n) { return 1010.0 + 0.05 * n - 0.78 * std::abs(e + 2000.0); };
  for (int i = 0; i < 40; ++i) {
    const double n = -400 + (i / 2) * 60.0;
    const double sgn = i % 2 ? 1.0 : -1.0;
    double lo = 0, hi = 800;
    auto f = [&](double d) {
      const double e = -2000 + sgn * d;
      return folded(e, n) - terrain(e, n);
    };
    if ((f(lo) > 0) == (f(hi) > 0)) throw std::logic_error("demo fold does not meet the terrain");
    for (int k = 0; k < 60; ++k) {
      const double mid = 0.5 * (lo + hi);
      ((f(lo) > 0) == (f(mid) > 0) ? lo : hi) = mid;
    }
    const double e = -2000 + sgn * lo;
    add_point(A_, C5_, {e, n, terrain(e, n)}, clk, RO_, 3, 5);
    clk.minute += 5;
  }
  for (int i = 1; i <= 10; ++i) {
    const std::string code = "RO-" + geo::format_decimal("%02.0f", 12 + i);
    const double n = -350 + i * 100.0, e = -2000 + (i % 2 ? 1 : -1) * rng_.uniform(450, 650);
    clk.minute += 10;
    const store::Station& st = add_station(A_, code, e, n, "Vg", clk, RO_);
    const Plane fol = noisy(rng_, geo::plane_from_dip_direction(e > -2000 ? 90 : 270, 38), 4);
    add_plane(A_, st, store::PlaneKind::Foliation, fol, store::North::True, clk, code + "a", nullptr, 4);
    clk.minute += 4;
    if (i <= 8)
      add_line(A_, st, store::LineKind::FoldAxis, {geo::wrap360(rng_.uniform(-4, 4)), 4 + rng_.uniform(0, 3)},
               store::North::True, clk, code + "F");
    add_plane(A_, st, store::PlaneKind::Joint, noisy(rng_, i % 2 ? joint1_ : joint2_, 3), store::North::True, clk,
              code + "b");
  }
}

// Tablet A, day 4: scattered stations on the ridge.
void AreaBuilder::tablet_a_ridge() {
  Clock clk{4, 8 * 60};
  for (int i = 1; i <= 10; ++i) {
    const std::string code = "BK-" + geo::format_decimal("%02.0f", 12 + i);
    const double e = rng_.uniform(-300, 600), n = rng_.uniform(-1900, -1200);
    clk.minute += 20;
    const store::Station& st = add_station(A_, code, e, n, "Sq", clk, BK_);
    const Plane joint = noisy(rng_, joint1_, 3);
    add_plane(A_, st, store::PlaneKind::Joint, joint, store::North::True, clk, code + "a");
    clk.minute += 4;
    add_plane(A_, st, store::PlaneKind::Vein, noisy(rng_, geo::plane_from_dip_direction(160, 55), 5),
              store::North::True, clk, code + "b");
    if (i == 4) {
      // PLANTED: the same joint entered twice, three minutes apart.
      clk.minute += 3;
      add_plane(A_, st, store::PlaneKind::Joint, joint, store::North::True, clk, code + "c");
    }
    add_line(A_, st, store::LineKind::Lineation, {rng_.uniform(20, 40), rng_.uniform(10, 25)}, store::North::True, clk,
             code + "L");
  }
}

// Tablet B (magnetic compass readings, no declination set), days 1-2: the Tolm
// sandstone base (contact 3), an overturned limb nobody marked.
void AreaBuilder::tablet_b_sandstone_base() {
  for (int day = 1; day <= 2; ++day) {
    Clock clk{day, 8 * 60 + 45};
    for (int i = 0; i < 15; ++i) {
      add_point(B_, C3_, trace_point(P3_, -750 + i * 105.0 + (day - 1) * 50.0), clk, MT_, 3, 5);
      clk.minute += 6;
    }
    for (int i = 1; i <= 8; ++i) {
      const int k = (day - 1) * 8 + i;
      const std::string code = "MT-" + geo::format_decimal("%02.0f", k);
      // PLANTED: overturned limb: the younger sandstone lies on the lower side of the
      // contact (west), the conglomerate on its upper side (east).
      const bool above = k % 2 == 0;
      const Pos sp = beside(P3_, -700 + (k - 1) * 95.0, above, 40, 160);
      clk.minute += 15;
      const store::Station& st = add_station(B_, code, sp.e, sp.n, above ? "Tc" : "Ts", clk, MT_);
      const Plane bed = noisy(rng_, P3_.true_plane, kSigma);
      // PLANTED (k = 4 and 11): read off the compass (magnetic) but recorded as true north.
      const store::North bed_north = (k == 4 || k == 11) ? store::North::True : store::North::Magnetic;
      add_plane(B_, st, store::PlaneKind::Bedding, magnetic(bed), bed_north, clk, code + "a", &C3_);
      clk.minute += 4;
      add_plane(B_, st, store::PlaneKind::Joint, magnetic(noisy(rng_, k % 2 ? joint1_ : joint2_, kSigma)),
                store::North::Magnetic, clk, code + "b");
      if (k % 4 == 0) {
        const geo::Line lin = geo::line_from_rake(bed, 75);
        add_line(B_, st, store::LineKind::Lineation, {geo::wrap360(lin.trend - kDecl), lin.plunge},
                 store::North::Magnetic, clk, code + "L");
      }
    }
  }
}

// Tablet B, days 3-4: the Tolm unconformity (contact 2), whose trace is walked with
// the handheld receiver; the Brenn fault (contact 4); scattered stations in the west.
void AreaBuilder::tablet_b_unconformity_fault_and_west() {
  Clock clk{3, 9 * 60};
  for (int i = 1; i <= 12; ++i) {
    const std::string code = "MT-" + geo::format_decimal("%02.0f", 16 + i);
    const bool above = i % 2 == 0;
    const Pos sp = beside(P2_, -650 + (i - 1) * 118.0, above, 40, 200);
    clk.minute += 18;
    const store::Station& st = add_station(B_, code, sp.e, sp.n, above ? "Tc" : "Ss", clk, MT_);
    add_plane(B_, st, store::PlaneKind::Contact, magnetic(noisy(rng_, P2_.true_plane, kSigma)), store::North::Magnetic,
              clk, code + "a", &C2_);
    clk.minute += 4;
    add_plane(B_, st, above ? store::PlaneKind::Bedding : store::PlaneKind::Cleavage,
              magnetic(noisy(rng_, above ? geo::plane_from_dip_direction(285, 22) : cleavage_, kSigma)),
              store::North::Magnetic, clk, code + "b");
    clk.minute += 4;
    add_plane(B_, st, store::PlaneKind::Joint, magnetic(noisy(rng_, joint1_, kSigma)), store::North::Magnetic, clk,
              code + "c");
  }
  // Day 4: the Brenn fault along the valley floor: every point on one straight
  // line at nearly one elevation. PLANTED: too weak a geometry to fit.
  clk = Clock{4, 9 * 60};
  for (int i = 0; i < 8; ++i) {
    const double e = 700 + i * 140.0, n = -1750 + i * 50.0;
    add_point(B_, C4_, {e, n, 820.0 + 0.5 * i}, clk, MT_, 3, 5);
    clk.minute += 7;
  }
  const Plane fault = geo::plane_from_dip_direction(155, 80);
  for (int i = 1; i <= 6; ++i) {
    const std::string code = "MT-" + geo::format_decimal("%02.0f", 28 + i);
    const double e = 720 + i * 150.0 + rng_.uniform(-30, 30), n = -1700 + i * 55.0 + rng_.uniform(-30, 30);
    clk.minute += 20;
    const store::Station& st = add_station(B_, code, e, n, i % 2 ? "Sq" : "Tc", clk, MT_, "fault breccia");
    const Plane fp = noisy(rng_, fault, 3);
    add_plane(B_, st, store::PlaneKind::Fault, magnetic(fp), store::North::Magnetic, clk, code + "a");
    clk.minute += 4;
    const geo::Line sl = geo::line_from_rake(fp, 20 + rng_.uniform(-5, 5));
    add_line(B_, st, store::LineKind::Slickenline, {geo::wrap360(sl.trend - kDecl), sl.plunge}, store::North::Magnetic,
             clk, code + "K");
    add_plane(B_, st, store::PlaneKind::Joint, magnetic(noisy(rng_, joint2_, 3)), store::North::Magnetic, clk,
              code + "b");
  }
  // Scattered stations in the west (day 4 afternoon).
  clk = Clock{4, 14 * 60};
  for (int i = 1; i <= 6; ++i) {
    const std::string code = "MT-" + geo::format_decimal("%02.0f", 34 + i);
    const double e = rng_.uniform(-2400, -1500), n = rng_.uniform(-1900, -1200);
    clk.minute += 15;
    const store::Station& st = add_station(B_, code, e, n, "Hg", clk, MT_, "granite, coarse");
    add_plane(B_, st, store::PlaneKind::Joint, magnetic(noisy(rng_, joint1_, 3)), store::North::Magnetic, clk,
              code + "a");
    add_line(B_, st, store::LineKind::Lineation, {geo::wrap360(rng_.uniform(300, 330) - kDecl), rng_.uniform(5, 15)},
             store::North::Magnetic, clk, code + "L");
  }
}

// The notebook typed in camp: tablet A's stations revisited on day 3 evening.
void AreaBuilder::notebook_typed_in_camp() {
  std::string csv = "station,kind,strike,dip,north,contact,quality,facing,ref,time,notes\n";
  Clock clk{3, 16 * 60};
  for (int i = 1; i <= 12; ++i) {
    const std::string code = "BK-" + geo::format_decimal("%02.0f", i);
    clk.minute += 9;
    Plane p = noisy(rng_, i % 2 ? joint2_ : joint1_, kSigma);
    std::string kind = "joint", contact_name, note = "revisit";
    if (i == 9) {
      // PLANTED: cross-bedding in a channel taken for bedding: disagrees with the contact.
      p = Plane{75, 62};
      kind = "bedding";
      contact_name = C1_.name;
      note = "channel fill, top of bed";
    }
    csv += formats::csv_record({code, kind, geo::format_decimal("%.0f", p.strike), geo::format_decimal("%.0f", p.dip),
                                "true", contact_name, "5", "unknown", code + "n", clk.local(), note});
  }
  area_.notebook_csv = csv;
}

// The handheld receiver's waypoints along the Tolm unconformity (GPX 1.1).
void AreaBuilder::handheld_waypoints() {
  std::string g =
      "<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"no\"?>\n"
      "<gpx xmlns=\"http://www.topografix.com/GPX/1/1\" xmlns:xsi=\"http://www.w3.org/2001/XMLSchema-instance\" "
      "xmlns:hh=\"urn:example:handheld:ext\" version=\"1.1\" creator=\"handheld receiver\" "
      "xsi:schemaLocation=\"http://www.topografix.com/GPX/1/1 http://www.topografix.com/GPX/1/1/gpx.xsd\">\n"
      "  <metadata><name>Tolm unconformity walk</name><time>2026-07-08T16:00:00Z</time></metadata>\n";
  Clock clk{3, 9 * 60 + 5};
  for (int i = 0; i < 30; ++i) {
    const Pos p = trace_point(P2_, -700 + i * 48.0);
    const auto ll = frame_.latlon(p.e + rng_.normal(3), p.n + rng_.normal(3));
    const double ele = p.z + rng_.normal(5);
    g += fmt::format("  <wpt lat=\"{:.7f}\" lon=\"{:.7f}\">\n", ll.lat, ll.lon);
    if (i != 17) g += "    <ele>" + geo::format_decimal("%.1f", ele) + "</ele>\n";  // one fix without elevation
    g += "    <time>" + clk.utc().substr(0, 19) + "Z</time>\n";
    g += "    <name>TU" + geo::format_decimal("%02.0f", i + 1) + "</name>\n    <sym>Flag, Blue</sym>\n";
    g += "    <extensions><hh:fix><hh:sats>" + std::to_string(7 + i % 5) + "</hh:sats></hh:fix></extensions>\n";
    g += "  </wpt>\n";
    clk.minute += 4;
  }
  g += "</gpx>\n";
  area_.gpx = g;
}

}  // namespace

// The steps in the order they draw from the random source (see AreaBuilder).
Area build_area() {
  AreaBuilder b;
  b.crew_units_and_contacts();
  b.contacts_as_planes();
  b.tablet_a_slate_base();
  b.tablet_a_gneiss_fold();
  b.tablet_a_ridge();
  b.tablet_b_sandstone_base();
  b.tablet_b_unconformity_fault_and_west();
  b.notebook_typed_in_camp();
  b.handheld_waypoints();
  return b.take();
}

}  // namespace cairn::cli::demo
