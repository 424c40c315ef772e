// Empirical cdf and one- and two-sample Kolmogorov distances for Monte Carlo checks.
#include "simulate/empirical.h"

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>

namespace edgelaw {
namespace {

std::vector<double> sorted_checked(std::span<const double> samples, const char* what) {
  if (samples.empty()) throw std::invalid_argument(std::string(what) + ": empty sample");
  std::vector<double> s(samples.begin(), samples.end());
  for (double x : s)
    if (std::isnan(x)) throw std::invalid_argument(std::string(what) + ": sample contains NaN");
  std::sort(s.begin(), s.end());
  return s;
}

KolmogorovResult finish(double distance, double location, double effective_n) {
  KolmogorovResult r;
  r.distance = distance;
  r.location = location;
  r.effective_n = effective_n;
  r.critical_95 = 1.36 / std::sqrt(effective_n);
  r.p_value = kolmogorov_survival(std::sqrt(effective_n) * distance);
  return r;
}

}  // namespace

EmpiricalCdf::EmpiricalCdf(std::vector<double> samples) : sorted_(sorted_checked(samples, "EmpiricalCdf")) {}

double EmpiricalCdf::operator()(double x) const {
  const auto it = std::upper_bound(sorted_.begin(), sorted_.end(), x);
  return static_cast<double>(it - sorted_.begin()) / static_cast<double>(sorted_.size());
}

double EmpiricalCdf::quantile(double q) const {
  if (!(q > 0.0 && q <= 1.0)) throw std::invalid_argument("EmpiricalCdf::quantile: q must be in (0, 1]");
  const double rank = std::ceil(q * static_cast<double>(sorted_.size()));
  const std::size_t i = static_cast<std::size_t>(std::max(1.0, rank)) - 1;
  return sorted_[std::min(i, sorted_.size() - 1)];
}

double kolmogorov_survival(double t) {
  if (std::isnan(t)) throw std::invalid_argument("kolmogorov_survival: NaN argument");
  if (t <= 0.0) return 1.0;
  constexpr double kPi = 3.14159265358979323846;
  if (t < 1.0) {
    // Small t: the dual (theta-function) series of the cdf converges fast and avoids the
    // cancellation of the alternating one; Q = 1 - sqrt(2 pi)/t sum exp(-(2k-1)^2 pi^2 / (8 t^2)).
    double cdf = 0.0;
    for (int k = 1; k <= 50; ++k) {
      const double term = std::exp(-(2.0 * k - 1) * (2.0 * k - 1) * kPi * kPi / (8.0 * t * t));
      cdf += term;
      if (term < 1e-18 * cdf) break;
    }
    return std::clamp(1.0 - std::sqrt(2.0 * kPi) / t * cdf, 0.0, 1.0);
  }
  double sum = 0.0;
  for (int k = 1; k <= 100; ++k) {
    const double term = std::exp(-2.0 * k * k * t * t);
    sum += (k % 2 == 1 ? term : -term);
    if (term < 1e-18) break;
  }
  return std::clamp(2.0 * sum, 0.0, 1.0);
}

KolmogorovResult kolmogorov_distance(std::span<const double> samples, const std::function<double(double)>& cdf) {
  if (!cdf) throw std::invalid_argument("kolmogorov_distance: empty cdf function");
  const std::vector<double> s = sorted_checked(samples, "kolmogorov_distance");
  const double n = static_cast<double>(s.size());
  double best = 0.0, where = s.front();
  for (std::size_t i = 0; i < s.size();) {
    // Ties: the empirical cdf jumps once over the whole run of equal values.
    std::size_t j = i;
    while (j < s.size() && s[j] == s[i]) ++j;
    const double f = cdf(s[i]);
    if (!(f >= 0.0 && f <= 1.0))
      throw std::invalid_argument("kolmogorov_distance: cdf returned a value outside [0, 1] or NaN");
    const double gap = std::max(f - static_cast<double>(i) / n, static_cast<double>(j) / n - f);
    if (gap > best) {
      best = gap;
      where = s[i];
    }
    i = j;
  }
  return finish(best, where, n);
}

KolmogorovResult kolmogorov_distance(std::span<const double> a, std::span<const double> b) {
  const std::vector<double> x = sorted_checked(a, "kolmogorov_distance (first sample)");
  const std::vector<double> y = sorted_checked(b, "kolmogorov_distance (second sample)");
  const double nx = static_cast<double>(x.size()), ny = static_cast<double>(y.size());
  std::size_t i = 0, j = 0;
  double best = 0.0, where = std::min(x.front(), y.front());
  while (i < x.size() || j < y.size()) {
    // Step past every copy of the next smallest value in both samples, then compare.
    const double v = j == y.size() || (i < x.size() && x[i] <= y[j]) ? x[i] : y[j];
    while (i < x.size() && x[i] == v) ++i;
    while (j < y.size() && y[j] == v) ++j;
    const double gap = std::abs(static_cast<double>(i) / nx - static_cast<double>(j) / ny);
    if (gap > best) {
      best = gap;
      where = v;
    }
  }
  return finish(best, where, nx * ny / (nx + ny));
}

}  // namespace edgelaw
