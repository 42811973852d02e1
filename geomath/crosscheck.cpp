#include "geomath/crosscheck.h"

#include <algorithm>
#include <atomic>
#include <exception>
#include <mutex>
#include <thread>
#include <cmath>
#include <cstdio>
#include <map>
#include <memory>
#include <set>
#include <string_view>
#include <tuple>
#include <unordered_map>

#include "geomath/angles.h"
#include "geomath/distributions.h"
#include "geomath/notation.h"
#include "geomath/statistics.h"
#include "geomath/strike_lines.h"
#include "geomath/decimal.h"

namespace cairn::geo {

const char* const kSlopeCaution =
    "Screening indication only, not a slope-stability assessment. Keep off and out from under "
    "this face; follow the crew's field-safety plan, and refer to a licensed engineering geologist "
    "and local codes before any work near it.";
const char* const kSteepGroundCaution =
    "Steep ground: re-measure only where the crew's field-safety plan allows. Do not climb or work "
    "under the face to do it; a reading from safe ground or a note is better than a fall.";

const char* const kRevisitCaution =
    "Go back along the contact only where the crew's field-safety plan allows; keep off steep faces and "
    "defer to local codes and licensed practice. A note is better than a fall.";

namespace {

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
  struct Entry {
    double e, n;
    size_t id;
  };
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

struct Outlier {
  size_t index;
  double score;
  double residual;
};

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

// Runs body(0 .. n-1) on up to four threads (fewer on a smaller machine or for
// little work); rethrows the first exception a body threw.
template <class F>
void parallel_for(size_t n, F&& body) {
  const size_t cores = std::max(1u, std::thread::hardware_concurrency());
  const size_t threads = std::min({cores, size_t{4}, n / 16 + 1});
  if (threads <= 1) {
    for (size_t i = 0; i < n; ++i) body(i);
    return;
  }
  std::atomic<size_t> next{0};
  std::exception_ptr error;
  std::mutex error_mutex;
  auto run = [&] {
    for (size_t i = next++; i < n; i = next++) {
      try {
        body(i);
      } catch (...) {
        std::lock_guard<std::mutex> lock(error_mutex);
        if (!error) error = std::current_exception();
      }
    }
  };
  std::vector<std::thread> pool;
  for (size_t t = 1; t < threads; ++t) pool.emplace_back(run);
  run();
  for (auto& t : pool) t.join();
  if (error) std::rethrow_exception(error);
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

Result<CircularMean> circular_mean_rotation(const std::vector<double>& deg, double confidence) {
  const size_t n = deg.size();
  if (n < 2) return Result<CircularMean>::failure("a mean rotation needs at least 2 readings");
  // Fisher (1993), 2.3 and 4.4.4: mean direction from the vector sum; circular
  // dispersion d = (1 - rho2) / (2 R^2) with rho2 = mean cos 2(theta - mean);
  // standard error sqrt(d / n); interval mean +/- arcsin(q SE). q is Student's
  // t with n - 1 degrees of freedom in place of Fisher's large-sample normal
  // quantile (our own choice for small groups, by analogy with a linear mean).
  double S = 0, C = 0;
  for (double d : deg) {
    S += std::sin(deg2rad(d));
    C += std::cos(deg2rad(d));
  }
  CircularMean m;
  m.n = n;
  m.resultant = std::hypot(S, C) / static_cast<double>(n);
  if (m.resultant < 1e-9) return Result<CircularMean>::failure("the rotations have no mean direction");
  const double mean = std::atan2(S, C);
  double rho2 = 0;
  for (double d : deg) rho2 += std::cos(2.0 * (deg2rad(d) - mean));
  rho2 /= static_cast<double>(n);
  const double dispersion = (1.0 - rho2) / (2.0 * m.resultant * m.resultant);
  const double se = std::sqrt(std::max(0.0, dispersion) / static_cast<double>(n));
  auto t = t_quantile(0.5 + confidence / 2.0, static_cast<double>(n - 1));
  if (!t) return Result<CircularMean>::failure(t.error());
  const double half = std::asin(std::min(1.0, *t * se));
  m.mean = azimuth_difference(rad2deg(mean), 0.0);
  m.standard_error = rad2deg(se);
  m.low = m.mean - rad2deg(half);
  m.high = m.mean + rad2deg(half);
  return m;
}

Result<RepeatMean> repeat_mean(const std::vector<Plane>& readings) {
  if (readings.size() < 2) return Result<RepeatMean>::failure("a repeat set needs at least 2 readings");
  std::vector<Line> poles;
  for (const auto& p : readings) poles.push_back(pole(p));
  auto f = fisher_mean(poles);
  if (!f) return Result<RepeatMean>::failure(f.error());
  RepeatMean m;
  m.plane = plane_from_pole(f->mean);
  m.n = readings.size();
  m.alpha95 = f->alpha95;
  return m;
}

double repeat_sigma(const RepeatMean& m, double reading_sigma_deg) {
  const double root_n = std::sqrt(static_cast<double>(m.n));
  if (!m.alpha95) return reading_sigma_deg / root_n;
  return std::max(*m.alpha95 / std::sqrt(-2.0 * std::log(0.05)), 1.0 / root_n);
}

namespace {

// One reading compared with a usable contact fit, kept for the group check.
struct Compared {
  const CheckPlane* reading;
  double rotation;  // degrees to add to the reading's strike to match the reference
};

// Planes dipping less than this give a strike too uncertain to measure a
// rotation about the vertical (our own choice, no published source).
constexpr double kMinDipForRotation = 10.0;

// The engine, one named step per rule family; run() calls them in order.
class Checker {
 public:
  Checker(const CheckInput& in, const CheckOptions& o) : in_(in), o_(o), station_index_(o.terrain_radius) {
    for (size_t i = 0; i < in.stations.size(); ++i) station_of_[in.stations[i].uuid] = i;
  }

  CheckReport run() {
    fit_contacts();
    index_slopes();
    compare_readings();
    compass_groups();
    facing();
    slope_screening();
    duplicates();
    std::stable_sort(rep_.flags.begin(), rep_.flags.end(), [](const Flag& a, const Flag& b) {
      if (a.station != b.station) return a.station < b.station;
      if (a.severity != b.severity) return a.severity > b.severity;
      return a.rule < b.rule;
    });
    return std::move(rep_);
  }

 private:
  std::string station_code(const std::string& id) const {
    auto it = station_of_.find(id);
    return it == station_of_.end() ? std::string() : in_.stations[it->second].code;
  }
  const CheckStation* station(const std::string& id) const {
    auto it = station_of_.find(id);
    return it == station_of_.end() ? nullptr : &in_.stations[it->second];
  }

  // 1. Fits: a plane through each contact's points, its verdict and whether
  // readings are compared against it.
  // The plane fit and the leave-one-out screening of one contact: most of the
  // check's time, and independent from contact to contact.
  struct FitWork {
    std::optional<Result<PlaneFit>> fit;
    std::vector<Outlier> outliers;
  };

  void fit_contacts() {
    // The fits run on the machine's cores (each contact's Monte Carlo has its
    // own fixed seed, so the results do not depend on the order); the flags are
    // then made one contact after the other, in the contacts' order.
    std::vector<FitWork> work(in_.contacts.size());
    parallel_for(in_.contacts.size(), [&](size_t i) {
      const CheckContact& c = in_.contacts[i];
      if (c.points.size() < 3) return;
      work[i].fit = fit_plane(c.points);
      if (*work[i].fit) work[i].outliers = leave_one_out(c.points);
    });
    for (size_t i = 0; i < in_.contacts.size(); ++i) {
      fit_of_[in_.contacts[i].uuid] = rep_.fits.size();
      rep_.fits.push_back(fit_contact(in_.contacts[i], work[i]));
      work[i] = FitWork{};  // moved into the report: each fit's draws are held once
    }
  }

  ContactFit fit_contact(const CheckContact& c, FitWork& work) {
    ContactFit cf;
    cf.contact = c.name;
    cf.contact_id = c.uuid;
    cf.points = c.points.size();
    if (c.points.size() < 3) {
      cf.verdict = c.points.empty() ? "no points mapped" : "fewer than 3 points: no plane";
      return cf;
    }
    Result<PlaneFit>& f = *work.fit;
    Flag flag;
    flag.contact = c.name;
    flag.rule = "weak-geometry";
    flag.severity = Severity::Query;
    flag.caution = kRevisitCaution;
    if (!f) {
      cf.verdict = f.error();
      flag.message = "No plane through the points of " + c.name + ": " + f.error() + ".";
      flag.action = "Map points along the contact at different elevations and away from a straight line.";
      rep_.flags.push_back(flag);
      return cf;
    }
    // The Monte Carlo draws move into the report (held once, not copied).
    std::vector<PlaneDraw> draws = std::move(f.value().draws);
    cf.fit = *f;
    cf.fit->draws = std::move(draws);
    cf.plane = grid_plane_to_true(f->plane, c.grid.value_or(in_.grid));
    cf.verdict = f->verdict;
    const auto& outliers = work.outliers;
    for (size_t k = 0; k < outliers.size() && k < 5; ++k) cf.worst_points.push_back(outliers[k].index);
    // Residuals far above the points' precision say the contact is not one plane
    // (folded, faulted or a point mis-located); that explains a poor geometry too,
    // so it is reported first.
    const bool not_planar = f->not_planar || !outliers.empty();
    if (not_planar) {
      flag.rule = "not-planar";
      std::string worst;
      for (size_t k = 0; k < outliers.size() && k < 5; ++k)
        worst += (k ? ", " : "") + std::string("#") + std::to_string(outliers[k].index + 1) + " (" +
                 format_decimal("%+.1f m", outliers[k].residual) + ")";
      if (worst.empty()) {
        worst = "#" + std::to_string(f->worst_index + 1) + " (" + format_decimal("%+.1f m", f->worst_residual) + ")";
        cf.worst_points.push_back(f->worst_index);
      }
      flag.message = c.name + " does not lie on one plane (rms " + format_decimal("%.1f m", f->rms) +
                     "); worst points " + worst + ". Readings on it are not compared.";
      flag.action =
          "Check the worst points' positions; if the contact is folded or faulted, split it "
          "into planar segments.";
      rep_.flags.push_back(flag);
    } else if (f->weak_geometry) {
      flag.message = "The points of " + c.name + " constrain its plane weakly: " + f->weakness.value_or(f->verdict);
      flag.action =
          "Add points along the contact at different elevations and away from a straight line "
          "before trusting its attitude.";
      rep_.flags.push_back(flag);
    } else if (!f->cone95) {
      // Three points (or points exactly on a plane) without accuracies: a plane
      // with no uncertainty at all cannot judge a reading.
      flag.message = "The " + std::to_string(c.points.size()) + " points of " + c.name +
                     " fit a plane exactly and carry no accuracies: its uncertainty is unknown, so readings are "
                     "not compared with it.";
      flag.action = "Give the points' horizontal and vertical accuracies, or map more points along the contact.";
      rep_.flags.push_back(flag);
    } else {
      cf.usable = true;
    }
    return cf;
  }

  // Ground slope at each station: the steepest slope-face reading there, or the
  // plane through nearby stations' elevations.
  void index_slopes() {
    for (size_t i = 0; i < in_.stations.size(); ++i)
      if (in_.stations[i].z) station_index_.add(in_.stations[i].e, in_.stations[i].n, i);
    for (const auto& p : in_.planes)
      if (p.kind == "slope") slopes_at_[p.station].push_back(&p);
  }

  std::optional<double> ground_slope(const std::string& station_id) const {
    auto s = slopes_at_.find(station_id);
    if (s != slopes_at_.end()) {
      double m = 0;
      for (auto* p : s->second) m = std::max(m, p->plane.dip);
      return m;
    }
    const CheckStation* st = station(station_id);
    if (!st) return std::nullopt;
    std::vector<FitPoint> near;
    station_index_.within(st->e, st->n, o_.terrain_radius, [&](size_t id, double) {
      const auto& q = in_.stations[id];
      near.push_back({q.e, q.n, *q.z, 0, 0});
    });
    if (near.size() < 3) return std::nullopt;
    FitOptions quick;
    quick.draws = 200;  // enough for the cone to tell a usable ground plane from a line of stations
    auto f = fit_plane(near, quick);
    if (!f || f->weak_geometry) return std::nullopt;
    return f->plane.dip;
  }

  // Every action that sends someone back to an outcrop carries the caution where
  // the ground there is steep.
  void add_steep_caution(Flag& f) const {
    if (f.station_id.empty()) return;
    if (auto s = ground_slope(f.station_id); s && *s > o_.steep_slope) {
      f.caution = kSteepGroundCaution;
      f.message += " Ground here slopes about " + format_decimal("%.0f", *s) + " degrees.";
    }
  }

  // The contact a bedding or contact reading is compared with: the one it names,
  // or with the nearby option the nearest usable contact.
  const CheckContact* contact_for(const CheckPlane& r) {
    if (!r.contact.empty()) {
      auto it = fit_of_.find(r.contact);  // fits are in the contacts' order
      return it == fit_of_.end() ? nullptr : &in_.contacts[it->second];
    }
    if (o_.nearby_radius <= 0) return nullptr;
    const CheckStation* st = station(r.station);
    if (!st) return nullptr;
    const CheckContact* contact = nullptr;
    double best = o_.nearby_radius + 1;
    point_index_->within(st->e, st->n, o_.nearby_radius, [&](size_t id, double d) {
      if (d < best && rep_.fits[point_owner_[id].first].usable) {
        best = d;
        contact = &in_.contacts[point_owner_[id].first];
      }
    });
    return contact;
  }

  // 2-3. Compare bedding and contact readings with their contact's plane; diagnose misfits.
  void compare_readings() {
    point_index_ = std::make_unique<NearIndex>(o_.nearby_radius > 0 ? o_.nearby_radius : 1.0);
    if (o_.nearby_radius > 0) {
      for (size_t ci = 0; ci < in_.contacts.size(); ++ci)
        for (size_t pi = 0; pi < in_.contacts[ci].points.size(); ++pi) {
          point_index_->add(in_.contacts[ci].points[pi].e, in_.contacts[ci].points[pi].n, point_owner_.size());
          point_owner_.push_back({ci, pi});
        }
    }
    const auto sets = repeat_sets();
    for (const auto& original : in_.planes) {
      if (original.kind != "bedding" && original.kind != "contact") continue;
      auto set = sets.find(original.uuid);
      if (set == sets.end()) continue;  // a repeat: compared with its first reading
      // A surface measured several times is compared once, as the Fisher mean of
      // the readings, with their measured spread in place of the grade's.
      CheckPlane r = original;
      std::optional<RepeatMean> mean;
      if (set->second.size() > 1) {
        std::vector<Plane> ps;
        for (const CheckPlane* m : set->second) ps.push_back(m->plane);
        if (auto rm = repeat_mean(ps)) {
          mean = *rm;
          r.plane = rm->plane;
        }
      }
      const CheckContact* contact = contact_for(r);
      if (!contact || !rep_.fits[fit_of_[contact->uuid]].usable) {
        unreferenced_.push_back({&original, r.plane});
        continue;
      }
      const ContactFit& cf = rep_.fits[fit_of_[contact->uuid]];
      const double sigma = mean ? repeat_sigma(*mean, reading_sigma(r.quality, o_)) : reading_sigma(r.quality, o_);
      const double tol = comparison_tolerance(sigma, cf.fit->cone95, o_.confidence);
      const double misfit = angle_between_planes(r.plane, *cf.plane);
      std::string rule;
      if (misfit > tol) {
        rule = diagnose(r, *contact, *cf.plane, misfit, tol);
        if (mean) describe_repeats(rep_.flags.back(), *mean, set->second);
      }
      // Readings explained by local structure or a right-hand-rule slip say
      // nothing about the compass; the others go into their group's rotation.
      if (rule != "misfit" && rule != "reversed-dip" && r.plane.dip >= kMinDipForRotation &&
          cf.plane->dip >= kMinDipForRotation)
        compared_.push_back({&original, azimuth_difference(cf.plane->strike, r.plane.strike)});
    }
  }

  // Readings keyed by the first reading of their surface: a reading marked as a
  // repeat of another bedding or contact reading joins that one's set (a repeat
  // of a repeat joins the first). Only first readings are keys (views of the
  // input's ids: no copy per reading).
  std::unordered_map<std::string_view, std::vector<const CheckPlane*>> repeat_sets() const {
    std::unordered_map<std::string_view, const CheckPlane*> by_id;
    for (const auto& r : in_.planes) by_id[r.uuid] = &r;
    auto root_of = [&](const CheckPlane& r) {
      const CheckPlane* at = &r;
      for (int hop = 0; hop < 100 && !at->repeat_of.empty(); ++hop) {
        auto it = by_id.find(at->repeat_of);
        if (it == by_id.end() || it->second->kind != r.kind || it->second->station != r.station) break;
        at = it->second;
      }
      return std::string_view(at->uuid);
    };
    std::unordered_map<std::string_view, std::vector<const CheckPlane*>> sets;
    for (const auto& r : in_.planes)
      if (r.kind == "bedding" || r.kind == "contact") sets[root_of(r)].push_back(&r);
    return sets;
  }

  // A flag about a repeat set names the set and its spread; the one-tap
  // correction is for a single reading, so a set has none.
  static void describe_repeats(Flag& f, const RepeatMean& m, const std::vector<const CheckPlane*>& set) {
    std::string refs;
    for (const CheckPlane* r : set) refs += (refs.empty() ? "" : ", ") + (r->ref.empty() ? r->uuid : r->ref);
    f.message = "The Fisher mean of " + std::to_string(m.n) + " readings of one surface (" + refs + "; alpha95 " +
                (m.alpha95 ? format_decimal("%.1f", *m.alpha95) : std::string("undefined")) + "): " + f.message;
    if (f.corrected) f.action += " Correct each reading of the set.";
    f.corrected.reset();
  }

  // A reading outside the tolerance: right-hand-rule slip, declination, or misfit.
  // Returns the rule raised.
  std::string diagnose(const CheckPlane& r, const CheckContact& contact, const Plane& fitted, double misfit,
                       double tol) {
    Flag f;
    f.station = station_code(r.station);
    f.station_id = r.station;
    f.ref = r.ref;
    f.reading = r.uuid;
    f.contact = contact.name;
    f.misfit = misfit;
    const std::string what = r.kind + " " + plane_text(r.plane) + " at " + f.station;
    const std::string against = " from the plane of " + contact.name + " (" + plane_text(fitted) + ", tolerance " +
                                format_decimal("%.1f", tol) + ")";
    const Plane reversed{wrap360(r.plane.strike + 180.0), r.plane.dip};
    const double m_rev = angle_between_planes(reversed, fitted);
    std::optional<std::pair<double, Plane>> decl;
    if (r.local_declination && std::abs(*r.local_declination) >= o_.min_declination) {
      for (double sign : {+1.0, -1.0}) {
        const Plane cand{wrap360(r.plane.strike + sign * *r.local_declination), r.plane.dip};
        const double m = angle_between_planes(cand, fitted);
        if (!decl || m < decl->first) decl = {{m, cand}};
      }
    }
    if (m_rev <= tol) {
      f.rule = "reversed-dip";
      f.cause = "right-hand-rule";
      f.severity = Severity::Conflict;
      f.misfit_corrected = m_rev;
      f.corrected = reversed;
      f.message = what + " is " + format_decimal("%.0f", misfit) + " degrees" + against +
                  ", but dipping the other way (" + plane_text(reversed) + ") it fits within " +
                  format_decimal("%.0f", m_rev) + ": a right-hand-rule slip or a wrong dip-quadrant letter?";
      f.action = "Check the notebook and the outcrop's dip direction; if the beds dip towards " +
                 format_decimal("%03.0f", reversed.dip_direction()) + ", correct the reading to " +
                 plane_text(reversed) + ".";
      add_steep_caution(f);
    } else if (decl && decl->first <= tol) {
      f.rule = "declination-suspect";
      f.severity = Severity::Query;
      f.misfit_corrected = decl->first;
      f.corrected = decl->second;
      const double turn = azimuth_difference(decl->second.strike, r.plane.strike);
      f.cause = declination_cause(turn, *r.local_declination);
      f.message = what + " is " + format_decimal("%.0f", misfit) + " degrees" + against + "; turned by " +
                  format_decimal("%+.1f", turn) + " degrees it fits within " + format_decimal("%.0f", decl->first) +
                  ". " + declination_words(f.cause, *r.local_declination);
      f.action =
          "Check the compass's declination setting and the reading's north reference (true or "
          "magnetic), then correct the reading's north reference.";
    } else {
      f.rule = "misfit";
      f.severity = Severity::Conflict;
      f.message = what + " is " + format_decimal("%.0f", misfit) + " degrees" + against +
                  ": local structure, cross-bedding, a slumped block, or a misreading.";
      f.action = "Re-measure on a clean, representative surface; if it holds, note the local structure.";
      add_steep_caution(f);
    }
    rep_.flags.push_back(f);
    return f.rule;
  }

  // The sign of the rotation a reading needs, compared with the sign of the
  // local declination (east positive; true = magnetic + declination): adding
  // the declination means it was not applied, taking it off means it was
  // applied twice, whichever side of north the declination lies.
  static std::string declination_cause(double turn, double declination) {
    return turn * declination > 0 ? "declination-not-applied" : "declination-applied-twice";
  }
  static std::string declination_words(const std::string& cause, double declination) {
    const std::string d = format_decimal("%.1f", std::abs(declination)) + (declination >= 0 ? " east" : " west");
    return cause == "declination-not-applied" ? "The turn is the local declination (" + d +
                                                    ") added: declination not applied (a magnetic reading "
                                                    "stored as true north?)."
                                              : "The turn is the local declination (" + d +
                                                    ") taken off: declination applied twice (the compass "
                                                    "already set to it and the reading stored as magnetic?).";
  }

  // 4. Systematic compass error: the readings of one observer on one day (and
  // one device where known) turned by a common rotation about the vertical.
  void compass_groups() {
    // First against the contacts' fits; an observer's day that agrees with them
    // (enough readings, an interval holding zero) may then serve as the
    // reference for readings that have no fit.
    std::set<std::pair<std::string, std::string>> trusted;
    for (const auto& [key, m] : group_means(compared_))
      if (m.low <= 0 && m.high >= 0 && !std::get<0>(key).empty()) trusted.insert({std::get<0>(key), std::get<1>(key)});
    compare_with_crew(trusted);
    for (const auto& [key, m] : group_means(compared_))
      if (m.low > 0 || m.high < 0) group_flag(std::get<0>(key), std::get<1>(key), groups_[key], m);
  }

  using GroupKey = std::tuple<std::string, std::string, std::string>;  // observer, day, device
  // The readings compared so far by observer and day (the device is a key only
  // when no observer is recorded: it names the device that last wrote a record,
  // which a later edit in camp changes), and each group's mean rotation.
  std::map<GroupKey, CircularMean> group_means(const std::vector<Compared>& compared) {
    groups_.clear();
    for (const auto& c : compared) {
      const CheckPlane& r = *c.reading;
      if (!r.observer.empty())
        groups_[{r.observer, r.day, ""}].push_back(&c);
      else if (!r.device.empty())
        groups_[{"", r.day, r.device}].push_back(&c);
    }
    std::map<GroupKey, CircularMean> out;
    for (const auto& [key, list] : groups_) {
      if (list.size() < std::max<size_t>(2, o_.group_min_readings)) continue;
      std::vector<double> rot;
      for (const Compared* c : list) rot.push_back(c->rotation);
      if (auto m = circular_mean_rotation(rot, o_.group_confidence)) out[key] = *m;
    }
    return out;
  }

  // Readings with no usable contact fit are compared with other crew members'
  // readings of the same surface nearby instead: the Fisher mean of the bedding
  // or contact readings, by observers whose day agreed with the contacts' fits,
  // at stations within crew_reference_radius, taken as the same surface when
  // within crew_reference_angle of the reading (our own choices, no published
  // source). Two observers who only check each other could not tell which of
  // them is wrong; a day that agreed with the fits can.
  void compare_with_crew(const std::set<std::pair<std::string, std::string>>& trusted) {
    if (unreferenced_.empty() || o_.crew_reference_radius <= 0 || trusted.empty()) return;
    NearIndex near(o_.crew_reference_radius);
    std::vector<const CheckPlane*> candidates;
    for (const auto& r : in_.planes) {
      if ((r.kind != "bedding" && r.kind != "contact") || r.plane.dip < kMinDipForRotation ||
          !trusted.count({r.observer, r.day}))
        continue;
      if (const CheckStation* st = station(r.station)) {
        near.add(st->e, st->n, candidates.size());
        candidates.push_back(&r);
      }
    }
    for (const auto& entry : unreferenced_) {
      // Named copies, not structured bindings: a lambda may not capture those in C++17.
      const auto* r = entry.first;
      const Plane& plane = entry.second;
      const CheckStation* st = station(r->station);
      if (!st || r->observer.empty() || plane.dip < kMinDipForRotation) continue;
      std::vector<Plane> others;
      near.within(st->e, st->n, o_.crew_reference_radius, [&](size_t id, double) {
        const CheckPlane* q = candidates[id];
        if (q->observer != r->observer && angle_between_planes(q->plane, plane) <= o_.crew_reference_angle)
          others.push_back(q->plane);
      });
      if (others.empty()) continue;
      Plane ref = others.front();
      if (others.size() > 1)
        if (auto m = repeat_mean(others)) ref = m->plane;
      compared_.push_back({r, azimuth_difference(ref.strike, plane.strike)});
    }
  }

  void group_flag(const std::string& observer, const std::string& day, const std::vector<const Compared*>& list,
                  const CircularMean& m) {
    Flag f;
    f.severity = Severity::Query;
    f.observer = observer;
    f.day = day;
    f.rotation = m.mean;
    f.rotation_interval = std::make_pair(m.low, m.high);
    double decl = 0;
    size_t with_decl = 0;
    for (const Compared* c : list) {
      f.refs.push_back(c->reading->ref);
      f.readings.push_back(c->reading->uuid);
      f.stations.push_back(station_code(c->reading->station));
      if (c->reading->local_declination) decl += *c->reading->local_declination, ++with_decl;
    }
    if (with_decl) decl /= static_cast<double>(with_decl);
    const std::string who =
        (observer.empty() ? std::string("one device") : observer) + (day.empty() ? std::string() : " on " + day);
    const std::string head =
        "All " + std::to_string(list.size()) + " readings by " + who +
        " compared with a contact's plane (or a crew member's readings nearby) need a common turn of " +
        format_decimal("%+.1f", m.mean) + " degrees (95% interval " + format_decimal("%+.1f", m.low) + " to " +
        format_decimal("%+.1f", m.high) + ") to fit: ";
    const bool decl_known = with_decl && std::abs(decl) >= o_.min_declination;
    if (decl_known && m.low <= decl && decl <= m.high) {
      f.rule = "declination-suspect";
      f.cause = "declination-not-applied";
    } else if (decl_known && m.low <= -decl && -decl <= m.high) {
      f.rule = "declination-suspect";
      f.cause = "declination-applied-twice";
    } else {
      f.rule = "compass-offset";
      f.cause = "compass-offset";
    }
    if (f.rule == "declination-suspect") {
      f.message = head + declination_words(f.cause, decl) + " Each reading alone may be within its tolerance.";
      f.action =
          "Check the compass's declination setting that day; if it is confirmed, correct the north "
          "reference of the whole group at once (one audited change).";
    } else {
      f.message = head +
                  "the local declination does not explain it. A compass with an offset, a "
                  "magnetised object near it, or a wrong declination set?";
      f.action =
          "Check the compass against a known bearing or another crew member's compass; if the offset is "
          "confirmed, turn the whole group by " +
          format_decimal("%+.1f", m.mean) + " degrees (one audited change).";
    }
    rep_.flags.push_back(f);
  }

  // 5. Facing: the younger unit should lie above a depositional contact when the
  // beds are upright, below it when they are overturned. A contact whose cone
  // includes the vertical has no known "above" and is not judged either way.
  void facing() {
    // Stations by position (a cell the size of the search radius) and the facing
    // marks by contact and by unit, built once: each contact then looks only at
    // the stations near its own points, so the step grows with the data, not
    // with contacts times stations.
    NearIndex stations_near(o_.facing_radius);
    for (size_t i = 0; i < in_.stations.size(); ++i)
      if (in_.stations[i].z) stations_near.add(in_.stations[i].e, in_.stations[i].n, i);
    count_facing_marks();
    std::vector<char> picked(in_.stations.size(), 0);
    std::vector<size_t> near_ids;
    for (const auto& c : in_.contacts) {
      if (c.type != "depositional" || c.lower_unit.empty() || c.upper_unit.empty()) continue;
      const ContactFit& cf = rep_.fits[fit_of_[c.uuid]];
      if (!cf.usable) continue;
      const bool expect_overturned = marked_overturned(c);
      // Stations within facing_radius of one of the contact's points, in the stations' order.
      near_ids.clear();
      for (const auto& pt : c.points)
        stations_near.within(pt.e, pt.n, o_.facing_radius, [&](size_t id, double) {
          if (!picked[id]) picked[id] = 1, near_ids.push_back(id);
        });
      std::sort(near_ids.begin(), near_ids.end());
      std::vector<const CheckStation*> voters;
      for (size_t id : near_ids) {
        picked[id] = 0;
        const CheckStation& s = in_.stations[id];
        if (s.unit == c.upper_unit || s.unit == c.lower_unit) voters.push_back(&s);
      }
      if (voters.size() < 2) continue;
      if (cf.fit->plane.dip + *cf.fit->cone95 >= 90.0) {
        facing_undecided(c, cf, voters.size());
        continue;
      }
      facing_votes(c, cf, voters, expect_overturned);
    }
  }

  // Bedding and contact readings marked overturned or upright, counted by the
  // contact they name, by their station's unit, and by both (a reading that
  // names the contact and stands in one of its units counts once).
  struct FacingMarks {
    int overturned = 0, upright = 0;
    void add(CheckFacing f) {
      if (f == CheckFacing::Overturned) ++overturned;
      if (f == CheckFacing::Upright) ++upright;
    }
  };
  void count_facing_marks() {
    for (const auto& r : in_.planes) {
      if (r.kind != "bedding" && r.kind != "contact") continue;
      if (r.facing == CheckFacing::Unknown) continue;
      const CheckStation* st = station(r.station);
      if (!r.contact.empty()) marks_by_contact_[r.contact].add(r.facing);
      if (st && !st->unit.empty()) {
        marks_by_unit_[st->unit].add(r.facing);
        if (!r.contact.empty()) marks_by_both_[{r.contact, st->unit}].add(r.facing);
      }
    }
  }

  bool marked_overturned(const CheckContact& c) const {
    int overturned = 0, upright = 0;
    auto take = [&](const FacingMarks* m, int sign) {
      if (m) overturned += sign * m->overturned, upright += sign * m->upright;
    };
    auto find = [](const auto& map, const auto& key) -> const FacingMarks* {
      auto it = map.find(key);
      return it == map.end() ? nullptr : &it->second;
    };
    take(find(marks_by_contact_, c.uuid), +1);
    for (const std::string* u : {&c.upper_unit, &c.lower_unit}) {
      if (u == &c.lower_unit && c.lower_unit == c.upper_unit) break;  // one unit counts once
      take(find(marks_by_unit_, *u), +1);
      take(find(marks_by_both_, std::make_pair(c.uuid, *u)), -1);
    }
    return overturned > upright;
  }

  void facing_undecided(const CheckContact& c, const ContactFit& cf, size_t stations) {
    Flag f;
    f.rule = "weak-geometry";
    f.cause = "facing-undecided";
    f.severity = Severity::Note;
    f.contact = c.name;
    f.message = c.name + " dips " + format_decimal("%.0f", cf.fit->plane.dip) + " degrees with a 95% cone of " +
                format_decimal("%.1f", *cf.fit->cone95) +
                ", which includes the vertical: which side is above it is not "
                "known from the fit, so the facing of the " +
                std::to_string(stations) + " stations beside it is not judged (neither confirmed nor questioned).";
    f.action = "Record way-up indicators (graded beds, cross-bedding, load casts) at stations by the contact.";
    f.caution = kRevisitCaution;
    rep_.flags.push_back(f);
  }

  void facing_votes(const CheckContact& c, const ContactFit& cf, const std::vector<const CheckStation*>& voters,
                    bool expect_overturned) {
    const Vec3 nrm = cf.fit->normal, ctr = cf.fit->centroid;
    int agree = 0, disagree = 0;
    std::string wrong;
    for (const CheckStation* s : voters) {
      const double d = (Vec3(s->e, s->n, *s->z) - ctr).dot(nrm);
      // A station within the plane's own 95% band there, or too close for its
      // position's accuracy, cannot say which side it is on: it does not vote.
      double band = std::max(1.0, 2.0 * std::max(s->v_acc, s->h_acc));
      if (auto e = elevation_at(*cf.fit, s->e, s->n); e && e->half_width95)
        band = std::max(band, *e->half_width95 * std::abs(nrm.z()));
      if (std::abs(d) <= band) continue;
      const bool above = d > 0;
      const bool younger = s->unit == c.upper_unit;
      const bool ok = (above == younger) != expect_overturned;
      (ok ? agree : disagree)++;
      if (!ok && wrong.size() < 60) wrong += (wrong.empty() ? "" : ", ") + s->code;
    }
    if (disagree < 2 || disagree <= agree) return;
    Flag f;
    f.rule = "facing-conflict";
    f.severity = Severity::Conflict;
    f.contact = c.name;
    f.message = std::to_string(disagree) + " of " + std::to_string(agree + disagree) + " stations by " + c.name +
                " lie on the wrong side of it for " + (expect_overturned ? "overturned" : "upright") + " beds (" +
                wrong + "): overturned beds, or units mislabelled?";
    f.action =
        "Look for way-up indicators (graded beds, cross-bedding, load casts) and check the units "
        "recorded at these stations; mark overturned readings as such.";
    f.caution = kRevisitCaution;
    rep_.flags.push_back(f);
  }

  // 6. Safety screening under slope faces.
  void slope_screening() {
    std::unordered_map<std::string, std::vector<const CheckPlane*>> planes_at;
    for (const auto& p : in_.planes)
      if (slopes_at_.count(p.station) && p.kind != "slope") planes_at[p.station].push_back(&p);
    for (const auto& [station_id, faces] : slopes_at_) {
      for (const CheckPlane* rp : planes_at[station_id]) {
        for (const CheckPlane* face : faces)
          if (screen(station_id, *rp, *face)) break;  // one flag per reading
      }
    }
  }

  bool screen(const std::string& station_id, const CheckPlane& r, const CheckPlane& face) {
    const bool slide = planar_sliding_possible(r.plane, face.plane, o_.friction_angle, o_.sliding_window);
    const bool topple =
        !slide && flexural_toppling_possible(r.plane, face.plane, o_.friction_angle, o_.toppling_window);
    if (!slide && !topple) return false;
    Flag f;
    f.rule = slide ? "daylighting" : "toppling";
    f.severity = Severity::Hazard;
    f.station = station_code(station_id);
    f.station_id = station_id;
    f.ref = r.ref;
    f.reading = r.uuid;
    const std::string what = r.kind + " " + plane_text(r.plane);
    f.message = slide ? what + " daylights in the slope face " + plane_text(face.plane) +
                            " and dips more steeply than the friction angle (" +
                            format_decimal("%.0f", o_.friction_angle) + "): planar sliding is kinematically possible."
                      : what + " dips steeply into the slope face " + plane_text(face.plane) +
                            ": flexural toppling is kinematically possible.";
    f.action = "Keep clear of the face and the ground below it; record the hazard for the crew.";
    f.caution = kSlopeCaution;
    rep_.flags.push_back(f);
    return true;
  }

  // 7. Duplicates: the same reading entered twice.
  void duplicates() {
    // The timed readings grouped by station and kind (groups in the order of
    // those strings, readings in their input order within a group: a stable
    // sort of pointers, no map of copied keys), then each group by time.
    std::vector<const CheckPlane*> timed;
    for (const auto& r : in_.planes)
      if (r.time_minutes) timed.push_back(&r);
    auto same_group = [](const CheckPlane* a, const CheckPlane* b) {
      return a->station == b->station && a->kind == b->kind;
    };
    std::stable_sort(timed.begin(), timed.end(), [](const CheckPlane* a, const CheckPlane* b) {
      const int c = a->station.compare(b->station);
      return c < 0 || (c == 0 && a->kind < b->kind);
    });
    for (size_t g = 0, end = 0; g < timed.size(); g = end) {
      end = g + 1;
      while (end < timed.size() && same_group(timed[g], timed[end])) ++end;
      std::sort(timed.begin() + static_cast<std::ptrdiff_t>(g), timed.begin() + static_cast<std::ptrdiff_t>(end),
                [](auto* a, auto* b) { return *a->time_minutes < *b->time_minutes; });
      const CheckPlane* const* list = timed.data() + g;
      const size_t count = end - g;
      const std::pair<std::string_view, std::string_view> key{list[0]->station, list[0]->kind};
      for (size_t i = 1; i < count; ++i) {
        for (size_t j = i; j-- > 0;) {
          const double dt = *list[i]->time_minutes - *list[j]->time_minutes;
          if (dt > o_.duplicate_minutes) break;
          const double ang = angle_between_planes(list[i]->plane, list[j]->plane);
          if (ang > o_.duplicate_angle) continue;
          // Marked as a repeat of the same surface: measured again on purpose.
          if (list[i]->repeat_of == list[j]->uuid || list[j]->repeat_of == list[i]->uuid ||
              (!list[i]->repeat_of.empty() && list[i]->repeat_of == list[j]->repeat_of))
            continue;
          Flag f;
          f.rule = "duplicate";
          f.severity = Severity::Note;
          f.station_id = std::string(key.first);
          f.station = station_code(f.station_id);
          f.ref = list[i]->ref;
          f.reading = list[i]->uuid;
          f.misfit = ang;
          f.message = std::string(key.second) + " " + plane_text(list[i]->plane) + " repeats " +
                      (list[j]->ref.empty() ? "an earlier reading" : "reading " + list[j]->ref) + " (" +
                      format_decimal("%.1f", ang) + " degrees apart, " + format_decimal("%.0f", dt) +
                      " min earlier): entered twice?";
          f.action =
              "If both are the same measurement, delete one. If you measured the surface again on purpose, "
              "mark the later reading as a repeat of the first (repeat_of): the check then uses their "
              "Fisher mean and spread.";
          rep_.flags.push_back(f);
          break;
        }
      }
    }
  }

  const CheckInput& in_;
  const CheckOptions& o_;
  CheckReport rep_;
  // Keyed by views of the input's ids (the input outlives the checker): no copy per station.
  std::unordered_map<std::string_view, size_t> station_of_;
  std::unordered_map<std::string_view, size_t> fit_of_;  // contact id -> index in rep_.fits
  NearIndex station_index_;
  std::unordered_map<std::string, std::vector<const CheckPlane*>> slopes_at_;
  std::unordered_map<std::string, FacingMarks> marks_by_contact_, marks_by_unit_;
  std::map<std::pair<std::string, std::string>, FacingMarks> marks_by_both_;
  std::unique_ptr<NearIndex> point_index_;
  std::vector<std::pair<size_t, size_t>> point_owner_;  // (contact index, point index)
  std::vector<Compared> compared_;
  std::map<std::tuple<std::string, std::string, std::string>, std::vector<const Compared*>> groups_;
  std::vector<std::pair<const CheckPlane*, Plane>> unreferenced_;  // no usable fit: (reading, attitude or repeat mean)
};

}  // namespace

CheckReport run_crosscheck(const CheckInput& in, const CheckOptions& o) { return Checker(in, o).run(); }

}  // namespace cairn::geo
