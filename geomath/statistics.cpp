#include "geomath/statistics.h"

#include <Eigen/Eigenvalues>
#include <algorithm>
#include <cmath>
#include <limits>
#include <random>
#include <sstream>
#include <string>

#include "geomath/angles.h"

namespace cairn::geo {

namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
// Eigenvalues of a trace-1 tensor below this are zero (rounding of exact zeros).
constexpr double kZeroEigenvalue = 1e-12;
// Log-ratios of eigenvalues below this are zero (equal eigenvalues up to rounding).
constexpr double kZeroLogRatio = 1e-9;

// Unit vectors of the input, or the index of the first unusable one.
Result<std::vector<Vec3>> unit_vectors(const std::vector<Vec3>& v) {
  std::vector<Vec3> out;
  out.reserve(v.size());
  for (std::size_t i = 0; i < v.size(); ++i) {
    const double len = v[i].norm();
    if (!std::isfinite(len) || len == 0.0) {
      return Result<std::vector<Vec3>>::failure("vector " + std::to_string(i + 1) + " of " + std::to_string(v.size()) +
                                                " is zero or not a number");
    }
    out.push_back(v[i] / len);
  }
  return out;
}

std::vector<Vec3> line_vectors(const std::vector<Line>& lines) {
  std::vector<Vec3> out;
  out.reserve(lines.size());
  for (const Line& l : lines) out.push_back(line_vector(l));
  return out;
}

Vec3 downward(Vec3 v) { return v.z() > 0 ? Vec3(-v) : v; }

// Tensor and eigen analysis of unit vectors (at least one).
OrientationTensor analyse(const std::vector<Vec3>& u) {
  OrientationTensor t;
  t.n = static_cast<int>(u.size());
  for (const Vec3& v : u) t.tensor += v * v.transpose();
  t.tensor /= static_cast<double>(u.size());
  // Symmetric 3x3: Eigen's self-adjoint solver returns ascending eigenvalues.
  Eigen::SelfAdjointEigenSolver<Eigen::Matrix3d> es(t.tensor);
  for (int i = 0; i < 3; ++i) {
    const int k = 2 - i;
    t.eigenvalues[i] = std::max(es.eigenvalues()(k), 0.0);  // T is positive semi-definite
    t.eigenvectors[i] = downward(es.eigenvectors().col(k).normalized());
    t.axes[i] = line_from_vector(t.eigenvectors[i]);
  }
  return t;
}

FisherMean fisher_of_units(const std::vector<Vec3>& u, const Vec3& sum) {
  FisherMean f;
  f.n = static_cast<int>(u.size());
  f.resultant = sum.norm();
  f.mean_vector = sum / f.resultant;
  f.mean = line_from_vector(f.mean_vector);
  const double spread = f.n - f.resultant;
  // R == N (to rounding) means every vector is the same: infinite precision.
  f.kappa = spread <= 1e-12 * f.n ? kInf : (f.n - 1) / spread;
  f.alpha95 = fisher_cone_angle(f.n, f.resultant, 0.05);
  return f;
}

}  // namespace

std::optional<double> fisher_cone_angle(int n, double r, double p) {
  if (n < 2 || !(r > 0.0) || !(p > 0.0 && p < 1.0)) return std::nullopt;
  const double spread = std::max(n - r, 0.0);  // R cannot exceed N but may by rounding
  const double c = 1.0 - spread / r * (std::pow(1.0 / p, 1.0 / (n - 1)) - 1.0);
  if (c < -1.0) return std::nullopt;
  return rad2deg(std::acos(std::min(c, 1.0)));
}

Result<FisherMean> fisher_mean_directions(const std::vector<Vec3>& v) {
  if (v.size() < 2) {
    return Result<FisherMean>::failure("a Fisher mean needs at least 2 directions, got " + std::to_string(v.size()));
  }
  auto u = unit_vectors(v);
  if (!u) return Result<FisherMean>::failure(u.error());
  Vec3 sum = Vec3::Zero();
  for (const Vec3& x : *u) sum += x;
  if (sum.norm() < 1e-9 * static_cast<double>(v.size())) {
    return Result<FisherMean>::failure(
        "the directions cancel out (resultant length zero), so they have no mean direction");
  }
  return fisher_of_units(*u, sum);
}

Result<FisherMean> fisher_mean(const std::vector<Line>& lines) {
  if (lines.size() < 2) {
    return Result<FisherMean>::failure("a Fisher mean needs at least 2 lines, got " + std::to_string(lines.size()));
  }
  std::vector<Vec3> u = line_vectors(lines);
  // Axes: put each in the hemisphere of the principal eigenvector (common practice).
  const Vec3 e1 = analyse(u).eigenvectors[0];
  Vec3 sum = Vec3::Zero();
  for (Vec3& x : u) {
    if (x.dot(e1) < 0) x = -x;
    sum += x;
  }
  // sum . e1 = sum |v . e1| > 0 since N * lambda1 = sum (v . e1)^2 >= N/3: never zero.
  return fisher_of_units(u, sum);
}

