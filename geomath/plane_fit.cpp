#include "geomath/plane_fit.h"

#include <Eigen/Eigenvalues>
#include <Eigen/Geometry>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <mutex>
#include <optional>

#include "geomath/angles.h"
#include "geomath/distributions.h"
#include "geomath/decimal.h"

namespace cairn::geo {

namespace {

// Below these the points are treated as coincident or collinear: a micrometre
// absolute, or a part in 1e9 of the point cloud's size (well under rounding of
// any survey coordinate, well above double-precision noise of centred values).
constexpr double kTinyMetres = 1e-6;
constexpr double kTinyRelative = 1e-9;

// Quality thresholds.
// Fernández (2005): M > 4 and K < 0.8 for a reliable plane (values from memory).
constexpr double kMinM = 4.0;
constexpr double kMaxK = 0.8;
// A fit's weakness is judged by its 95% cone, which measures what the spread,
// the relief, the number of points and their precision together leave
// uncertain: a flat-lying contact mapped over a wide area is well constrained
// although its relief is small, and a long thin trace is weak only when the
// cone says so. The spread across the trace is still reported as a caveat when
// it is under 3 times the points' precision in that direction (in the spirit of
// Jones et al., 2016; the factor is our own choice).
constexpr double kSpreadOverPrecision = 3.0;
// Without any precision (three exact points, no accuracies) only the shape is
// judged: a second-axis spread under 5% of the first is "nearly collinear"
// (our own choice).
constexpr double kMinShapeRatio = 0.05;
// A 95% cone wider than this is reported as weak (our own choice).
constexpr double kMaxCone = 10.0;
// Residuals more than this many times the stated precision: not planar (our own
// choice; for a chi-square with a few degrees of freedom a ratio of 3 means a
// variance nine times the expected one).
constexpr double kMaxMisfitRatio = 3.0;

std::string point_name(size_t i) { return "point " + std::to_string(i + 1); }

struct Eigen3 {
  Eigen::Vector3d values;   // descending
  Eigen::Matrix3d vectors;  // columns to match
};

// Weighted centroid and eigen-decomposition of the weighted scatter matrix.
// Values are those of the covariance (scatter / sum of weights), descending.
Eigen3 weighted_scatter(const std::vector<Vec3>& p, const std::vector<double>& w, Vec3& centroid) {
  double sw = 0;
  Vec3 c = Vec3::Zero();
  for (size_t i = 0; i < p.size(); ++i) {
    c += w[i] * p[i];
    sw += w[i];
  }
  c /= sw;
  Eigen::Matrix3d s = Eigen::Matrix3d::Zero();
  for (size_t i = 0; i < p.size(); ++i) {
    const Vec3 d = p[i] - c;
    s.noalias() += w[i] * d * d.transpose();
  }
  s /= sw;
  // The iterative (QL) solver, not computeDirect: it keeps full accuracy on
  // the smallest eigenvector when the eigenvalues span many orders.
  Eigen::SelfAdjointEigenSolver<Eigen::Matrix3d> es(s);
  Eigen3 out;
  for (int k = 0; k < 3; ++k) {
    out.values(k) = std::max(0.0, es.eigenvalues()(2 - k));
    out.vectors.col(k) = es.eigenvectors().col(2 - k);
  }
  centroid = c;
  return out;
}

Vec3 upward(Vec3 n) {
  n.normalize();
  if (n.z() < 0) n = -n;
  return n;
}

// Precision (1-sigma, metres) of a point along unit direction u.
double precision_along(const FitPoint& p, const Vec3& u) {
  return std::sqrt(p.h_acc * p.h_acc * (u.x() * u.x() + u.y() * u.y()) + p.v_acc * p.v_acc * u.z() * u.z());
}

double angle_between(const Vec3& a, const Vec3& b) { return std::atan2(a.cross(b).norm(), std::abs(a.dot(b))); }

}  // namespace

const char* cone_source_name(ConeSource s) {
  switch (s) {
    case ConeSource::Accuracies: return "accuracies";
    case ConeSource::Residuals: return "residuals";
    case ConeSource::None: break;
  }
  return "none";
}

Result<Plane> three_point_plane(const FitPoint& a, const FitPoint& b, const FitPoint& c) {
  const Vec3 pa(a.e, a.n, a.z), pb(b.e, b.n, b.z), pc(c.e, c.n, c.z);
  const Vec3* pts[3] = {&pa, &pb, &pc};
  for (int i = 0; i < 3; ++i)
    if (!pts[i]->allFinite())
      return Result<Plane>::failure(point_name(i) + " has a coordinate that is not a finite number");
  // Coincident pairs first: they make any cross product meaningless.
  const int pairs[3][2] = {{0, 1}, {0, 2}, {1, 2}};
  double longest = 0;
  int li = 0;
  for (int k = 0; k < 3; ++k) {
    const double d = (*pts[pairs[k][1]] - *pts[pairs[k][0]]).norm();
    if (d < kTinyMetres)
      return Result<Plane>::failure("geometry too weak: points " + std::to_string(pairs[k][0] + 1) + " and " +
                                    std::to_string(pairs[k][1] + 1) + " coincide, so three points define no plane");
    if (d > longest) longest = d, li = k;
  }
  // Distance of the third point from the longest edge's line.
  const Vec3& p0 = *pts[pairs[li][0]];
  const Vec3& p1 = *pts[pairs[li][1]];
  const Vec3& p2 = *pts[3 - pairs[li][0] - pairs[li][1]];
  const Vec3 n = (p1 - p0).cross(p2 - p0);
  const double height = n.norm() / longest;
  if (height < std::max(kTinyMetres, kTinyRelative * longest))
    return Result<Plane>::failure("geometry too weak: the three points are collinear (the third lies " +
                                  format_decimal("%.3g", height) +
                                  " m from the line through the other two), so they define no plane");
  return plane_from_normal(n);
}

namespace {

// ---- the steps of fit_plane ---------------------------------------------------

// Checks every coordinate and accuracy; tells whether all points state accuracies.
Result<bool> validate_points(const std::vector<FitPoint>& pts) {
  const size_t N = pts.size();
  if (N < 3)
    return Result<bool>::failure("geometry too weak: " + std::to_string(N) +
                                 (N == 1 ? " point given" : " points given") + ", a plane needs at least 3");
  size_t with_acc = 0;
  for (size_t i = 0; i < N; ++i) {
    const FitPoint& p = pts[i];
    if (!std::isfinite(p.e) || !std::isfinite(p.n) || !std::isfinite(p.z))
      return Result<bool>::failure(point_name(i) + " has a coordinate that is not a finite number");
    if (!std::isfinite(p.h_acc) || !std::isfinite(p.v_acc) || p.h_acc < 0 || p.v_acc < 0)
      return Result<bool>::failure(point_name(i) + " has an accuracy that is negative or not a finite number");
    if (p.h_acc > 0 || p.v_acc > 0) ++with_acc;
  }
  if (with_acc != 0 && with_acc != N) {
    size_t missing = 0;
    while (pts[missing].h_acc > 0 || pts[missing].v_acc > 0) ++missing;
    return Result<bool>::failure("accuracies are given for some points but not all (" + point_name(missing) +
                                 " has none)");
  }
  return with_acc == N;
}

// Coincident or collinear points define no plane (judged unweighted).
// On success returns the unweighted decomposition and sets `length` (the
// standard deviation along the main axis).
Result<Eigen3> check_geometry(const std::vector<Vec3>& P, Vec3& c, double& length) {
  const size_t N = P.size();
  const std::vector<double> w(N, 1.0);
  Eigen3 eig = weighted_scatter(P, w, c);
  length = std::sqrt(eig.values(0));
  if (length < kTinyMetres)
    return Result<Eigen3>::failure("geometry too weak: all " + std::to_string(N) + " points coincide");
  // Spread across the main axis from the points' distances to that line: the
  // square root of a small eigenvalue would carry rounding noise of about
  // 1e-8 * length, the distances only about 1e-16 * length.
  double across2 = 0;
  const Vec3 e1 = eig.vectors.col(0);
  for (const auto& p : P) {
    const Vec3 d = p - c;
    across2 += (d - d.dot(e1) * e1).squaredNorm();
  }
  const double across = std::sqrt(across2 / static_cast<double>(N));
  if (across < std::max(kTinyMetres, kTinyRelative * length))
    return Result<Eigen3>::failure("geometry too weak: the " + std::to_string(N) +
                                   " points are collinear (they spread " + format_decimal("%.3g", across) +
                                   " m across the line through them), so they define no plane");
  return eig;
}

// Precision of point i along the normal, with a floor so that a point with a
// zero component cannot take all the weight.
double normal_sd(const FitPoint& p, const Vec3& normal) {
  return std::max(precision_along(p, normal), 1e-3 * std::max(p.h_acc, p.v_acc));
}

// Weighted total least squares: w = 1/sigma_n^2 depends on the normal, so
// refit until the normal settles (a few iterations in practice).
Vec3 iterate_weights(const std::vector<FitPoint>& pts, const std::vector<Vec3>& P, std::vector<double>& w, Eigen3& eig,
                     Vec3& c) {
  Vec3 normal = upward(eig.vectors.col(2));
  for (int it = 0; it < 50; ++it) {
    for (size_t i = 0; i < pts.size(); ++i) w[i] = 1.0 / std::pow(normal_sd(pts[i], normal), 2);
    eig = weighted_scatter(P, w, c);
    const Vec3 next = upward(eig.vectors.col(2));
    const double change = angle_between(next, normal);
    normal = next;
    if (change < 1e-14) break;
  }
  return normal;
}

// Eigenvalues, spreads and Fernández's M and K. Returns true when the points
// are exactly coplanar (three points always are).
bool describe_shape(PlaneFit& f, const std::vector<Vec3>& P, const std::vector<double>& w, const Eigen3& eig,
                    double length) {
  const size_t N = P.size();
  f.axes = eig.vectors;
  // Eigenvalues recomputed as the (weighted) mean square of the points'
  // coordinates along each eigenvector: equal in exact arithmetic, and the
  // small ones keep their accuracy (no rounding floor of 1e-16 * l1).
  Eigen::Vector3d lam = Eigen::Vector3d::Zero();
  double sw = 0;
  for (size_t i = 0; i < N; ++i) {
    const Vec3 d = P[i] - f.centroid;
    for (int k = 0; k < 3; ++k) lam(k) += w[i] * std::pow(d.dot(eig.vectors.col(k)), 2);
    sw += w[i];
  }
  lam /= sw;
  f.eigenvalues = lam / lam.sum();
  f.spread = lam.cwiseSqrt();
  // Exactly coplanar: residuals at rounding level, 0.1 micrometre or 1e-12 of
  // the cloud's size. M is then unbounded and K undefined.
  const bool exact = N == 3 || f.spread(2) < std::max(1e-7, 1e-12 * length);
  if (!exact) {
    const double l1 = f.eigenvalues(0), l2 = f.eigenvalues(1), l3 = f.eigenvalues(2);
    f.M = std::log(l1 / l3);
    const double den = std::log(l2 / l3);
    if (den > 0) f.K = std::log(l1 / l2) / den;
  }
  return exact;
}

// Residuals along the upward normal, their rms, the worst point, the misfit
// ratio (with accuracies) and the precision along the normal for the cone.
void measure_residuals(PlaneFit& f, const std::vector<FitPoint>& pts, const std::vector<Vec3>& P, bool have_acc,
                       bool exact) {
  const size_t N = P.size();
  f.residuals.resize(N);
  double ss = 0, chi2 = 0;
  for (size_t i = 0; i < N; ++i) {
    const double r = f.normal.dot(P[i] - f.centroid);
    f.residuals[i] = r;
    ss += r * r;
    if (std::abs(r) > std::abs(f.worst_residual) || i == 0) {
      f.worst_index = i;
      f.worst_residual = r;
    }
    if (have_acc) chi2 += std::pow(r / normal_sd(pts[i], f.normal), 2);
  }
  f.rms = std::sqrt(ss / static_cast<double>(N));
  f.dof = static_cast<int>(N) - 3;
  if (have_acc && N > 3) f.misfit_ratio = std::sqrt(chi2 / static_cast<double>(N - 3));
  // Precision along the normal for the cone: the points' own accuracies, else
  // the residual standard deviation (3 parameters fitted), else nothing.
  if (have_acc) {
    double m = 0;
    for (const auto& p : pts) m += std::pow(precision_along(p, f.normal), 2);
    f.sigma_normal = std::sqrt(m / static_cast<double>(N));
    f.cone_source = ConeSource::Accuracies;
  } else if (N > 3 && !exact) {
    // Points exactly on a plane carry no information about their own uncertainty.
    f.sigma_normal = std::sqrt(ss / static_cast<double>(N - 3));
    f.cone_source = ConeSource::Residuals;
  }
}

// Monte Carlo (parametric bootstrap): the points projected onto the fitted
// plane are perturbed by normal noise - per axis with the stated accuracies,
// or along the normal with the residual standard deviation - and refitted with
// the same weights. The 95th percentile of the angle between the refitted and
// the fitted normal is the cone at that precision (cone95_known). Chosen over a
// first-order analytic formula because it stays honest for nearly collinear
// points and anisotropic accuracies. The generator is the project's own
// (NormalDeviates) with a fixed seed: the same points give the same cone with
// every standard library (up to the last bits of the C library's log and sin).
void monte_carlo_cone(PlaneFit& f, const std::vector<FitPoint>& pts, const std::vector<Vec3>& P,
                      const std::vector<double>& w, const FitOptions& opt) {
  const size_t N = P.size();
  // The same seed gives every fit the same deviates: they are drawn once in the
  // process and read here (shared_normal_deviates), else drawn for this fit.
  const size_t needed =
      static_cast<size_t>(std::max(opt.draws, 0)) * N * (f.cone_source == ConeSource::Accuracies ? 3 : 1);
  const auto shared = shared_normal_deviates(opt.seed, needed);
  const double* next_shared = shared ? shared->data() : nullptr;
  NormalDeviates own(opt.seed);
  auto gauss = [&] { return next_shared ? *next_shared++ : own(); };
  std::vector<Vec3> Q(N), base(N);
  for (size_t i = 0; i < N; ++i) base[i] = P[i] - f.residuals[i] * f.normal;
  std::vector<double> angles;
  angles.reserve(static_cast<size_t>(opt.draws));
  f.draws.reserve(static_cast<size_t>(opt.draws));
  for (int d = 0; d < opt.draws; ++d) {
    for (size_t i = 0; i < N; ++i) {
      if (f.cone_source == ConeSource::Accuracies) {
        const double de = gauss() * pts[i].h_acc;
        const double dn = gauss() * pts[i].h_acc;
        const double dz = gauss() * pts[i].v_acc;
        Q[i] = base[i] + Vec3(de, dn, dz);
      } else {
        Q[i] = base[i] + gauss() * (*f.sigma_normal) * f.normal;
      }
    }
    Vec3 dc;
    const Eigen3 e = weighted_scatter(Q, w, dc);
    Vec3 dn = e.vectors.col(2).normalized();
    if (dn.dot(f.normal) < 0) dn = -dn;
    angles.push_back(angle_between(dn, f.normal));
    f.draws.push_back(PlaneDraw{dc, dn});
  }
  std::sort(angles.begin(), angles.end());
  // Linear interpolation between order statistics.
  const double pos = 0.95 * static_cast<double>(angles.size() - 1);
  const size_t lo = static_cast<size_t>(pos);
  const size_t hi = std::min(lo + 1, angles.size() - 1);
  const double t = pos - static_cast<double>(lo);
  f.cone95_known = rad2deg(angles[lo] * (1 - t) + angles[hi] * t);
}

// Small-sample correction of the cone and of every 95% interval drawn from the
// Monte Carlo planes.
//
// The pole's tilt is two regression parameters. With the precision known, their
// joint 95% region is bounded by the chi-square(2) quantile, which the Monte
// Carlo cone reproduces. With the precision estimated from N - 3 degrees of
// freedom the region is bounded by 2 F(2, N - 3) instead (Draper & Smith,
// Applied Regression Analysis, 3rd ed., 1998, 5.4; Seber & Lee, Linear
// Regression Analysis, 2nd ed., 2003, 5.1.2), so in the small-angle limit the
// cone scales by sqrt(2 F_0.95(2, nu) / chi2_0.95(2)); one quantity, such as an
// elevation, takes t_0.975(nu) in place of 1.96 (the same sources).
//
// - Residuals: the precision is the residual standard deviation: scale as above.
// - Accuracies: the residuals estimate a variance factor, the misfit ratio m
//   (about 1 when the accuracies are right). The cone uses the stated
//   accuracies scaled by m with the F quantile, so that optimistic accuracies
//   widen it; residuals smaller than stated narrow it only down to the 5% point
//   of m under the stated accuracies, sqrt(chi2_0.05(nu) / nu) (A&S 26.4), so
//   points that happen to lie exactly on a plane keep a cone. Simulated
//   coverage of this rule with stated, understated (by half) and absent
//   accuracies is 95-97% for 4 to 30 points (tests/geomath/test_plane_fit.cpp).
// - Three points with accuracies leave no residual to test them: the stated
//   accuracies are used as they are.
// The quantiles small_sample_scaling needs depend on the degrees of freedom
// only; each is computed once per value (the inverse incomplete beta and gamma
// functions otherwise take a sixth of a season's check: issue 16). The same
// functions give the same values, so the fits are unchanged.
struct DofQuantiles {
  std::optional<double> chi2_05;  // chi2_quantile(0.05, nu)
  double f95 = 0;                 // f_quantile(0.95, 2, nu)
  double t975 = 0;                // t_quantile(0.975, nu)
};
const DofQuantiles& dof_quantiles(int dof) {
  static std::mutex mutex;
  static std::map<int, DofQuantiles> cache;  // references to its values stay valid
  std::lock_guard<std::mutex> lock(mutex);
  auto it = cache.find(dof);
  if (it == cache.end()) {
    const double nu = dof;
    DofQuantiles q;
    if (const auto c05 = chi2_quantile(0.05, nu)) q.chi2_05 = *c05;
    // nu >= 1 is a valid argument: neither quantile can fail here.
    q.f95 = *f_quantile(0.95, 2.0, nu);
    q.t975 = *t_quantile(0.975, nu);
    it = cache.emplace(dof, q).first;
  }
  return it->second;
}

void small_sample_scaling(PlaneFit& f) {
  constexpr double kZ975 = 1.959963984540054;  // two-sided 95% normal quantile
  f.variance_factor = 1.0;
  f.cone_scale = 1.0;
  f.interval_k95 = kZ975;
  if (f.dof < 1 || f.cone_source == ConeSource::None) return;
  const double nu = f.dof;
  const DofQuantiles& q = dof_quantiles(f.dof);
  double s = 1.0;
  if (f.cone_source == ConeSource::Accuracies && f.misfit_ratio) {
    const double floor = q.chi2_05 ? std::sqrt(*q.chi2_05 / nu) : 0.0;
    s = std::max(*f.misfit_ratio, floor);
  }
  const double F = q.f95;
  const double t = q.t975;
  f.variance_factor = s;
  f.cone_scale = s * std::sqrt(2.0 * F / chi2_2_quantile(0.95));
  f.interval_k95 = s * t;
}

// Plain-words verdict: weak when the cone is wide (or missing for points that
// are not exactly coplanar), poor fit when the residuals exceed the accuracies.
void judge_quality(PlaneFit& f, const std::vector<FitPoint>& pts, const Eigen3& eig) {
  const size_t N = pts.size();
  std::vector<std::string> brief, full, caveats;
  auto weak = [&](const std::string& b, const std::string& why) {
    f.weak_geometry = true;
    brief.push_back(b);
    full.push_back(why);
  };
  auto caveat = [&](const std::string& b, const std::string& why) {
    caveats.push_back(b);
    full.push_back(why);
  };
  const double spread2 = f.spread(1);
  if (f.cone_source == ConeSource::None) {
    if (spread2 < kMinShapeRatio * f.spread(0))
      weak("points nearly collinear", "The points spread only " + format_decimal("%.3g", spread2) +
                                          " m across the line they follow, under 5% of "
                                          "their length; without accuracies the fit cannot say how much that matters.");
  } else {
    const Vec3 e2 = eig.vectors.col(1);
    double m2 = 0;
    for (const auto& p : pts) m2 += std::pow(precision_along(p, e2), 2);
    const double across_prec =
        f.cone_source == ConeSource::Accuracies ? std::sqrt(m2 / static_cast<double>(N)) : *f.sigma_normal;
    if (spread2 < kSpreadOverPrecision * across_prec)
      caveat("points nearly collinear", "The points spread only " + format_decimal("%.3g", spread2) +
                                            " m (1-sigma) across the line they follow, less "
                                            "than 3 times their precision in that direction (" +
                                            format_decimal("%.3g", across_prec) +
                                            " m); the cone shows "
                                            "what that leaves uncertain.");
  }
  // Fernández's shape figures describe the cloud; on a long, thin contact trace
  // they fail even where the cone shows a well-determined pole, so they are
  // reported as caveats and only the cone makes a fit weak.
  if (f.M && *f.M < kMinM)
    caveat("points barely define a plane (M < 4)",
           "Fernández M = " + format_decimal("%.2f", *f.M) + " is below 4: the points hardly stand out from a blob.");
  if (f.K && *f.K > kMaxK)
    caveat("points closer to a line than a plane (K > 0.8)",
           "Fernández K = " + format_decimal("%.2f", *f.K) +
               " is above 0.8: the points are closer to a line than a plane.");
  if (f.cone95 && *f.cone95 > kMaxCone) {
    const bool collinear = !caveats.empty() && caveats.front() == "points nearly collinear";
    if (collinear) caveats.erase(caveats.begin());
    weak(collinear ? "points nearly collinear" : "wide confidence cone",
         "The 95% confidence cone on the pole is " + format_decimal("%.1f", *f.cone95) + " degrees, wider than 10.");
  }
  if (f.misfit_ratio && *f.misfit_ratio > kMaxMisfitRatio) {
    f.not_planar = true;
    brief.push_back("residuals " + format_decimal("%.1f", *f.misfit_ratio) + " times the stated accuracy");
    full.push_back(
        "The residuals are about " + format_decimal("%.1f", *f.misfit_ratio) +
        " times the points' stated accuracy: they may not lie on one plane, or the accuracies are optimistic.");
  } else if (f.misfit_ratio && f.variance_factor > 1.0) {
    full.push_back("The residuals are " + format_decimal("%.1f", *f.misfit_ratio) +
                   " times the points' stated accuracy; the cone is widened to match.");
  }
  auto join = [](const std::vector<std::string>& v, const char* sep) {
    std::string s;
    for (size_t i = 0; i < v.size(); ++i) s += (i ? sep : "") + v[i];
    return s;
  };
  if (f.weak_geometry) {
    f.verdict = "weak: " + join(brief, "; ");
  } else if (f.not_planar) {
    f.verdict = "poor fit: " + join(brief, "; ");
  } else if (f.cone_source == ConeSource::None) {
    f.verdict = "uncertainty unknown: the points fit a plane exactly and carry no accuracies";
    full.push_back(N == 3 ? "Three points always fit a plane exactly; give their accuracies to get a confidence cone."
                          : "The points lie exactly on a plane; give their accuracies to get a confidence cone.");
  } else {
    f.verdict = "well constrained";
  }
  if (!caveats.empty()) f.verdict += " (" + join(caveats, "; ") + ")";
  if (!full.empty()) f.weakness = join(full, " ");
}

}  // namespace

// The steps in order: validate, refuse coincident or collinear points, weight
// and fit, describe the cloud, measure residuals, propagate the precision to a
// cone (Monte Carlo, then the small-sample correction), judge.
Result<PlaneFit> fit_plane(const std::vector<FitPoint>& pts, const FitOptions& opt) {
  auto have_acc = validate_points(pts);
  if (!have_acc) return Result<PlaneFit>::failure(have_acc.error());
  const size_t N = pts.size();
  std::vector<Vec3> P(N);
  for (size_t i = 0; i < N; ++i) P[i] = Vec3(pts[i].e, pts[i].n, pts[i].z);
  Vec3 c;
  double length = 0;
  auto geometry = check_geometry(P, c, length);
  if (!geometry) return Result<PlaneFit>::failure(geometry.error());
  Eigen3 eig = *geometry;

  PlaneFit f;
  f.count = N;
  f.weighted = *have_acc && opt.use_accuracies;
  std::vector<double> w(N, 1.0);
  f.normal = f.weighted ? iterate_weights(pts, P, w, eig, c) : upward(eig.vectors.col(2));
  f.centroid = c;
  f.plane = plane_from_normal(f.normal);
  const bool exact = describe_shape(f, P, w, eig, length);
  measure_residuals(f, pts, P, *have_acc, exact);
  if (f.cone_source != ConeSource::None && opt.draws > 0) {
    monte_carlo_cone(f, pts, P, w, opt);
    small_sample_scaling(f);
    f.cone95 = *f.cone95_known * f.cone_scale;
  } else {
    small_sample_scaling(f);
  }
  judge_quality(f, pts, eig);
  return f;
}

}  // namespace cairn::geo
