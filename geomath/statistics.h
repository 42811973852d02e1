// Orientation statistics: Fisher mean with alpha95, the orientation tensor and its
// eigen analysis, Woodcock's shape and strength, and the best-fit great circle
// (pi-girdle) through poles with its beta axis.
//
// Lines on a lower-hemisphere net are axes (undirected): a line and its antipode
// are the same datum. For planes, callers pass the planes' poles as lines.
//
// References:
//  - Fisher, R. A. (1953). Dispersion on a sphere. Proc. R. Soc. Lond. A 217, 295-305.
//  - Scheidegger, A. E. (1965). On the statistics of the orientation of bedding
//    planes, grain axes, and similar sedimentological data. USGS Prof. Paper 525-C.
//  - Woodcock, N. H. (1977). Specification of fabric shapes using an eigenvalue
//    method. Geol. Soc. Am. Bull. 88, 1231-1236.
//  - Efron, B. (1979). Bootstrap methods: another look at the jackknife. Ann. Statist.
//    7, 1-26; Fisher, N. I., Lewis, T. & Embleton, B. J. J. (1987). Statistical
//    analysis of spherical data. Cambridge University Press (bootstrap for axes).
#pragma once
#include <Eigen/Core>
#include <array>
#include <cstdint>
#include <optional>
#include <vector>

#include "geomath/orientation.h"
#include "geomath/result.h"

namespace cairn::geo {

// ---------------------------------------------------------------- Fisher mean

struct FisherMean {
  int n = 0;
  double resultant = 0;  // R, length of the vector sum of the unit vectors
  Vec3 mean_vector;      // unit vector of the sum (directional) - may point up
  Line mean;             // the mean as a lower-hemisphere line
  // Best estimate of the precision parameter, k = (N - 1) / (N - R) (Fisher 1953);
  // +infinity when all vectors are identical (R == N).
  double kappa = 0;
  // Semi-angle in degrees of the 95% confidence cone about the mean (Fisher 1953):
  //   cos(a95) = 1 - (N - R)/R * ((1/p)^(1/(N - 1)) - 1),  p = 0.05.
  // Empty when the right-hand side falls below -1 (data too dispersed for a cone).
  std::optional<double> alpha95;
};

// Confidence-cone semi-angle (degrees) of Fisher (1953) at probability p (0.05 for
// alpha95), for N unit vectors with resultant R. Empty when undefined (N < 2,
// R <= 0, or cos below -1).
std::optional<double> fisher_cone_angle(int n, double r, double p = 0.05);

// Directional data: the vectors as given (each normalised). Fails for N < 2, a zero
// or non-finite vector (named by its index), or a resultant of (nearly) zero length.
Result<FisherMean> fisher_mean_directions(const std::vector<Vec3>& v);

// Axial data (lines; for planes pass their poles). Common practice, no single
// published source: each axis is taken in the sense of the hemisphere of the
// principal eigenvector of the orientation tensor (v -> -v when v . e1 < 0) and the
// Fisher statistics are computed on those vectors. This is sound for a single
// cluster; for a girdle or several clusters the Fisher mean is not meaningful and
// the orientation tensor should be used instead. Fails for N < 2.
Result<FisherMean> fisher_mean(const std::vector<Line>& lines);

// ---------------------------------------------------------- orientation tensor

struct OrientationTensor {
  int n = 0;
  // Normalised tensor T = (1/N) sum v v^T (Scheidegger 1965); trace 1.
  Eigen::Matrix3d tensor = Eigen::Matrix3d::Zero();
  std::array<double, 3> eigenvalues{};  // lambda1 >= lambda2 >= lambda3, summing to 1
  std::array<Vec3, 3> eigenvectors;     // unit, matching eigenvalues, pointing down (z <= 0)
  std::array<Line, 3> axes;             // the eigenvectors as lines
};

// Fails for an empty set, or a zero or non-finite vector (named by its index).
Result<OrientationTensor> orientation_tensor(const std::vector<Line>& lines);
Result<OrientationTensor> orientation_tensor_vectors(const std::vector<Vec3>& v);

// Woodcock (1977) fabric shape K = ln(l1/l2) / ln(l2/l3) and strength C = ln(l1/l3).
// Eigenvalues below 1e-12 count as zero, and log-ratios below 1e-9 as zero, so that
// the end-members come out exactly:
//  - l3 = 0 (all axes in one plane, a perfect girdle): C = +inf and K = 0, unless
//    l2 = 0 too (all axes parallel, a perfect cluster): then K = +inf;
//  - l2 = l3 > 0 (a symmetric cluster): K = +inf;
//  - l1 = l2 = l3 (uniform): K is 0/0, undefined -> failure; C would be 0.
struct WoodcockShape {
  double k = 0;  // shape: < 1 girdles, > 1 clusters
  double c = 0;  // strength
};
Result<WoodcockShape> woodcock_shape(const OrientationTensor& t);

// ------------------------------------------------------- pi-girdle and beta axis

struct GirdleOptions {
  int bootstrap_samples = 1000;  // resamples for the confidence cone of beta
  std::uint64_t seed = 1953;     // fixed, so the same data always give the same cone
  double confidence = 0.95;
};

struct GirdleFit {
  OrientationTensor tensor;  // of the poles
  Plane girdle;              // best-fit great circle (pi-girdle) through the poles
  Line beta;                 // its pole: the fold axis beta = eigenvector of lambda3
  // Semi-angle (degrees) of a circular confidence cone about beta, by the percentile
  // bootstrap (Efron 1979; bootstrap for axes: Fisher, Lewis & Embleton 1987): the
  // poles are resampled with replacement, beta* is found for each resample, and the
  // cone is the `confidence` quantile of the angles between beta* and beta.
  // Simple circular cone; it ignores any elongation of the beta* cloud.
  double beta_cone = 0;
};

// Fails for fewer than 3 poles, bad options, or poles that define no girdle (the two
// smallest eigenvalues equal: a cluster or a uniform spread, so no plane stands out).
Result<GirdleFit> fit_girdle(const std::vector<Line>& poles, const GirdleOptions& opt = {});

}  // namespace cairn::geo
