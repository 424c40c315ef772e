// Independent reference values of the Tracy-Widom laws and the rank-one spiked beta = 2 law by
// Fredholm determinants (Bornemann's Gauss-Legendre method, Math. Comp. 79 (2010)).
//
// Achieved accuracy (check_fredholm.py: 25 points against mpmath at 40-75 digits with its own
// Gauss-Legendre rule and, for F_2 and the spiked law, the Christoffel-Darboux kernel):
//   absolute error on cdf and survival, all points:                    <= 1.1e-16
//   relative error of the small tail, TW_1/TW_2 (cdf ~1e-21..1e-24 left, survival ~1e-20 right):
//                                                                        <= 5e-17
//   TW_4 (cdf 4e-21 at x = -6.9, survival 2.5e-20 at x = 5.3):          <= 1.7e-14
//   spiked, w in {-3, 0, 2, 5}, cdf ~1e-21 left and survival ~1e-21 right: <= 9e-13
//   (worst: survival at w = 5, x = 10; all others <= 1.5e-15). mpmath run: about 9 minutes.
//   moments (reference_test): TW_1, TW_2, TW_4 mean and variance within 2e-12 of Bornemann (2010);
//   TW_2 quantiles within 1e-13 of design.md (observed <= 5e-17).
// Long double path vs __float128 path: relative <= 5e-13 where the long double path is used.
// Cost: 0.3-2 ms per evaluation (long double path: s >= -5.5, with s = x, or 2^{2/3} x for beta 4,
// and for the spiked law also 1 - <(I - K)^{-1} s_w, Ai> >= 1e-4); 30-90 ms on the __float128
// path (deep left tails; strongly supercritical spikes below their bulk, e.g. w = -3, x < ~1).
// Domain checked: x from the cdf = 1e-20 point to the survival = 1e-20 point, w in [-3, 5] and
// w >= 5 up to 1e3 (w -> inf tested; w = 60, 150, 300 at x = -2.5 agree within 1e-14 with an
// independent scipy evaluation: scipy.integrate.quad for s_w, numpy Gauss-Legendre with 80 and 100
// nodes); w < -3 is not validated (s_w grows like e^{|w| u}).
#pragma once

namespace edgelaw::reference {

// cdf = P(X <= x) and survival = P(X > x), each computed without cancellation (survival is
// never formed as 1 - cdf where cdf is near 1).
struct Probability {
  double cdf;
  double survival;
};

// Tracy-Widom law, beta in {1, 2, 4}. beta = 4 in the stochastic-Airy-operator normalisation:
// TW_4(x) = F_4^{TW}(2^{1/6} x), F_4^{TW} the Tracy-Widom (1996) GSE law (design.md 1 and 4).
Probability tracy_widom(int beta, double x);

// Rank-one spiked beta = 2 law (Baik, Ben Arous, Peche 2005) in design.md section 1 form:
// F_2(x; w) = F_2(x) (1 - <(I - K_Ai)^{-1} s_w, Ai>_{L^2(x, inf)}); w = +inf gives TW_2.
Probability spiked_beta2(double x, double w);

// Inverse of the Tracy-Widom cdf, probability in (0, 1), to about 1e-13 in x.
double tracy_widom_quantile(int beta, double probability);

}  // namespace edgelaw::reference
