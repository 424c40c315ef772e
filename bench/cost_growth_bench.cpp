// Cost growth of one edgelaw grid level (the integration of solver.cpp's solve_level: survival,
// then cdf after the switch; on one thread): time, steps, right-hand sides, Jacobians, Newton iterations and peak memory as the
// angle grid is refined and as the x range widens. Each configuration runs in its own child
// process, so its peak RSS (getrusage) is its own. Prints Markdown tables for BENCHMARKS.md.
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <numbers>
#include <algorithm>
#include <ctime>
#include <sstream>
#include <string>
#include <vector>

#include "grids/angle_grid.h"
#include "solver/backward_run.h"
#include "solver/kolmogorov.h"
#include "solver/plan.h"
#include "solver/solver.h"

namespace {

using namespace edgelaw;

std::string load_average() {
  double a[3] = {NAN, NAN, NAN};
  if (FILE* f = std::fopen("/proc/loadavg", "r")) {
    if (std::fscanf(f, "%lf %lf %lf", &a[0], &a[1], &a[2]) != 3) a[0] = NAN;
    std::fclose(f);
  }
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.2f %.2f %.2f", a[0], a[1], a[2]);
  return buf;
}

// Terminal data of solver.cpp (escape law of the linearised unstable Ornstein-Uhlenbeck process
// near the unstable branch p = -sqrt(x)); repeated here because it is internal to the solver.
double terminal_survival(double beta, double x, double theta) {
  if (theta == 0.0) return 0.0;
  const double p = std::cos(theta) / std::sin(theta);
  const double z = std::sqrt(beta) * std::pow(x, 0.25) * (p + std::sqrt(x));
  return 0.5 * std::erfc(z / std::sqrt(2.0));
}

struct Result {
  int intervals = 0;
  double x_low = 0, x_high = 0;
  long outputs = 0;
  IntegratorCounters c;
  double wall = 0, cpu = 0, interpolation = 0, rss_mib = 0;
};

// One level: grid `intervals`, outputs at x in [x_min, 8] step 0.01 for the 242 default w.
Result run_level(int intervals, double x_min) {
  LawRequest req;
  req.beta = 2;
  for (double x = x_min; x <= 8.0 + 1e-9; x += 0.01) req.x.push_back(x);
  for (int i = 0; i <= 240; ++i) req.w.push_back(-6 + 0.05 * i);
  req.w.push_back(kInf);
  SolverOptions so;
  so.moments = false;
  const Plan plan = make_plan(req, so);
  // The solver's own schedule: level l = log2(intervals / base) gets Plan::bulk_tolerance_at(l),
  // the tolerance divided by 16 per halving of h but capped so the integrator's share stays at
  // a quarter of the target (1e-10 here, the solver's default); levels beyond the cap share it.
  const int level = std::max(0, static_cast<int>(std::lround(std::log2(double(intervals) / plan.base_intervals))));
  const std::clock_t c0 = std::clock();
  const auto t0 = std::chrono::steady_clock::now();
  const AngleGrid grid = AngleGrid::with_density(intervals, [&plan](double t) { return plan.grid_density(t); });
  const KolmogorovOperator op(req.beta, grid);
  const int n = op.unknowns();
  std::vector<PointWeights> weights;
  for (double w : req.w) weights.push_back(grid.point_weights(std::isinf(w) ? 0.0 : std::atan2(1.0, w)));
  BackwardProblem problem;
  problem.op = &op;
  problem.boundary = 1.0;  // the survival first, as in solve_level
  problem.complement_above = plan.complement_above;
  problem.left_tail_rate = req.beta / 24.0;
  problem.reference_node = std::min(grid.last_node_at_most(std::numbers::pi / 2), n - 1);
  problem.x_start = plan.x_high;
  problem.x_end = plan.x_low;
  problem.bulk_tolerance = plan.bulk_tolerance_at(level);
  problem.tail_relative = plan.tail_relative_at(level);
  problem.floor = plan.floor;
  problem.initial.resize(n);
  for (int i = 0; i < n; ++i) problem.initial[i] = terminal_survival(req.beta, plan.x_high, grid.theta(i));
  std::vector<double> outputs(req.x.rbegin(), req.x.rend());
  std::vector<double> table(req.w.size() * req.x.size());
  double interp = 0, checksum = 0;
  const OutputObserver record = [&](int index, double, const double* nodal, const double*, bool) {
    const auto s0 = std::chrono::steady_clock::now();
    for (std::size_t r = 0; r < weights.size(); ++r) {
      double v = 0;
      for (int k = 0; k < weights[r].size; ++k) v += weights[r].value[k] * nodal[weights[r].first + k];
      table[r * outputs.size() + index] = v;
    }
    interp += std::chrono::duration<double>(std::chrono::steady_clock::now() - s0).count();
  };
  Result res;
  res.c = integrate_backward(problem, outputs, record, StepObserver{});
  for (double v : table) checksum += v;
  res.wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  res.cpu = double(std::clock() - c0) / CLOCKS_PER_SEC;
  res.interpolation = interp;
  res.intervals = intervals;
  res.x_low = plan.x_low;
  res.x_high = plan.x_high;
  res.outputs = static_cast<long>(table.size());
  rusage u{};
  getrusage(RUSAGE_SELF, &u);
  res.rss_mib = u.ru_maxrss / 1024.0;
  if (!std::isfinite(checksum)) res.wall = NAN;
  return res;
}

// Runs the level in a child process and reads its result back through a pipe.
bool run_isolated(int intervals, double x_min, Result& out) {
  int fd[2];
  if (pipe(fd) != 0) return false;
  std::fflush(stdout);
  const pid_t pid = fork();
  if (pid == 0) {
    close(fd[0]);
    Result r;
    try {
      r = run_level(intervals, x_min);
    } catch (const std::exception& e) {
      std::fprintf(stderr, "cost_growth_bench: %s\n", e.what());
      _exit(70);
    }
    const ssize_t written = write(fd[1], &r, sizeof r);
    _exit(written == ssize_t(sizeof r) ? 0 : 71);
  }
  close(fd[1]);
  const ssize_t got = read(fd[0], &out, sizeof out);
  close(fd[0]);
  int status = 0;
  waitpid(pid, &status, 0);
  return got == ssize_t(sizeof out) && WIFEXITED(status) && WEXITSTATUS(status) == 0;
}

std::vector<double> parse_list(const char* s) {
  std::vector<double> v;
  std::stringstream in(s);
  std::string item;
  while (std::getline(in, item, ',')) v.push_back(std::stod(item));
  return v;
}

// Least-squares slope of log y against log x.
double slope(const std::vector<double>& x, const std::vector<double>& y) {
  double sx = 0, sy = 0, sxx = 0, sxy = 0;
  const double n = double(x.size());
  for (std::size_t i = 0; i < x.size(); ++i) {
    const double a = std::log(x[i]), b = std::log(y[i]);
    sx += a;
    sy += b;
    sxx += a * a;
    sxy += a * b;
  }
  return (n * sxy - sx * sy) / (n * sxx - sx * sx);
}

void print_header() {
  std::printf("| intervals | x range | outputs | steps | rhs | Jacobians | Newton | wall s | CPU s | ns per node-step "
              "| interpolation s | peak RSS MiB | load |\n|---|---|---|---|---|---|---|---|---|---|---|---|---|\n");
}

void print_row(const Result& r) {
  std::printf("| %d | [%.2f, %.2f] | %ld | %ld | %ld | %ld | %ld | %.2f | %.2f | %.0f | %.3f | %.1f | %s |\n", r.intervals,
              r.x_low, r.x_high, r.outputs, r.c.steps, r.c.rhs_evals, r.c.jac_evals, r.c.newton_iters, r.wall, r.cpu,
              1e9 * r.cpu / (double(r.intervals) * r.c.steps), r.interpolation, r.rss_mib, load_average().c_str());
  std::fflush(stdout);
}

}  // namespace

