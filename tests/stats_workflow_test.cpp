// The statistics layer (stats/) against independent references: p-values, critical values,
// power and spike intervals of the direct beta = 2 model against the Fredholm-determinant
// reference (Baik, Ben Arous, Peche 2005 formula by Bornemann's 2010 method, tests/reference);
// the monotone brackets at the region's edges; CSV input and its errors; the shipped demo
// dataset against an eigenvalue computed here by another method.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <sstream>

#include "reference/fredholm.h"
#include "stats/data_matrix.h"
#include "stats/edge_law.h"
#include "stats/spike_test.h"

namespace edgelaw {
namespace {

// One beta = 2 law over x in [-9, 9] and every w >= -4 serves the checks below.
class Beta2Law : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    LawRegion region;
    region.x_min = -9;
    region.x_max = 9;
    region.w_min = -4;
    law_ = new EdgeLaw(EdgeLaw::solve(2.0, region, 1e-8));
  }
  static void TearDownTestSuite() { delete law_; }
  static const EdgeLaw& law() { return *law_; }
  static EdgeLaw* law_;
};
EdgeLaw* Beta2Law::law_ = nullptr;

SpikedModel direct2() {
  SpikedModel m;
  m.family = ModelFamily::direct;
  m.beta = 2;
  return m;
}

// Between grid points and in the angle coordinate, including w between 6 and +inf where a
// table in w has no rows: every value within the solve's target 1e-8 of the reference, and the
// reported error (about 1e-10 here, far below the target) bounding the actual error at >= 90% of
// the points up to the reference's 1e-13 (fredholm.h). Measured: 71 of 77 bounded, the others
// exceed their estimate by at most 2.5x (all below 1.5e-10); at target 1e-9 all 77 are bounded.
TEST_F(Beta2Law, InterpolatedValuesMatchFredholm) {
  int points = 0, bounded = 0;
  for (double w : {-3.7, -2.013, -0.5, 0.0, 0.333, 1.7, 4.9, 8.0, 20.0, 150.0, kInf}) {
    for (double x : {-4.03, -2.5, -1.111, 0.0, 0.77, 2.5, 4.21}) {
      const auto ref = reference::spiked_beta2(x, w);
      const Estimate c = law().cdf(x, w), s = law().survival(x, w);
      EXPECT_LE(std::abs(c.value - ref.cdf), 1e-8) << "x=" << x << " w=" << w;
      EXPECT_LE(std::abs(s.value - ref.survival), 1e-8) << "x=" << x << " w=" << w;
      EXPECT_LT(c.error, 1e-8);
      bounded += std::abs(c.value - ref.cdf) <= c.error + 1e-13 && std::abs(s.value - ref.survival) <= s.error + 1e-13;
      ++points;
    }
  }
  EXPECT_EQ(points, 77);
  EXPECT_GE(bounded, 0.9 * points) << bounded << " of " << points << " bounded by their estimate";
}

// Outside the region the value is bracketed by monotonicity: the bracket must contain the truth.
TEST_F(Beta2Law, BracketsBeyondTheRegionContainTheTruth) {
  for (double x : {9.5, 12.0}) {
    const Estimate s = law().survival(x, 0.0);
    const double ref = reference::spiked_beta2(x, 0.0).survival;
    EXPECT_LE(std::abs(s.value - ref), s.error) << x;
    EXPECT_LT(s.value + s.error, 1e-8);  // the survival at x = 9 bounds it
  }
  const Estimate strong = law().survival(0.0, -5.0);  // w below the region: S >= S(0; -4)
  EXPECT_GE(strong.value + strong.error, 1.0 - 1e-12);
  EXPECT_LE(strong.value - strong.error, reference::spiked_beta2(0.0, -4.0).survival + 1e-9);
}

// Critical value of the unspiked test = TW_2 quantile (reference inverse, ~1e-13 in x).
TEST_F(Beta2Law, CriticalValueIsTheTracyWidomQuantile) {
  for (double alpha : {0.1, 0.05, 0.01, 0.001}) {
    const CriticalValue cv = critical_value(direct2(), law(), alpha, kInf);
    const double ref = reference::tracy_widom_quantile(2, 1 - alpha);
    EXPECT_LE(std::abs(cv.x.value - ref), cv.x.error + 1e-12) << alpha;
    EXPECT_LT(cv.x.error, 1e-7) << alpha;
  }
}

