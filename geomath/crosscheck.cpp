#include "geomath/crosscheck.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <unordered_map>

#include "geomath/angles.h"
#include "geomath/notation.h"

namespace cairn::geo {

const char* const kSlopeCaution =
    "Screening indication only, not a slope-stability assessment. Keep off and out from under "
    "this face; follow the crew's field-safety plan, and refer to a licensed engineering geologist "
    "and local codes before any work near it.";
const char* const kSteepGroundCaution =
    "Steep ground: re-measure only where the crew's field-safety plan allows. Do not climb or work "
    "under the face to do it; a reading from safe ground or a note is better than a fall.";

namespace {

std::string fmt(const char* f, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, f, v);
  return buf;
}

// A uniform grid over map positions for "what is near here" questions: each
// query looks at the 3x3 cells around a point, so with a cell the size of the
// search radius a query costs O(points nearby) and building costs O(N).
class NearIndex {
public:
  explicit NearIndex(double cell) : cell_(cell > 0 ? cell : 1.0) {}
  void add(double e, double n, size_t id) { cells_[key(e, n)].push_back({e, n, id}); }
  template <class F>
  void within(double e, double n, double radius, F&& visit) const {
    const long ce = static_cast<long>(std::floor(e / cell_)), cn = static_cast<long>(std::floor(n / cell_));
    const long reach = static_cast<long>(std::ceil(radius / cell_));
    for (long i = ce - reach; i <= ce + reach; ++i)
      for (long j = cn - reach; j <= cn + reach; ++j) {
        auto it = cells_.find(pack(i, j));
        if (it == cells_.end()) continue;
        for (const auto& p : it->second) {
          const double d = std::hypot(p.e - e, p.n - n);
          if (d <= radius) visit(p.id, d);
        }
      }
  }

private:
  struct Entry { double e, n; size_t id; };
  // Shifted as unsigned: a left shift of a negative value is undefined in C++17
  // (found by UndefinedBehaviorSanitizer); the bits, and so the keys, are the same.
  static long long pack(long i, long j) {
    return static_cast<long long>((static_cast<unsigned long long>(i) << 32) ^
                                  (static_cast<unsigned long long>(j) & 0xffffffffULL));
  }
  long long key(double e, double n) const {
    return pack(static_cast<long>(std::floor(e / cell_)), static_cast<long>(std::floor(n / cell_)));
  }
  double cell_;
  std::unordered_map<long long, std::vector<Entry>> cells_;
};

// Precision of a point along a unit normal: sigma_n^2 = h^2 (nx^2 + ny^2) + v^2 nz^2.
double normal_sigma(const FitPoint& p, const Vec3& n) {
  return std::sqrt(p.h_acc * p.h_acc * (n.x() * n.x() + n.y() * n.y()) + p.v_acc * p.v_acc * n.z() * n.z());
}

struct Outlier { size_t index; double score; double residual; };

// Leave-one-out screening for points that break planarity: each point is judged
// against the plane fitted to all the others, in units of its own precision
// along the normal (or, without accuracies, of the other points' rms residual).
// The worst point is set aside and the screening repeated, so one mis-located
// point does not make its neighbours look bad; a folded contact shows many.
std::vector<Outlier> leave_one_out(const std::vector<FitPoint>& all) {
  std::vector<Outlier> out;
  std::vector<size_t> keep(all.size());
  for (size_t i = 0; i < keep.size(); ++i) keep[i] = i;
  FitOptions quick;
  quick.draws = 0;
  const bool acc = std::all_of(all.begin(), all.end(), [](const FitPoint& p) { return p.h_acc > 0 || p.v_acc > 0; });
  // Thresholds (common practice for outlier screening, no published source):
  // 4.5 sigma with stated accuracies, 6 times the rms scatter without.
  const double threshold = acc ? 4.5 : 6.0;
  while (keep.size() >= 5 && out.size() < 5) {  // four points leave three: an exact plane, no scale
    std::optional<Outlier> worst;
    for (size_t k = 0; k < keep.size(); ++k) {
      std::vector<FitPoint> rest;
      rest.reserve(keep.size() - 1);
      for (size_t j = 0; j < keep.size(); ++j)
        if (j != k) rest.push_back(all[keep[j]]);
      auto f = fit_plane(rest, quick);
      if (!f) continue;
      const FitPoint& q = all[keep[k]];
      const double r = (Vec3(q.e, q.n, q.z) - f->centroid).dot(f->normal);
      double scale = acc ? normal_sigma(q, f->normal)
                         : f->rms * std::sqrt(static_cast<double>(rest.size()) / static_cast<double>(rest.size() - 3));
      const double score = std::abs(r) / std::max(scale, 1e-3);
      if (score > threshold && (!worst || score > worst->score)) worst = Outlier{keep[k], score, r};
    }
    if (!worst) break;
    out.push_back(*worst);
    keep.erase(std::find(keep.begin(), keep.end(), worst->index));
  }
  return out;
}

std::string plane_text(const Plane& p) { return format_strike_dip(p); }

}  // namespace

