// How a solve is laid out for a given beta and request: x range, grids and tolerances.
#pragma once

#include "solver/solver.h"

namespace edgelaw {

struct Plan {
  double x_low = 0, x_high = 0;   // integration from x_high (terminal data) down to x_low
  int base_intervals = 0;         // theta intervals on the coarsest level
  // CVODE error control (see BackwardProblem): bulk absolute, tail relative, floor.
  // On the coarsest level; each finer level divides them by 16, but never above the caps,
  // which keep the integrator's share of the estimate (time_error_factor times the
  // tolerance) at a quarter of what the request needs on every level.
  double bulk_tolerance = 1e-10;
  double tail_relative = 1e-6;
  double floor = 1e-30;
  double bulk_cap = 1e-10;
  double tail_relative_cap = 1e-6;
  // The run switches from the survival S to the cdf F = 1 - S once S is at least this at every
  // node (BackwardProblem::complement_above). From there S = 1 - F has the absolute accuracy of
  // F, which is a relative accuracy of bulk / complement_above: the switch sits where the
  // survival's own error control had already become absolute (tail_relative * S >= bulk).
  double complement_above = 0.5;
  double bulk_tolerance_at(int level) const;
  double tail_relative_at(int level) const;
  // Global time error relative to the local tolerances, and the level below which BDF's
  // global error does not fall however tight the tolerance (measured: up to 3.4e-11 in
  // cdf + survival - 1 on beta = 2). Measured on the beta = 2 test table (x in [-5, 6],
  // w in [-3, +inf]) against the Fredholm values, with the sixth-order grids 200/400/800 so
  // fine that the integrator dominates: 470 at tolerance 9.8e-13 (error 4.6e-10) and 490 at
  // 3.9e-13 (1.9e-10), largest in the survival at w = +inf; taken twice larger.
  // (With the fourth-order scheme the tolerances of the finer levels were so small that a
  // factor 64 sufficed.)
  double time_error_factor = 1024;
  double time_error_floor = 4e-11;
  double beta = 2;
  // Nodes per radian (relative): uniform plus a share that follows the width of the front
  // near the unstable branch for every x in [0, front_until].
  double front_weight = 4.0;
  double front_until = 8.0;
  double grid_density(double theta) const;
  // A rough location of the law for row w, so moments are accumulated without cancellation.
  double moment_centre(double w) const;
};

Plan make_plan(const LawRequest& request, const SolverOptions& options);

}  // namespace edgelaw
