// Monte Carlo of finite-n spiked beta-ensembles: samples of the top eigenvalue, and its numerics.
//
// Two models, both from Dumitriu and Edelman, "Matrix models for beta ensembles",
// J. Math. Phys. 43 (2002), reduced to tridiagonal form so that one sample costs O(n) random
// variates and O(n) per bisection step instead of a dense O(n^3) eigensolve:
//
//  * Spiked Gaussian beta-Hermite ensemble: diagonal N(0, 2)/sqrt(beta) plus theta sqrt(n) at
//    entry (1,1), off-diagonals chi_{beta(n-k)}/sqrt(beta), k = 1..n-1. For beta = 1 (2) this is
//    the Householder tridiagonal form of a GOE (GUE) matrix with E|H_ij|^2 = 1 off the diagonal
//    and the spike theta sqrt(n) e1 e1^T; its bulk fills [-2 sqrt n, 2 sqrt n] and the spike
//    separates from it when theta > 1. Edge statistic x = n^{1/6} (lambda_max - 2 sqrt n).
//
//  * Spiked beta-Laguerre (sample covariance): n samples of p variables with population
//    covariance diag(ell, 1, ..., 1), S = X^T X (not divided by n). Golub-Kahan
//    bidiagonalization of X (left reflection first) gives S = V B^T B V^*, with B upper
//    bidiagonal, a_k = chi_{beta(n-k+1)}/sqrt(beta), b_k = chi_{beta(p-k)}/sqrt(beta): the first
//    left reflection only sees column 1, whose norm carries the factor sqrt(ell); every later
//    reflection acts on columns 2..p, which have identity covariance. So the spike multiplies
//    a_1 by sqrt(ell) and nothing else (checked against dense real and complex X in the tests).
//
// Truncation. The top eigenvector of both models lives in the first O(n^{1/3}) coordinates
// (Airy decay beyond), so each sample draws only the leading k = min(m, 10 n^{1/3} + 50) rows (deeper for beta < 1.9),
// computes the top eigenvalue mu of that leading block and accepts it only if the block's top
// eigenvector u has |u_k| / ||u|| <= 1e-8 (its residual in the full matrix is then
// <= 1e-8 |e_k|, and the eigenvalue error is second order in it; see sample.cpp). Otherwise it
// doubles k, drawing the next rows from the same stream. Rows are drawn in order from a
// per-sample stream, so a truncated sample is the leading-block eigenvalue of exactly the
// matrix the untruncated path would use (SampleOptions::truncate = false).
#pragma once

#include <cstdint>
#include <span>
#include <vector>

#include "simulate/empirical.h"

namespace edgelaw {

// Spiked Gaussian beta-Hermite ensemble (critical spike theta = 1).
struct HermiteSpikeModel {
  double beta = 2.0;
  long n = 100;        // matrix size, >= 2
  double theta = 0.0;  // spike theta sqrt(n) added at entry (1,1); any finite value
};

// Spiked beta-Laguerre (Wishart) ensemble (critical spike ell = 1 + sqrt(p/n)).
struct LaguerreSpikeModel {
  double beta = 1.0;
  long n = 100;      // samples, >= 1
  long p = 25;       // variables, >= 1
  double ell = 1.0;  // population variance of the first variable, > 0 (1 = no spike)
};

struct SampleOptions {
  long count = 0;           // number of samples, >= 0
  std::uint64_t seed = 0;   // sample i uses a stream derived from (seed, i) only
  int threads = 0;          // 0 = all cores; results do not depend on it
  bool truncate = true;     // false: always use the whole matrix (for checking the shortcut)
};

// Raw largest eigenvalue lambda_max of the spiked Hermite matrix, `count` samples.
std::vector<double> sample_top_eigenvalue(const HermiteSpikeModel& model, const SampleOptions& options);
// Raw largest eigenvalue lambda_1 of S = X^T X, `count` samples.
std::vector<double> sample_top_eigenvalue(const LaguerreSpikeModel& model, const SampleOptions& options);

// Edge statistic of the Hermite model, x = n^{1/6} (lambda_max - 2 sqrt n).
double hermite_edge_statistic(const HermiteSpikeModel& model, double lambda_max);

// Largest eigenvalue of the symmetric tridiagonal matrix with diagonal `diag` (size m >= 1) and
// off-diagonal `offdiag` (size m - 1), by Sturm-sequence multisection with LAPACK-style safe
// pivots, to about 4 ulps of the result (or the underflow threshold if it is ~0).
double largest_eigenvalue_tridiagonal(std::span<const double> diag, std::span<const double> offdiag);

// Largest eigenvalue of B^T B (= squared largest singular value of B) for the upper bidiagonal
// B with diagonal `diag` (size m >= 1) and superdiagonal `superdiag` of size m - 1 (B square) or
// m (B is m x (m+1), the p > n case of the Laguerre model).
double largest_eigenvalue_bidiagonal_gram(std::span<const double> diag, std::span<const double> superdiag);

}  // namespace edgelaw