const char* severity_name(Severity s) {
  switch (s) {
    case Severity::Note: return "note";
    case Severity::Query: return "query";
    case Severity::Conflict: return "conflict";
    case Severity::Hazard: return "hazard";
  }
  return "note";
}

std::optional<Severity> parse_severity(const std::string& s) {
  for (Severity v : {Severity::Note, Severity::Query, Severity::Conflict, Severity::Hazard})
    if (s == severity_name(v)) return v;
  return std::nullopt;
}

double reading_sigma(std::optional<int> quality, const CheckOptions& o) {
  // Grade 5 (or unstated) is a careful reading with a hand compass-clinometer; each
  // grade down adds half of that again (common practice, no published source).
  const int q = quality ? std::clamp(*quality, 1, 5) : 5;
  return o.compass_sigma * (1.0 + 0.5 * (5 - q));
}

double comparison_tolerance(double reading_sigma_deg, std::optional<double> fit_cone95, double confidence) {
  // Small-angle model: the error of a pole is an isotropic two-dimensional normal
  // deviation, so the angle between the measured and true pole has a Rayleigh
  // distribution, P(theta <= t) = 1 - exp(-t^2 / (2 sigma^2)) (the small-angle
  // limit of the Fisher (1953) distribution; Mardia & Jupp, Directional
  // Statistics, 2000). The fit's 95% cone gives its sigma the same way, and the two
  // independent errors add in quadrature.
  const double k95 = std::sqrt(-2.0 * std::log(0.05));
  const double fit_sigma = fit_cone95 ? *fit_cone95 / k95 : 0.0;
  const double sigma = std::hypot(reading_sigma_deg, fit_sigma);
  return sigma * std::sqrt(-2.0 * std::log(1.0 - confidence));
}

bool planar_sliding_possible(const Plane& plane, const Plane& slope, double friction, double window) {
  // Markland test (Hoek & Bray, Rock Slope Engineering): the plane strikes near the
  // face (dip directions within +/-window), dips less steeply than the face (it
  // daylights) and more steeply than the friction angle.
  const double dd = std::abs(azimuth_difference(plane.dip_direction(), slope.dip_direction()));
  return dd <= window && plane.dip < slope.dip && plane.dip > friction;
}

bool flexural_toppling_possible(const Plane& plane, const Plane& slope, double friction, double window) {
  // Goodman & Bray (1976): layers dipping steeply into the face topple when they
  // strike near the face (dip direction within +/-window of the opposite of the
  // face's) and the layers' normal is flatter than the face by more than the
  // friction angle: (90 - dip) + friction <= slope dip.
  const double dd = std::abs(azimuth_difference(plane.dip_direction(), slope.dip_direction() + 180.0));
  return dd <= window && (90.0 - plane.dip) + friction <= slope.dip;
}

