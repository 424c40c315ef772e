// Time-budget estimates (see time_budget.h).
#include "solver/time_budget.h"

#include <algorithm>
#include <cmath>

namespace edgelaw {

namespace {
// A-priori cost of level l: kSecondsPerNodeStep * N_l * (x_high - x_low) *
// kStepsPerUnitX * kLevelGrowth^l, i.e. per level the work grows like N (doubled) times the
// steps (measured 1.1 to 2.1x per level). Calibrated on this machine (Debian 12, 2 cores, quiet,
// 2026-12-02, one run per grid, moments off) from the default tables for beta = 1, 2, 4,
// beta = 2 at w = -4 and beta = 1 at w = -8: 2.1e-7 to 3.1e-7 s per node and step, 110 to 170
// steps per unit x on the coarsest level, level time ratios 2.2 to 3.5. The constants are the
// low ends, so the a-priori estimate is low by a factor ~2 (default beta = 2 table: 0.57 s for
// 1.2 s wall with the finest grid beside the others, 0.94 s for 1.9 s in turn) and refuses
// only requests that surely miss the budget; the projection from measured levels does the rest.
constexpr double kSecondsPerNodeStep = 2.1e-7;
constexpr double kStepsPerUnitX = 110;
constexpr double kLevelGrowth = 2.2;

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
// measured growth (until two levels exist, kLevelGrowth: the measured first ratios were 2.2 to
// 2.7, and later ones up to 3.5, so this projection can be low by up to 1.6x per level).
double projected_seconds(std::span<const double> done, int next, int min_levels) {
  const double last = done.back();
  double growth = kLevelGrowth;
  if (done.size() >= 2) growth = std::clamp(last / done[done.size() - 2], 1.5, 8.0);
  double total = 0, cost = last;
  for (int l = next; l < std::max(next + 1, min_levels); ++l) total += (cost *= growth);
  return total;
}

}  // namespace edgelaw
