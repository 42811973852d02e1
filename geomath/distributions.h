// Sampling distributions for small-sample confidence statements, and a normal
// random generator of the project's own.
//
// References:
//  - Abramowitz, M. & Stegun, I. A. (1964). Handbook of Mathematical Functions,
//    26.5 (incomplete beta function), 26.6 (F distribution), 26.7 (Student's t).
//  - Press, W. H. et al. (2007). Numerical Recipes, 3rd ed., 6.4: the continued
//    fraction for the incomplete beta function evaluated by the modified Lentz
//    method.
//  - Box, G. E. P. & Muller, M. E. (1958). A note on the generation of random
//    normal deviates. Ann. Math. Statist. 29, 610-611.
#pragma once
#include <cstdint>
#include <cstddef>
#include <memory>
#include <random>
#include <vector>

#include "geomath/result.h"

namespace cairn::geo {

// Regularized incomplete beta function I_x(a, b) for a, b > 0 and 0 <= x <= 1
// (A&S 26.5.1; continued fraction A&S 26.5.8, Numerical Recipes 6.4).
double incomplete_beta(double a, double b, double x);

// P(F <= f) of Snedecor's F distribution with (d1, d2) degrees of freedom:
// I_{d1 f / (d1 f + d2)}(d1/2, d2/2) (A&S 26.6.2).
double f_cdf(double f, double d1, double d2);
// The p-quantile of F(d1, d2), 0 < p < 1 (bisection on f_cdf to 1e-12 relative).
// Fails for non-positive degrees of freedom or p outside (0, 1).
Result<double> f_quantile(double p, double d1, double d2);
// The p-quantile of Student's t with nu degrees of freedom, 0 < p < 1:
// t^2 follows F(1, nu) (A&S 26.7.5).
Result<double> t_quantile(double p, double nu);
// The p-quantile of the chi-square distribution with 2 degrees of freedom:
// -2 ln(1 - p) (A&S 26.4.1 with nu = 2, an exponential distribution).
double chi2_2_quantile(double p);
// Regularized lower incomplete gamma function P(a, x) (A&S 6.5.1; series
// A&S 6.5.29 and continued fraction A&S 6.5.31, as in Numerical Recipes 6.2).
double incomplete_gamma(double a, double x);
// The p-quantile of chi-square with nu degrees of freedom: P(nu/2, x/2) = p
// (A&S 26.4.19), by bisection. Fails for nu <= 0 or p outside (0, 1).
Result<double> chi2_quantile(double p, double nu);

// Standard normal deviates from a 64-bit Mersenne Twister (whose output
// sequence the C++ standard fixes, [rand.eng.mt]) by the Box-Muller transform
// with our own conversion of the raw bits to (0, 1). std::normal_distribution
// is not used because each standard library implements it differently; this
// gives the same sequence with every library, up to the last bits of log, sin
// and cos of the C library.
class NormalDeviates {
 public:
  explicit NormalDeviates(std::uint64_t seed) : engine_(seed) {}
  double operator()();

 private:
  double uniform_open();  // in (0, 1), 53 bits
  std::mt19937_64 engine_;
  bool have_spare_ = false;
  double spare_ = 0;
};

// The first n values of NormalDeviates(seed), drawn once in the process and
// shared (read-only) by every caller and thread. Every plane fit's Monte Carlo
// cone starts the same fixed seed, so each fit would otherwise draw the same
// values again: over half of a season's cross-check (issue 16). The values are
// the generator's own, so results stay bit for bit what they were. Returns
// nullptr when n is above kSharedDeviatesMax (the caller then draws its own).
constexpr std::size_t kSharedDeviatesMax = std::size_t{1} << 22;  // 32 MiB of doubles
std::shared_ptr<const std::vector<double>> shared_normal_deviates(std::uint64_t seed, std::size_t n);

}  // namespace cairn::geo
