// Finite-n maps from the spiked models of simulate/simulate.h to the edge law's (x, w).
#pragma once

namespace edgelaw {

// Affine edge coordinates of a finite-n model: x = (lambda - center) / scale, and the boundary
// parameter w of the spike (w = +inf for no spike / a subcritical spike that maps there).
struct EdgeMap {
  double center;
  double scale;
  double w;
};

// Spiked Gaussian beta-Hermite model of simulate/simulate.h (HermiteSpikeModel): raw lambda_max,
// spike theta (critical theta = 1; theta <= 0 is no spike).
EdgeMap hermite_edge_map(double beta, long n, double theta);
// Spiked covariance: n samples, p variables, S = X^T X (not divided by n), noise variance 1,
// population spike ell >= 1 (1 = no spike) in units of the noise variance.
EdgeMap covariance_edge_map(double beta, long n, long p, double ell);
// Inverses in the spike at fixed n (and p): the spike whose map gives this w (decreasing in
// the spike); w = +inf gives the no-spike value. Throw std::invalid_argument on bad arguments.
double hermite_spike_for_w(double beta, long n, double w);
double covariance_spike_for_w(double beta, long n, long p, double w);

}  // namespace edgelaw
