// Simulation-versus-law check of the finite-n maps (stats/finite_n_map.h): the solved cdf
// F_beta(x; w) as a function of x, samplers of raw top eigenvalues (tridiagonal / bidiagonal
// models and dense real Gaussian data matrices) and the Kolmogorov distance after a map.
// Shared by bench/finite_n_accuracy (the tables in stats/FINITE_N.md) and tests/stats_maps_test.
#pragma once

#include <Eigen/Dense>
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <future>
#include <map>
#include <random>
#include <span>
#include <stdexcept>
#include <vector>

#include "simulate/empirical.h"
#include "simulate/simulate.h"
#include "solver/solver.h"
#include "stats/finite_n_map.h"

namespace edgelaw::finite_n_check {

// F_beta(x; w) on a fine x grid for a set of w, evaluated between nodes by cubic Hermite
// interpolation with the solved density (error ~ step^4 F'''' ~ 1e-9 at step 0.02, far below the
// solver target and the sampling error). Outside the grid: 0 on the left, 1 on the right.
class LawCdf {
 public:
  LawCdf(double beta, std::vector<double> w, double target_error, double x_low, double x_high, double step) {
    std::sort(w.begin(), w.end());
    w.erase(std::unique(w.begin(), w.end()), w.end());
    LawRequest r;
    r.beta = beta;
    r.w = w;
    for (double x = x_low; x <= x_high + 1e-12; x += step) r.x.push_back(x);
    SolverOptions o;
    o.target_error = target_error;
    o.moments = true;
    table_ = solve_law(r, o);
    for (std::size_t i = 0; i < w.size(); ++i) row_[w[i]] = i;
  }
  double operator()(double w, double x) const {
    const auto it = row_.find(w);
    if (it == row_.end()) throw std::invalid_argument("LawCdf: w not solved");
    const std::size_t r = it->second;
    const std::vector<double>& xs = table_.x;
    if (x <= xs.front()) return std::max(0.0, table_.cdf(r, 0));
    if (x >= xs.back()) return std::min(1.0, table_.cdf(r, xs.size() - 1));
    const std::size_t j = std::min<std::size_t>(std::upper_bound(xs.begin(), xs.end(), x) - xs.begin() - 1, xs.size() - 2);
    const double h = xs[j + 1] - xs[j], s = (x - xs[j]) / h;
    const double f0 = table_.cdf(r, j), f1 = table_.cdf(r, j + 1);
    const double d0 = table_.density(r, j) * h, d1 = table_.density(r, j + 1) * h;
    const double v = (2 * s * s * s - 3 * s * s + 1) * f0 + (s * s * s - 2 * s * s + s) * d0 +
                     (-2 * s * s * s + 3 * s * s) * f1 + (s * s * s - s * s) * d1;
    return std::clamp(v, 0.0, 1.0);
  }
  double max_error() const { return table_.summary.max_cdf_error; }
  const Moments& moments(double w) const { return table_.moments.at(row_.at(w)); }

 private:
  LawTable table_;
  std::map<double, std::size_t> row_;
};

// Kolmogorov distance between the mapped sample (lambda - center)/scale and F(.; map.w).
inline KolmogorovResult distance_after_map(std::span<const double> lambda, const EdgeMap& map, const LawCdf& law) {
  std::vector<double> x(lambda.begin(), lambda.end());
  for (double& v : x) v = (v - map.center) / map.scale;
  return kolmogorov_distance(x, [&](double t) { return law(map.w, t); });
}

// Top eigenvalue of S = X^T X for real Gaussian X (n x p), rows N(0, diag(ell, 1, ..., 1)),
// by Eigen's dense symmetric eigensolver; `threads` independent streams (seed, thread).
inline std::vector<double> dense_real_covariance_top(long n, long p, double ell, long count, std::uint64_t seed,
                                                     int threads) {
  auto draw = [=](long k, std::uint64_t s) {
    std::mt19937_64 rng(s);
    std::normal_distribution<double> normal;
    std::vector<double> out;
    out.reserve(static_cast<std::size_t>(k));
    Eigen::MatrixXd x(n, p), s_mat(p, p);
    Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> eig(p);
    for (long i = 0; i < k; ++i) {
      for (long j = 0; j < p; ++j)
        for (long r = 0; r < n; ++r) x(r, j) = (j == 0 ? std::sqrt(ell) : 1.0) * normal(rng);
      // Lower triangle of X^T X only (the eigensolver reads the lower triangle): half the flops.
      s_mat.setZero();
      s_mat.selfadjointView<Eigen::Lower>().rankUpdate(x.transpose());
      eig.compute(s_mat, Eigen::EigenvaluesOnly);
      out.push_back(eig.eigenvalues()(p - 1));
    }
    return out;
  };
  threads = std::max(1, threads);
  std::vector<std::future<std::vector<double>>> parts;
  for (int t = 1; t < threads; ++t)
    parts.push_back(std::async(std::launch::async, draw, count * (t + 1) / threads - count * t / threads,
                               seed * 1000003ULL + static_cast<std::uint64_t>(t)));
  std::vector<double> all = draw(count / threads, seed * 1000003ULL);
  for (auto& f : parts) {
    const std::vector<double> v = f.get();
    all.insert(all.end(), v.begin(), v.end());
  }
  return all;
}

}  // namespace edgelaw::finite_n_check
