// How a solve is laid out for a given beta and request: x range, grids and tolerances.
#pragma once

#include "solver/solver.h"

namespace edgelaw {

struct Plan {
  double x_low = 0, x_high = 0;   // integration from x_high (terminal data) down to x_low
  int base_intervals = 0;         // theta intervals on the coarsest level
  // CVODE error control (see BackwardProblem): bulk absolute, tail relative, floor.
  // On the coarsest level; each finer level divides them by 16.
  double bulk_tolerance = 1e-10;
  double tail_relative = 1e-6;
  double floor = 1e-30;
  // Global time error relative to the local tolerances (measured: up to ~40 on beta = 2),
  // and the level below which BDF's global error does not fall however tight the tolerance
  // (measured: up to 3.4e-11 in cdf + survival - 1 on beta = 2).
  double time_error_factor = 64;
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
