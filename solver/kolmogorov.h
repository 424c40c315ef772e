// The backward Kolmogorov operator of the Riccati diffusion in the angle theta, discretised on a grid.
//
// With p = f'/f the eigenvalue equation of the stochastic Airy operator becomes
// dp = (t - p^2) dt + (2/sqrt(beta)) dB, and F(x, w) = P(started at t = x from p = w, p never
// explodes). In theta = arccot(p), Ito's formula gives the backward equation
//     dF/dx = -( a(x, theta) dF/dtheta + D(theta) d^2F/dtheta^2 ),
//     a = cos^2 - x sin^2 + (4/beta) sin^3 cos,   D = (2/beta) sin^4,
// integrated from large x down. Node 0 (theta = 0) needs no boundary condition (drift +1, no
// diffusion); node N (theta = pi, explosion) carries a fixed value: 0 for the cdf, 1 for the survival.
#pragma once

#include <sundials/sundials_matrix.h>

#include <vector>

#include "grids/angle_grid.h"

namespace edgelaw {

class KolmogorovOperator {
 public:
  KolmogorovOperator(double beta, const AngleGrid& grid);

  int unknowns() const { return grid_.intervals(); }  // nodes 0..N-1; node N is fixed
  // Band of the Jacobian: the sixth-order stencils reach 6 nodes below (second derivative
  // shifted at the last node) and 7 above (shifted at node 0).
  static constexpr int kLowerBand = 6;
  static constexpr int kUpperBand = 7;

  // du = dF/dx at the unknowns for the state u (size N) with the Dirichlet value at node N.
  void rhs(double x, const double* u, double boundary, double* du) const;
  // The exact (banded) Jacobian d(du)/du at x; independent of u and of the boundary value.
  void jacobian(double x, SUNMatrix band) const;

  const AngleGrid& grid() const { return grid_; }

  // Share of the "plus" (larger-theta) biased stencil at drift a: 1 for a >> 0, 0 for a << 0.
  static double upwind_share(double a);
  static constexpr double kBlendWidth = 0.25;

 private:
  const AngleGrid& grid_;
  // Per node: cos^2, sin^2, (4/beta) sin^3 cos and the diffusion; a(x) = c - x s + e.
  std::vector<double> cos2_, sin2_, extra_, diffusion_;
};

}  // namespace edgelaw
