// Memory estimate and budget check for solves and sweeps (see budget.h).
#include "cli/budget.h"

#include <cmath>
#include <cstdio>

#include "cli/commands.h"

namespace edgelaw {

double solve_bytes(double entries, int max_levels) { return entries * 8.0 * (3.0 * max_levels + 8.0); }

void check_memory_budget(const std::string& what, double entries, int max_levels, std::size_t concurrent,
                         std::size_t assembled, double budget_mib) {
  if (!(budget_mib > 0) || !std::isfinite(budget_mib))
    throw UsageError("--max-memory must be a positive number of MiB, got " + format_double(budget_mib));
  const double mib = 1024.0 * 1024.0;
  const double solving = static_cast<double>(concurrent) * solve_bytes(entries, max_levels);
  // The sweep file is assembled from the slice files: six tables per beta held in memory,
  // one variable at a time copied into a contiguous buffer, and one slice being read.
  const double assembling =
      assembled > 0 ? entries * 8.0 * (7.0 * static_cast<double>(assembled) + 10.0) : 0.0;
  const double need = std::max(solving, assembling) / mib;
  if (need <= budget_mib) return;
  char text[512];
  std::snprintf(text, sizeof text,
                "%s needs about %.3g MiB (%.3g table entries per beta, up to %d grid levels, %zu solve%s at once%s), "
                "over the memory budget of %.3g MiB; use a coarser grid or raise --max-memory",
                what.c_str(), need, entries, max_levels, concurrent, concurrent == 1 ? "" : "s",
                assembled > 0 ? (", " + std::to_string(assembled) + " betas in the file").c_str() : "", budget_mib);
  throw OverBudgetError(text);
}

}  // namespace edgelaw
