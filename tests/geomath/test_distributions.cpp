// F, t and chi-square quantiles and the incomplete beta and gamma functions,
// against published tables and closed forms.
//
// Sources, named beside each check:
//  - table values: Abramowitz & Stegun (1964), Handbook of Mathematical
//    Functions, Table 26.8 (chi-square), 26.9 (F) and 26.10 (t), to the digits
//    printed in the usual statistical tables (values from memory of those tables);
//  - closed forms: F(2, nu) has P(F <= f) = 1 - (1 + 2f/nu)^(-nu/2), so its
//    p-quantile is (nu/2)((1-p)^(-2/nu) - 1); Student's t with 1 degree of
//    freedom is Cauchy, t_p = tan(pi (p - 1/2)); with 2, t_p = (2p-1)/sqrt(2p(1-p));
//    chi-square with 2 is exponential, -2 ln(1-p) (A&S 26.7.4, 26.4 and 26.6);
//  - I_x(a, 1) = x^a, I_x(1, b) = 1 - (1-x)^b, I_(1/2)(a, a) = 1/2 (A&S 26.5);
//    P(1, x) = 1 - exp(-x) (A&S 6.5.13 with a = 1);
//  - the shared deviates are checked against NormalDeviates itself, whose
//    moments are checked above (a standard normal's, A&S 26.2).
#include <gtest/gtest.h>

#include <cmath>
#include <thread>
#include <vector>

#include "geomath/angles.h"
#include "geomath/distributions.h"

using namespace cairn::geo;

TEST(Distributions, IncompleteBetaClosedForms) {
  for (double x : {0.01, 0.2, 0.5, 0.77, 0.999}) {
    for (double a : {0.5, 1.0, 2.5, 7.0}) {
      EXPECT_NEAR(incomplete_beta(a, 1.0, x), std::pow(x, a), 1e-12) << a << " " << x;  // A&S 26.5
      EXPECT_NEAR(incomplete_beta(1.0, a, x), 1.0 - std::pow(1.0 - x, a), 1e-12) << a << " " << x;
    }
  }
  for (double a : {0.5, 3.0, 40.0}) EXPECT_NEAR(incomplete_beta(a, a, 0.5), 0.5, 1e-12);  // symmetry
  EXPECT_TRUE(std::isnan(incomplete_beta(-1, 1, 0.5)));
  for (double x : {0.1, 1.0, 4.0, 30.0}) EXPECT_NEAR(incomplete_gamma(1.0, x), 1.0 - std::exp(-x), 1e-13);
}

TEST(Distributions, FQuantileMatchesTableAndClosedForm) {
  // F_0.95(2, nu), A&S Table 26.9: 199.5, 19.00, 9.55, 6.94, 5.79, 4.10, 3.49, 3.32.
  const std::vector<std::pair<double, double>> table = {{1, 199.5}, {2, 19.00}, {3, 9.55},  {4, 6.94},
                                                        {5, 5.79},  {10, 4.10}, {20, 3.49}, {30, 3.32}};
  for (auto [nu, want] : table) {
    auto f = f_quantile(0.95, 2, nu);
    ASSERT_TRUE(f.ok()) << f.error();
    EXPECT_NEAR(*f, want, 0.006 * want) << "nu " << nu;
    EXPECT_NEAR(*f, nu / 2 * (std::pow(0.05, -2 / nu) - 1), 1e-8 * *f) << "closed form, nu " << nu;
  }
  // Other degrees of freedom and levels, same tables: F_0.95(1,10) = 4.96,
  // F_0.95(5,10) = 3.33, F_0.95(3,20) = 3.10, F_0.99(2,10) = 7.56, F_0.95(10,10) = 2.98.
  EXPECT_NEAR(*f_quantile(0.95, 1, 10), 4.96, 0.01);
  EXPECT_NEAR(*f_quantile(0.95, 5, 10), 3.33, 0.01);
  EXPECT_NEAR(*f_quantile(0.95, 3, 20), 3.10, 0.01);
  EXPECT_NEAR(*f_quantile(0.99, 2, 10), 7.56, 0.01);
  EXPECT_NEAR(*f_quantile(0.95, 10, 10), 2.98, 0.01);
  EXPECT_FALSE(f_quantile(0.95, 0, 3).ok());
  EXPECT_FALSE(f_quantile(1.0, 2, 3).ok());
}

