// Finite-n maps (centering, scale, w) of the spiked Hermite and covariance models; see the header.
#include "stats/finite_n_map.h"

#include <cmath>
#include <limits>
#include <stdexcept>
#include <string>

namespace edgelaw {
namespace {

constexpr double kInfinity = std::numeric_limits<double>::infinity();

std::string show(double v) {
  if (std::isnan(v)) return "nan";
  return std::to_string(v);
}

void check_beta(double beta) {
  if (!(std::isfinite(beta) && beta > 0.0)) throw std::invalid_argument("beta must be finite and > 0, got " + show(beta));
}

// Effective size after the noise shift n -> n - 1/beta (step 3 of the header).
double shifted_size(double beta, long size, const char* what) {
  const double shifted = static_cast<double>(size) - 1.0 / beta;
  if (size < 2 || !(shifted >= 1.0))
    throw std::invalid_argument(std::string(what) + " must be >= 2 and >= 1 + 1/beta, got " + std::to_string(size) +
                                " with beta " + show(beta));
  return shifted;
}

// The boundary function g(theta): Strang form below criticality, outlier form above (C^2 at 1).
double boundary_g(double theta) {
  return theta <= 1.0 ? 2.0 * (1.0 - theta) / (1.0 + theta) : (1.0 - theta) / std::sqrt(theta);
}

// Inverse of g on theta in (0, inf), for u = w / kappa in (-inf, 2).
double boundary_g_inverse(double u) {
  if (u >= 0.0) return (2.0 - u) / (2.0 + u);
  const double s = 0.5 * (-u + std::sqrt(u * u + 4.0));  // sqrt(theta): s^2 + u s - 1 = 0
  return s * s;
}

// Spike theta <= 0: Dirichlet-equivalent description. g would give w_s = kappa g(theta) >= 2 kappa
// (> 0 for theta > -1); F(x; w_s) = TW(x - 1/w_s) + O(w_s^{-3}), so move the centre by
// scale / w_s and report w = +inf. 1/w_s = (1 + theta) / (2 kappa (1 - theta)) stays finite (and
// continues the same Dirichlet-point reading) for theta <= -1.
// Spike theta > 1: `variance_ratio` is v = (exact finite-n outlier variance) / (the law's
// 4|w|/beta); the scale becomes scale sqrt(v), pivoting about the outlier's place w^2 so that
// the location match is kept (x = w^2 + (x_0 - w^2)/sqrt(v), x_0 the unscaled coordinate).
EdgeMap finish(double center, double scale, double kappa, double theta, double variance_ratio) {
  if (theta <= 0.0) return {center + scale * (1.0 + theta) / (2.0 * kappa * (1.0 - theta)), scale, kInfinity};
  const double w = kappa * boundary_g(theta);
  if (theta <= 1.0) return {center, scale, w};
  const double rho = std::sqrt(variance_ratio);
  return {center + scale * w * w * (1.0 - rho), scale * rho, w};
}

// Hermite: outlier variance (2/beta)(1 - theta^{-2}) (raw units; Capitaine, Donati-Martin, Feral
// 2009 for beta = 1, 2), law 4|w|/beta in x units with |w| = n^{1/3} (theta - 1)/sqrt(theta):
// v = (1 + theta) / (2 theta^{3/2}).
double hermite_variance_ratio(double theta) { return (1.0 + theta) / (2.0 * theta * std::sqrt(theta)); }

struct CovarianceFrame {
  double mu, sigma, kappa, theta, c;
};

// Johnstone's (2001) centre and scale for sizes N, P; kappa and theta = (ell - 1)/sqrt(c) with
// c = P/N, so that the outlier N ell (1 + c/(ell - 1)) maps exactly to x = w^2.
CovarianceFrame covariance_frame(double big_n, double big_p, double ell) {
  const double sn = std::sqrt(big_n), sp = std::sqrt(big_p), c = big_p / big_n;
  const double mu = (sn + sp) * (sn + sp);
  const double sigma = (sn + sp) * std::cbrt(1.0 / sn + 1.0 / sp);
  const double kappa = std::cbrt(big_n * c) / std::cbrt((1.0 + std::sqrt(c)) * (1.0 + std::sqrt(c)));
  return {mu, sigma, kappa, (ell - 1.0) / std::sqrt(c), c};
}

// Covariance: outlier variance (2/beta) n ell^2 (1 - theta^{-2}) (Paul 2007 real, Baik, Ben Arous,
// Peche 2005 complex), over sigma^2 4|w|/beta: v = Hermite's v times (ell / (1 + sqrt c))^2.
double covariance_variance_ratio(const CovarianceFrame& f, double ell) {
  const double r = ell / (1.0 + std::sqrt(f.c));
  return hermite_variance_ratio(f.theta) * r * r;
}

void check_theta(double theta) {
  if (!std::isfinite(theta)) throw std::invalid_argument("spike theta must be finite, got " + show(theta));
}

void check_ell(double ell) {
  if (!(std::isfinite(ell) && ell > 0.0)) throw std::invalid_argument("spike ell must be finite and > 0, got " + show(ell));
}

void check_sizes(long n, long p) {
  if (n < 2) throw std::invalid_argument("covariance map needs n >= 2 samples, got " + std::to_string(n));
  if (p < 1) throw std::invalid_argument("covariance map needs p >= 1 variables, got " + std::to_string(p));
}

void check_w(double w) {
  if (std::isnan(w) || w == -kInfinity) throw std::invalid_argument("w must be a number or +inf, got " + show(w));
}

// theta for w at boundary scale kappa; w >= 2 kappa (and +inf) give the no-spike theta = 0.
double theta_for_w(double kappa, double w) {
  const double u = w / kappa;
  return u >= 2.0 ? 0.0 : boundary_g_inverse(u);
}

}  // namespace

EdgeMap hermite_edge_map(double beta, long n, double theta) {
  check_beta(beta);
  check_theta(theta);
  const double big_n = shifted_size(beta, n, "Hermite model size n");
  return finish(2.0 * std::sqrt(big_n), 1.0 / std::cbrt(std::sqrt(big_n)), std::cbrt(big_n), theta,
                hermite_variance_ratio(theta));
}

EdgeMap covariance_edge_map(double beta, long n, long p, double ell) {
  check_beta(beta);
  check_sizes(n, p);
  check_ell(ell);
  const CovarianceFrame f =
      covariance_frame(shifted_size(beta, n, "sample count n"), shifted_size(beta, p, "variable count p"), ell);
  return finish(f.mu, f.sigma, f.kappa, f.theta, covariance_variance_ratio(f, ell));
}

double hermite_spike_for_w(double beta, long n, double w) {
  check_beta(beta);
  check_w(w);
  return theta_for_w(std::cbrt(shifted_size(beta, n, "Hermite model size n")), w);
}

double covariance_spike_for_w(double beta, long n, long p, double w) {
  check_beta(beta);
  check_sizes(n, p);
  check_w(w);
  const CovarianceFrame f =
      covariance_frame(shifted_size(beta, n, "sample count n"), shifted_size(beta, p, "variable count p"), 1.0);
  return 1.0 + std::sqrt(f.c) * theta_for_w(f.kappa, w);
}

namespace edge_map_candidates {

EdgeMap hermite_leading(long n, double theta) {
  const double nn = static_cast<double>(n);
  return {2.0 * std::sqrt(nn), 1.0 / std::cbrt(std::sqrt(nn)), std::cbrt(nn) * (1.0 - theta)};
}

EdgeMap covariance_leading(long n, long p, double ell) {
  const CovarianceFrame f = covariance_frame(static_cast<double>(n), static_cast<double>(p), ell);
  return {f.mu, f.sigma, f.kappa * (1.0 - f.theta)};
}

EdgeMap hermite_exponential(long n, double theta) {
  const double nn = static_cast<double>(n);
  return {2.0 * std::sqrt(nn), 1.0 / std::cbrt(std::sqrt(nn)), theta > 0.0 ? -std::cbrt(nn) * std::log(theta) : kInfinity};
}

EdgeMap covariance_exponential(long n, long p, double ell) {
  const CovarianceFrame f = covariance_frame(static_cast<double>(n), static_cast<double>(p), ell);
  return {f.mu, f.sigma, f.theta > 0.0 ? -f.kappa * std::log(f.theta) : kInfinity};
}

EdgeMap hermite_noise_free(long n, double theta) {
  const double nn = static_cast<double>(n);
  return finish(2.0 * std::sqrt(nn), 1.0 / std::cbrt(std::sqrt(nn)), std::cbrt(nn), theta, 1.0);
}

EdgeMap covariance_noise_free(long n, long p, double ell) {
  const CovarianceFrame f = covariance_frame(static_cast<double>(n), static_cast<double>(p), ell);
  return finish(f.mu, f.sigma, f.kappa, f.theta, 1.0);
}

EdgeMap hermite_shifted(double beta, long n, double theta) {
  const double big_n = static_cast<double>(n) - 1.0 / beta;
  return finish(2.0 * std::sqrt(big_n), 1.0 / std::cbrt(std::sqrt(big_n)), std::cbrt(big_n), theta, 1.0);
}

EdgeMap covariance_shifted(double beta, long n, long p, double ell) {
  const CovarianceFrame f = covariance_frame(n - 1.0 / beta, p - 1.0 / beta, ell);
  return finish(f.mu, f.sigma, f.kappa, f.theta, 1.0);
}

}  // namespace edge_map_candidates
}  // namespace edgelaw
