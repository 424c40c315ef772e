// Empirical distribution of Monte Carlo samples and Kolmogorov distances to a cdf or another sample.
#pragma once

#include <cstddef>
#include <functional>
#include <span>
#include <vector>

namespace edgelaw {

// Right-continuous empirical cdf of a sample: F_N(x) = #{x_i <= x} / N.
class EmpiricalCdf {
 public:
  // Throws std::invalid_argument on an empty sample or one containing NaN.
  explicit EmpiricalCdf(std::vector<double> samples);
  double operator()(double x) const;
  // Smallest sample value v with F_N(v) >= q, for q in (0, 1].
  double quantile(double q) const;
  std::span<const double> sorted() const { return sorted_; }
  std::size_t size() const { return sorted_.size(); }

 private:
  std::vector<double> sorted_;
};

struct KolmogorovResult {
  double distance = 0.0;     // sup_x |F_N(x) - F(x)| (or |F_N - G_M| for two samples)
  double location = 0.0;     // an x where the supremum is attained (approached)
  double effective_n = 0.0;  // N, or N M / (N + M) for two samples
  // Sampling scale: 1.36 / sqrt(effective_n), the 95% point of Kolmogorov's asymptotic law
  // (Kolmogorov 1933; Smirnov 1948 for two samples), valid for a continuous F.
  double critical_95 = 0.0;
  // Asymptotic p-value Q(sqrt(effective_n) distance), Q(t) = 2 sum_k (-1)^{k-1} exp(-2 k^2 t^2).
  double p_value = 1.0;
};

// One-sample distance to a continuous cdf F (F must return values in [0, 1]; NaN throws).
KolmogorovResult kolmogorov_distance(std::span<const double> samples, const std::function<double(double)>& cdf);
// Two-sample (Smirnov) distance.
KolmogorovResult kolmogorov_distance(std::span<const double> a, std::span<const double> b);

// Kolmogorov's limiting survival function Q(t) = P(sup |Brownian bridge| > t).
double kolmogorov_survival(double t);

}  // namespace edgelaw