TEST(Distributions, TQuantileMatchesTableAndClosedForms) {
  // t_0.975(nu), A&S Table 26.10: 12.706, 4.303, 3.182, 2.776, 2.571, 2.228, 2.086, 2.042.
  const std::vector<std::pair<double, double>> table = {{1, 12.706}, {2, 4.303},  {3, 3.182},  {4, 2.776},
                                                        {5, 2.571},  {10, 2.228}, {20, 2.086}, {30, 2.042}};
  for (auto [nu, want] : table) EXPECT_NEAR(*t_quantile(0.975, nu), want, 0.0006) << "nu " << nu;
  for (double p : {0.6, 0.9, 0.975, 0.995}) {
    EXPECT_NEAR(*t_quantile(p, 1), std::tan(kPi * (p - 0.5)), 1e-8 * std::tan(kPi * (p - 0.5)));  // Cauchy
    EXPECT_NEAR(*t_quantile(p, 2), (2 * p - 1) / std::sqrt(2 * p * (1 - p)), 1e-8);
    EXPECT_NEAR(*t_quantile(1 - p, 5), -*t_quantile(p, 5), 1e-9);  // symmetry
  }
}

TEST(Distributions, ChiSquareQuantileMatchesTable) {
  // A&S Table 26.8: chi2_0.95(1) = 3.841, chi2_0.95(10) = 18.307, chi2_0.05(10) = 3.940,
  // chi2_0.05(1) = 0.00393, chi2_0.95(27) = 40.113, chi2_0.05(27) = 16.151.
  EXPECT_NEAR(*chi2_quantile(0.95, 1), 3.841, 0.001);
  EXPECT_NEAR(*chi2_quantile(0.95, 10), 18.307, 0.001);
  EXPECT_NEAR(*chi2_quantile(0.05, 10), 3.940, 0.001);
  EXPECT_NEAR(*chi2_quantile(0.05, 1), 0.00393, 0.00001);
  EXPECT_NEAR(*chi2_quantile(0.95, 27), 40.113, 0.001);
  EXPECT_NEAR(*chi2_quantile(0.05, 27), 16.151, 0.001);
  for (double p : {0.05, 0.5, 0.95}) EXPECT_NEAR(*chi2_quantile(p, 2), chi2_2_quantile(p), 1e-9);
  EXPECT_NEAR(chi2_2_quantile(0.95), -2 * std::log(0.05), 1e-12);
}

TEST(Distributions, NormalDeviatesHaveUnitVarianceAndRepeat) {
  // Moments of a standard normal (mean 0, variance 1, fourth moment 3) within
  // sampling error of 200000 draws; the same seed gives the same sequence.
  NormalDeviates g(12345), h(12345);
  const int n = 200000;
  double s1 = 0, s2 = 0, s4 = 0;
  int within = 0;
  for (int i = 0; i < n; ++i) {
    const double x = g();
    EXPECT_EQ(x, h());
    s1 += x;
    s2 += x * x;
    s4 += x * x * x * x;
    within += std::abs(x) <= 1.959963984540054;
  }
  EXPECT_NEAR(s1 / n, 0.0, 0.01);
  EXPECT_NEAR(s2 / n, 1.0, 0.01);
  EXPECT_NEAR(s4 / n, 3.0, 0.05);
  EXPECT_NEAR(within / double(n), 0.95, 0.002);  // two-sided 95% normal quantile 1.96
}

TEST(Distributions, SharedDeviatesAreTheGeneratorsOwn) {
  // The shared prefix is the generator's sequence value for value, however it
  // grows and from whichever thread it is asked for; past the cap there is none.
  const std::uint64_t seed = 0x5eed5eedULL;
  const std::size_t sizes[] = {10, 1, 70000, 300001, 65536};
  std::vector<std::thread> askers;
  std::vector<std::shared_ptr<const std::vector<double>>> got(std::size(sizes));
  for (std::size_t k = 0; k < std::size(sizes); ++k)
    askers.emplace_back([&, k] { got[k] = shared_normal_deviates(seed, sizes[k]); });
  for (auto& t : askers) t.join();
  NormalDeviates g(seed);
  std::vector<double> expected(300001);
  for (double& x : expected) x = g();
  for (std::size_t k = 0; k < std::size(sizes); ++k) {
    ASSERT_TRUE(got[k]) << sizes[k];
    ASSERT_GE(got[k]->size(), sizes[k]);
    for (std::size_t i = 0; i < sizes[k]; ++i) ASSERT_EQ((*got[k])[i], expected[i]) << sizes[k] << " at " << i;
  }
  // Another seed is another sequence.
  const auto other = shared_normal_deviates(seed + 1, 4);
  ASSERT_TRUE(other);
  EXPECT_NE((*other)[0], expected[0]);
  EXPECT_EQ(shared_normal_deviates(seed, kSharedDeviatesMax + 1), nullptr);
}
