// Tests of the Fredholm-determinant reference (tests/reference/fredholm.h) against published
// values and identities; the point-wise high-precision check is tests/reference/check_fredholm.py.
#include <gtest/gtest.h>

#include <boost/math/quadrature/gauss.hpp>
#include <cmath>
#include <vector>

#include "tests/reference/fredholm.h"

namespace {

using edgelaw::reference::Probability;
using edgelaw::reference::spiked_beta2;
using edgelaw::reference::tracy_widom;
using edgelaw::reference::tracy_widom_quantile;

// a is strictly below b in the tail that double resolves (the smaller of cdf, survival).
void expect_increasing(const Probability& a, const Probability& b) {
  EXPECT_LE(a.cdf, b.cdf);
  EXPECT_GE(a.survival, b.survival);
  if (b.cdf < 0.5) EXPECT_LT(a.cdf, b.cdf);
  else EXPECT_GT(a.survival, b.survival);
}

struct Moments {
  double mean, variance;
};

// E[X] = int_0^inf S - int_{-inf}^0 F and E[X^2] = int_0^inf 2x S + int_{-inf}^0 2|x| F, by
// 15-point Gauss-Legendre panels of length 1/2 on [lo, hi] (the cdf below lo and the survival
// above hi are below 1e-19).
Moments moments(int beta, double lo, double hi) {
  using Rule = boost::math::quadrature::gauss<double, 15>;
  double m1 = 0, m2 = 0;
  for (double a = lo; a < hi - 1e-12; a += 0.5) {
    const double b = a + 0.5;
    const auto& xs = Rule::abscissa();
    const auto& ws = Rule::weights();
    for (std::size_t k = 0; k < xs.size(); ++k)
      for (int sign : {-1, 1}) {
        if (k == 0 && sign < 0) continue;  // the centre node appears once
        const double x = 0.5 * (a + b) + sign * 0.25 * xs[k], wk = 0.25 * ws[k];
        const Probability p = tracy_widom(beta, x);
        m1 += wk * (x > 0 ? p.survival : -p.cdf);
        m2 += wk * 2 * std::abs(x) * (x > 0 ? p.survival : p.cdf);
      }
  }
  return {m1, m2 - m1 * m1};
}

// Bornemann, Markov Process. Relat. Fields 16 (2010), table of TW moments (design.md section 4).
TEST(ReferenceMoments, TracyWidom2MatchesBornemann) {
  Moments m = moments(2, -9.0, 10.0);
  EXPECT_NEAR(m.mean, -1.7710868074116, 2e-12);
  EXPECT_NEAR(m.variance, 0.8131947928329, 2e-12);
}

TEST(ReferenceMoments, TracyWidom1MatchesBornemann) {
  Moments m = moments(1, -11.0, 17.0);
  EXPECT_NEAR(m.mean, -1.2065335745820, 2e-12);
  EXPECT_NEAR(m.variance, 1.6077810345810, 2e-12);
}

// TW_4 here is the stochastic-Airy normalisation TW_4(x) = F_4^{TW}(2^{1/6} x): its moments are
// Bornemann's GSE values (TW 1996 normalisation) times 2^{-1/6} and 2^{-1/3}.
TEST(ReferenceMoments, TracyWidom4MatchesBornemannInBothNormalisations) {
  Moments m = moments(4, -7.5, 6.5);
  EXPECT_NEAR(m.mean, -2.05520079428581, 2e-12);
  EXPECT_NEAR(m.variance, 0.410917589491718, 2e-12);
  EXPECT_NEAR(std::pow(2.0, 1.0 / 6.0) * m.mean, -2.3068848932410, 2e-12);
  EXPECT_NEAR(std::cbrt(2.0) * m.variance, 0.5177237207726, 2e-12);
}

// TW_2 quantiles, design.md section 4 (independent Fredholm computation, ~2e-15).
TEST(ReferenceQuantile, TracyWidom2Quantiles) {
  EXPECT_NEAR(tracy_widom_quantile(2, 0.90), -0.5968512971173513, 1e-13);
  EXPECT_NEAR(tracy_widom_quantile(2, 0.95), -0.23247446976400488, 1e-13);
  EXPECT_NEAR(tracy_widom_quantile(2, 0.99), 0.4776360473907985, 1e-13);
}

TEST(ReferenceQuantile, InvertsTheCdf) {
  for (int beta : {1, 2, 4})
    for (double p : {1e-15, 1e-6, 0.01, 0.3, 0.5, 0.8, 0.999}) {
      const double x = tracy_widom_quantile(beta, p);
      EXPECT_NEAR(tracy_widom(beta, x).cdf / p, 1.0, 1e-11) << beta << " " << p;
    }
}

// Baik, Ben Arous, Peche (2005): the critical rank-one law is the square of the GOE law.
TEST(ReferenceSpiked, CriticalSpikeIsGoeSquared) {
  for (double x : {-7.5, -5.0, -3.0, -1.0, 0.0, 2.0, 5.0, 9.0, 14.0}) {
    const Probability s = spiked_beta2(x, 0.0), f1 = tracy_widom(1, x);
    EXPECT_NEAR(s.cdf / (f1.cdf * f1.cdf), 1.0, 1e-12) << x;
    EXPECT_NEAR(s.survival / (f1.survival * (2.0 - f1.survival)), 1.0, 1e-12) << x;
  }
}

// w -> +inf (Dirichlet condition) gives TW_2, with F_2(x) - F_2(x; w) = O(1/w) (s_w ~ Ai / w).
TEST(ReferenceSpiked, LargeWTendsToTracyWidom2) {
  for (double x : {-4.0, -1.5, 0.0, 2.0}) {
    const Probability tw2 = tracy_widom(2, x);
    double prev = 1.0;
    for (double w : {10.0, 100.0, 1000.0}) {
      const double d = tw2.cdf - spiked_beta2(x, w).cdf;
      EXPECT_GE(d, 0.0);
      EXPECT_LT(d, 0.2 * prev) << x << " " << w;
      EXPECT_LT(d * w, 1.0);
      prev = d;
    }
    const Probability inf = spiked_beta2(x, INFINITY);
    EXPECT_EQ(inf.cdf, tw2.cdf);
  }
}

TEST(ReferenceConsistency, CdfPlusSurvivalIsOne) {
  for (double x = -8.0; x <= 12.0; x += 0.37) {
    for (int beta : {1, 2, 4}) {
      const Probability p = tracy_widom(beta, x);
      EXPECT_NEAR(p.cdf + p.survival, 1.0, 1e-14) << beta << " " << x;
    }
    for (double w : {-3.0, -1.0, 0.0, 1.0, 2.0, 5.0}) {
      const Probability p = spiked_beta2(x, w);
      EXPECT_NEAR(p.cdf + p.survival, 1.0, 1e-14) << w << " " << x;
    }
  }
}

TEST(ReferenceConsistency, MonotoneInXAndW) {
  const std::vector<double> ws = {-3.0, -2.0, -1.0, -0.5, 0.0, 0.5, 1.0, 1.49, 1.51, 2.0, 3.0, 5.0, INFINITY};
  for (double x = -7.0; x <= 10.0; x += 0.5) {
    Probability prev = spiked_beta2(x, -4.0);
    for (double w : ws) {
      SCOPED_TRACE(testing::Message() << "x " << x << " w " << w);
      const Probability p = spiked_beta2(x, w);
      expect_increasing(prev, p);
      prev = p;
    }
  }
  for (double w : ws) {
    Probability prev = spiked_beta2(-7.5, w);
    for (double x = -7.0; x <= 14.0; x += 0.5) {
      SCOPED_TRACE(testing::Message() << "x " << x << " w " << w);
      const Probability p = spiked_beta2(x, w);
      expect_increasing(prev, p);
      prev = p;
    }
  }
  for (int beta : {1, 2, 4}) {
    Probability prev = tracy_widom(beta, -8.0);
    for (double x = -7.75; x <= 12.0; x += 0.25) {
      SCOPED_TRACE(testing::Message() << "beta " << beta << " x " << x);
      const Probability p = tracy_widom(beta, x);
      expect_increasing(prev, p);
      prev = p;
    }
  }
}

}  // namespace
