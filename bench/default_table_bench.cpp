// Times the full solve of the default table (beta = 2, x in [-10, 8] step 0.01, w in [-6, 6]
// step 0.05 plus +inf) at the accuracy targets given on the command line, and prints one
// Markdown table row per target: wall time, CPU time, entries, max errors, peak memory, grids.
#include <sys/resource.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <string>

#include "solver/solver.h"

int main(int argc, char** argv) {
  using namespace edgelaw;
  LawRequest r;
  r.beta = 2;
  for (int i = 0; i <= 1800; ++i) r.x.push_back(-10 + 0.01 * i);
  for (int i = 0; i <= 240; ++i) r.w.push_back(-6 + 0.05 * i);
  r.w.push_back(kInf);
  std::printf("| target | wall s | CPU s | entries | max cdf error | max survival error | grids | steps (finest) | peak RSS MiB | converged |\n");
  std::printf("|---|---|---|---|---|---|---|---|---|---|\n");
  for (int a = 1; a < argc; ++a) {
    SolverOptions o;
    o.target_error = std::atof(argv[a]);
    o.moments = true;
    const std::clock_t c0 = std::clock();
    const auto t0 = std::chrono::steady_clock::now();
    LawTable t;
    try {
      t = solve_law(r, o);
    } catch (const SolveError& e) {
      std::printf("| %s | failed: %s |\n", argv[a], e.what());
      continue;
    }
    const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    const double cpu = double(std::clock() - c0) / CLOCKS_PER_SEC;
    rusage u{};
    getrusage(RUSAGE_SELF, &u);
    std::string grids;
    for (int n : t.summary.intervals) grids += (grids.empty() ? "" : "/") + std::to_string(n);
    std::printf("| %s | %.1f | %.1f | %zu | %.2e | %.2e | %s | %ld | %.0f | %s |\n", argv[a], wall, cpu,
                r.x.size() * r.w.size(), t.summary.max_cdf_error, t.summary.max_survival_error, grids.c_str(),
                t.summary.steps.back(), u.ru_maxrss / 1024.0, t.summary.converged ? "yes" : "no");
    std::fflush(stdout);
  }
}