Result<OrientationTensor> orientation_tensor_vectors(const std::vector<Vec3>& v) {
  if (v.empty()) return Result<OrientationTensor>::failure("no directions to analyse");
  auto u = unit_vectors(v);
  if (!u) return Result<OrientationTensor>::failure(u.error());
  return analyse(*u);
}

Result<OrientationTensor> orientation_tensor(const std::vector<Line>& lines) {
  if (lines.empty()) return Result<OrientationTensor>::failure("no lines to analyse");
  return analyse(line_vectors(lines));
}

Result<WoodcockShape> woodcock_shape(const OrientationTensor& t) {
  auto ev = t.eigenvalues;
  for (double& l : ev) {
    if (l < kZeroEigenvalue) l = 0.0;
  }
  const double l1 = ev[0], l2 = ev[1], l3 = ev[2];
  auto log_ratio = [](double a, double b) {  // ln(a/b) for a >= b >= 0, a > 0
    if (b == 0.0) return a == 0.0 ? 0.0 : kInf;
    const double r = std::log(a / b);
    return r < kZeroLogRatio ? 0.0 : r;
  };
  const double ln12 = log_ratio(l1, l2);
  const double ln23 = log_ratio(l2, l3);  // 0 when l2 = l3 = 0 (a perfect cluster)
  WoodcockShape w;
  w.c = log_ratio(l1, l3);
  if (ln12 == 0.0 && ln23 == 0.0) {
    return Result<WoodcockShape>::failure(
        "Woodcock shape K is undefined for a uniform distribution (all three eigenvalues "
        "equal)");
  }
  if (ln23 == 0.0) {
    w.k = kInf;  // cluster end-member
  } else if (ln23 == kInf) {
    w.k = 0.0;  // girdle end-member (ln12 is finite here: l2 > 0)
  } else {
    w.k = ln12 / ln23;
  }
  return w;
}

Result<GirdleFit> fit_girdle(const std::vector<Line>& poles, const GirdleOptions& opt) {
  using R = Result<GirdleFit>;
  if (poles.size() < 3) {
    return R::failure("a best-fit great circle needs at least 3 poles, got " + std::to_string(poles.size()));
  }
  if (opt.bootstrap_samples < 1) {
    return R::failure("bootstrap samples must be at least 1, got " + std::to_string(opt.bootstrap_samples));
  }
  if (!(opt.confidence > 0.0 && opt.confidence < 1.0)) {
    std::ostringstream s;
    s << "confidence must lie strictly between 0 and 1, got " << opt.confidence;
    return R::failure(s.str());
  }
  const std::vector<Vec3> u = line_vectors(poles);
  GirdleFit fit;
  fit.tensor = analyse(u);
  const auto& ev = fit.tensor.eigenvalues;
  if (ev[1] - ev[2] < 1e-9) {
    return R::failure(
        "the poles define no girdle: the two smallest eigenvalues of the orientation tensor "
        "are equal (the poles form a cluster or are spread evenly)");
  }
  const Vec3 beta = fit.tensor.eigenvectors[2];
  fit.beta = fit.tensor.axes[2];
  fit.girdle = plane_from_pole(fit.beta);

  // Percentile bootstrap of beta. The index draw is written out (top 53 bits of the
  // 64-bit Mersenne Twister, whose output the C++ standard fixes) so that the cone does
  // not depend on the library's distribution classes.
  std::mt19937_64 rng(opt.seed);
  const std::size_t n = u.size();
  std::vector<Eigen::Matrix3d> outer(n);
  for (std::size_t i = 0; i < n; ++i) outer[i] = u[i] * u[i].transpose();
  std::vector<double> angles;
  angles.reserve(opt.bootstrap_samples);
  Eigen::SelfAdjointEigenSolver<Eigen::Matrix3d> es;
  for (int b = 0; b < opt.bootstrap_samples; ++b) {
    Eigen::Matrix3d t = Eigen::Matrix3d::Zero();
    for (std::size_t k = 0; k < n; ++k) {
      const double unit = static_cast<double>(rng() >> 11) * 0x1.0p-53;  // [0, 1)
      t += outer[std::min(n - 1, static_cast<std::size_t>(unit * n))];
    }
    es.compute(t);
    const Vec3 b3 = es.eigenvectors().col(0);  // smallest eigenvalue
    const double c = std::abs(b3.dot(beta)) / b3.norm();
    angles.push_back(rad2deg(std::atan2(b3.cross(beta).norm() / b3.norm(), c)));
  }
  std::sort(angles.begin(), angles.end());
  const auto idx = static_cast<std::size_t>(std::ceil(opt.confidence * static_cast<double>(angles.size())) - 1.0);
  fit.beta_cone = angles[std::min(idx, angles.size() - 1)];
  return fit;
}

}  // namespace cairn::geo
