// Finite-n maps from the spiked Hermite and covariance models to the edge law's coordinates (x, w).
//
// Derivation (stats/FINITE_N.md has the details and the measured accuracy); h = n^{-1/3}.
//
// 1. The Sturm (Riccati) recursion of the Hermite tridiagonal matrix near its edge, with
//    h = n^{-1/3}, r_k = b_k f_{k+1} / (sqrt(n) f_k) = 1 + h q_k, reads exactly
//        q_k = q_{k-1} / (1 + h q_{k-1}) + h (x + t_{k-1} / (1 + h q_{k-1})) + noise,
//    i.e. the exact time-h flow of dq = -q^2 dt followed by the forcing. Read as a Strang
//    splitting of dq = (t + x - q^2) dt + (2/sqrt(beta)) dB started half a flow step in, the
//    spike theta (row 1 gives q_1 = (1 - theta)/h + ...) becomes the continuum boundary value
//        w = n^{1/3} g(theta),  g(theta) = 2 (1 - theta) / (1 + theta)        (theta <= 1).
//    It agrees with the leading map n^{1/3} (1 - theta) and with -n^{1/3} ln(theta) to second
//    order at theta = 1, and unlike them it is right at theta -> 0, where the no-spike edge sits
//    at w = 2 n^{1/3}, i.e. half a lattice step in (F(x; w) ~ TW(x - 1/w) for large w).
// 2. Supercritical side: matching the exact outlier location sqrt(n) (theta + 1/theta) to the
//    law's centre w^2 gives g(theta) = (1 - theta) / sqrt(theta) (theta > 1). Both forms agree at
//    theta = 1 to second order (g, g', g'' = 0, -1, 1), so the map is C^2.
// 3. The noise adds a constant O(n^{-1/3}) shift of x. Heuristic derivation: the recursion's
//    off-diagonal noise enters with the state-dependent weight 1/r_{k-1} = 1 - h q + ...; the
//    change of variable that makes the noise additive leaves an Ito drift h/beta, the same as
//    replacing n by N = n - 1/beta in the centering (for no spike this gives 2 sqrt(n - 1/2) for
//    beta = 1 and 2 sqrt(n) for beta = 2, in line with the finite-n centerings of the Gaussian
//    ensembles in Johnstone and Ma (2012), from memory). Confirmed by simulation for beta in
//    {0.5, 1, 2, 4}, where it removes most of the remaining error for w >= 0.
// 4. Covariance: with c = P/N the outlier N ell (1 + c/(ell - 1)) equals the edge
//    N (1 + sqrt c)^2 plus N sqrt(c) (theta + 1/theta - 2) for theta = (ell - 1)/sqrt(c): the
//    Hermite structure, with n^{1/3} replaced by kappa = N^{1/3} c^{1/3} (1 + sqrt c)^{-2/3}
//    (the design's leading map is kappa (1 - theta)). Centre and scale are Johnstone's (2001)
//    mu = (sqrt N + sqrt P)^2, sigma = (sqrt N + sqrt P)(1/sqrt N + 1/sqrt P)^{1/3} with
//    N = n - 1/beta, P = p - 1/beta (for beta = 1 Ma's (2012) n - 1/2, p - 1/2 once the no-spike
//    half step below is included; from memory).
// 5. Supercritical width: the exact outlier variance is (2/beta)(1 - theta^{-2}) (Hermite; times
//    N ell^2 for covariance), smaller than the law's 4|w|/beta by the factor
//    v = (1 + theta)/(2 theta^{3/2}) = 1 - |w| n^{-1/3} + ... (covariance: v (ell/(1 + sqrt c))^2).
//    It comes from the off-diagonal noise coupling neighbouring rows: the eigenvalue variance is
//    (2/beta)(sum u_k^4 + sum u_k^2 u_{k+1}^2) = continuum - (h/beta) u(0)^4, a noise deficit at the
//    boundary. For theta > 1 the scale is multiplied by sqrt(v), pivoting about the outlier place
//    x = w^2 so that the location match of step 2 is kept.
// No spike (theta <= 0, ell <= 1) returns w = +inf with the centre moved by scale/w_s, w_s the
// value g would give: F(x; w_s) = TW(x - 1/w_s) + O(w_s^{-3}) (measured sup difference 8e-5 at
// w_s = 15.9, 4e-4 at 8.9), and it keeps table users on the exact Tracy-Widom row.
// Checked noise-free (beta = inf: deterministic matrices against the Airy root of
// Ai'(x) = w Ai(x), error O(n^{-2/3})) and by simulation for beta in {0.5, 1, 2, 4}: the
// Kolmogorov distance to F_beta(x; w) is <= 0.016 at n = 500 for w in [-3, 3] (FINITE_N.md).
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
// spike theta (theta <= 0 allowed and maps to w = +inf; critical theta = 1). Needs n - 1/beta >= 1.
EdgeMap hermite_edge_map(double beta, long n, double theta);
// Spiked covariance: n samples, p variables, S = X^T X (NOT divided by n), noise variance 1,
// population spike ell > 0 (ell <= 1: no spike, w = +inf) in units of the noise variance;
// beta = 1 real, 2 complex, any beta > 0 for beta-Laguerre. Needs n - 1/beta >= 1, p - 1/beta >= 1.
EdgeMap covariance_edge_map(double beta, long n, long p, double ell);

// Inverses in the spike at fixed n (and p): the spike whose map gives this w (non-increasing in
// w). w = +inf, and any w >= 2 kappa (beyond what a positive spike reaches at this n; such laws
// are the unspiked one to O(1/n)), map to theta = 0 / ell = 1. Throw std::invalid_argument on bad
// arguments (NaN w, beta <= 0, n or p too small).
double hermite_spike_for_w(double beta, long n, double w);
double covariance_spike_for_w(double beta, long n, long p, double w);

// Other maps, kept for comparison in tests and the accuracy program (bench/finite_n_accuracy).
namespace edge_map_candidates {
// design.md section 3: centre 2 sqrt(n), scale n^{-1/6}, w = n^{1/3} (1 - theta); covariance
// with Johnstone's mu, sigma (plain n, p) and w = kappa (1 - theta).
EdgeMap hermite_leading(long n, double theta);
EdgeMap covariance_leading(long n, long p, double ell);
// w = -n^{1/3} ln(theta) (w = +inf for theta <= 0), plain centering.
EdgeMap hermite_exponential(long n, double theta);
EdgeMap covariance_exponential(long n, long p, double ell);
// The chosen map without the noise shift (steps 1, 2, 4 with N = n, P = p): exact as beta -> inf.
EdgeMap hermite_noise_free(long n, double theta);
EdgeMap covariance_noise_free(long n, long p, double ell);
// The chosen map without the supercritical scale correction (steps 1 to 4, no step 5).
EdgeMap hermite_shifted(double beta, long n, double theta);
EdgeMap covariance_shifted(double beta, long n, long p, double ell);
}  // namespace edge_map_candidates

}  // namespace edgelaw
