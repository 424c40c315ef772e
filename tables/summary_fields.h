// What the reader and the writer share: the solve-summary attributes and number formatting.
#pragma once

#include <cstdio>
#include <string>
#include <utility>

#include "solver/solver.h"

namespace edgelaw {

// Scalar fields of SolveSummary stored as file attributes, in one list so that writer and
// reader cannot drift apart.
inline constexpr std::pair<const char*, double SolveSummary::*> kSummaryScalars[] = {
    {"solve_x_low", &SolveSummary::x_low},
    {"solve_x_high", &SolveSummary::x_high},
    {"solve_time_tolerance", &SolveSummary::time_tolerance},
    {"solve_observed_order", &SolveSummary::observed_order},
    {"solve_nominal_order", &SolveSummary::nominal_order},
    {"solve_max_cdf_error", &SolveSummary::max_cdf_error},
    {"solve_max_survival_error", &SolveSummary::max_survival_error},
    {"solve_max_tail_relative_error", &SolveSummary::max_tail_relative_error},
    {"solve_max_time_error", &SolveSummary::max_time_error},
    {"solve_wall_seconds", &SolveSummary::wall_seconds}};

// A number for an error message: ten significant digits.
inline std::string format_number(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.10g", v);
  return buf;
}

}  // namespace edgelaw