// Power at an alternative w1 = survival of the spiked law at the TW_2 critical value.
TEST_F(Beta2Law, PowerMatchesFredholm) {
  for (double w1 : {-3.0, -1.5, 0.0, 2.0}) {
    const Power p = power(direct2(), law(), 0.05, kInf, w1);
    const double q = reference::tracy_widom_quantile(2, 0.95);
    const double ref = reference::spiked_beta2(q, w1).survival;
    // The critical value's error (~1e-12 here) moves the power by density * dx: inside error.
    EXPECT_LE(std::abs(p.power.value - ref), p.power.error + 1e-12) << w1;
  }
  // More spike, more power.
  EXPECT_LT(power(direct2(), law(), 0.05, kInf, 1.0).power.value, power(direct2(), law(), 0.05, kInf, 0.0).power.value);
}

// Interval ends for w: the reference cdf at the observed x equals 1 - alpha/2 and alpha/2 there.
TEST_F(Beta2Law, IntervalEndsInvertTheReferenceLaw) {
  const double x_obs = 3.0, alpha = 0.1;
  const SpikeInterval iv = spike_interval(direct2(), law(), x_obs, alpha);
  ASSERT_FALSE(iv.lower_is_no_spike);
  ASSERT_FALSE(iv.upper_open);
  // Weak end (larger w) has F = 1 - alpha/2, strong end F = alpha/2; the slope of F in w
  // turns the law's 1e-9 error into the reported end errors.
  const auto weak = reference::spiked_beta2(x_obs, iv.lower_w), strong = reference::spiked_beta2(x_obs, iv.upper_w);
  EXPECT_NEAR(weak.cdf, 1 - alpha / 2, 1e-8);
  EXPECT_NEAR(strong.cdf, alpha / 2, 1e-8);
  EXPECT_GT(iv.lower, iv.upper);  // direct model: the spike is w, stronger = smaller
  // An observation in the bulk of TW_2 cannot exclude "no spike".
  const SpikeInterval bulk = spike_interval(direct2(), law(), -1.5, 0.05);
  EXPECT_TRUE(bulk.lower_is_no_spike);
}

// The covariance (beta = 2 Laguerre) model: the p-value rises with the null spike (a stronger
// null makes a given eigenvalue less surprising).
TEST_F(Beta2Law, PValueRisesWithTheNullSpike) {
  SpikedModel m;
  m.family = ModelFamily::covariance;
  m.beta = 2;
  m.n = 800;
  m.p = 200;
  const double lambda = m.map(1.0).center + 2.5 * m.map(1.0).scale;  // x = 2.5 with no spike
  double previous = 0;
  for (double ell : {1.0, 1.2, 1.4, 1.5, 1.6, 1.7}) {
    const PValue p = p_value(m, law(), lambda, ell);
    EXPECT_GT(p.p_value.value, previous) << ell;
    previous = p.p_value.value;
  }
}

TEST(SpikedModelInput, BadValuesAreNamed) {
  SpikedModel m;
  m.family = ModelFamily::covariance;
  m.beta = 1;
  m.n = 100;
  m.p = 10;
  m.noise_variance = -1;
  EXPECT_NE(m.check().find("noise variance"), std::string::npos);
  m.noise_variance = 1;
  m.n = 1;
  EXPECT_NE(m.check().find("at least 2 samples"), std::string::npos);
  m.n = 100;
  EXPECT_EQ(m.check(), "");
  EXPECT_NE(m.check_spike(0.5).find(">= 1"), std::string::npos);
  m.beta = 0;
  EXPECT_NE(m.check().find("beta"), std::string::npos);
}

