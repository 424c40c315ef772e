// Double-precision Fredholm-determinant evaluation of the spiked beta = 2 law, the competitor
// edgelaw is timed against (bench/fredholm_table_bench.cpp).
//
// Method: Bornemann, "On the numerical evaluation of Fredholm determinants", Math. Comp. 79
// (2010): Nystrom discretisation by an m-point Gauss-Legendre rule on a truncated half line,
// applied to the rank-one spiked formula of Baik, Ben Arous, Peche, Ann. Probab. 33 (2005)
//   F_2(x; w) = F_2(x) (1 - <(I - K_Ai)^{-1} s_w, Ai>_{L^2(x, inf)}),   K_Ai = B_x^2,
// with B_x(u, v) = Ai(x + u + v) on L^2(0, inf) (the same formulas as tests/reference, which
// works in long double / __float128; this one is plain double with Eigen's Cholesky, tuned for
// speed at a given absolute accuracy).
#pragma once

#include <vector>

#include "solver/solver.h"

namespace edgelaw::bench {

// Ai(z) from a cached table of (Ai, Ai') at spacing 1/64 (filled once by Boost.Math) and a
// short Taylor series of y'' = z y from the nearest table point. Relative error ~1e-15 on the
// table range (tests/bench_fredholm_test.cpp checks 1e-13); 0 above it (Ai(100) ~ 1e-290).
class AiryTable {
 public:
  AiryTable();
  double operator()(double z) const;
  static constexpr double kLow = -40.0, kHigh = 100.0;

 private:
  std::vector<double> ai_, aip_;
};

// How many nodes and how long a truncated half line a point needs for absolute error
// <= target (node rule calibrated against tests/reference, see fredholm_beta2.cpp).
struct QuadraturePlan {
  int nodes = 0;
  double length = 0;
};
QuadraturePlan plan_for(double x, double growth, double target);

// One point with a given quadrature (for calibrating the node rule and for smoke tests).
struct PointValue {
  double cdf, survival;
};
PointValue fredholm_point(double x, double w, const QuadraturePlan& plan, double target);
PointValue fredholm_point(double x, double w, double target);
// Growth rate e^{g u} of s_w that the truncation of the half line must absorb.
double growth_of(double w);

struct FredholmResult {
  RowMatrix cdf, survival;      // (w.size(), x.size()), like edgelaw's LawTable
  long factorisations = 0;      // Cholesky factorisations of I - K
  double mean_nodes = 0;        // average quadrature size per factorisation
};

// The whole table. share_per_x: one factorisation of I - K per x and per group of w that
// needs the same truncation (K_Ai does not depend on w); otherwise one per (x, w) point.
// threads > 1 splits the x values among threads.
FredholmResult fredholm_table(const std::vector<double>& x, const std::vector<double>& w, double target,
                              bool share_per_x, int threads);

}  // namespace edgelaw::bench