CheckReport run_crosscheck(const CheckInput& in, const CheckOptions& o) {
  CheckReport rep;
  std::unordered_map<std::string, size_t> station_of;
  for (size_t i = 0; i < in.stations.size(); ++i) station_of[in.stations[i].uuid] = i;
  auto station_code = [&](const std::string& id) -> std::string {
    auto it = station_of.find(id);
    return it == station_of.end() ? std::string() : in.stations[it->second].code;
  };

  // 1. Fits.
  std::unordered_map<std::string, size_t> fit_of;  // contact id -> index in rep.fits
  for (const auto& c : in.contacts) {
    ContactFit cf;
    cf.contact = c.name;
    cf.contact_id = c.uuid;
    cf.points = c.points.size();
    fit_of[c.uuid] = rep.fits.size();
    if (c.points.size() < 3) {
      cf.verdict = c.points.empty() ? "no points mapped" : "fewer than 3 points: no plane";
      rep.fits.push_back(cf);
      continue;
    }
    auto f = fit_plane(c.points);
    Flag flag;
    flag.contact = c.name;
    if (!f) {
      cf.verdict = f.error();
      flag.rule = "weak-geometry";
      flag.severity = Severity::Query;
      flag.message = "No plane through the points of " + c.name + ": " + f.error() + ".";
      flag.action = "Map points along the contact at different elevations and away from a straight line.";
      rep.flags.push_back(flag);
      rep.fits.push_back(cf);
      continue;
    }
    cf.fit = *f;
    cf.plane = grid_plane_to_true(f->plane, in.grid);
    cf.verdict = f->verdict;
    const auto outliers = leave_one_out(c.points);
    for (size_t k = 0; k < outliers.size() && k < 5; ++k) cf.worst_points.push_back(outliers[k].index);
    // Residuals far above the points' precision say the contact is not one plane
    // (folded, faulted or a point mis-located); that explains a poor geometry too,
    // so it is reported first.
    const bool not_planar = f->not_planar || !outliers.empty();
    if (f->weak_geometry && !not_planar) {
      flag.rule = "weak-geometry";
      flag.severity = Severity::Query;
      flag.message = "The points of " + c.name + " constrain its plane weakly: " + f->weakness.value_or(f->verdict);
      flag.action = "Add points along the contact at different elevations and away from a straight line "
                    "before trusting its attitude.";
      rep.flags.push_back(flag);
    } else if (not_planar) {
      flag.rule = "not-planar";
      flag.severity = Severity::Query;
      std::string worst;
      for (size_t k = 0; k < outliers.size() && k < 5; ++k)
        worst += (k ? ", " : "") + std::string("#") + std::to_string(outliers[k].index + 1) + " (" +
                 fmt("%+.1f m", outliers[k].residual) + ")";
      if (worst.empty()) {
        worst = "#" + std::to_string(f->worst_index + 1) + " (" + fmt("%+.1f m", f->worst_residual) + ")";
        cf.worst_points.push_back(f->worst_index);
      }
      flag.message = c.name + " does not lie on one plane (rms " + fmt("%.1f m", f->rms) +
                     "); worst points " + worst + ". Readings on it are not compared.";
      flag.action = "Check the worst points' positions; if the contact is folded or faulted, split it "
                    "into planar segments.";
      rep.flags.push_back(flag);
    } else if (!f->weak_geometry) {
      cf.usable = true;
    }
    rep.fits.push_back(cf);
  }

  // Ground slope at each station: the steepest slope-face reading there, or the
  // plane through nearby stations' elevations.
  NearIndex station_index(o.terrain_radius);
  for (size_t i = 0; i < in.stations.size(); ++i)
    if (in.stations[i].z) station_index.add(in.stations[i].e, in.stations[i].n, i);
  std::unordered_map<std::string, std::vector<const CheckPlane*>> slopes_at;
  for (const auto& p : in.planes)
    if (p.kind == "slope") slopes_at[p.station].push_back(&p);
  auto ground_slope = [&](const std::string& station_id) -> std::optional<double> {
    auto s = slopes_at.find(station_id);
    if (s != slopes_at.end()) {
      double m = 0;
      for (auto* p : s->second) m = std::max(m, p->plane.dip);
      return m;
    }
    auto it = station_of.find(station_id);
    if (it == station_of.end()) return std::nullopt;
    const auto& st = in.stations[it->second];
    std::vector<FitPoint> near;
    station_index.within(st.e, st.n, o.terrain_radius, [&](size_t id, double) {
      const auto& q = in.stations[id];
      near.push_back({q.e, q.n, *q.z, 0, 0});
    });
    if (near.size() < 3) return std::nullopt;
    FitOptions quick;
    quick.draws = 0;
    auto f = fit_plane(near, quick);
    if (!f || f->weak_geometry) return std::nullopt;
    return f->plane.dip;
  };
  auto add_steep_caution = [&](Flag& f) {
    if (f.station_id.empty()) return;
    if (auto s = ground_slope(f.station_id); s && *s > o.steep_slope) {
      f.caution = kSteepGroundCaution;
      f.message += " Ground here slopes about " + fmt("%.0f", *s) + " degrees.";
    }
  };

  // 2-3. Compare bedding and contact readings with their contact's plane; diagnose misfits.
  NearIndex point_index(o.nearby_radius > 0 ? o.nearby_radius : 1.0);
  std::vector<std::pair<size_t, size_t>> point_owner;  // (contact index, point index)
  if (o.nearby_radius > 0) {
    for (size_t ci = 0; ci < in.contacts.size(); ++ci)
      for (size_t pi = 0; pi < in.contacts[ci].points.size(); ++pi) {
        point_index.add(in.contacts[ci].points[pi].e, in.contacts[ci].points[pi].n, point_owner.size());
        point_owner.push_back({ci, pi});
      }
  }
  for (const auto& r : in.planes) {
    if (r.kind != "bedding" && r.kind != "contact") continue;
    const CheckContact* contact = nullptr;
    if (!r.contact.empty()) {
      auto it = fit_of.find(r.contact);  // fits are in the contacts' order
      if (it != fit_of.end()) contact = &in.contacts[it->second];
    }
    if (!contact && r.contact.empty() && o.nearby_radius > 0) {
      auto st = station_of.find(r.station);
      if (st != station_of.end()) {
        double best = o.nearby_radius + 1;
        point_index.within(in.stations[st->second].e, in.stations[st->second].n, o.nearby_radius,
                           [&](size_t id, double d) {
                             if (d < best && rep.fits[point_owner[id].first].usable) {
                               best = d;
                               contact = &in.contacts[point_owner[id].first];
                             }
                           });
      }
    }
    if (!contact) continue;
    const ContactFit& cf = rep.fits[fit_of[contact->uuid]];
    if (!cf.usable) continue;
    const Plane fit_plane_true = *cf.plane;
    const double misfit = angle_between_planes(r.plane, fit_plane_true);
    const double tol = comparison_tolerance(reading_sigma(r.quality, o), cf.fit->cone95, o.confidence);
    if (misfit <= tol) continue;

    Flag f;
    f.station = station_code(r.station);
    f.station_id = r.station;
    f.ref = r.ref;
    f.reading = r.uuid;
    f.contact = contact->name;
    f.misfit = misfit;
    const std::string what = r.kind + " " + plane_text(r.plane) + " at " + f.station;
    const std::string against = " from the plane of " + contact->name + " (" + plane_text(fit_plane_true) +
                                ", tolerance " + fmt("%.1f", tol) + ")";

    const Plane reversed{wrap360(r.plane.strike + 180.0), r.plane.dip};
    const double m_rev = angle_between_planes(reversed, fit_plane_true);
    std::optional<std::pair<double, Plane>> decl;
    if (r.local_declination && std::abs(*r.local_declination) >= o.min_declination) {
      for (double sign : {+1.0, -1.0}) {
        const Plane cand{wrap360(r.plane.strike + sign * *r.local_declination), r.plane.dip};
        const double m = angle_between_planes(cand, fit_plane_true);
        if (!decl || m < decl->first) decl = {{m, cand}};
      }
    }
    if (m_rev <= tol) {
      f.rule = "reversed-dip";
      f.severity = Severity::Conflict;
      f.misfit_corrected = m_rev;
      f.corrected = reversed;
      f.message = what + " is " + fmt("%.0f", misfit) + " degrees" + against + ", but dipping the other way (" +
                  plane_text(reversed) + ") it fits within " + fmt("%.0f", m_rev) +
                  ": a right-hand-rule slip or a wrong dip-quadrant letter?";
      f.action = "Check the notebook and the outcrop's dip direction; if the beds dip towards " +
                 fmt("%03.0f", reversed.dip_direction()) + ", correct the reading to " + plane_text(reversed) + ".";
    } else if (decl && decl->first <= tol) {
      f.rule = "declination-suspect";
      f.severity = Severity::Query;
      f.misfit_corrected = decl->first;
      f.corrected = decl->second;
      const double applied = azimuth_difference(decl->second.strike, r.plane.strike);
      f.message = what + " is " + fmt("%.0f", misfit) + " degrees" + against + "; turned by " +
                  fmt("%+.1f", applied) + " degrees (the local declination) it fits within " +
                  fmt("%.0f", decl->first) + ": declination " + (applied > 0 ? "not applied?" : "applied twice?");
      f.action = "Check the compass's declination setting and the reading's north reference (true or "
                 "magnetic), then correct the reading's north reference.";
    } else {
      f.rule = "misfit";
      f.severity = Severity::Conflict;
      f.message = what + " is " + fmt("%.0f", misfit) + " degrees" + against +
                  ": local structure, cross-bedding, a slumped block, or a misreading.";
      f.action = "Re-measure on a clean, representative surface; if it holds, note the local structure.";
      add_steep_caution(f);
    }
    rep.flags.push_back(f);
  }

  // 4. Facing: the younger unit should lie above a depositional contact when the
  // beds are upright, below it when they are overturned.
  for (const auto& c : in.contacts) {
    if (c.type != "depositional" || c.lower_unit.empty() || c.upper_unit.empty()) continue;
    const ContactFit& cf = rep.fits[fit_of[c.uuid]];
    if (!cf.usable) continue;
    const Vec3 nrm = cf.fit->normal, ctr = cf.fit->centroid;
    int overturned = 0, upright = 0;
    for (const auto& r : in.planes) {
      if (r.kind != "bedding" && r.kind != "contact") continue;
      auto st = station_of.find(r.station);
      const bool on_contact = r.contact == c.uuid ||
                              (st != station_of.end() && (in.stations[st->second].unit == c.upper_unit ||
                                                          in.stations[st->second].unit == c.lower_unit));
      if (!on_contact) continue;
      if (r.facing == CheckFacing::Overturned) ++overturned;
      if (r.facing == CheckFacing::Upright) ++upright;
    }
    const bool expect_overturned = overturned > upright;
    NearIndex near_contact(o.facing_radius);
    for (size_t k = 0; k < c.points.size(); ++k) near_contact.add(c.points[k].e, c.points[k].n, k);
    int agree = 0, disagree = 0;
    std::string wrong;
    for (const auto& s : in.stations) {
      if (!s.z || (s.unit != c.upper_unit && s.unit != c.lower_unit)) continue;
      bool near = false;
      near_contact.within(s.e, s.n, o.facing_radius, [&](size_t, double) { near = true; });
      if (!near) continue;
      const double d = (Vec3(s.e, s.n, *s.z) - ctr).dot(nrm);
      // A station too close to the plane to tell which side it is on does not vote.
      if (std::abs(d) <= std::max(1.0, 2.0 * std::max(s.v_acc, s.h_acc))) continue;
      const bool above = d > 0;
      const bool younger = s.unit == c.upper_unit;
      const bool ok = (above == younger) != expect_overturned;
      (ok ? agree : disagree)++;
      if (!ok && wrong.size() < 60) wrong += (wrong.empty() ? "" : ", ") + s.code;
    }
    if (disagree >= 2 && disagree > agree) {
      Flag f;
      f.rule = "facing-conflict";
      f.severity = Severity::Conflict;
      f.contact = c.name;
      f.message = std::to_string(disagree) + " of " + std::to_string(agree + disagree) + " stations by " + c.name +
                  " lie on the wrong side of it for " + (expect_overturned ? "overturned" : "upright") +
                  " beds (" + wrong + "): overturned beds, or units mislabelled?";
      f.action = "Look for way-up indicators (graded beds, cross-bedding, load casts) and check the units "
                 "recorded at these stations; mark overturned readings as such.";
      rep.flags.push_back(f);
    }
  }

  // 5. Safety screening under slope faces.
  std::unordered_map<std::string, std::vector<const CheckPlane*>> planes_at;
  for (const auto& p : in.planes)
    if (slopes_at.count(p.station) && p.kind != "slope") planes_at[p.station].push_back(&p);
  for (const auto& [station_id, faces] : slopes_at) {
    for (const CheckPlane* rp : planes_at[station_id]) {
      const CheckPlane& r = *rp;
      for (const CheckPlane* face : faces) {
        const bool slide = planar_sliding_possible(r.plane, face->plane, o.friction_angle, o.sliding_window);
        const bool topple = !slide && flexural_toppling_possible(r.plane, face->plane, o.friction_angle, o.toppling_window);
        if (!slide && !topple) continue;
        Flag f;
        f.rule = slide ? "daylighting" : "toppling";
        f.severity = Severity::Hazard;
        f.station = station_code(station_id);
        f.station_id = station_id;
        f.ref = r.ref;
        f.reading = r.uuid;
        const std::string what = r.kind + " " + plane_text(r.plane);
        f.message = slide ? what + " daylights in the slope face " + plane_text(face->plane) +
                                " and dips more steeply than the friction angle (" +
                                fmt("%.0f", o.friction_angle) + "): planar sliding is kinematically possible."
                          : what + " dips steeply into the slope face " + plane_text(face->plane) +
                                ": flexural toppling is kinematically possible.";
        f.action = "Keep clear of the face and the ground below it; record the hazard for the crew.";
        f.caution = kSlopeCaution;
        rep.flags.push_back(f);
        break;  // one flag per reading
      }
    }
  }

  // 8. Duplicates: the same reading entered twice.
  std::map<std::pair<std::string, std::string>, std::vector<const CheckPlane*>> groups;
  for (const auto& r : in.planes)
    if (r.time_minutes) groups[{r.station, r.kind}].push_back(&r);
  for (auto& [key, list] : groups) {
    std::sort(list.begin(), list.end(), [](auto* a, auto* b) { return *a->time_minutes < *b->time_minutes; });
    for (size_t i = 1; i < list.size(); ++i) {
      for (size_t j = i; j-- > 0;) {
        const double dt = *list[i]->time_minutes - *list[j]->time_minutes;
        if (dt > o.duplicate_minutes) break;
        const double ang = angle_between_planes(list[i]->plane, list[j]->plane);
        if (ang > o.duplicate_angle) continue;
        Flag f;
        f.rule = "duplicate";
        f.severity = Severity::Note;
        f.station = station_code(key.first);
        f.station_id = key.first;
        f.ref = list[i]->ref;
        f.reading = list[i]->uuid;
        f.misfit = ang;
        f.message = key.second + " " + plane_text(list[i]->plane) + " repeats " +
                    (list[j]->ref.empty() ? "an earlier reading" : "reading " + list[j]->ref) + " (" +
                    fmt("%.1f", ang) + " degrees apart, " + fmt("%.0f", dt) + " min earlier): entered twice?";
        f.action = "If both are the same measurement, delete one; if not, add a note saying why they repeat.";
        rep.flags.push_back(f);
        break;
      }
    }
  }

  std::stable_sort(rep.flags.begin(), rep.flags.end(), [](const Flag& a, const Flag& b) {
    if (a.station != b.station) return a.station < b.station;
    if (a.severity != b.severity) return a.severity > b.severity;
    return a.rule < b.rule;
  });
  return rep;
}

}  // namespace cairn::geo
