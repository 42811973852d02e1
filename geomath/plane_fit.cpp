#include "geomath/plane_fit.h"

#include <Eigen/Eigenvalues>
#include <Eigen/Geometry>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <random>

#include "geomath/angles.h"

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
// In the spirit of Jones et al. (2016): the cloud's spread across its second
// axis must clearly exceed the positional precision along that axis, and the
// relief must exceed the vertical precision. The factors are our own choice
// (common practice, no published source): 3 across, 3 for relief. They are
// deliberately lenient: a contact's trace is always long and thin, and how much
// that matters depends on the number of points, which the 95% cone measures.
constexpr double kSpreadOverPrecision = 3.0;
constexpr double kReliefOverPrecision = 3.0;
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

std::string fmt(const char* f, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, f, v);
  return buf;
}

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

double angle_between(const Vec3& a, const Vec3& b) {
  return std::atan2(a.cross(b).norm(), std::abs(a.dot(b)));
}

Result<PlaneFit> too_weak(const std::string& why) {
  return Result<PlaneFit>::failure("geometry too weak: " + why);
}

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
      return Result<Plane>::failure("geometry too weak: points " + std::to_string(pairs[k][0] + 1) +
                                    " and " + std::to_string(pairs[k][1] + 1) +
                                    " coincide, so three points define no plane");
    if (d > longest) longest = d, li = k;
  }
  // Distance of the third point from the longest edge's line.
  const Vec3& p0 = *pts[pairs[li][0]];
  const Vec3& p1 = *pts[pairs[li][1]];
  const Vec3& p2 = *pts[3 - pairs[li][0] - pairs[li][1]];
  const Vec3 n = (p1 - p0).cross(p2 - p0);
  const double height = n.norm() / longest;
  if (height < std::max(kTinyMetres, kTinyRelative * longest))
    return Result<Plane>::failure(
        "geometry too weak: the three points are collinear (the third lies " + fmt("%.3g", height) +
        " m from the line through the other two), so they define no plane");
  return plane_from_normal(n);
}