TEST(DataMatrix, ParsesAndRefusesClearly) {
  const Eigen::MatrixXd a = parse_matrix_csv("# c\nv1,v2\n1, 2\n3,4.5\n\n", "t.csv");
  ASSERT_EQ(a.rows(), 2);
  EXPECT_EQ(a(1, 1), 4.5);
  auto message = [](const std::string& text) {
    try {
      parse_matrix_csv(text, "t.csv");
    } catch (const DataMatrixError& e) {
      return std::string(e.what());
    }
    return std::string("no error");
  };
  EXPECT_NE(message("1,2\n3,x\n").find("line 2, column 2: 'x' is not a finite number"), std::string::npos);
  EXPECT_NE(message("1,2\n3\n").find("line 2 has 1 fields"), std::string::npos);
  EXPECT_NE(message("1,2\n3,nan\n").find("not a finite number"), std::string::npos);
  EXPECT_NE(message("1,2\n3,\n").find("column 2"), std::string::npos);
  EXPECT_NE(message("").find("no data rows"), std::string::npos);
  EXPECT_NE(message("a,b\n").find("no data rows"), std::string::npos);
  EXPECT_THROW(covariance_data(Eigen::MatrixXd::Ones(1, 3), false), DataMatrixError);  // one sample
  EXPECT_THROW(covariance_data(Eigen::MatrixXd::Ones(2, 3), true), DataMatrixError);   // centring leaves 1
  EXPECT_THROW(symmetric_data(Eigen::MatrixXd::Ones(2, 3)), DataMatrixError);
  Eigen::MatrixXd asym = Eigen::MatrixXd::Identity(3, 3);
  asym(0, 1) = 0.5;
  EXPECT_THROW(symmetric_data(asym), DataMatrixError);
}

// The shipped demo dataset (tests/data/bridge_sensors.csv, invented by make_bridge_sensors.py):
// its top eigenvalue after centring, computed here by power iteration on X_c^T X_c with a
// plain reader, against the library's Eigen path; and the noise estimate's formula.
TEST(DataMatrix, DemoDatasetTopEigenvalueByPowerIteration) {
  std::ifstream in(EDGELAW_TEST_DATA "/bridge_sensors.csv");
  ASSERT_TRUE(in) << "demo dataset missing";
  std::stringstream text;
  text << in.rdbuf();
  std::vector<std::vector<double>> rows;
  std::istringstream lines(text.str());
  for (std::string line; std::getline(lines, line);) {
    if (line.empty() || line[0] == '#' || line[0] == 's') continue;
    std::vector<double> r;
    std::istringstream f(line);
    for (std::string v; std::getline(f, v, ',');) r.push_back(std::strtod(v.c_str(), nullptr));
    rows.push_back(r);
  }
  const std::size_t n = rows.size(), p = rows.front().size();
  ASSERT_EQ(n, 400u);
  ASSERT_EQ(p, 20u);
  std::vector<double> mean(p, 0.0);
  for (const auto& r : rows)
    for (std::size_t j = 0; j < p; ++j) mean[j] += r[j] / static_cast<double>(n);
  std::vector<std::vector<double>> s(p, std::vector<double>(p, 0.0));
  double trace = 0;
  for (const auto& r : rows)
    for (std::size_t i = 0; i < p; ++i) {
      trace += (r[i] - mean[i]) * (r[i] - mean[i]);
      for (std::size_t j = 0; j < p; ++j) s[i][j] += (r[i] - mean[i]) * (r[j] - mean[j]);
    }
  std::vector<double> v(p, 1.0);
  double lambda = 0;
  for (int it = 0; it < 2000; ++it) {
    std::vector<double> y(p, 0.0);
    for (std::size_t i = 0; i < p; ++i)
      for (std::size_t j = 0; j < p; ++j) y[i] += s[i][j] * v[j];
    double norm = 0;
    for (double e : y) norm += e * e;
    norm = std::sqrt(norm);
    lambda = norm;
    for (std::size_t i = 0; i < p; ++i) v[i] = y[i] / norm;
  }
  const CovarianceData d = covariance_data(parse_matrix_csv(text.str(), "bridge_sensors.csv"), true);
  EXPECT_EQ(d.effective_samples, 399);
  EXPECT_EQ(d.variables, 20);
  EXPECT_NEAR(d.top_eigenvalue, lambda, 1e-9 * lambda);
  EXPECT_NEAR(d.noise_variance_estimate, (trace - lambda) / (399.0 * 19.0), 1e-9);
}

