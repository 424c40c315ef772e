// Up-front memory estimate of a solve or a sweep: a request over the budget is refused before
// any work starts, with the estimate in the message (exit code kOverBudget).
#pragma once

#include <cstddef>
#include <stdexcept>
#include <string>

namespace edgelaw {

struct OverBudgetError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// Default of --max-memory (MiB).
inline constexpr double kDefaultMemoryBudgetMiB = 4096;

// Peak bytes of solving one beta on `entries` (x, w) points with up to max_levels grid levels:
// every level keeps cdf, survival and density, the result adds six tables and the writer two
// log tables (8 bytes each). Measured check: the default table (435 842 entries, 3 of 5
// levels used) peaks at 54 MiB RSS (BENCHMARKS.md); this estimate gives 80 MiB.
double solve_bytes(double entries, int max_levels);

// Throws UsageError for a budget that is not a positive number, and OverBudgetError when
// `concurrent` solves at once plus assembling `assembled` betas into one sweep file
// (0: no sweep) would need more than budget_mib. `what` names the request in the message.
void check_memory_budget(const std::string& what, double entries, int max_levels, std::size_t concurrent,
                         std::size_t assembled, double budget_mib);

}  // namespace edgelaw
