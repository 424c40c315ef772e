// Tests of the finite-n maps (stats/finite_n_map.h): identities of the maps; the
// simulation-versus-law checks are in stats_maps_simulation_test.cpp (slow label).
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <limits>
#include <stdexcept>
#include <vector>

#include "stats/finite_n_map.h"

namespace edgelaw {
namespace {

constexpr double kInfinity = std::numeric_limits<double>::infinity();
const double kNan = std::numeric_limits<double>::quiet_NaN();

// Boundary scale kappa of each family (header, steps 1 and 4), with N = n - 1/beta, P = p - 1/beta.
double hermite_kappa(double beta, long n) { return std::cbrt(n - 1.0 / beta); }
double covariance_c(double beta, long n, long p) { return (p - 1.0 / beta) / (n - 1.0 / beta); }
double covariance_kappa(double beta, long n, long p) {
  const double c = covariance_c(beta, n, p);
  return std::cbrt((n - 1.0 / beta) * c) / std::cbrt((1.0 + std::sqrt(c)) * (1.0 + std::sqrt(c)));
}

struct Sizes {
  long n, p;
};

// ---------------------------------------------------------------------------------------------
// Fast: identities. Exact identities are checked to 1e-12 relative (a few hundred ulps of the
// closed forms, which involve cbrt/sqrt of sizes up to 1e6).

TEST(FiniteNMap, InverseRoundTrip) {
  for (double beta : {0.5, 1.0, 2.0, 4.0}) {
    for (long n : {20L, 400L, 3200L, 1000000L}) {
      const double k = hermite_kappa(beta, n);
      for (double w : {-8.0, -3.0, -1.0, -0.2, 0.0, 0.3, 1.0, 3.0, 1.9 * k}) {
        const double theta = hermite_spike_for_w(beta, n, w);
        EXPECT_NEAR(hermite_edge_map(beta, n, theta).w, w, 1e-12 * std::max(1.0, std::abs(w)))
            << "Hermite beta " << beta << " n " << n << " w " << w;
      }
    }
    for (Sizes s : {Sizes{800, 200}, Sizes{500, 125}, Sizes{100, 300}, Sizes{100000, 1000}}) {
      const double k = covariance_kappa(beta, s.n, s.p);
      for (double w : {-8.0, -3.0, -1.0, 0.0, 1.0, 3.0, 1.9 * k}) {
        const double ell = covariance_spike_for_w(beta, s.n, s.p, w);
        EXPECT_NEAR(covariance_edge_map(beta, s.n, s.p, ell).w, w, 1e-12 * std::max(1.0, std::abs(w)))
            << "covariance beta " << beta << " n " << s.n << " p " << s.p << " w " << w;
      }
    }
  }
}

TEST(FiniteNMap, MonotoneInTheSpike) {
  for (double beta : {0.5, 2.0}) {
    double last_w = kInfinity, last_theta = kInfinity, last_ell = kInfinity;
    for (double theta = 0.01; theta < 6.0; theta += 0.01) {
      const double w = hermite_edge_map(beta, 500, theta).w;
      EXPECT_LT(w, last_w) << "theta " << theta;
      last_w = w;
    }
    last_w = kInfinity;
    for (double ell = 1.001; ell < 8.0; ell += 0.01) {
      const double w = covariance_edge_map(beta, 800, 200, ell).w;
      EXPECT_LT(w, last_w) << "ell " << ell;
      last_w = w;
    }
    for (double w = -10.0; w < 15.0; w += 0.05) {
      const double theta = hermite_spike_for_w(beta, 500, w), ell = covariance_spike_for_w(beta, 800, 200, w);
      EXPECT_LE(theta, last_theta) << "w " << w;
      EXPECT_LE(ell, last_ell) << "w " << w;
      last_theta = theta;
      last_ell = ell;
    }
  }
}

// Near criticality the maps agree with design.md section 3 (leading order): g(theta) and
// 1 - theta share value and slope at theta = 1 (they differ in g'' = 1), so w / w_leading -> 1 as
// theta -> 1; the centre moves by the noise shift only (-n^{-1/3}/beta in x units), the scale by
// O(1/n) relative.
TEST(FiniteNMap, LeadingOrderNearCriticality) {
  for (double beta : {1.0, 2.0}) {
    for (long n : {500L, 100000L}) {
      for (double eps : {1e-2, -1e-2, 1e-3, -1e-3}) {
        const EdgeMap m = hermite_edge_map(beta, n, 1.0 + eps);
        const EdgeMap lead = edge_map_candidates::hermite_leading(n, 1.0 + eps);
        // g(1 + e) = -e + e^2/2 + O(e^3) against -e: relative difference |e|/2, plus 1/(3 beta n)
        // from the N = n - 1/beta in kappa.
        EXPECT_NEAR(m.w / lead.w, 1.0, 0.6 * std::abs(eps) + 1.0 / n) << "beta " << beta << " n " << n << " eps " << eps;
        EXPECT_NEAR(m.scale / lead.scale, 1.0, 2.0 / n + std::abs(eps));
        // 2 sqrt(n - 1/beta) - 2 sqrt(n) = -n^{-1/2}/beta + O(n^{-3/2}); for theta > 1 the width
        // pivot adds scale w^2 (1 - sqrt v) = O(n^{2/3} |e|^3) in x units.
        const double h = std::pow(static_cast<double>(n), -1.0 / 3.0);
        EXPECT_NEAR((m.center - lead.center) / lead.scale, -h / beta,
                    0.01 * h + std::pow(static_cast<double>(n), 2.0 / 3.0) * std::pow(std::abs(eps), 3.0));
      }
    }
    for (Sizes s : {Sizes{800, 200}, Sizes{40000, 10000}}) {
      const double crit = 1.0 + std::sqrt(static_cast<double>(s.p) / s.n);
      for (double eps : {1e-2, -1e-2, 1e-3}) {
        const EdgeMap m = covariance_edge_map(beta, s.n, s.p, crit * (1.0 + eps));
        const EdgeMap lead = edge_map_candidates::covariance_leading(s.n, s.p, crit * (1.0 + eps));
        // design.md: w = n^{1/3} (1 + sqrt c - ell) / (c^{1/6} (1 + sqrt c)^{2/3}).
        const double c = static_cast<double>(s.p) / s.n, ell = crit * (1.0 + eps);
        const double design_w = std::cbrt(static_cast<double>(s.n)) * (1.0 + std::sqrt(c) - ell) /
                                (std::pow(c, 1.0 / 6.0) * std::pow(1.0 + std::sqrt(c), 2.0 / 3.0));
        EXPECT_NEAR(lead.w, design_w, 1e-12 * std::abs(design_w));
        // g(theta) - (1 - theta) = O((theta - 1)^2), and the critical point moves by O(1/p) with
        // P = p - 1/beta: |w - design w| <= kappa ((theta - 1)^2 + 2/p).
        const double theta = (ell - 1.0) / std::sqrt(c), kappa = covariance_kappa(beta, s.n, s.p);
        EXPECT_NEAR(m.w, design_w, kappa * ((theta - 1.0) * (theta - 1.0) + 2.0 / s.p)) << "n " << s.n << " eps " << eps;
        EXPECT_NEAR(m.scale / lead.scale, 1.0, 5.0 / s.p + 5.0 * std::abs(eps));
      }
    }
  }
}

// Supercritical spikes: the exact outlier location (the large-n limit of the outlier with N for
// n) maps to the law's centre w^2, and the exact outlier variance to the law's 4|w|/beta.
// Hermite: sqrt(N) (theta + 1/theta), variance (2/beta)(1 - theta^{-2}) (Baik, Ben Arous, Peche
// 2005; Capitaine, Donati-Martin, Feral 2009). Covariance: N ell (1 + c/(ell - 1)), variance
// (2/beta) N ell^2 (1 - c/(ell - 1)^2) (Baik, Silverstein 2006; Paul 2007).
TEST(FiniteNMap, OutlierLocationAndVarianceMatchExactly) {
  for (double beta : {0.5, 1.0, 2.0, 4.0}) {
    const long n = 500;
    const double big_n = n - 1.0 / beta;
    for (double theta : {1.05, 1.5, 3.0}) {
      const EdgeMap m = hermite_edge_map(beta, n, theta);
      const double outlier = std::sqrt(big_n) * (theta + 1.0 / theta);
      EXPECT_NEAR((outlier - m.center) / m.scale, m.w * m.w, 1e-10 * m.w * m.w) << "beta " << beta << " theta " << theta;
      const double variance = 2.0 / beta * (1.0 - 1.0 / (theta * theta));
      EXPECT_NEAR(m.scale * m.scale * 4.0 * std::abs(m.w) / beta, variance, 1e-12 * variance);
    }
    for (Sizes s : {Sizes{800, 200}, Sizes{100, 300}}) {
      const double big_n2 = s.n - 1.0 / beta, c = covariance_c(beta, s.n, s.p);
      for (double ell : {1.0 + 1.05 * std::sqrt(c), 3.0, 8.0}) {
        const EdgeMap m = covariance_edge_map(beta, s.n, s.p, ell);
        const double outlier = big_n2 * ell * (1.0 + c / (ell - 1.0));
        EXPECT_NEAR((outlier - m.center) / m.scale, m.w * m.w, 1e-10 * m.w * m.w) << "ell " << ell;
        const double variance = 2.0 / beta * big_n2 * ell * ell * (1.0 - c / ((ell - 1.0) * (ell - 1.0)));
        EXPECT_NEAR(m.scale * m.scale * 4.0 * std::abs(m.w) / beta, variance, 1e-10 * variance);
      }
    }
  }
}

// No spike: w = +inf, centred half a boundary step in (F(x; 2 kappa) = TW(x - 1/(2 kappa)) up to
// O(kappa^{-3})): Hermite 2 sqrt(N) + N^{-1/6} / (2 N^{1/3}); Johnstone-type mu + sigma/(2 kappa).
TEST(FiniteNMap, NoSpikeIsTracyWidom) {
  for (double beta : {1.0, 2.0}) {
    const long n = 500;
    const double big_n = n - 1.0 / beta;
    const EdgeMap h = hermite_edge_map(beta, n, 0.0);
    EXPECT_EQ(h.w, kInfinity);
    EXPECT_NEAR(h.center, 2.0 * std::sqrt(big_n) + 0.5 / std::sqrt(big_n), 1e-12 * h.center);
    EXPECT_EQ(hermite_edge_map(beta, n, -3.0).w, kInfinity);
    EXPECT_EQ(hermite_spike_for_w(beta, n, kInfinity), 0.0);
    EXPECT_EQ(hermite_spike_for_w(beta, n, 2.0 * hermite_kappa(beta, n) + 1.0), 0.0);
    const EdgeMap c = covariance_edge_map(beta, 800, 200, 1.0);
    EXPECT_EQ(c.w, kInfinity);
    const double bn = 800 - 1.0 / beta, bp = 200 - 1.0 / beta;
    const double mu = std::pow(std::sqrt(bn) + std::sqrt(bp), 2.0);
    const double sigma = (std::sqrt(bn) + std::sqrt(bp)) * std::cbrt(1.0 / std::sqrt(bn) + 1.0 / std::sqrt(bp));
    EXPECT_NEAR(c.center, mu + sigma / (2.0 * covariance_kappa(beta, 800, 200)), 1e-12 * mu);
    EXPECT_NEAR(c.scale, sigma, 1e-12 * sigma);
    EXPECT_EQ(covariance_edge_map(beta, 800, 200, 0.5).w, kInfinity);
    EXPECT_EQ(covariance_spike_for_w(beta, 800, 200, kInfinity), 1.0);
  }
}

TEST(FiniteNMap, BadInputThrows) {
  for (double beta : {0.0, -1.0, kNan, kInfinity}) {
    EXPECT_THROW(hermite_edge_map(beta, 100, 1.0), std::invalid_argument);
    EXPECT_THROW(covariance_edge_map(beta, 100, 20, 2.0), std::invalid_argument);
    EXPECT_THROW(hermite_spike_for_w(beta, 100, 0.0), std::invalid_argument);
    EXPECT_THROW(covariance_spike_for_w(beta, 100, 20, 0.0), std::invalid_argument);
  }
  EXPECT_THROW(hermite_edge_map(2.0, 1, 1.0), std::invalid_argument);
  EXPECT_THROW(hermite_edge_map(0.5, 2, 1.0), std::invalid_argument);  // n - 1/beta < 1
  EXPECT_THROW(hermite_edge_map(2.0, 100, kNan), std::invalid_argument);
  EXPECT_THROW(hermite_edge_map(2.0, 100, kInfinity), std::invalid_argument);
  EXPECT_THROW(covariance_edge_map(1.0, 1, 20, 2.0), std::invalid_argument);
  EXPECT_THROW(covariance_edge_map(1.0, 100, 0, 2.0), std::invalid_argument);
  for (double ell : {0.0, -1.0, kNan, kInfinity}) EXPECT_THROW(covariance_edge_map(1.0, 100, 20, ell), std::invalid_argument);
  for (double w : {kNan, -kInfinity}) {
    EXPECT_THROW(hermite_spike_for_w(2.0, 100, w), std::invalid_argument);
    EXPECT_THROW(covariance_spike_for_w(2.0, 100, 20, w), std::invalid_argument);
  }
  try {
    covariance_edge_map(1.0, 100, 20, -1.0);
    ADD_FAILURE() << "no exception for ell = -1";
  } catch (const std::invalid_argument& e) {
    EXPECT_NE(std::string(e.what()).find("ell"), std::string::npos) << e.what();
  }
}

}  // namespace
}  // namespace edgelaw