int main(int argc, char** argv) {
  // h, h/2, h/4, h/8 from the solver's base grid; `--grids 200,400,800,1600,3200` adds h/16
  // (no solver plan at the default targets goes beyond 1600).
  std::vector<double> grids{200, 400, 800, 1600};
  std::vector<double> x_mins{-5, -10, -20, -40};
  int single = 0;
  double single_x_min = -10;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    auto next = [&]() -> const char* {
      if (i + 1 >= argc) {
        std::fprintf(stderr, "cost_growth_bench: %s needs a value\n", a.c_str());
        std::exit(64);
      }
      return argv[++i];
    };
    if (a == "--quick") {
      grids = {200, 400, 800};
      x_mins = {-5, -10, -20};
    } else if (a == "--grids") grids = parse_list(next());
    else if (a == "--x-mins") x_mins = parse_list(next());
    else if (a == "--single") single = std::atoi(next());  // one level in this process (for perf)
    else if (a == "--x-min") single_x_min = std::strtod(next(), nullptr);
    else {
      std::fprintf(stderr, "usage: cost_growth_bench [--quick] [--grids 200,400,...] [--x-mins -5,-10,...] "
                           "[--single N [--x-min X]]\n");
      return a == "--help" ? 0 : 64;
    }
  }
  if (single > 0) {
    print_header();
    print_row(run_level(single, single_x_min));
    return 0;
  }

  std::printf("Grid refinement (x in [-10, 8], step 0.01; the plan integrates from x_high down to x_low):\n\n");
  print_header();
  std::vector<double> n, t, work;
  for (double g : grids) {
    Result r;
    if (!run_isolated(static_cast<int>(g), -10, r)) {
      std::printf("| %d | failed |\n", static_cast<int>(g));
      continue;
    }
    print_row(r);
    n.push_back(g);
    t.push_back(r.cpu);
    work.push_back(g * double(r.c.steps));
  }
  if (n.size() >= 2)
    std::printf("\nObserved exponents: CPU time ~ intervals^%.2f, steps ~ intervals^%.2f, CPU time ~ (intervals x "
                "steps)^%.2f.\n\n",
                slope(n, t), slope(n, [&] {
                  std::vector<double> s;
                  for (std::size_t i = 0; i < n.size(); ++i) s.push_back(work[i] / n[i]);
                  return s;
                }()),
                slope(work, t));

  std::printf("Range widening (400 intervals, x_min varied, x_max = 8, step 0.01):\n\n");
  print_header();
  std::vector<double> len, tl;
  for (double xm : x_mins) {
    Result r;
    if (!run_isolated(400, xm, r)) {
      std::printf("| 400 | x_min %g failed |\n", xm);
      continue;
    }
    print_row(r);
    len.push_back(r.x_high - r.x_low);
    tl.push_back(r.cpu);
  }
  if (len.size() >= 2) std::printf("\nObserved exponent: CPU time ~ (x_high - x_low)^%.2f.\n", slope(len, tl));
}
