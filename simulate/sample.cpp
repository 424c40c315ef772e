// Samplers of the top eigenvalue of the spiked Hermite and Laguerre beta-ensembles (see simulate.h).
//
// Streams. Sample i draws from std::mt19937_64 seeded with a splitmix64 hash of (seed, i), and
// draws its matrix row by row (diagonal entry, then the coupling to the next row). Results are
// therefore independent of the thread count and of how samples are split among threads, and a
// truncated sample sees exactly the leading rows of the matrix the untruncated path builds.
//
// Truncation and its error. Let T_k be the leading k x k block, mu its top eigenvalue with
// eigenvector u. In the full matrix T, (mu, u padded by zeros) has residual
// rho = |e_k u_k| / ||u|| (e_k the coupling cut off). Cauchy interlacing gives
// lambda_max(T) >= mu, and first-order perturbation gives lambda_max(T) - mu ~ rho^2 G with
// G = e_1^T (mu - T_rest)^{-1} e_1 for the cut-off part T_rest, whose top eigenvalue sits about
// k / sqrt(n) below mu (Hermite; similarly for Laguerre), so G is O(sqrt(n) / k). We accept mu
// when rho <= 1e-8 |mu|, so the relative error is about 1e-16 |mu| G, i.e. ~1e-15 for the
// sizes used here. The starting k = 10 m^{1/3} + 50 (beta >= 1.9) lies about 10 Airy units into the region
// where u decays like exp(-(2/3) t^{3/2}) (deeper for beta < 1.9, see first_rows), so the check
// almost always passes at once; when it fails (large upward fluctuations) k doubles. The tests
// compare against the untruncated eigenvalue on many samples.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <exception>
#include <random>
#include <stdexcept>
#include <string>
#include <thread>
#include <vector>

#include "simulate/simulate.h"
#include "simulate/sturm.h"

namespace edgelaw {
namespace {

constexpr double kResidualTolerance = 1e-8;

std::uint64_t splitmix64(std::uint64_t x) {
  x += 0x9E3779B97F4A7C15ULL;
  x = (x ^ (x >> 30)) * 0xBF58476D1CE4E5B9ULL;
  x = (x ^ (x >> 27)) * 0x94D049BB133111EBULL;
  return x ^ (x >> 31);
}

std::mt19937_64 sample_stream(std::uint64_t seed, std::uint64_t index) {
  return std::mt19937_64(splitmix64(splitmix64(seed) ^ index));
}

// Hermite rows: d_i = N(0, 2/beta) (+ theta sqrt n at i = 0), e_i^2 = chi^2_{beta(n-1-i)} / beta.
class HermiteRows {
 public:
  HermiteRows(const HermiteSpikeModel& model, std::uint64_t seed, std::uint64_t index)
      : model_(model), rng_(sample_stream(seed, index)), normal_(0.0, std::sqrt(2.0 / model.beta)) {}
  std::size_t size() const { return static_cast<std::size_t>(model_.n); }
  // Row i: its diagonal entry and (if not last) its squared coupling to row i+1.
  void draw(std::size_t i, double& d, double& e2) {
    d = normal_(rng_);
    if (i == 0) d += model_.theta * std::sqrt(static_cast<double>(model_.n));
    const double dof = model_.beta * static_cast<double>(model_.n - 1 - static_cast<long>(i));
    e2 = i + 1 < size() ? 2.0 * gamma_(rng_, Gamma::param_type(0.5 * dof, 1.0)) / model_.beta : 0.0;
  }

 private:
  using Gamma = std::gamma_distribution<double>;
  HermiteSpikeModel model_;
  std::mt19937_64 rng_;
  std::normal_distribution<double> normal_;
  Gamma gamma_;
};

// Laguerre rows of B^T B: d_i = a_{i+1}^2 + b_i^2, e_i^2 = a_{i+1}^2 b_{i+1}^2 (1-based a, b),
// a_k^2 = chi^2_{beta(n-k+1)} / beta (times ell for k = 1; 0 for k = n+1 < p + 1),
// b_k^2 = chi^2_{beta(p-k)} / beta for k <= min(n, p-1). Size min(p, n+1).
class LaguerreRows {
 public:
  LaguerreRows(const LaguerreSpikeModel& model, std::uint64_t seed, std::uint64_t index)
      : model_(model), rng_(sample_stream(seed, index)) {}
  std::size_t size() const { return static_cast<std::size_t>(std::min(model_.p, model_.n + 1)); }
  void draw(std::size_t i, double& d, double& e2) {
    const long k = static_cast<long>(i) + 1;
    double a2 = k <= model_.n ? chi2(model_.beta * static_cast<double>(model_.n - k + 1)) : 0.0;
    if (k == 1) a2 *= model_.ell;
    d = a2 + b2_prev_;
    const double b2 = k <= std::min(model_.n, model_.p - 1) ? chi2(model_.beta * static_cast<double>(model_.p - k)) : 0.0;
    e2 = a2 * b2;
    b2_prev_ = b2;
  }