Result<PlaneFit> fit_plane(const std::vector<FitPoint>& pts, const FitOptions& opt) {
  const size_t N = pts.size();
  if (N < 3)
    return too_weak(std::to_string(N) + (N == 1 ? " point given" : " points given") +
                    ", a plane needs at least 3");
  // Validate and decide whether to weight.
  size_t with_acc = 0;
  for (size_t i = 0; i < N; ++i) {
    const FitPoint& p = pts[i];
    if (!std::isfinite(p.e) || !std::isfinite(p.n) || !std::isfinite(p.z))
      return Result<PlaneFit>::failure(point_name(i) + " has a coordinate that is not a finite number");
    if (!std::isfinite(p.h_acc) || !std::isfinite(p.v_acc) || p.h_acc < 0 || p.v_acc < 0)
      return Result<PlaneFit>::failure(point_name(i) +
                                       " has an accuracy that is negative or not a finite number");
    if (p.h_acc > 0 || p.v_acc > 0) ++with_acc;
  }
  if (with_acc != 0 && with_acc != N) {
    size_t missing = 0;
    while (pts[missing].h_acc > 0 || pts[missing].v_acc > 0) ++missing;
    return Result<PlaneFit>::failure("accuracies are given for some points but not all (" +
                                     point_name(missing) + " has none)");
  }
  const bool have_acc = with_acc == N;
  const bool weighted = have_acc && opt.use_accuracies;

  std::vector<Vec3> P(N);
  for (size_t i = 0; i < N; ++i) P[i] = Vec3(pts[i].e, pts[i].n, pts[i].z);

  // Geometry first, unweighted: coincident or collinear points define no plane.
  std::vector<double> w(N, 1.0);
  Vec3 c;
  Eigen3 eig = weighted_scatter(P, w, c);
  const double s1 = std::sqrt(eig.values(0));
  if (s1 < kTinyMetres) return too_weak("all " + std::to_string(N) + " points coincide");
  // Spread across the main axis from the points' distances to that line: the
  // square root of a small eigenvalue would carry rounding noise of about
  // 1e-8 * s1, the distances only about 1e-16 * s1.
  double across2 = 0;
  {
    const Vec3 e1 = eig.vectors.col(0);
    for (const auto& p : P) {
      const Vec3 d = p - c;
      across2 += (d - d.dot(e1) * e1).squaredNorm();
    }
  }
  const double across = std::sqrt(across2 / static_cast<double>(N));
  if (across < std::max(kTinyMetres, kTinyRelative * s1))
    return too_weak("the " + std::to_string(N) + " points are collinear (they spread " +
                    fmt("%.3g", across) + " m across the line through them), so they define no plane");

  // Weighted total least squares: w = 1/sigma_n^2 depends on the normal, so
  // refit until the normal settles (a few iterations in practice).
  Vec3 normal = upward(eig.vectors.col(2));
  if (weighted) {
    for (int it = 0; it < 50; ++it) {
      for (size_t i = 0; i < N; ++i) {
        const double floor_sd = 1e-3 * std::max(pts[i].h_acc, pts[i].v_acc);
        const double sd = std::max(precision_along(pts[i], normal), floor_sd);
        w[i] = 1.0 / (sd * sd);
      }
      eig = weighted_scatter(P, w, c);
      const Vec3 next = upward(eig.vectors.col(2));
      const double change = angle_between(next, normal);
      normal = next;
      if (change < 1e-14) break;
    }
  }

  PlaneFit f;
  f.count = N;
  f.weighted = weighted;
  f.normal = normal;
  f.centroid = c;
  f.plane = plane_from_normal(normal);
  f.axes = eig.vectors;
  // Eigenvalues recomputed as the (weighted) mean square of the points'
  // coordinates along each eigenvector: equal in exact arithmetic, and the
  // small ones keep their accuracy (no rounding floor of 1e-16 * l1).
  Eigen::Vector3d lam;
  {
    double sw = 0;
    lam.setZero();
    for (size_t i = 0; i < N; ++i) {
      const Vec3 d = P[i] - c;
      for (int k = 0; k < 3; ++k) lam(k) += w[i] * std::pow(d.dot(eig.vectors.col(k)), 2);
      sw += w[i];
    }
    lam /= sw;
  }
  f.eigenvalues = lam / lam.sum();
  f.spread = lam.cwiseSqrt();
  // Exactly coplanar (three points always are; more points when they were
  // built on a plane): residuals at rounding level, 0.1 micrometre or 1e-12 of
  // the cloud's size. M is then unbounded and K undefined.
  const bool exact = N == 3 || f.spread(2) < std::max(1e-7, 1e-12 * s1);
  {
    const double l1 = f.eigenvalues(0), l2 = f.eigenvalues(1), l3 = f.eigenvalues(2);
    if (!exact) {
      f.M = std::log(l1 / l3);
      const double den = std::log(l2 / l3);
      if (den > 0) f.K = std::log(l1 / l2) / den;
    }
  }

  // Residuals: signed distance along the upward normal.
  f.residuals.resize(N);
  double ss = 0, chi2 = 0;
  for (size_t i = 0; i < N; ++i) {
    const double r = normal.dot(P[i] - c);
    f.residuals[i] = r;
    ss += r * r;
    if (std::abs(r) > std::abs(f.worst_residual) || i == 0) {
      f.worst_index = i;
      f.worst_residual = r;
    }
    if (have_acc) {
      const double sd = std::max(precision_along(pts[i], normal), 1e-3 * std::max(pts[i].h_acc, pts[i].v_acc));
      chi2 += (r / sd) * (r / sd);
    }
  }
  f.rms = std::sqrt(ss / static_cast<double>(N));
  if (have_acc && N > 3) f.misfit_ratio = std::sqrt(chi2 / static_cast<double>(N - 3));

  // Precision along the normal for the cone: the points' own accuracies, else
  // the residual standard deviation (3 parameters fitted), else nothing.
  if (have_acc) {
    double m = 0;
    for (const auto& p : pts) m += std::pow(precision_along(p, normal), 2);
    f.sigma_normal = std::sqrt(m / static_cast<double>(N));
    f.cone_source = ConeSource::Accuracies;
  } else if (N > 3) {
    const double sd = std::sqrt(ss / static_cast<double>(N - 3));
    // Points exactly on a plane carry no information about their own uncertainty.
    if (!exact) {
      f.sigma_normal = sd;
      f.cone_source = ConeSource::Residuals;
    }
  }

  // Monte Carlo (parametric bootstrap): the points projected onto the fitted
  // plane are perturbed by normal noise — per axis with the stated accuracies,
  // or along the normal with the residual standard deviation — and refitted
  // with the same weights. The 95th percentile of the angle between the
  // refitted and the fitted normal is the 95% confidence cone. Chosen over a
  // first-order analytic formula because it stays honest for nearly collinear
  // points and anisotropic accuracies; the fixed seed makes it repeatable.
  if (f.cone_source != ConeSource::None && opt.draws > 0) {
    std::mt19937_64 rng(opt.seed);
    std::normal_distribution<double> gauss(0.0, 1.0);
    std::vector<Vec3> Q(N), base(N);
    for (size_t i = 0; i < N; ++i) base[i] = P[i] - f.residuals[i] * normal;
    std::vector<double> angles;
    angles.reserve(static_cast<size_t>(opt.draws));
    f.draws.reserve(static_cast<size_t>(opt.draws));
    for (int d = 0; d < opt.draws; ++d) {
      for (size_t i = 0; i < N; ++i) {
        if (f.cone_source == ConeSource::Accuracies) {
          const double de = gauss(rng) * pts[i].h_acc;
          const double dn = gauss(rng) * pts[i].h_acc;
          const double dz = gauss(rng) * pts[i].v_acc;
          Q[i] = base[i] + Vec3(de, dn, dz);
        } else {
          Q[i] = base[i] + gauss(rng) * (*f.sigma_normal) * normal;
        }
      }
      Vec3 dc;
      const Eigen3 e = weighted_scatter(Q, w, dc);
      Vec3 dn = e.vectors.col(2).normalized();
      if (dn.dot(normal) < 0) dn = -dn;
      angles.push_back(angle_between(dn, normal));
      f.draws.push_back(PlaneDraw{dc, dn});
    }
    std::sort(angles.begin(), angles.end());
    // Linear interpolation between order statistics.
    const double pos = 0.95 * static_cast<double>(angles.size() - 1);
    const size_t lo = static_cast<size_t>(pos);
    const size_t hi = std::min(lo + 1, angles.size() - 1);
    const double t = pos - static_cast<double>(lo);
    f.cone95 = rad2deg(angles[lo] * (1 - t) + angles[hi] * t);
  }

  // Quality.
  std::vector<std::string> brief, full;
  auto weak = [&](const std::string& b, const std::string& why) {
    f.weak_geometry = true;
    brief.push_back(b);
    full.push_back(why);
  };
  const Vec3 e2 = eig.vectors.col(1);
  double zc = 0;
  for (const auto& p : P) zc += p.z();
  zc /= static_cast<double>(N);
  double zvar = 0;
  for (const auto& p : P) zvar += (p.z() - zc) * (p.z() - zc);
  const double relief = std::sqrt(zvar / static_cast<double>(N));  // standard deviation of elevation
  const double spread2 = f.spread(1);

  // Spread across the line vs the precision across it, relief vs the vertical
  // precision: from the stated accuracies, or else from the residual scatter.
  auto judge = [&](double across_prec, double vert_prec, const std::string& across_what,
                   const std::string& relief_brief, const std::string& vert_what) {
    if (spread2 < kSpreadOverPrecision * across_prec)
      weak("points nearly collinear",
           "The points spread only " + fmt("%.3g", spread2) + " m (1-sigma) across the line they follow, "
           "less than 3 times " + across_what + " (" + fmt("%.3g", across_prec) + " m).");
    if (relief < kReliefOverPrecision * vert_prec)
      weak(relief_brief, "The elevations vary by only " + fmt("%.3g", relief) + " m (1-sigma), less than 3 times " +
                             vert_what + " (" + fmt("%.3g", vert_prec) + " m): the dip direction is poorly constrained.");
  };
  if (f.cone_source == ConeSource::Accuracies) {
    double m2 = 0, v2 = 0;
    for (const auto& p : pts) {
      m2 += std::pow(precision_along(p, e2), 2);
      v2 += p.v_acc * p.v_acc;
    }
    judge(std::sqrt(m2 / static_cast<double>(N)), std::sqrt(v2 / static_cast<double>(N)),
          "their positional precision in that direction", "relief small for the stated vertical accuracy",
          "the vertical accuracy");
  } else if (f.cone_source == ConeSource::Residuals) {
    judge(*f.sigma_normal, *f.sigma_normal, "their scatter about the plane",
          "relief small compared with the scatter of the points", "the points' scatter about the plane");
  } else if (spread2 < kMinShapeRatio * f.spread(0)) {
    weak("points nearly collinear",
         "The points spread only " + fmt("%.3g", spread2) + " m across the line they follow, under 5% of "
         "their length; without accuracies the fit cannot say how much that matters.");
  }
  // Fernández's shape figures describe the cloud; on a long, thin contact trace
  // they fail even where the cone shows a well-determined pole, so they are
  // reported as caveats and only the geometry tests and the cone make a fit weak.
  std::vector<std::string> caveats;
  auto caveat = [&](const std::string& b, const std::string& why) {
    caveats.push_back(b);
    full.push_back(why);
  };
  if (f.M && *f.M < kMinM)
    caveat("points barely define a plane (M < 4)",
         "Fernández M = " + fmt("%.2f", *f.M) + " is below 4: the points hardly stand out from a blob.");
  if (f.K && *f.K > kMaxK)
    caveat("points closer to a line than a plane (K > 0.8)",
         "Fernández K = " + fmt("%.2f", *f.K) + " is above 0.8: the points are closer to a line than a plane.");
  if (f.cone95 && *f.cone95 > kMaxCone)
    weak("wide confidence cone",
         "The 95% confidence cone on the pole is " + fmt("%.1f", *f.cone95) + " degrees, wider than 10.");
  if (f.misfit_ratio && *f.misfit_ratio > kMaxMisfitRatio) {
    f.not_planar = true;
    brief.push_back("residuals " + fmt("%.1f", *f.misfit_ratio) + " times the stated accuracy");
    full.push_back("The residuals are about " + fmt("%.1f", *f.misfit_ratio) +
                   " times the points' stated accuracy: they may not lie on one plane, or the accuracies are optimistic.");
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
  return f;
}

}  // namespace cairn::geo
