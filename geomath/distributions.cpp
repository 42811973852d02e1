#include "geomath/distributions.h"

#include <cmath>
#include <algorithm>
#include <limits>
#include <map>
#include <mutex>
#include <string>

#include "geomath/angles.h"

namespace cairn::geo {

namespace {

// Continued fraction for I_x(a, b) (A&S 26.5.8), evaluated by the modified
// Lentz method as in Numerical Recipes 6.4; converges fast for x < (a+1)/(a+b+2).
double beta_continued_fraction(double a, double b, double x) {
  constexpr double kTiny = 1e-300;
  constexpr double kEps = 1e-15;
  const double qab = a + b, qap = a + 1.0, qam = a - 1.0;
  double c = 1.0, d = 1.0 - qab * x / qap;
  if (std::abs(d) < kTiny) d = kTiny;
  d = 1.0 / d;
  double h = d;
  for (int m = 1; m <= 10000; ++m) {
    const double m2 = 2.0 * m;
    double aa = m * (b - m) * x / ((qam + m2) * (a + m2));
    d = 1.0 + aa * d;
    if (std::abs(d) < kTiny) d = kTiny;
    c = 1.0 + aa / c;
    if (std::abs(c) < kTiny) c = kTiny;
    d = 1.0 / d;
    h *= d * c;
    aa = -(a + m) * (qab + m) * x / ((a + m2) * (qap + m2));
    d = 1.0 + aa * d;
    if (std::abs(d) < kTiny) d = kTiny;
    c = 1.0 + aa / c;
    if (std::abs(c) < kTiny) c = kTiny;
    d = 1.0 / d;
    const double del = d * c;
    h *= del;
    if (std::abs(del - 1.0) < kEps) break;
  }
  return h;
}

}  // namespace

double incomplete_beta(double a, double b, double x) {
  if (!(a > 0) || !(b > 0) || !(x >= 0) || !(x <= 1)) return std::numeric_limits<double>::quiet_NaN();
  if (x == 0 || x == 1) return x;
  // x^a (1-x)^b / (a B(a, b)), then the continued fraction on the side where it
  // converges, using I_x(a, b) = 1 - I_{1-x}(b, a) (A&S 26.5.2).
  const double front =
      std::exp(std::lgamma(a + b) - std::lgamma(a) - std::lgamma(b) + a * std::log(x) + b * std::log1p(-x));
  if (x < (a + 1.0) / (a + b + 2.0)) return front * beta_continued_fraction(a, b, x) / a;
  return 1.0 - front * beta_continued_fraction(b, a, 1.0 - x) / b;
}

double f_cdf(double f, double d1, double d2) {
  if (!(f > 0)) return 0.0;
  return incomplete_beta(d1 / 2.0, d2 / 2.0, d1 * f / (d1 * f + d2));
}

Result<double> f_quantile(double p, double d1, double d2) {
  if (!(d1 > 0) || !(d2 > 0) || !std::isfinite(d1) || !std::isfinite(d2))
    return Result<double>::failure("the F distribution needs positive degrees of freedom");
  if (!(p > 0) || !(p < 1)) return Result<double>::failure("a quantile needs a probability between 0 and 1");
  double lo = 0, hi = 1;
  while (f_cdf(hi, d1, d2) < p) {
    lo = hi;
    hi *= 2;
    if (hi > 1e300) return Result<double>::failure("the F quantile is too large to represent");
  }
  for (int i = 0; i < 2000 && hi - lo > 1e-12 * hi; ++i) {
    const double mid = 0.5 * (lo + hi);
    (f_cdf(mid, d1, d2) < p ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}

Result<double> t_quantile(double p, double nu) {
  if (!(p > 0) || !(p < 1)) return Result<double>::failure("a quantile needs a probability between 0 and 1");
  if (p == 0.5) return 0.0;
  // P(|T| <= t) = P(F(1, nu) <= t^2): the two-sided level is 2p - 1 for p > 1/2.
  auto f = f_quantile(std::abs(2.0 * p - 1.0), 1.0, nu);
  if (!f) return f;
  const double t = std::sqrt(*f);
  return p > 0.5 ? t : -t;
}

double chi2_2_quantile(double p) { return -2.0 * std::log1p(-p); }

double incomplete_gamma(double a, double x) {
  if (!(a > 0) || !(x >= 0)) return std::numeric_limits<double>::quiet_NaN();
  if (x == 0) return 0.0;
  const double front = std::exp(-x + a * std::log(x) - std::lgamma(a));
  if (x < a + 1.0) {
    // Series (A&S 6.5.29): sum x^n / (a (a+1) ... (a+n)).
    double term = 1.0 / a, sum = term;
    for (int n = 1; n < 100000; ++n) {
      term *= x / (a + n);
      sum += term;
      if (std::abs(term) < std::abs(sum) * 1e-16) break;
    }
    return front * sum;
  }
  // Continued fraction for the upper function (A&S 6.5.31), modified Lentz.
  constexpr double kTiny = 1e-300;
  double b = x + 1.0 - a, c = 1.0 / kTiny, d = 1.0 / b, h = d;
  for (int i = 1; i < 100000; ++i) {
    const double an = -i * (i - a);
    b += 2.0;
    d = an * d + b;
    if (std::abs(d) < kTiny) d = kTiny;
    c = b + an / c;
    if (std::abs(c) < kTiny) c = kTiny;
    d = 1.0 / d;
    const double del = d * c;
    h *= del;
    if (std::abs(del - 1.0) < 1e-16) break;
  }
  return 1.0 - front * h;
}

Result<double> chi2_quantile(double p, double nu) {
  if (!(nu > 0) || !std::isfinite(nu))
    return Result<double>::failure("the chi-square distribution needs positive degrees of freedom");
  if (!(p > 0) || !(p < 1)) return Result<double>::failure("a quantile needs a probability between 0 and 1");
  double lo = 0, hi = nu + 1;
  while (incomplete_gamma(nu / 2.0, hi / 2.0) < p) lo = hi, hi *= 2;
  for (int i = 0; i < 2000 && hi - lo > 1e-13 * hi; ++i) {
    const double mid = 0.5 * (lo + hi);
    (incomplete_gamma(nu / 2.0, mid / 2.0) < p ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}

double NormalDeviates::uniform_open() {
  // The top 53 bits as an integer k, mapped to (k + 0.5) / 2^53: never 0 or 1.
  const std::uint64_t k = engine_() >> 11;
  return (static_cast<double>(k) + 0.5) * (1.0 / 9007199254740992.0);
}

double NormalDeviates::operator()() {
  if (have_spare_) {
    have_spare_ = false;
    return spare_;
  }
  // Box & Muller (1958): two independent uniforms give two independent normals.
  const double u1 = uniform_open(), u2 = uniform_open();
  const double r = std::sqrt(-2.0 * std::log(u1));
  const double a = 2.0 * kPi * u2;
  spare_ = r * std::sin(a);
  have_spare_ = true;
  return r * std::cos(a);
}

std::shared_ptr<const std::vector<double>> shared_normal_deviates(std::uint64_t seed, std::size_t n) {
  if (n > kSharedDeviatesMax) return nullptr;
  struct Stream {
    explicit Stream(std::uint64_t s) : gen(s), values(std::make_shared<std::vector<double>>()) {}
    NormalDeviates gen;  // positioned after the last value drawn
    std::shared_ptr<const std::vector<double>> values;
  };
  static std::mutex mutex;
  static std::map<std::uint64_t, Stream> streams;
  std::lock_guard<std::mutex> lock(mutex);
  auto it = streams.find(seed);
  if (it == streams.end()) {
    if (streams.size() >= 8) streams.clear();  // callers keep the values they hold
    it = streams.emplace(seed, Stream(seed)).first;
  }
  Stream& s = it->second;
  if (s.values->size() < n) {
    // A longer prefix is a new vector (the old one may be read on other
    // threads), grown geometrically so that a season draws a few times at most.
    const std::size_t size = std::min(kSharedDeviatesMax, std::max({n, 2 * s.values->size(), std::size_t{1} << 16}));
    auto longer = std::make_shared<std::vector<double>>();
    longer->reserve(size);
    longer->assign(s.values->begin(), s.values->end());
    while (longer->size() < size) longer->push_back(s.gen());
    s.values = std::move(longer);
  }
  return s.values;
}

}  // namespace cairn::geo
