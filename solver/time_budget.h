// Wall-time budget of a solve (SolverOptions::max_seconds): an a-priori estimate from the plan,
// and a projection from the levels already solved.
#pragma once

#include <span>

#include "solver/plan.h"

namespace edgelaw {

// Low-biased estimate of the first `levels` grid levels, so only requests that surely miss the
// budget are refused before any work (constants and their measured spread in time_budget.cpp).
// top_in_parallel: the last of these levels runs beside the others (SolverOptions::parallel_levels).
double a_priori_seconds(const Plan& plan, int levels, bool top_in_parallel = false);

// Before level `next` (>= 1), given the measured wall times of levels 0..next-1: the time of the
// levels that must still run (this one, and all up to min_levels - 1).
double projected_seconds(std::span<const double> done, int next, int min_levels);

}  // namespace edgelaw
