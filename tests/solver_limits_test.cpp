// Limits of the law (slow): beta -> inf, w -> -inf, tail exponents, and general beta (refinement
// order, Monte Carlo of the tridiagonal model). Every check names its source next to it.
//
// Cost: each solve here is cheap on purpose (few x points, few w rows, loose targets, no moments
// unless needed); the timings printed with EDGELAW_VERBOSE=1 are what the comments refer to.
#include <gtest/gtest.h>

#include <algorithm>
#include <boost/math/special_functions/airy.hpp>
#include <boost/math/tools/roots.hpp>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <numbers>
#include <string>
#include <vector>

#include "simulate/simulate.h"
#include "solver/solver.h"

namespace edgelaw {
namespace {

bool verbose() { return std::getenv("EDGELAW_VERBOSE") != nullptr; }

std::string name_of(double beta) {
  std::string s = std::to_string(beta);
  s.erase(s.find_last_not_of('0') + 1);
  if (s.back() == '.') s.pop_back();
  std::replace(s.begin(), s.end(), '.', 'p');
  return "Beta" + s;
}

std::vector<double> linspace(double a, double b, int n) {
  std::vector<double> v(n);
  for (int i = 0; i < n; ++i) v[i] = a + (b - a) * i / (n - 1);
  return v;
}

LawTable solve_logged(const LawRequest& r, const SolverOptions& o, const char* what) {
  LawTable t = solve_law(r, o);
  if (verbose()) std::printf("[%s] beta=%g: %s\n", what, r.beta, t.summary.brief().c_str());
  return t;
}

// x*(w): the largest root of Ai'(x) = w Ai(x) (DLMF 9.9 for w = +inf, 0: the zeros a_1, a'_1).
// On (a_1, inf) Ai > 0 and p = Ai'/Ai solves p' = x - p^2, decreasing from +inf to -inf, so
// h = Ai' - w Ai has exactly one root there, bracketed by a_1 (h = Ai'(a_1) > 0) and a point
// where p < w (p ~ -sqrt(x) for large x, so x = w^2 + 10 suffices for the w used here).
double airy_root(double w) {
  const double a1 = boost::math::airy_ai_zero<double>(1);
  if (std::isinf(w)) return a1;
  auto h = [w](double x) { return boost::math::airy_ai_prime(x) - w * boost::math::airy_ai(x); };
  boost::math::tools::eps_tolerance<double> tol(50);
  std::uintmax_t iters = 200;
  const auto [lo, hi] = boost::math::tools::toms748_solve(h, a1, w * w + 10.0, tol, iters);
  return 0.5 * (lo + hi);
}

// Inverse of a monotone tabulated cdf at level q: cubic Lagrange interpolation through the four
// nodes around the crossing, solved by bisection. The interpolation error is O(h^4 F'''') and far
// below the medians' distances to x* asserted below for the grids used (h = 0.01).
double invert_cdf(const std::vector<double>& x, const std::vector<double>& F, double q) {
  std::size_t k = 1;
  while (k < x.size() && F[k] < q) ++k;
  if (k == x.size() || F[0] >= q) return std::nan("");  // no crossing inside the grid
  const std::size_t i0 = std::clamp<std::size_t>(k, 2, x.size() - 2) - 2;
  auto cubic = [&](double s) {
    double sum = 0;
    for (std::size_t a = i0; a < i0 + 4; ++a) {
      double l = F[a];
      for (std::size_t b = i0; b < i0 + 4; ++b)
        if (b != a) l *= (s - x[b]) / (x[a] - x[b]);
      sum += l;
    }
    return sum - q;
  };
  double lo = x[k - 1], hi = x[k];
  for (int it = 0; it < 100; ++it) {
    const double mid = 0.5 * (lo + hi);
    (cubic(mid) < 0 ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}

double normal_cdf(double z) { return 0.5 * std::erfc(-z / std::numbers::sqrt2); }

// ---------------------------------------------------------------------------------------------
// 1. beta -> inf: the law concentrates at x*(w) (Bloemendal-Virag 2013: as beta -> inf the
// stochastic Airy operator becomes the deterministic -d^2/dt^2 + t with f'(0) = w f(0), whose top
// "eigenvalue" -Lambda_0 is x*(w); Airy zeros a_1, a'_1 from DLMF 9.9 / A&S Table 10.13).
// Perturbation theory in the noise (2/sqrt(beta)) B': the first-order shift is a centred Gaussian
// of size beta^{-1/2}, so the median moves from x* only at second order, O(1/beta). The issue asks
// for at least the beta^{-1/2} rate: between beta = 100 and 400 the deviation must shrink by at
// least 2 / 1.25 = 1.6 (the 25% margin absorbs the O(beta^{-3/2}) terms; the expected ratio is 4).
TEST(BetaToInfinity, MedianApproachesAiryRoot) {
  // Airy zeros as published (DLMF 9.9, Table 9.9.1; A&S Table 10.13): Boost must reproduce them,
  // which also checks the root finder used for w = +-1.
  EXPECT_NEAR(airy_root(kInf), -2.338107410459767, 1e-13);
  EXPECT_NEAR(airy_root(0.0), -1.018792971647471, 1e-13);

  const std::vector<double> ws = {-1.0, 0.0, 1.0, kInf};
  std::vector<double> xstar;
  for (double w : ws) xstar.push_back(airy_root(w));
  // One solve per beta serves all four rows: x spans every x* +- 0.5 (>= 4 standard deviations of
  // the beta = 100 law, whose standard deviation is about 0.1) with h = 0.01.
  const double x_lo = *std::min_element(xstar.begin(), xstar.end()) - 0.5;
  const double x_hi = *std::max_element(xstar.begin(), xstar.end()) + 0.5;
  const int nx = static_cast<int>(std::round((x_hi - x_lo) / 0.01)) + 1;

  // The betas, 100 and 400, on the solver's default grids (about 15 s and 100 s here).
  // Measured deviation ratios 100 -> 400: 4.00 at every w, the O(1/beta) rate. Before the plan
  // carried x_high far enough for the deterministic contraction (solver/plan.cpp) the w = -1 ratio
  // was 1.6: the median depended on the requested x range by 5e-3, far beyond its estimate.
  std::vector<double> betas = {100.0, 400.0};
  std::vector<std::vector<double>> deviation(betas.size());
  for (std::size_t b = 0; b < betas.size(); ++b) {
    LawRequest r;
    r.beta = betas[b];
    r.x = linspace(x_lo, x_hi, nx);
    r.w = ws;
    SolverOptions o;
    // A cdf error of 1e-6 moves the median by 1e-6 / density (density >= 3 here): negligible
    // against deviations of order 1/beta >= 2.5e-3.
    o.target_error = 1e-6;
    o.moments = false;
    const LawTable t = solve_logged(r, o, "beta->inf");
    ASSERT_TRUE(t.summary.converged) << t.summary.full();
    for (std::size_t i = 0; i < ws.size(); ++i) {
      std::vector<double> F(t.cdf.cols());
      for (int c = 0; c < t.cdf.cols(); ++c) F[c] = t.cdf(i, c);
      const double median = invert_cdf(r.x, F, 0.5);
      ASSERT_FALSE(std::isnan(median)) << "beta=" << r.beta << " w=" << ws[i];
      deviation[b].push_back(std::abs(median - xstar[i]));
      if (verbose())
        std::printf("  beta=%g w=%g x*=%.9f median=%.9f deviation=%.3e\n", r.beta, ws[i], xstar[i], median,
                    deviation[b].back());
      // Concentration itself: the median sits within a few 1/beta of x* (deviation ~ C/beta with C
      // of order one; 5/beta is a generous bound that beta = 2-like spreads would break).
      EXPECT_LT(deviation[b].back(), 5.0 / r.beta) << "beta=" << r.beta << " w=" << ws[i];
    }
  }
  for (std::size_t i = 0; i < ws.size(); ++i) {
    const double ratio = deviation[0][i] / deviation[1][i];
    if (verbose()) std::printf("  w=%g deviation ratio beta 100/400 = %.3f\n", ws[i], ratio);
    EXPECT_GE(ratio, 1.6) << "w=" << ws[i];
  }
}

// ---------------------------------------------------------------------------------------------
// 2. w -> -inf: the supercritical spike is Gaussian, F ~ Phi((x - w^2) / (2 sqrt(|w|/beta)))
// (design.md section 1; Baik-Ben Arous-Peche 2005 for beta = 2, Bloemendal-Virag 2013 in general).
// Linearising the Riccati diffusion dp = (t - p^2) dt + (2/sqrt(beta)) dB around its unstable
// branch p = -sqrt(t) (where the start p(x) = w sits when x ~ w^2), the law is centred at w^2 with
// variance 4|w|/beta. The corrections are of
// relative order |w|^{-3/2}: the deterministic root of Ai'(x) = w Ai(x) sits at
// w^2 - 1/(2|w|) + ... (from Ai'/Ai ~ -sqrt(x) - 1/(4x), the large-x expansions of DLMF 9.7(ii)), a shift of
// sqrt(beta)/(4|w|^{3/2}) standard deviations, and the skewness of the law is of the same order.
// Checks: the distance max |F - Phi| over x in w^2 +- 3 sd decreases strictly along the sequence,
// and its local decay exponent between the last two w lies in [1.25, 1.75] (predicted 3/2;
// measured 1.54, 1.50, 1.50 for beta = 1, 2, 4, distances 1.5e-3 .. 3.2e-3 at w = -12).
// These rows need x up to ~170, where the front is ~1e-3 wide in theta: the plan puts four
// nodes across it on the coarsest level (solver/plan.cpp), so each solve takes 2-35 s.
constexpr double kSupercriticalW[] = {-4.0, -8.0, -12.0};
class SupercriticalLimit : public ::testing::TestWithParam<double> {};

TEST_P(SupercriticalLimit, ApproachesGaussian) {
  const double beta = GetParam();
  std::vector<double> distance;
  for (double w : kSupercriticalW) {
    const double mean = w * w, sd = 2.0 * std::sqrt(std::abs(w) / beta);
    LawRequest r;
    r.beta = beta;
    r.x = linspace(mean - 3 * sd, mean + 3 * sd, 25);
    r.w = {w};
    SolverOptions o;
    o.target_error = 1e-6;  // distances below are >= 1e-3: the solver error is irrelevant
    o.moments = false;
    const LawTable t = solve_logged(r, o, "w->-inf");
    ASSERT_TRUE(t.summary.converged) << t.summary.full();
    double d = 0;
    for (int c = 0; c < t.cdf.cols(); ++c) d = std::max(d, std::abs(t.cdf(0, c) - normal_cdf((r.x[c] - mean) / sd)));
    distance.push_back(d);
    if (verbose()) std::printf("  beta=%g w=%g max|F - Phi| = %.4e\n", beta, w, d);
  }
  // Strict decrease, with a 10% margin so a flat sequence (no approach) fails.
  for (std::size_t k = 1; k < distance.size(); ++k)
    EXPECT_LT(distance[k], 0.9 * distance[k - 1]) << "w = " << kSupercriticalW[k - 1] << " -> " << kSupercriticalW[k];
  const double exponent = std::log(distance[1] / distance[2]) / std::log(kSupercriticalW[2] / kSupercriticalW[1]);
  if (verbose()) std::printf("  beta=%g decay exponent of the distance in |w|: %.3f\n", beta, exponent);
  EXPECT_GT(exponent, 1.25);
  EXPECT_LT(exponent, 1.75);
}

INSTANTIATE_TEST_SUITE_P(Betas, SupercriticalLimit, ::testing::Values(1.0, 2.0, 4.0),
                         [](const auto& info) { return name_of(info.param); });

// ---------------------------------------------------------------------------------------------
// 3. Tail exponents (Ramirez-Rider-Virag 2011): log F(x) ~ -(beta/24)|x|^3 as x -> -inf, and
// log(1 - F(x)) ~ -(2 beta/3) x^{3/2} as x -> +inf for w = +inf; for finite w (here w = 0) the
// upper tail is ~ -(beta/3) x^{3/2} (design.md section 1, measured in a prototype, no published
// source). The sub-leading terms decay slowly: from memory (Borot-Eynard-Majumdar-Nadal 2011;
// Dumaz-Virag 2013) log F(-a) = -(beta/24) a^3 + (sqrt(2)/3)(beta/2 - 1) a^{3/2} + O(log a), and
// log(1 - F(a)) = -(2 beta/3) a^{3/2} - (3 beta/4) log a + O(1). So the ratio r = log / leading
// tends to 1 only like |x|^{-3/2} (log x / x^{3/2} on the right): at reachable |x| it is still
// 10-40% off. Two checks per tail:
//  (a) the ratio: |r - 1| decreases monotonically over four |x| values (as the issue asks);
//  (b) the local exponent: the secant slope of -log F against u = |x|^3 (-log S against
//      u = x^{3/2}) between the two largest |x|, divided by the leading rate. The slope removes the
//      O(1) constant. For w = +inf the sub-leading terms above predict it: left,
//      1 - (24/beta)(sqrt(2)/3)(beta/2 - 1)(sqrt(u2) - sqrt(u1))/(u2 - u1) (an offset of ~0.11 at
//      beta = 1 and 4, none at beta = 2); right, 1 + (9/8) log(x2/x1)/(u2 - u1) (0.02 to 0.08).
//      Tolerance 0.02: the log a term on the left moves the slope by < 0.002 here and the O(x^{-3/2})
//      term of log S on the right by about 0.01 at beta = 4. For w = 0 no sub-leading terms are
//      published; the slope must be within 0.1 (right) or 0.3 (left, where the spiked start adds a
//      visibly larger |x|^{3/2} term) of 1. Any wrong rate by a factor 2 (beta/12, or 2 beta/3 for
//      the spiked row) fails all of these.
class TailExponents : public ::testing::TestWithParam<double> {};

TEST_P(TailExponents, RatiosApproachOne) {
  const double beta = GetParam();
  // Points in the natural scales, so every beta probes the same depths: left a = beta^{-1/3}
  // (6..9) puts the leading log F at -(1/24)(216..729) = -9 .. -30; right x = beta^{-2/3} (6..12)
  // puts the Dirichlet leading log S at -(2/3)(14.7..41.6) = -10 .. -28 (the w = 0 row at half).
  const double ls = std::cbrt(1.0 / beta), rs = std::pow(beta, -2.0 / 3.0);
  std::vector<double> left = {-9 * ls, -8 * ls, -7 * ls, -6 * ls};
  std::vector<double> right = {6 * rs, 8 * rs, 10 * rs, 12 * rs};
  LawRequest r;
  r.beta = beta;
  r.x = left;
  r.x.insert(r.x.end(), right.begin(), right.end());
  r.w = {0.0, kInf};
  SolverOptions o;
  // The tails are carried with relative accuracy (tail_relative_error, default 1e-6) whatever the
  // absolute target; 1e-8 only governs the bulk, which this test does not use.
  o.target_error = 1e-8;
  o.moments = false;
  const LawTable t = solve_logged(r, o, "tails");
  ASSERT_TRUE(t.summary.converged) << t.summary.full();

  auto check = [&](const char* what, int row, std::vector<int> cols, bool lower, double c_rate, bool dirichlet,
                   double tol) {
    if (lower) std::reverse(cols.begin(), cols.end());  // from the smallest |x| to the largest
    std::vector<double> dev, u, logv;
    for (int c : cols) {
      const double x = t.x[c];
      const double value = lower ? t.cdf(row, c) : t.survival(row, c);
      const double err = lower ? t.cdf_error(row, c) : t.survival_error(row, c);
      // The log is only meaningful if the entry is resolved to 1% relative accuracy (a log error
      // of 0.01 against logs of 10 to 60).
      ASSERT_GT(value, 0) << what << " x=" << x;
      ASSERT_LT(err, 0.01 * value) << what << " x=" << x;
      u.push_back(lower ? std::pow(std::abs(x), 3) : std::pow(x, 1.5));
      const double leading = lower ? -(beta / 24) * u.back() : -c_rate * beta * u.back();
      logv.push_back(std::log(value));
      const double ratio = logv.back() / leading;
      dev.push_back(std::abs(ratio - 1));
      if (verbose()) std::printf("  beta=%g %s x=%.4f value=%.4e ratio=%.4f\n", beta, what, x, value, ratio);
    }
    for (std::size_t k = 1; k < dev.size(); ++k) EXPECT_LT(dev[k], dev[k - 1]) << what << " step " << k;
    const std::size_t n = u.size();
    const double rate = lower ? beta / 24 : c_rate * beta;
    const double u1 = u[n - 2], u2 = u[n - 1];
    const double slope_ratio = -(logv[n - 1] - logv[n - 2]) / (u2 - u1) / rate;
    double expected = 1.0;
    if (dirichlet && lower)
      expected = 1 - (24 / beta) * (std::numbers::sqrt2 / 3) * (beta / 2 - 1) * (std::sqrt(u2) - std::sqrt(u1)) / (u2 - u1);
    if (dirichlet && !lower) expected = 1 + (9.0 / 8.0) * (2.0 / 3.0) * std::log(u2 / u1) / (u2 - u1);
    if (verbose())
      std::printf("  beta=%g %s local exponent / leading rate = %.4f (sub-leading prediction %.4f)\n", beta, what,
                  slope_ratio, expected);
    EXPECT_NEAR(slope_ratio, expected, tol) << what;
  };
  const std::vector<int> lcols = {0, 1, 2, 3}, rcols = {4, 5, 6, 7};
  check("left w=+inf", 1, lcols, true, 0, true, 0.02);
  check("left w=0", 0, lcols, true, 0, false, 0.3);
  check("right w=+inf", 1, rcols, false, 2.0 / 3.0, true, 0.02);
  check("right w=0", 0, rcols, false, 1.0 / 3.0, false, 0.1);
}

INSTANTIATE_TEST_SUITE_P(Betas, TailExponents, ::testing::Values(1.0, 2.0, 4.0),
                         [](const auto& info) { return name_of(info.param); });

// ---------------------------------------------------------------------------------------------
// 4. General beta: the method's sixth order (tests/grids_test.cpp) holds away from beta = 1, 2, 4,
// and the w = +inf moments agree with a Monte Carlo of the Dumitriu-Edelman (2002) tridiagonal
// model at n = 1000, with x = n^{1/6} (lambda_max - 2 sqrt n) (design.md section 3).
class GeneralBeta : public ::testing::TestWithParam<double> {};

TEST_P(GeneralBeta, ConvergesAtSixthOrder) {
  const double beta = GetParam();
  LawRequest r;
  r.beta = beta;
  // A few points across the bulk and both tails in the beta scales (left beta^{-1/3}, right
  // beta^{-2/3}) and the two rows that need no spike handling plus one critical one.
  const double ls = std::cbrt(2.0 / beta), rs = std::pow(2.0 / beta, 2.0 / 3.0);
  r.x = {-4 * ls, -2.5 * ls, -1.5 * ls, -0.5 * rs, 0.5 * rs, 2 * rs};
  r.w = {0.0, kInf};
  SolverOptions base;
  base.target_error = 1e-6;
  base.moments = false;
  base.min_levels = base.max_levels = 3;  // fixed levels so the two runs are comparable
  // Run A: base grid N (levels N, 2N, 4N). Run B: base 2N (levels 2N, 4N, 8N). N = 16 sqrt(beta/2)
  // for beta >= 2, so that the sixth-order spatial errors stay well above the integrator's part
  // of the estimate (~4e-10 here), where the order is visible. (With N = 100 sqrt(beta/2), which
  // suited the former fourth-order scheme, every estimate sat on that floor: observed orders
  // -0.5 to 4.6 and A/B ratios ~1, while all estimates still bounded |A - B|.)
  base.base_intervals = static_cast<int>(std::ceil(16.0 * std::max(1.0, std::sqrt(beta / 2.0)) / 8.0) * 8);
  const LawTable a = solve_logged(r, base, "order A");
  SolverOptions ob = base;
  ob.base_intervals = 2 * base.base_intervals;
  const LawTable b = solve_logged(r, ob, "order B");
  // The solver's observed order (last three levels, max norm): sixth-order stencils
  // (tests/grids_test.cpp; 5.8 on the beta = 2 grids, solver_test). On these coarse grids it is
  // pre-asymptotic: measured 5.7 to 6.5 for beta = 0.5, 3, 10 and 3.7 (A) to 7.4 (B) at
  // beta = 6, 10; so the window is [3.5, 8].
  for (const LawTable* t : {&a, &b}) {
    EXPECT_GT(t->summary.observed_order, 3.5) << t->summary.full();
    EXPECT_LT(t->summary.observed_order, 8.0) << t->summary.full();
  }
  // Halving h once more (A -> B) divides a sixth-order error estimate by 2^6 = 64; accept 2^3.5
  // to 2^8 (the same order window), i.e. [11, 256] (measured 40 to 191).
  const double ea = std::max(a.summary.max_cdf_error, a.summary.max_survival_error);
  const double eb = std::max(b.summary.max_cdf_error, b.summary.max_survival_error);
  if (verbose()) std::printf("  beta=%g error estimate A %.3e B %.3e ratio %.2f\n", beta, ea, eb, ea / eb);
  EXPECT_GT(ea / eb, 11.0);
  EXPECT_LT(ea / eb, 256.0);
  // The estimate of A must be honest: B is ~64x more accurate, so |A - B| is A's actual error
  // (within 1/64); allow a factor 2 for the estimate's own uncertainty.
  const double actual = std::max((a.cdf - b.cdf).cwiseAbs().maxCoeff(), (a.survival - b.survival).cwiseAbs().maxCoeff());
  if (verbose()) std::printf("  beta=%g |A - B| = %.3e\n", beta, actual);
  EXPECT_LE(actual, 2.0 * ea + 1e-12);
  // ... and useful: the estimate is the larger of the last two Richardson differences plus the
  // integrator floor (solver.cpp, Plan::time_error_factor); measured 0.6x to 1.8x |A - B| on
  // these coarse sixth-order grids (the factor 2 above covers the 0.6x of beta = 3); more than
  // 100x would make it worthless as an error bar.
  EXPECT_GE(actual, 0.01 * ea);
}

TEST_P(GeneralBeta, MomentsMatchTridiagonalMonteCarlo) {
  const double beta = GetParam();
  LawRequest r;
  r.beta = beta;
  r.x = {0.0};
  r.w = {kInf};
  SolverOptions o;
  o.target_error = 1e-6;  // moment errors ~1e-6 are far below the Monte Carlo's >= 4e-3
  const LawTable t = solve_logged(r, o, "moments");
  ASSERT_TRUE(t.summary.converged) << t.summary.full();
  ASSERT_EQ(t.moments.size(), 1u);
  const double mean = t.moments[0].mean, var = t.moments[0].variance;

  // Sample mean and variance of x = n^{1/6} (lambda_max - 2 sqrt n) with their standard errors:
  // sd/sqrt(N) for the mean, sqrt((m4 - var^2)/N) for the sample variance (common practice, no
  // source).
  struct Stats {
    double mean, var, se_mean, se_var;
  };
  auto simulate = [beta](long n, long count, std::uint64_t seed) {
    const HermiteSpikeModel model{beta, n, 0.0};
    SampleOptions so;
    so.count = count;
    so.seed = seed;
    so.threads = 2;
    const std::vector<double> lambda = sample_top_eigenvalue(model, so);
    double s1 = 0, s2 = 0, s4 = 0;
    std::vector<double> x(lambda.size());
    for (std::size_t i = 0; i < lambda.size(); ++i) s1 += (x[i] = hermite_edge_statistic(model, lambda[i]));
    const double m = s1 / count;
    for (double v : x) {
      s2 += (v - m) * (v - m);
      s4 += std::pow(v - m, 4);
    }
    const double var = s2 / (count - 1), m4 = s4 / count;
    return Stats{m, var, std::sqrt(var / count), std::sqrt((m4 - var * var) / count)};
  };
  // Two sizes, extrapolated to n = inf in n^{-2/3}, the order of the unspiked edge's finite-n bias
  // (design.md section 3; consistent with the beta = 2 measurements -1.7731 at n = 1000 and
  // -1.7718 at n = 4000 against -1.77109). Independent seeds, so the errors add in quadrature.
  const long n1 = 1000, n2 = 8000, count = 30000;
  const std::uint64_t seed = 20240611u + static_cast<std::uint64_t>(beta * 100);
  const Stats s1 = simulate(n1, count, seed), s2 = simulate(n2, count, seed + 7919);
  const double q = std::pow(static_cast<double>(n2) / n1, -2.0 / 3.0);  // n2^{-2/3} / n1^{-2/3} = 1/4
  auto extrapolate = [q](double a1, double a2) { return (a2 - q * a1) / (1 - q); };
  auto extrapolate_se = [q](double e1, double e2) { return std::hypot(e2, q * e1) / (1 - q); };
  const double m_inf = extrapolate(s1.mean, s2.mean), v_inf = extrapolate(s1.var, s2.var);
  const double se_m = extrapolate_se(s1.se_mean, s2.se_mean), se_v = extrapolate_se(s1.se_var, s2.se_var);
  // What extrapolation cannot remove: the next order, n^{-1} against n^{-2/3}, is n1^{-1/3} = 0.1
  // times the n1 bias; allow half the observed n1 -> n2 change (5x that) for it.
  const double allow_m = 0.5 * std::abs(s1.mean - s2.mean), allow_v = 0.5 * std::abs(s1.var - s2.var);
  if (verbose())
    std::printf("  beta=%g PDE mean %.6f var %.6f | MC n=%ld mean %.5f var %.5f | n=%ld mean %.5f var %.5f | "
                "extrapolated mean %.5f +- %.5f var %.5f +- %.5f\n",
                beta, mean, var, n1, s1.mean, s1.var, n2, s2.mean, s2.var, m_inf, se_m, v_inf, se_v);
  // Four standard errors: a 6e-5 false-alarm rate per comparison (common practice, no source).
  EXPECT_NEAR(m_inf, mean, 4 * se_m + allow_m) << "n=" << n1 << ": " << s1.mean << ", n=" << n2 << ": " << s2.mean;
  EXPECT_NEAR(v_inf, var, 4 * se_v + allow_v) << "n=" << n1 << ": " << s1.var << ", n=" << n2 << ": " << s2.var;
}

INSTANTIATE_TEST_SUITE_P(Betas, GeneralBeta, ::testing::Values(0.5, 3.0, 6.0, 10.0),
                         [](const auto& info) { return name_of(info.param); });

}  // namespace
}  // namespace edgelaw
