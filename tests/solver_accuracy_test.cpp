// Slower checks of the solver (label slow): deep tails and the beta = 1, 4 Tracy-Widom laws.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>

#include "reference/fredholm.h"
#include "solver/solver.h"

namespace edgelaw {
namespace {

// Tails: relative accuracy where the reference is at least 1e-20.
// Rows w >= 0; the left tail of supercritical rows lies below the unstable branch, where the
// cdf falls off like a Gaussian tail in p that a fixed grid does not resolve relatively.
TEST(Beta2Tails, KeepRelativeAccuracy) {
  LawRequest r;
  r.beta = 2;
  for (double x = -8; x <= -2.9; x += 0.5) r.x.push_back(x);
  for (double x = 3; x <= 9.0001; x += 0.5) r.x.push_back(x);
  r.w = {0, 0.5, 1, 2, 3, 5, kInf};
  SolverOptions o;
  o.target_error = 1e-8;
  o.moments = false;
  const LawTable tails = solve_law(r, o);
  ASSERT_TRUE(tails.summary.converged) << tails.summary.full();
  int checked_left = 0, checked_right = 0;
  double worst_deep = 0;
  for (std::size_t r = 0; r < tails.w.size(); ++r) {
    const double w = tails.w[r];
    for (std::size_t c = 0; c < tails.x.size(); ++c) {
      const double x = tails.x[c];
      const auto ref = reference::spiked_beta2(x, w);
      if (x < 0 && ref.cdf >= 1e-20) {
        EXPECT_LE(std::abs(tails.cdf(r, c) / ref.cdf - 1), 1e-6) << "left tail x=" << x << " w=" << w;
        ++checked_left;
      }
      // Right tail: 1e-6 relative down to 1e-20. The sixth-order scheme reaches it on the default
      // grids (measured worst 7.7e-7 below 1e-13 with separate cdf and survival runs, observed
      // order 4.0; 3.8e-8 with the single run that switches from the survival to the cdf, whose
      // level differences show the order 6.2); the fourth-order one reached only ~3e-6 there.
      if (x > 0 && ref.survival >= 1e-20) {
        const double allowed = 1e-6;
        const double rel = std::abs(tails.survival(r, c) / ref.survival - 1);
        worst_deep = ref.survival < 1e-13 ? std::max(worst_deep, rel) : worst_deep;
        EXPECT_LE(rel, allowed) << "right tail x=" << x << " w=" << w;
        ++checked_right;
      }
    }
  }
  std::printf("worst relative survival error below 1e-13: %.2e\n%s", worst_deep, tails.summary.full().c_str());
  EXPECT_GE(checked_left, 20);
  EXPECT_GE(checked_right, 20);
}

// Tracy-Widom moments for beta = 1 and beta = 4 (Bornemann 2010 table; mean and variance as in
// the design notes, skewness and kurtosis from memory of the same table and cross-checked by
// tests/reference_test.cpp from the Fredholm determinants; the beta = 4 values
// there are in the Tracy-Widom (1996) normalisation F_4^TW, whose variable is 2^{1/6} times
// this operator's: mean scales by 2^{-1/6}, variance by 2^{-1/3}, shape is unchanged).
TEST(TracyWidom, MomentsBeta1AndBeta4) {
  struct Case {
    double beta, mean, variance, skewness, kurtosis;
  };
  const double s4 = std::pow(2.0, -1.0 / 6.0);
  const Case cases[] = {
      {1, -1.2065335745820, 1.6077810345810, 0.2934645240, 0.1652429384},
      {4, -2.3068848932410 * s4, 0.5177237207726 * s4 * s4, 0.1655094964, 0.0491951565},
  };
  for (const auto& k : cases) {
    LawRequest r;
    r.beta = k.beta;
    r.x = {0.0};
    r.w = {kInf};
    SolverOptions o;
    o.target_error = 1e-10;
    const auto t = solve_law(r, o);
    const auto& m = t.moments[0];
    // The tolerances: mean and variance within 1e-9, skewness and excess kurtosis
    // within 1e-7. With the sixth-order scheme at a 1e-10 cdf target (measured) beta = 1 lands
    // at 4e-11 (mean) and 8e-11 (variance), beta = 4 at 2e-11 and 1.1e-10; at the earlier
    // fourth-order scheme and a 1e-9 target they were 3e-9 and 1e-8. The reported moment
    // errors must cover the difference.
    const auto& e = t.moment_errors[0];
    std::printf("beta %g: mean %+.2e variance %+.2e skewness %+.2e kurtosis %+.2e (errors %.1e %.1e %.1e %.1e)\n", k.beta,
                m.mean - k.mean, m.variance - k.variance, m.skewness - k.skewness, m.excess_kurtosis - k.kurtosis, e.mean,
                e.variance, e.skewness, e.excess_kurtosis);
    EXPECT_NEAR(m.mean, k.mean, 1e-9) << "beta " << k.beta;
    EXPECT_NEAR(m.variance, k.variance, 1e-9) << "beta " << k.beta;
    EXPECT_NEAR(m.skewness, k.skewness, 1e-7) << "beta " << k.beta;
    EXPECT_NEAR(m.excess_kurtosis, k.kurtosis, 1e-7) << "beta " << k.beta;
    EXPECT_LE(std::abs(m.mean - k.mean), e.mean + 1e-13) << "beta " << k.beta;
    EXPECT_LE(std::abs(m.variance - k.variance), e.variance + 1e-13) << "beta " << k.beta;
    EXPECT_LE(std::abs(m.skewness - k.skewness), e.skewness + 1e-10) << "beta " << k.beta;
    EXPECT_LE(std::abs(m.excess_kurtosis - k.kurtosis), e.excess_kurtosis + 1e-10) << "beta " << k.beta;
    // And the cdf itself against the Fredholm determinant (Bornemann 2010).
    EXPECT_NEAR(t.cdf(0, 0), reference::tracy_widom(static_cast<int>(k.beta), 0.0).cdf, 1e-9);
  }
}

}  // namespace
}  // namespace edgelaw
