// Tests of the simulate library: Sturm eigenvalues, the tridiagonal/bidiagonal models against dense
// matrices, truncation, outlier and edge locations, reproducibility, Kolmogorov tools, bad input.
#include <gtest/gtest.h>

#include <Eigen/Dense>
#include <algorithm>
#include <cmath>
#include <complex>
#include <functional>
#include <future>
#include <limits>
#include <numbers>
#include <random>
#include <vector>

#include "simulate/empirical.h"
#include "simulate/simulate.h"

namespace edgelaw {
namespace {

using LongMatrix = Eigen::Matrix<long double, Eigen::Dynamic, Eigen::Dynamic>;
using LongVector = Eigen::Matrix<long double, Eigen::Dynamic, 1>;

struct Moments {
  double mean, variance, se_mean, se_variance;
};

// Sample mean and variance with their standard errors; the variance's from the fourth central
// moment, se^2 = (m4 - s^4) / N (common practice, no source: delta method).
Moments moments(const std::vector<double>& v) {
  const double n = static_cast<double>(v.size());
  double mean = 0.0;
  for (double x : v) mean += x;
  mean /= n;
  double m2 = 0.0, m4 = 0.0;
  for (double x : v) {
    const double d2 = (x - mean) * (x - mean);
    m2 += d2;
    m4 += d2 * d2;
  }
  m2 /= n;
  m4 /= n;
  return {mean, m2 * n / (n - 1.0), std::sqrt(m2 / n), std::sqrt(std::max(m4 - m2 * m2, 0.0) / n)};
}

// Two independent samples from one law: means and variances agree within 5 combined standard
// errors (a false alarm has probability ~6e-7 per comparison under normality of the estimators),
// and the two-sample Kolmogorov-Smirnov distance is below its 0.1% point 1.95 sqrt((N+M)/(NM))
// (Smirnov 1948 asymptotic law).
void expect_same_law(const std::vector<double>& a, const std::vector<double>& b, const char* what) {
  const Moments ma = moments(a), mb = moments(b);
  EXPECT_LT(std::abs(ma.mean - mb.mean), 5.0 * std::hypot(ma.se_mean, mb.se_mean))
      << what << ": means " << ma.mean << " vs " << mb.mean;
  EXPECT_LT(std::abs(ma.variance - mb.variance), 5.0 * std::hypot(ma.se_variance, mb.se_variance))
      << what << ": variances " << ma.variance << " vs " << mb.variance;
  const KolmogorovResult ks = kolmogorov_distance(a, b);
  EXPECT_LT(ks.distance, 1.95 / std::sqrt(ks.effective_n)) << what << ": KS distance " << ks.distance;
}

// Dense reference samples are the slow part of this file: draw them as two independently seeded
// halves on two threads.
std::vector<double> two_halves(const std::function<std::vector<double>(long, std::uint64_t)>& draw, long count,
                               std::uint64_t seed) {
  auto first = std::async(std::launch::async, draw, count / 2, seed);
  std::vector<double> second = draw(count - count / 2, seed + 1000003);
  std::vector<double> out = first.get();
  out.insert(out.end(), second.begin(), second.end());
  return out;
}

// ---------------------------------------------------------------------------------------------
// Sturm bisection. Reference: Eigen's implicit-QR tridiagonal eigensolver run in long double
// (64-bit mantissa), so the reference error (~1e-19 ||T||) is far below the tolerance. Bisection
// with Sturm counts is backward stable (Kahan 1966; Demmel, Applied Numerical Linear Algebra,
// sec. 5.3.4): the error is a few ulps of ||T||, so 1e-13 ||T|| leaves a margin of ~100.

long double reference_largest(const std::vector<double>& d, const std::vector<double>& e, long double* norm) {
  LongVector dl(d.size()), el(e.size());
  for (std::size_t i = 0; i < d.size(); ++i) dl[i] = d[i];
  for (std::size_t i = 0; i < e.size(); ++i) el[i] = e[i];
  Eigen::SelfAdjointEigenSolver<LongMatrix> solver;
  solver.computeFromTridiagonal(dl, el, Eigen::EigenvaluesOnly);
  const LongVector& ev = solver.eigenvalues();
  *norm = std::max(std::abs(ev.minCoeff()), std::abs(ev.maxCoeff()));
  return ev.maxCoeff();
}

TEST(SturmBisection, MatchesLongDoubleEigenOnRandomTridiagonals) {
  std::mt19937_64 rng(20240601);
  std::normal_distribution<double> normal;
  double worst = 0.0;
  for (std::size_t n : {5u, 6u, 17u, 50u, 121u, 300u}) {
    for (int kind = 0; kind < 5; ++kind) {
      for (int rep = 0; rep < 4; ++rep) {
        std::vector<double> d(n), e(n - 1);
        for (std::size_t i = 0; i < n; ++i) {
          // kind 0: plain Gaussian; 1: large spike at (1,1); 2: graded, large at the top;
          // 3: graded, large at the bottom; 4: Hermite-like chi off-diagonals of size sqrt(n - i).
          const double grade = std::pow(10.0, -12.0 * static_cast<double>(i) / static_cast<double>(n));
          const double g = kind == 2 ? grade : kind == 3 ? 1e-12 / grade : 1.0;
          d[i] = g * normal(rng);
          if (i + 1 < n) {
            e[i] = kind == 4 ? std::sqrt(static_cast<double>(n - i)) + 0.5 * normal(rng) : g * normal(rng);
          }
        }
        if (kind == 1) d[0] += 10.0 * std::sqrt(static_cast<double>(n));
        long double norm = 0.0L;
        const long double ref = reference_largest(d, e, &norm);
        const double got = largest_eigenvalue_tridiagonal(d, e);
        const double err = static_cast<double>(std::abs(static_cast<long double>(got) - ref) / norm);
        worst = std::max(worst, err);
        EXPECT_LT(err, 1e-13) << "n = " << n << ", kind " << kind << ": " << got << " vs "
                              << static_cast<double>(ref);
      }
    }
  }
  std::printf("Sturm bisection: worst relative error %.3g\n", worst);
}

TEST(SturmBisection, ExactSmallCases) {
  // Closed forms (common practice, no source): a diagonal matrix's top eigenvalue is its largest
  // entry (zero couplings exercise the safe-pivot path); [[a, b], [b, c]] has
  // (a + c)/2 + sqrt(((a - c)/2)^2 + b^2) (to the 4-ulp stopping width); the m x m matrix with zero diagonal and unit
  // off-diagonals has 2 cos(pi / (m + 1)).
  EXPECT_EQ(largest_eigenvalue_tridiagonal(std::vector<double>{1.0, 5.0, 3.0}, std::vector<double>{0.0, 0.0}), 5.0);
  EXPECT_NEAR(largest_eigenvalue_tridiagonal(std::vector<double>{0.0, 0.0, 0.0}, std::vector<double>{0.0, 0.0}), 0.0, 1e-300);
  EXPECT_EQ(largest_eigenvalue_tridiagonal(std::vector<double>{-2.5}, std::vector<double>{}), -2.5);
  const double two = largest_eigenvalue_tridiagonal(std::vector<double>{1.0, 3.0}, std::vector<double>{2.0});
  EXPECT_NEAR(two, 2.0 + std::sqrt(5.0), 4.0 * std::numeric_limits<double>::epsilon() * two);  // the 4-ulp bracket
  for (std::size_t m : {3u, 40u, 1000u}) {
    const std::vector<double> d(m, 0.0), e(m - 1, 1.0);
    const double expected = 2.0 * std::cos(std::numbers::pi / static_cast<double>(m + 1));
    EXPECT_NEAR(largest_eigenvalue_tridiagonal(d, e), expected, 1e-15 * m) << "m = " << m;
  }
}

TEST(SturmBisection, BidiagonalGramMatchesDenseLongDouble) {
  // Reference: B^T B formed and diagonalized densely in long double (Eigen); same 1e-13 argument.
  std::mt19937_64 rng(77);
  std::normal_distribution<double> normal;
  for (std::size_t m : {1u, 4u, 33u, 150u}) {
    for (bool wide : {false, true}) {
      std::vector<double> a(m), b(wide ? m : m - 1);
      for (double& x : a) x = normal(rng);
      for (double& x : b) x = normal(rng);
      a[0] *= 5.0;  // a spike, as in the Laguerre model
      LongMatrix bm = LongMatrix::Zero(static_cast<long>(m), static_cast<long>(wide ? m + 1 : m));
      for (std::size_t k = 0; k < m; ++k) bm(k, k) = a[k];
      for (std::size_t k = 0; k < b.size(); ++k) bm(k, k + 1) = b[k];
      const LongMatrix gram = bm.transpose() * bm;
      Eigen::SelfAdjointEigenSolver<LongMatrix> solver(gram, Eigen::EigenvaluesOnly);
      const long double ref = solver.eigenvalues().maxCoeff();
      const double got = largest_eigenvalue_bidiagonal_gram(a, b);
      EXPECT_LT(std::abs(static_cast<long double>(got) - ref) / ref, 1e-13L) << "m = " << m << " wide " << wide;
    }
  }
}

// ---------------------------------------------------------------------------------------------
// Hermite model vs dense GOE / GUE. Dense model (common practice, no source; the scaling of
// Dumitriu-Edelman 2002 section 3 with E|H_ij|^2 = 1): GOE off-diagonals N(0,1), diagonal
// N(0,2); GUE off-diagonals (N(0,1/2) + i N(0,1/2)), diagonal N(0,1); so both bulks fill
// [-2 sqrt n, 2 sqrt n]. The spike theta sqrt(n) is added at (1,1); Householder
// tridiagonalization from the first column keeps e1 fixed, hence the same spike in the model.

std::vector<double> dense_hermite_top(double beta, long n, double theta, long count, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> normal;
  std::vector<double> out;
  out.reserve(static_cast<std::size_t>(count));
  for (long s = 0; s < count; ++s) {
    if (beta == 1.0) {
      Eigen::MatrixXd h(n, n);
      for (long i = 0; i < n; ++i) {
        h(i, i) = std::sqrt(2.0) * normal(rng);
        for (long j = i + 1; j < n; ++j) h(i, j) = h(j, i) = normal(rng);
      }
      h(0, 0) += theta * std::sqrt(static_cast<double>(n));
      out.push_back(Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd>(h, Eigen::EigenvaluesOnly).eigenvalues().maxCoeff());
    } else {
      Eigen::MatrixXcd h(n, n);
      for (long i = 0; i < n; ++i) {
        h(i, i) = normal(rng);
        for (long j = i + 1; j < n; ++j) {
          h(i, j) = std::complex<double>(normal(rng), normal(rng)) / std::sqrt(2.0);
          h(j, i) = std::conj(h(i, j));
        }
      }
      h(0, 0) += theta * std::sqrt(static_cast<double>(n));
      out.push_back(Eigen::SelfAdjointEigenSolver<Eigen::MatrixXcd>(h, Eigen::EigenvaluesOnly).eigenvalues().maxCoeff());
    }
  }
  return out;
}

TEST(HermiteModel, MatchesDenseGoeAndGue) {
  const long n = 50, count = 2000;
  for (double beta : {1.0, 2.0}) {
    for (double theta : {0.0, 0.9, 2.0}) {  // no spike, critical window, outlier
      const std::vector<double> model =
          sample_top_eigenvalue(HermiteSpikeModel{beta, n, theta}, SampleOptions{count, 101, 0});
      const std::vector<double> dense = two_halves(
          [&](long k, std::uint64_t seed) { return dense_hermite_top(beta, n, theta, k, seed); }, count,
          202 + static_cast<int>(10 * theta));
      const std::string what = "beta " + std::to_string(beta) + " theta " + std::to_string(theta);
      expect_same_law(model, dense, what.c_str());
    }
  }
}

// ---------------------------------------------------------------------------------------------
// Laguerre model vs dense X^* X, X n x p with independent rows N(0, diag(ell, 1, ..., 1)), real
// (beta = 1) or complex with E|X_ij|^2 = 1 (beta = 2): the definition of the model itself.

std::vector<double> dense_laguerre_top(double beta, long n, long p, double ell, long count, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> normal;
  std::vector<double> out;
  for (long s = 0; s < count; ++s) {
    if (beta == 1.0) {
      Eigen::MatrixXd x(n, p);
      for (long j = 0; j < p; ++j)
        for (long i = 0; i < n; ++i) x(i, j) = (j == 0 ? std::sqrt(ell) : 1.0) * normal(rng);
      const Eigen::MatrixXd gram = x.transpose() * x;
      out.push_back(Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd>(gram, Eigen::EigenvaluesOnly).eigenvalues().maxCoeff());
    } else {
      Eigen::MatrixXcd x(n, p);
      for (long j = 0; j < p; ++j)
        for (long i = 0; i < n; ++i)
          x(i, j) = (j == 0 ? std::sqrt(ell) : 1.0) * std::complex<double>(normal(rng), normal(rng)) / std::sqrt(2.0);
      const Eigen::MatrixXcd gram = x.adjoint() * x;
      out.push_back(Eigen::SelfAdjointEigenSolver<Eigen::MatrixXcd>(gram, Eigen::EigenvaluesOnly).eigenvalues().maxCoeff());
    }
  }
  return out;
}

TEST(LaguerreModel, MatchesDenseRealAndComplexWishart) {
  const long count = 2000;
  // (n, p) = (60, 20): critical ell = 1 + sqrt(1/3) = 1.58; 3 and 8 are supercritical.
  // (20, 30): more variables than samples, the bidiagonal is 20 x 21.
  struct Case {
    long n, p;
    double ell;
  };
  for (double beta : {1.0, 2.0}) {
    for (const Case c : {Case{60, 20, 1.0}, Case{60, 20, 1.5}, Case{60, 20, 3.0}, Case{60, 20, 8.0}, Case{20, 30, 1.0},
                         Case{20, 30, 4.0}}) {
      const std::vector<double> model =
          sample_top_eigenvalue(LaguerreSpikeModel{beta, c.n, c.p, c.ell}, SampleOptions{count, 303, 0});
      const std::vector<double> dense = two_halves(
          [&](long k, std::uint64_t seed) { return dense_laguerre_top(beta, c.n, c.p, c.ell, k, seed); }, count,
          404 + c.p + static_cast<int>(c.ell));
      const std::string what = "beta " + std::to_string(beta) + " n " + std::to_string(c.n) + " p " +
                               std::to_string(c.p) + " ell " + std::to_string(c.ell);
      expect_same_law(model, dense, what.c_str());
    }
  }
}

// ---------------------------------------------------------------------------------------------
// Truncation: a truncated sample draws the same leading rows as the untruncated one, so the two
// values must agree to the truncation error, required <= 1e-10 relative (the library aims at
// ~1e-15; common practice, no source).

TEST(Truncation, AgreesWithWholeMatrix) {
  double worst = 0.0;
  for (double beta : {0.5, 1.0, 2.0, 4.0}) {
    for (double theta : {0.0, 1.0, 1.3}) {
      const HermiteSpikeModel model{beta, 2000, theta};
      const auto cut = sample_top_eigenvalue(model, SampleOptions{150, 5, 0, true});
      const auto whole = sample_top_eigenvalue(model, SampleOptions{150, 5, 0, false});
      for (std::size_t i = 0; i < cut.size(); ++i) {
        const double rel = std::abs(cut[i] - whole[i]) / std::abs(whole[i]);
        worst = std::max(worst, rel);
        ASSERT_LE(rel, 1e-10) << "Hermite beta " << beta << " theta " << theta << " sample " << i;
      }
    }
  }
  struct Case {
    long n, p;
    double ell;
  };
  for (double beta : {0.5, 1.0, 2.0}) {
    for (const Case c : {Case{3000, 750, 1.0}, Case{3000, 750, 1.5}, Case{1000, 1000, 1.0}, Case{500, 2000, 1.0},
                         Case{500, 2000, 4.0}}) {
      const LaguerreSpikeModel model{beta, c.n, c.p, c.ell};
      const auto cut = sample_top_eigenvalue(model, SampleOptions{60, 6, 0, true});
      const auto whole = sample_top_eigenvalue(model, SampleOptions{60, 6, 0, false});
      for (std::size_t i = 0; i < cut.size(); ++i) {
        const double rel = std::abs(cut[i] - whole[i]) / std::abs(whole[i]);
        worst = std::max(worst, rel);
        ASSERT_LE(rel, 1e-10) << "Laguerre beta " << beta << " n " << c.n << " p " << c.p << " ell " << c.ell;
      }
    }
  }
  std::printf("Truncation: worst relative difference %.3g\n", worst);
}

// ---------------------------------------------------------------------------------------------
// Locations.

TEST(Locations, HermiteOutlier) {
  // lambda_max / sqrt(n) -> theta + 1/theta for theta > 1 (Baik, Ben Arous, Peche 2005; Peche
  // 2006). Finite-n allowance 2/n: the Schur-complement equation lambda - theta sqrt(n) =
  // e_1^2 G(lambda) with E e_1^2 = n - 1 gives theta + (1 - 1/n)/theta, a shift of -1/(theta n);
  // fluctuations add a term of the same order (measured: -0.84/n with 1e5 samples).
  const long n = 4000;
  for (double beta : {1.0, 2.0}) {
    auto v = sample_top_eigenvalue(HermiteSpikeModel{beta, n, 2.0}, SampleOptions{4000, 17, 0});
    for (double& x : v) x /= std::sqrt(static_cast<double>(n));
    const Moments m = moments(v);
    EXPECT_NEAR(m.mean, 2.5, 5.0 * m.se_mean + 2.0 / n) << "beta " << beta;
  }
}

TEST(Locations, LaguerreOutlier) {
  // lambda_1 / n -> ell (1 + c/(ell - 1)), c = p/n, for ell > 1 + sqrt(c) (Baik, Silverstein
  // 2006; Paul 2007). Finite-n allowance 2 rho / n, rho the limit: the bias of the outlier is
  // O(1/n) relative while its fluctuations are O(n^{-1/2}) (Paul 2007); measured -0.0009 at
  // n = 2000 (2 standard errors of a 5e4-sample run).
  const long n = 2000, p = 500;
  const double ell = 4.0, c = static_cast<double>(p) / n, rho = ell * (1.0 + c / (ell - 1.0));
  for (double beta : {1.0, 2.0}) {
    auto v = sample_top_eigenvalue(LaguerreSpikeModel{beta, n, p, ell}, SampleOptions{4000, 18, 0});
    for (double& x : v) x /= static_cast<double>(n);
    const Moments m = moments(v);
    EXPECT_NEAR(m.mean, rho, 5.0 * m.se_mean + 2.0 * rho / n) << "beta " << beta;
  }
}

TEST(Locations, UnspikedEdgeMatchesTracyWidomTwoMean) {
  // TW_2 mean -1.7710868074116 (Bornemann 2010, table). Allowance: 5 standard errors plus the
  // finite-n correction, O(n^{-2/3}) for the unspiked edge with this centering; we allow
  // n^{-2/3} = 0.01 at n = 1000 (measured offset -0.002 +- 0.002 with 2e5 samples).
  const long n = 1000;
  const HermiteSpikeModel model{2.0, n, 0.0};
  auto v = sample_top_eigenvalue(model, SampleOptions{40000, 19, 0});
  for (double& x : v) x = hermite_edge_statistic(model, x);
  const Moments m = moments(v);
  EXPECT_NEAR(m.mean, -1.7710868074116, 5.0 * m.se_mean + std::pow(static_cast<double>(n), -2.0 / 3.0));
  // TW_2 variance 0.8131947928329 (Bornemann 2010), same kind of allowance.
  EXPECT_NEAR(m.variance, 0.8131947928329, 5.0 * m.se_variance + std::pow(static_cast<double>(n), -2.0 / 3.0));
}

// ---------------------------------------------------------------------------------------------
// Reproducibility (common practice, no source).

TEST(Reproducibility, SameSeedSameSamplesForAnyThreadCount) {
  const HermiteSpikeModel h{1.0, 500, 1.2};
  const auto one = sample_top_eigenvalue(h, SampleOptions{301, 42, 1});
  const auto two = sample_top_eigenvalue(h, SampleOptions{301, 42, 2});
  const auto three = sample_top_eigenvalue(h, SampleOptions{301, 42, 3});
  EXPECT_EQ(one, two);
  EXPECT_EQ(one, three);
  // Sample i depends on (seed, i) only: a shorter run is a prefix of a longer one.
  const auto prefix = sample_top_eigenvalue(h, SampleOptions{50, 42, 2});
  EXPECT_TRUE(std::equal(prefix.begin(), prefix.end(), one.begin()));
  const auto other = sample_top_eigenvalue(h, SampleOptions{301, 43, 2});
  EXPECT_NE(one, other);
  const LaguerreSpikeModel l{2.0, 300, 100, 2.0};
  EXPECT_EQ(sample_top_eigenvalue(l, SampleOptions{200, 9, 1}), sample_top_eigenvalue(l, SampleOptions{200, 9, 2}));
  EXPECT_TRUE(sample_top_eigenvalue(h, SampleOptions{0, 1, 2}).empty());
}

// ---------------------------------------------------------------------------------------------
// Kolmogorov tools.

TEST(Kolmogorov, SurvivalMatchesKnownPoints) {
  // Kolmogorov's limiting law: P(K > 1.3581) = 0.05 and P(K > 1.6276) = 0.01 (standard tables,
  // e.g. Smirnov 1948; values from memory, confirmed by the two series agreeing at t = 1).
  EXPECT_NEAR(kolmogorov_survival(1.3581), 0.05, 2e-4);
  EXPECT_NEAR(kolmogorov_survival(1.6276), 0.01, 5e-5);
  EXPECT_NEAR(kolmogorov_survival(1.0 - 1e-12), kolmogorov_survival(1.0), 1e-11);
  EXPECT_NEAR(kolmogorov_survival(0.2), 1.0, 1e-12);
}

TEST(Kolmogorov, DistancesByHand) {
  // Hand computations (common practice, no source): {0.1, 0.5, 0.9} against U(0,1) has
  // D = max(0.1 - 0, 1/3 - 0.1, ..., 0.9 - 2/3) = 1/3 - 0.1; samples {1,2,3} and {2.5, 3.5} have
  // empirical cdfs differing most at x = 2 (2/3 vs 0).
  const std::vector<double> s{0.9, 0.1, 0.5};
  const auto one = kolmogorov_distance(s, [](double x) { return std::clamp(x, 0.0, 1.0); });
  EXPECT_NEAR(one.distance, 1.0 / 3.0 - 0.1, 1e-15);
  EXPECT_NEAR(one.critical_95, 1.36 / std::sqrt(3.0), 1e-15);
  const auto two = kolmogorov_distance(std::vector<double>{1, 2, 3}, std::vector<double>{2.5, 3.5});
  EXPECT_NEAR(two.distance, 2.0 / 3.0, 1e-15);
  EXPECT_EQ(two.location, 2.0);
  EXPECT_NEAR(two.effective_n, 1.2, 1e-15);
  const EmpiricalCdf ecdf(std::vector<double>{3, 1, 2, 2});
  EXPECT_EQ(ecdf(0.5), 0.0);
  EXPECT_EQ(ecdf(2.0), 0.75);
  EXPECT_EQ(ecdf(3.0), 1.0);
  EXPECT_EQ(ecdf.quantile(0.5), 2.0);
}

TEST(Kolmogorov, UniformSampleIsWithinSamplingScale) {
  // Uniform draws against their own cdf: sqrt(N) D follows Kolmogorov's law, so D < 1.95/sqrt(N)
  // except with probability 0.001 (Kolmogorov 1933).
  std::mt19937_64 rng(5);
  std::uniform_real_distribution<double> u;
  std::vector<double> v(20000);
  for (double& x : v) x = u(rng);
  const auto r = kolmogorov_distance(v, [](double x) { return x; });
  EXPECT_LT(r.distance, 1.95 / std::sqrt(20000.0));
  EXPECT_GT(r.p_value, 0.001);
  // And a shifted cdf must be detected: D close to the shift 0.05 (common practice, no source).
  const auto shifted = kolmogorov_distance(v, [](double x) { return std::clamp(x - 0.05, 0.0, 1.0); });
  EXPECT_NEAR(shifted.distance, 0.05, 0.02);
  EXPECT_LT(shifted.p_value, 1e-10);
}

// ---------------------------------------------------------------------------------------------
// Bad input throws std::invalid_argument with a message (common practice, no source).

TEST(BadInput, Throws) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const double inf = std::numeric_limits<double>::infinity();
  const SampleOptions ok{10, 1, 1};
  for (double beta : {0.0, -1.0, nan, inf}) {
    EXPECT_THROW(sample_top_eigenvalue(HermiteSpikeModel{beta, 10, 0.0}, ok), std::invalid_argument);
    EXPECT_THROW(sample_top_eigenvalue(LaguerreSpikeModel{beta, 10, 5, 1.0}, ok), std::invalid_argument);
  }
  EXPECT_THROW(sample_top_eigenvalue(HermiteSpikeModel{2.0, 1, 0.0}, ok), std::invalid_argument);
  EXPECT_THROW(sample_top_eigenvalue(HermiteSpikeModel{2.0, -5, 0.0}, ok), std::invalid_argument);
  EXPECT_THROW(sample_top_eigenvalue(HermiteSpikeModel{2.0, 10, nan}, ok), std::invalid_argument);
  EXPECT_THROW(sample_top_eigenvalue(LaguerreSpikeModel{2.0, 0, 5, 1.0}, ok), std::invalid_argument);
  EXPECT_THROW(sample_top_eigenvalue(LaguerreSpikeModel{2.0, 10, 0, 1.0}, ok), std::invalid_argument);
  for (double ell : {0.0, -2.0, nan, inf})
    EXPECT_THROW(sample_top_eigenvalue(LaguerreSpikeModel{2.0, 10, 5, ell}, ok), std::invalid_argument);
  EXPECT_THROW(sample_top_eigenvalue(HermiteSpikeModel{2.0, 10, 0.0}, SampleOptions{-1, 1, 1}), std::invalid_argument);
  EXPECT_THROW(sample_top_eigenvalue(HermiteSpikeModel{2.0, 10, 0.0}, SampleOptions{5, 1, -2}), std::invalid_argument);
  EXPECT_THROW(largest_eigenvalue_tridiagonal(std::vector<double>{}, std::vector<double>{}), std::invalid_argument);
  EXPECT_THROW(largest_eigenvalue_tridiagonal(std::vector<double>{1, 2}, std::vector<double>{}), std::invalid_argument);
  EXPECT_THROW(largest_eigenvalue_tridiagonal(std::vector<double>{1, nan}, std::vector<double>{1}), std::invalid_argument);
  EXPECT_THROW(largest_eigenvalue_bidiagonal_gram(std::vector<double>{1, 2}, std::vector<double>{1, 2, 3}),
               std::invalid_argument);
  EXPECT_THROW(EmpiricalCdf(std::vector<double>{}), std::invalid_argument);
  EXPECT_THROW(kolmogorov_distance(std::vector<double>{1.0, nan}, [](double) { return 0.5; }), std::invalid_argument);
  EXPECT_THROW(kolmogorov_distance(std::vector<double>{1.0}, [nan](double) { return nan; }), std::invalid_argument);
  // Messages are one line.
  try {
    sample_top_eigenvalue(HermiteSpikeModel{-1.0, 10, 0.0}, ok);
  } catch (const std::invalid_argument& e) {
    EXPECT_EQ(std::string(e.what()).find('\n'), std::string::npos);
    EXPECT_NE(std::string(e.what()).find("beta"), std::string::npos);
  }
}

}  // namespace
}  // namespace edgelaw
