// The largest-eigenvalue test of a rank-one spike: p-values, critical values, power and
// spike-strength intervals for finite-n spiked models, through the finite-n maps to (x, w)
// and the spiked edge law F_beta(x; w).
//
// Every probability carries the numerical error of the law (solve or table). It does NOT carry
// the finite-n approximation error of the asymptotic law, which is of order n^{-1/3} in the
// spiked window (measured values in stats/FINITE_N.md); an exact finite-n check for Gaussian
// data is the simulator's job (simulated_p_value).
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "stats/edge_law.h"
#include "stats/finite_n_map.h"

namespace edgelaw {

enum class ModelFamily {
  direct,      // x and w given; the "eigenvalue" is x and the spike is w itself
  covariance,  // spiked covariance (PCA): n samples of p variables, spike ell, 1 = none
  signal,      // spiked Gaussian beta-ensemble (deformed Wigner), spike theta, 0 = none
};

struct SpikedModel {
  ModelFamily family = ModelFamily::direct;
  double beta = 2.0;
  long n = 0;  // covariance: effective samples (n - 1 when columns were centred); signal: size
  long p = 0;  // covariance: variables
  // Covariance: noise variance sigma^2 of the entries of X. Signal: variance of the
  // off-diagonal noise entries. Both > 0.
  double noise_variance = 1.0;
  // Covariance: the eigenvalue is of X^T X / n (true) or of X^T X (false).
  bool divided_by_n = false;

  // Empty when valid, otherwise one line naming the problem.
  std::string check() const;
  // The spike value meaning "no spike" (covariance 1, signal 0, direct +inf).
  double no_spike() const;
  // Checks a spike value for this model (one line, empty when valid).
  std::string check_spike(double spike) const;
  // The model's own critical spike (the BBP threshold): covariance 1 + sqrt(p/n), signal 1,
  // direct w = 0.
  double critical_spike() const;
  // Eigenvalue in the raw units of the simulate/ models and the finite-n maps.
  double raw_eigenvalue(double eigenvalue) const;
  double user_eigenvalue(double raw) const;
  EdgeMap map(double spike) const;
  // The spike whose map gives w (w = +inf: no spike).
  double spike_for_w(double w) const;
};

// Where a spike's law sits: "subcritical" (w > 3: the law is close to the unspiked one and a
// spike of this size is hard to detect), "critical window" (|w| <= 3), "supercritical"
// (w < -3: a separated outlier). The cut at 3 is a convention of this tool.
std::string regime_of(double w);

struct EdgeCoordinates {
  double x = 0, w = 0;
};
EdgeCoordinates edge_coordinates(const SpikedModel& m, double eigenvalue, double spike);

struct PValue {
  double eigenvalue = 0, spike = 0;
  EdgeCoordinates at;
  Estimate p_value;  // P(lambda_max >= observed | spike), upper tail
};
PValue p_value(const SpikedModel& m, const EdgeLaw& law, double eigenvalue, double spike);

struct CriticalValue {
  double alpha = 0, spike = 0, w = 0;
  Estimate x;           // upper alpha quantile of F(.; w)
  Estimate eigenvalue;  // in the user's units
};
CriticalValue critical_value(const SpikedModel& m, const EdgeLaw& law, double alpha, double spike);

struct Power {
  CriticalValue critical;
  double alternative = 0;
  EdgeCoordinates at;  // the critical eigenvalue in the alternative's coordinates
  Estimate power;      // P(lambda_max > critical | alternative)
};
Power power(const SpikedModel& m, const EdgeLaw& law, double alpha, double spike, double alternative);

struct SpikeInterval {
  double level = 0;  // 1 - alpha
  double eigenvalue = 0;
  double lower = 0, upper = 0;          // spike values (user units)
  double lower_error = 0, upper_error = 0;
  double lower_w = 0, upper_w = 0;
  // The lower end is the no-spike value: no spike is consistent with the data.
  bool lower_is_no_spike = false;
  // The upper end ran into the edge of the region the law was computed on: the interval is
  // one-sided there ("at least as large as" does not apply; the data allow larger spikes).
  bool upper_open = false;
};
// Two-sided interval {spike : alpha/2 <= P(lambda_max >= observed | spike) <= 1 - alpha/2},
// by inverting the test (F is monotone in w).
SpikeInterval spike_interval(const SpikedModel& m, const EdgeLaw& law, double eigenvalue, double alpha);

// The smallest w the questions about these spikes need (floored at w_floor, whose w is the
// most extreme spike a law region covers).
double needed_w_min(const SpikedModel& m, const std::vector<double>& spikes, double w_floor);

// Exact-in-law finite-n p-value for Gaussian data by simulating the model under the spike:
// (1 + #{lambda_i >= observed}) / (N + 1), the usual Monte Carlo p-value (Davison and
// Hinkley 1997, section 4.2), with its binomial standard error.
struct SimulatedPValue {
  long samples = 0;
  std::uint64_t seed = 0;
  double p_value = 0, standard_error = 0;
  double seconds = 0;
};
SimulatedPValue simulated_p_value(const SpikedModel& m, double eigenvalue, double spike, long samples,
                                  std::uint64_t seed, int threads);

// Raw top eigenvalues of the model under a spike (covariance: of X^T X with unit noise;
// signal: of the Hermite matrix), for the simulate command and the finite-n checks.
std::vector<double> simulate_raw_eigenvalues(const SpikedModel& m, double spike, long samples, std::uint64_t seed,
                                             int threads);

}  // namespace edgelaw
