// Provisional finite-n maps (design notes, section 3): the exponential Hermite map and the
// Johnstone (2001) centering with the angle-style covariance w.
#include "stats/finite_n_map.h"

#include <cmath>
#include <limits>
#include <stdexcept>
#include <string>

namespace edgelaw {
namespace {
constexpr double kInfinity = std::numeric_limits<double>::infinity();

void check_common(double beta, long n) {
  if (!(std::isfinite(beta) && beta > 0)) throw std::invalid_argument("beta must be finite and > 0");
  if (n < 2) throw std::invalid_argument("n must be at least 2");
}
}  // namespace

EdgeMap hermite_edge_map(double beta, long n, double theta) {
  check_common(beta, n);
  if (std::isnan(theta)) throw std::invalid_argument("spike theta is NaN");
  const double nn = static_cast<double>(n);
  const double w = theta <= 0 ? kInfinity : -std::cbrt(nn) * std::log(theta);
  return {2.0 * std::sqrt(nn), std::pow(nn, -1.0 / 6.0), w};
}

EdgeMap covariance_edge_map(double beta, long n, long p, double ell) {
  check_common(beta, n);
  if (p < 1) throw std::invalid_argument("p must be at least 1");
  if (!(ell > 0) || !std::isfinite(ell)) throw std::invalid_argument("spike ell must be finite and > 0");
  const double nn = static_cast<double>(n), pp = static_cast<double>(p), c = pp / nn;
  const double root = std::sqrt(nn) + std::sqrt(pp);
  const double scale = root * std::cbrt(1.0 / std::sqrt(nn) + 1.0 / std::sqrt(pp));
  const double theta_eff = (ell - 1.0) / std::sqrt(c);
  const double w = theta_eff <= 0 ? kInfinity
                                  : -std::cbrt(nn * c) * std::log(theta_eff) / std::cbrt(std::pow(1 + std::sqrt(c), 2));
  return {root * root, scale, w};
}

double hermite_spike_for_w(double beta, long n, double w) {
  check_common(beta, n);
  if (std::isnan(w)) throw std::invalid_argument("w is NaN");
  return w == kInfinity ? 0.0 : std::exp(-w / std::cbrt(static_cast<double>(n)));
}

double covariance_spike_for_w(double beta, long n, long p, double w) {
  check_common(beta, n);
  if (p < 1) throw std::invalid_argument("p must be at least 1");
  if (std::isnan(w)) throw std::invalid_argument("w is NaN");
  if (w == kInfinity) return 1.0;
  const double nn = static_cast<double>(n), c = static_cast<double>(p) / nn;
  const double theta_eff = std::exp(-w * std::cbrt(std::pow(1 + std::sqrt(c), 2)) / std::cbrt(nn * c));
  return 1.0 + std::sqrt(c) * theta_eff;
}

}  // namespace edgelaw
