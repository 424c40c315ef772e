// Time-budget estimates (see time_budget.h).
#include "solver/time_budget.h"

#include <algorithm>
#include <cmath>

namespace edgelaw {

namespace {
// A-priori cost of level l: kSecondsPerNodeStep * N_l * (x_high - x_low) *
// kStepsPerUnitX * kLevelGrowth^l, i.e. per level the work grows like N (doubled) times the
// steps (measured 1.1 to 2.5x per level). Calibrated on this machine (Debian 12, 2 cores,
// BENCHMARKS.md) from the default beta = 2 table, beta = 2 at w = -4 and beta = 1 at w = -8:
// 2.6e-7 to 3.8e-7 s per node and step, 230 to 330 steps per unit x on the coarsest level, level
// ratios 1.9 to 4.2. The constants are the low ends, so the a-priori estimate is low by a factor
// 1.7 (default table: 2.6 s for 4.5 s) to 4 (w = -12: 7.8 s for 33 s) and refuses only requests
// that surely miss the budget; the projection from measured levels (below) does the rest.
constexpr double kSecondsPerNodeStep = 2.6e-7;
constexpr double kStepsPerUnitX = 200;
constexpr double kLevelGrowth = 2.5;

}  // namespace

double a_priori_seconds(const Plan& plan, int levels, bool top_in_parallel) {
  double rest = 0, top = 0;
  for (int l = 0; l < levels; ++l) {
    const double cost = kSecondsPerNodeStep * plan.base_intervals * (plan.x_high - plan.x_low) * kStepsPerUnitX *
                        std::pow(kLevelGrowth, l);
    (l + 1 == levels ? top : rest) += cost;
  }
  return top_in_parallel && levels >= 2 ? std::max(top, rest) : top + rest;
}

// Before level `next`: the projected finish of the levels that must still run (at least this
// one; all up to min_levels) from the measured times, each level costing the last one times the
// measured growth (until two levels exist, kLevelGrowth: the measured first ratios were 1.9, 2.4
// and 4.2, so this projection can be low by up to 1.7x per level).
double projected_seconds(std::span<const double> done, int next, int min_levels) {
  const double last = done.back();
  double growth = kLevelGrowth;
  if (done.size() >= 2) growth = std::clamp(last / done[done.size() - 2], 1.5, 8.0);
  double total = 0, cost = last;
  for (int l = next; l < std::max(next + 1, min_levels); ++l) total += (cost *= growth);
  return total;
}

}  // namespace edgelaw