 private:
  using Gamma = std::gamma_distribution<double>;
  double chi2(double dof) { return 2.0 * gamma_(rng_, Gamma::param_type(0.5 * dof, 1.0)) / model_.beta; }
  LaguerreSpikeModel model_;
  std::mt19937_64 rng_;
  Gamma gamma_;
  double b2_prev_ = 0.0;
};

struct Workspace {
  std::vector<double> d, e2;
};

// Top eigenvalue of one sample, drawing rows lazily (see the truncation note above).
template <class Rows>
double top_eigenvalue(Rows& rows, std::size_t first_rows, Workspace& work) {
  const std::size_t m = rows.size();
  std::size_t drawn = 0;
  std::size_t k = std::min(m, first_rows);
  for (;;) {
    // Storage grows with the rows actually drawn, so a huge n costs nothing when truncated.
    if (work.d.size() < k) {
      work.d.resize(k);
      work.e2.resize(k);
    }
    for (; drawn < k; ++drawn) rows.draw(drawn, work.d[drawn], work.e2[drawn]);
    const double mu = simulate::largest_eigenvalue_squared_offdiag(work.d.data(), work.e2.data(), k);
    if (k == m) return mu;
    const double allowed = kResidualTolerance * std::abs(mu);
    const double enough = allowed * allowed / std::max(work.e2[k - 1], 1e-300);
    const double tail = simulate::eigenvector_tail_weight(work.d.data(), work.e2.data(), k, mu, enough);
    if (work.e2[k - 1] * tail <= allowed * allowed) return mu;
    k = std::min(m, 2 * k);
  }
}

void check_options(const SampleOptions& options) {
  if (options.count < 0) throw std::invalid_argument("sample count must be >= 0, got " + std::to_string(options.count));
  if (options.threads < 0) throw std::invalid_argument("thread count must be >= 0, got " + std::to_string(options.threads));
}

void check_beta(double beta) {
  if (!(std::isfinite(beta) && beta > 0.0)) throw std::invalid_argument("beta must be finite and > 0, got " + std::to_string(beta));
}

// Runs sample(i, work) for i in [0, count) on the requested threads, contiguous ranges each.
template <class Sample>
std::vector<double> run_samples(const SampleOptions& options, Sample sample) {
  std::vector<double> out(static_cast<std::size_t>(options.count));
  unsigned threads = options.threads > 0 ? static_cast<unsigned>(options.threads) : std::thread::hardware_concurrency();
  threads = std::max(1u, std::min<unsigned>(threads, static_cast<unsigned>(std::max<long>(1, options.count))));
  std::vector<std::exception_ptr> errors(threads);
  auto work_range = [&](unsigned t) {
    try {
      Workspace work;
      const std::size_t begin = out.size() * t / threads, end = out.size() * (t + 1) / threads;
      for (std::size_t i = begin; i < end; ++i) out[i] = sample(i, work);
    } catch (...) {
      errors[t] = std::current_exception();
    }
  };
  if (threads == 1) {
    work_range(0);
  } else {
    std::vector<std::thread> pool;
    for (unsigned t = 0; t < threads; ++t) pool.emplace_back(work_range, t);
    for (auto& th : pool) th.join();
  }
  for (auto& e : errors)
    if (e) std::rethrow_exception(e);
  return out;
}

// Leading rows drawn first: depth T Airy units (t = row / size^{1/3}) plus 50 rows. Besides the
// eigenvector decay (checked per sample), the cut-off part has its own top eigenvalue, about T
// Airy units below the edge plus a TW_beta-like fluctuation; the residual check cannot see it
// overtaking mu, so T is chosen to make that a tail event of the upper tail
// exp(-(2 beta/3) T^{3/2}) (Ramirez-Rider-Virag 2011): (2 beta/3) T^{3/2} >= 40, and T >= 10.
std::size_t first_rows(long size_scale, double beta) {
  const double depth = std::max(10.0, std::pow(60.0 / beta, 2.0 / 3.0));
  const double rows = depth * std::cbrt(static_cast<double>(size_scale)) + 50.0;
  return rows >= 1e12 ? static_cast<std::size_t>(1e12) : static_cast<std::size_t>(rows);
}

}  // namespace

std::vector<double> sample_top_eigenvalue(const HermiteSpikeModel& model, const SampleOptions& options) {
  check_beta(model.beta);
  if (model.n < 2) throw std::invalid_argument("Hermite model needs n >= 2, got " + std::to_string(model.n));
  if (!std::isfinite(model.theta)) throw std::invalid_argument("spike theta must be finite");
  check_options(options);
  const std::size_t start = options.truncate ? first_rows(model.n, model.beta) : static_cast<std::size_t>(model.n);
  return run_samples(options, [&](std::size_t i, Workspace& work) {
    HermiteRows rows(model, options.seed, i);
    return top_eigenvalue(rows, start, work);
  });
}

std::vector<double> sample_top_eigenvalue(const LaguerreSpikeModel& model, const SampleOptions& options) {
  check_beta(model.beta);
  if (model.n < 1) throw std::invalid_argument("Laguerre model needs n >= 1 samples, got " + std::to_string(model.n));
  if (model.p < 1) throw std::invalid_argument("Laguerre model needs p >= 1 variables, got " + std::to_string(model.p));
  if (!(std::isfinite(model.ell) && model.ell > 0.0))
    throw std::invalid_argument("spike variance ell must be finite and > 0, got " + std::to_string(model.ell));
  check_options(options);
  const std::size_t start =
      options.truncate ? first_rows(std::min(model.n, model.p), model.beta) : static_cast<std::size_t>(std::min(model.p, model.n + 1));
  return run_samples(options, [&](std::size_t i, Workspace& work) {
    LaguerreRows rows(model, options.seed, i);
    return top_eigenvalue(rows, start, work);
  });
}

double hermite_edge_statistic(const HermiteSpikeModel& model, double lambda_max) {
  const double n = static_cast<double>(model.n);
  return std::cbrt(std::sqrt(n)) * (lambda_max - 2.0 * std::sqrt(n));
}

}  // namespace edgelaw