// The data path end to end on the shipped demo dataset (real data, beta = 1): p-value and
// critical value under "no spike" against the Tracy-Widom Fredholm reference with the map's
// formulas written out again here (stats/FINITE_N.md: N = n - 1/beta, P = p - 1/beta, Johnstone's
// mu and sigma on N, P, and the no-spike centre moved by sigma / (2 kappa)); power and the interval
// ends against a Monte Carlo of the real spiked Wishart model (simulate/, 20000 samples), which
// shares nothing with the law's solve. Tolerance for the Monte Carlo comparisons: 3 binomial
// standard errors plus 0.03 for the finite-n error of the asymptotic law at n = 399, p = 20 (the
// maps measured <= 0.013 at n = 800, p = 200 and <= 0.016 over the aspect ratios spot-checked in
// stats/FINITE_N.md; this aspect ratio p/n = 0.05 was not among them, hence the wider allowance).
TEST(DemoDataset, EndToEndAgainstIndependentDerivations) {
  std::ifstream in(EDGELAW_TEST_DATA "/bridge_sensors.csv");
  ASSERT_TRUE(in);
  std::stringstream text;
  text << in.rdbuf();
  const CovarianceData d = covariance_data(parse_matrix_csv(text.str(), "bridge_sensors.csv"), true);
  SpikedModel m;
  m.family = ModelFamily::covariance;
  m.beta = 1;
  m.n = d.effective_samples;
  m.p = d.variables;
  m.noise_variance = d.noise_variance_estimate;
  LawRegion region;
  region.x_min = -12;
  region.x_max = 14;
  region.w_min = -6;
  const EdgeLaw law = EdgeLaw::solve(1.0, region, 1e-8);

  // Independent edge coordinates of the observed eigenvalue under "no spike".
  const double big_n = 399.0 - 1.0, big_p = 20.0 - 1.0, c = big_p / big_n;
  const double mu = std::pow(std::sqrt(big_n) + std::sqrt(big_p), 2);
  const double sigma = (std::sqrt(big_n) + std::sqrt(big_p)) * std::cbrt(1 / std::sqrt(big_n) + 1 / std::sqrt(big_p));
  const double kappa = std::cbrt(big_n * c) / std::pow(1 + std::sqrt(c), 2.0 / 3.0);
  const double centre = mu + sigma / (2 * kappa);
  const double x_obs = (d.top_eigenvalue / d.noise_variance_estimate - centre) / sigma;

  const PValue pv = p_value(m, law, d.top_eigenvalue, 1.0);
  EXPECT_NEAR(pv.at.x, x_obs, 1e-10);
  EXPECT_TRUE(std::isinf(pv.at.w));
  const double p_ref = reference::tracy_widom(1, x_obs).survival;
  EXPECT_LE(std::abs(pv.p_value.value - p_ref), pv.p_value.error + 1e-13) << pv.p_value.value << " vs " << p_ref;
  EXPECT_LT(pv.p_value.value, 1e-3);  // the interference is detected

  const CriticalValue cv = critical_value(m, law, 0.05, 1.0);
  const double crit_ref = d.noise_variance_estimate * (centre + sigma * reference::tracy_widom_quantile(1, 0.95));
  EXPECT_LE(std::abs(cv.eigenvalue.value - crit_ref), cv.eigenvalue.error + 1e-9 * crit_ref);

  // Power at the true spike 1.6 and the interval, against simulation of the model.
  const long samples = 20000;
  auto exceed = [&](double ell, double raw_threshold, std::uint64_t seed) {
    const std::vector<double> raw = simulate_raw_eigenvalues(m, ell, samples, seed, 0);
    return static_cast<double>(std::count_if(raw.begin(), raw.end(), [&](double v) { return v > raw_threshold; })) / samples;
  };
  auto allowance = [&](double p) { return 3 * std::sqrt(p * (1 - p) / samples) + 0.03; };
  const Power pw = power(m, law, 0.05, 1.0, 1.6);
  const double pw_mc = exceed(1.6, m.raw_eigenvalue(cv.eigenvalue.value), 101);
  EXPECT_NEAR(pw.power.value, pw_mc, allowance(pw_mc));
  const SpikeInterval iv = spike_interval(m, law, d.top_eigenvalue, 0.05);
  ASSERT_FALSE(iv.lower_is_no_spike);
  ASSERT_FALSE(iv.upper_open);
  EXPECT_LT(iv.lower, 1.6);  // this dataset's interval holds its true spike
  EXPECT_GT(iv.upper, 1.6);
  const double observed_raw = m.raw_eigenvalue(d.top_eigenvalue);
  EXPECT_NEAR(exceed(iv.lower, observed_raw, 102), 0.025, allowance(0.025));
  EXPECT_NEAR(exceed(iv.upper, observed_raw, 103), 0.975, allowance(0.975));
  std::printf("demo: x %.4f p %.3e (ref %.3e) crit %.3f (ref %.3f) power %.4f (mc %.4f) interval [%.4f, %.4f]\n", x_obs,
              pv.p_value.value, p_ref, cv.eigenvalue.value, crit_ref, pw.power.value, pw_mc, iv.lower, iv.upper);
}

}  // namespace
}  // namespace edgelaw
