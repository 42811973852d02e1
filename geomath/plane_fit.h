// A plane through points: the exact three-point solution and the
// total-least-squares best-fit plane for N >= 3 points, with its quality.
//
// Coordinates are metres in a local East-North-Up frame (e.g. UTM easting,
// northing and elevation). Point accuracies are 1-sigma standard deviations in
// metres: h_acc for EACH horizontal coordinate (east and north independently),
// v_acc for the elevation. 0 means "not given".
//
// Method (see plane_fit.cpp for the details and their sources):
//  - best fit: centroid + eigenvector of the smallest eigenvalue of the scatter
//    matrix (total least squares; Fernández, 2005; Jones et al., 2016), solved
//    with Eigen::SelfAdjointEigenSolver. With accuracies, each point is weighted
//    by 1/sigma_n^2, sigma_n being its precision along the plane's normal;
//    because the normal depends on the weights, the fit is iterated.
//  - quality: the eigenvalues of the scatter normalised to sum 1, Fernández
//    (2005) M = ln(l1/l3) and K = ln(l1/l2)/ln(l2/l3), checks in the spirit of
//    Jones et al. (2016) relating the point cloud's spread to the points'
//    positional precision, residuals and the worst point.
//  - 95% confidence cone on the pole: Monte Carlo (parametric bootstrap) with a
//    fixed seed and the project's own normal generator (the same points give
//    the same cone with every standard library), then corrected for the
//    precision having been estimated from few residuals (F and t quantiles;
//    Draper & Smith 1998, Seber & Lee 2003) and widened when the residuals show
//    the stated accuracies were optimistic.
#pragma once
#include <Eigen/Core>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "geomath/orientation.h"
#include "geomath/result.h"

namespace cairn::geo {

struct FitPoint {
  double e = 0, n = 0, z = 0;  // metres
  double h_acc = 0;            // 1-sigma of each horizontal coordinate, metres (0: not given)
  double v_acc = 0;            // 1-sigma of the elevation, metres (0: not given)
};

// The exact plane through three points (cross product of two edges).
// Fails with "geometry too weak: ..." when two points coincide or the three are
// collinear (the third lies within 1e-9 of the longest edge's length, or 1e-6 m,
// of the line through the other two).
Result<Plane> three_point_plane(const FitPoint& a, const FitPoint& b, const FitPoint& c);

struct FitOptions {
  // Weight by the points' accuracies when every point has them.
  bool use_accuracies = true;
  // Monte Carlo draws for the confidence cone and elevation intervals (0: none).
  int draws = 1000;
  std::uint64_t seed = 0x6361697266697431ULL;  // fixed: the same points give the same cone (NormalDeviates)
};

// Where the confidence cone comes from.
enum class ConeSource {
  None,        // three points without accuracies fit exactly: nothing to propagate
  Accuracies,  // the points' stated horizontal and vertical accuracies
  Residuals    // no accuracies: the scatter of the residuals about the plane
};

// One Monte Carlo realisation of the plane (a point on it and its upward normal).
struct PlaneDraw {
  Vec3 point;
  Vec3 normal;
};

struct PlaneFit {
  Plane plane;            // strike (RHR) / dip
  Vec3 normal;            // unit normal, z >= 0
  Vec3 centroid;          // (weighted) centroid, metres: the plane passes through it
  size_t count = 0;       // number of points
  bool weighted = false;  // true when the points' accuracies weighted the fit

  // Eigenvalues of the (weighted) scatter matrix normalised to sum 1, l1 >= l2 >= l3.
  Eigen::Vector3d eigenvalues = Eigen::Vector3d::Zero();
  // Columns: unit eigenvectors for l1, l2, l3 (the last is the normal, either sense).
  Eigen::Matrix3d axes = Eigen::Matrix3d::Identity();
  // Standard deviation of the points along each axis, metres (sqrt of the
  // eigenvalues of the covariance = scatter / N).
  Eigen::Vector3d spread = Eigen::Vector3d::Zero();
  // Fernández (2005). Absent when l3 is zero to rounding (points exactly
  // coplanar, M unbounded) or, for K, when l2 equals l3.
  std::optional<double> M, K;

  // 95% confidence cone on the pole (degrees) and where it comes from:
  // cone95_known * cone_scale.
  std::optional<double> cone95;
  // The Monte Carlo cone at the precision used (stated accuracies or residual
  // standard deviation) taken as exactly known, before the small-sample correction.
  std::optional<double> cone95_known;
  int dof = 0;  // N - 3
  // Square root of the variance factor the residuals give the stated accuracies
  // (the misfit ratio, floored at its 5% point; see plane_fit.cpp), 1 otherwise.
  double variance_factor = 1.0;
  // cone95 / cone95_known: sqrt(2 F_0.95(2, N-3) / chi2_0.95(2)), times the variance factor.
  double cone_scale = 1.0;
  // Multiplier of the Monte Carlo planes' standard deviation of one quantity
  // (an elevation) for its two-sided 95% interval: t_0.975(N-3) times the
  // variance factor, or 1.96 when there are no degrees of freedom.
  double interval_k95 = 1.959963984540054;
  ConeSource cone_source = ConeSource::None;
  // Precision along the normal used for the cone (metres): the rms of the
  // points' sigma_n (accuracies) or the residual standard deviation.
  std::optional<double> sigma_normal;

  std::vector<double> residuals;  // signed perpendicular distance, metres, + above the plane
  double rms = 0;                 // root mean square of the residuals, metres
  size_t worst_index = 0;         // point with the largest |residual|
  double worst_residual = 0;
  // sqrt(sum (r/sigma_n)^2 / (N-3)) with accuracies and N > 3: about 1 when the
  // residuals match the stated accuracies.
  std::optional<double> misfit_ratio;

  bool weak_geometry = false;           // a wide cone (or nearly collinear points without any precision)
  bool not_planar = false;              // residuals well above the stated accuracies
  std::string verdict;                  // "well constrained", "weak: points nearly collinear", ...
  std::optional<std::string> weakness;  // the reasons in full, with numbers

  // Monte Carlo realisations at the precision used, before the small-sample
  // correction (empty when cone_source is None): intervals from them multiply
  // their standard deviation by interval_k95.
  std::vector<PlaneDraw> draws;
};

// Total-least-squares plane through N >= 3 points. Fails with
// "geometry too weak: ..." for fewer than 3 points, coincident or collinear
// points, and with a message naming the point for non-finite coordinates,
// negative accuracies, or accuracies given for some points only.
Result<PlaneFit> fit_plane(const std::vector<FitPoint>& points, const FitOptions& options = {});

// Short name of a cone source for reports: "none", "accuracies", "residuals".
const char* cone_source_name(ConeSource s);

}  // namespace cairn::geo
