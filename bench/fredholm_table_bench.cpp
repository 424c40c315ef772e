// edgelaw against Fredholm determinants (Bornemann 2010) on the default beta = 2 table: both
// timed in one run on the same machine, both checked against tests/reference (long double /
// __float128 Fredholm values) on a random sample of table points and against each other on the
// whole table. Prints Markdown tables for BENCHMARKS.md. `--help` lists the options.
#include <sys/resource.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "bench/fredholm_beta2.h"
#include "solver/solver.h"
#include "tests/reference/fredholm.h"

namespace {

using namespace edgelaw;

struct Options {
  std::vector<double> fredholm_targets{1e-8, 1e-9, 1e-10};
  std::vector<double> edgelaw_targets{1e-8, 1e-9, 1e-10};
  int repeats = 3;
  int sample = 300;               // reference points
  int per_point_columns = 60;     // x columns timed with one factorisation per point
  int threads = 2;
  bool calibrate = false;
};

std::vector<double> parse_list(const char* s) {
  std::vector<double> v;
  std::stringstream in(s);
  std::string item;
  while (std::getline(in, item, ',')) v.push_back(std::stod(item));
  return v;
}

struct Timing {
  double wall = 0, cpu = 0;
};

template <class F> Timing timed(F&& f) {
  const std::clock_t c0 = std::clock();
  const auto t0 = std::chrono::steady_clock::now();
  f();
  return {std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count(),
          double(std::clock() - c0) / CLOCKS_PER_SEC};
}

double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  const std::size_t n = v.size();
  return n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

std::string load_average() {
  double a[3] = {0, 0, 0};
  if (FILE* f = std::fopen("/proc/loadavg", "r")) {
    if (std::fscanf(f, "%lf %lf %lf", &a[0], &a[1], &a[2]) != 3) a[0] = a[1] = a[2] = NAN;
    std::fclose(f);
  }
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.2f %.2f %.2f", a[0], a[1], a[2]);
  return buf;
}

double peak_rss_mib() {
  rusage u{};
  getrusage(RUSAGE_SELF, &u);
  return u.ru_maxrss / 1024.0;
}

reference::Probability reference_at(double x, double w) {
  return std::isinf(w) ? reference::tracy_widom(2, x) : reference::spiked_beta2(x, w);
}

// Smallest node count meeting target / 10 against the reference (and at the next two sizes),
// per (x, w), next to what the rule in fredholm_beta2.cpp gives.
void calibrate(const std::vector<double>& targets) {
  std::printf("| target | x | w | length | osc | nodes needed | nodes by rule |\n|---|---|---|---|---|---|---|\n");
  const std::vector<double> ws{-6, -5, -4, -3, -2, -1, -0.5, 0, 0.5, 1, 1.45, 1.5, 2, 3, 4, 6, kInf};
  for (double x = -10; x <= 8.001; x += 1.0)
    for (double w : ws) {
      const auto ref = reference_at(x, w);
      for (double target : targets) {
        bench::QuadraturePlan rule = bench::plan_for(x, bench::growth_of(w), target);
        auto ok = [&](int m) {
          bench::QuadraturePlan p = rule;
          p.nodes = m;
          const auto v = bench::fredholm_point(x, w, p, target);
          return std::abs(v.cdf - ref.cdf) <= target / 10 && std::abs(v.survival - ref.survival) <= target / 10;
        };
        int need = -1;
        for (int m = 6; m <= 300; ++m)
          if (ok(m) && ok(m + 2) && ok(m + 4)) {
            need = m;
            break;
          }
        std::printf("| %.0e | %g | %g | %.2f | %.2f | %d | %d |\n", target, x, w, rule.length,
                    x < 0 ? std::pow(-x, 1.5) : 0.0, need, rule.nodes);
      }
      std::fflush(stdout);
    }
}

}  // namespace

int main(int argc, char** argv) {
  Options o;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    auto next = [&]() -> const char* {
      if (i + 1 >= argc) {
        std::fprintf(stderr, "fredholm_table_bench: %s needs a value\n", a.c_str());
        std::exit(64);
      }
      return argv[++i];
    };
    if (a == "--quick") {
      o.fredholm_targets = {1e-8, 1e-10};
      o.edgelaw_targets = {1e-8};
      o.repeats = 1;
      o.sample = 100;
      o.per_point_columns = 20;
    } else if (a == "--fredholm-targets") o.fredholm_targets = parse_list(next());
    else if (a == "--edgelaw-targets") o.edgelaw_targets = parse_list(next());
    else if (a == "--repeats") o.repeats = std::max(1, std::atoi(next()));
    else if (a == "--sample") o.sample = std::max(1, std::atoi(next()));
    else if (a == "--per-point-columns") o.per_point_columns = std::max(0, std::atoi(next()));
    else if (a == "--threads") o.threads = std::max(1, std::atoi(next()));
    else if (a == "--calibrate") o.calibrate = true;
    else {
      std::fprintf(stderr,
                   "usage: fredholm_table_bench [--quick] [--fredholm-targets 1e-8,1e-9,1e-10] [--edgelaw-targets "
                   "1e-8,1e-9,1e-10] [--repeats 3] [--sample 300] [--per-point-columns 60] [--threads 2] [--calibrate]\n");
      return a == "--help" ? 0 : 64;
    }
  }
  if (o.calibrate) {
    calibrate(o.fredholm_targets);
    return 0;
  }

  LawRequest req;
  req.beta = 2;
  for (int i = 0; i <= 1800; ++i) req.x.push_back(-10 + 0.01 * i);
  for (int i = 0; i <= 240; ++i) req.w.push_back(-6 + 0.05 * i);
  req.w.push_back(kInf);
  const int rows = static_cast<int>(req.w.size()), cols = static_cast<int>(req.x.size());
  const long entries = long(rows) * cols;

  // Reference sample: uniformly random table entries (fixed generator seed).
  std::mt19937_64 gen(20261202);
  std::vector<std::pair<int, int>> pts;
  std::vector<reference::Probability> ref;
  const Timing ref_time = timed([&] {
    for (int k = 0; k < o.sample; ++k) {
      const int r = std::uniform_int_distribution<int>(0, rows - 1)(gen);
      const int c = std::uniform_int_distribution<int>(0, cols - 1)(gen);
      pts.emplace_back(r, c);
      ref.push_back(reference_at(req.x[c], req.w[r]));
    }
  });
  auto sample_error = [&](const RowMatrix& cdf, const RowMatrix& sur) {
    double e = 0;
    for (std::size_t k = 0; k < pts.size(); ++k) {
      const auto [r, c] = pts[k];
      e = std::max({e, std::abs(cdf(r, c) - ref[k].cdf), std::abs(sur(r, c) - ref[k].survival)});
    }
    return e;
  };

  std::printf("Default table: beta = 2, x in [-10, 8] step 0.01, w in [-6, 6] step 0.05 plus +inf: %ld entries. "
              "Reference sample: %d random entries by tests/reference (%.1f s, %.1f ms per point). Load average at "
              "start: %s.\n\n",
              entries, o.sample, ref_time.wall, 1e3 * ref_time.wall / o.sample, load_average().c_str());
  std::printf("| method | target | wall s (median) | CPU s (median) | runs | max abs error vs reference (cdf, survival) "
              "| max abs difference vs Fredholm 1e-10 table | work | peak RSS MiB | load |\n");
  std::printf("|---|---|---|---|---|---|---|---|---|---|\n");

  // Fredholm, one factorisation per x and truncation group, on all threads.
  std::vector<double> fredholm_wall(o.fredholm_targets.size()), fredholm_cpu(o.fredholm_targets.size());
  bench::FredholmResult finest;
  double finest_target = 1;
  std::size_t finest_index = 0;
  for (std::size_t k = 0; k < o.fredholm_targets.size(); ++k) {
    const double target = o.fredholm_targets[k];
    std::vector<double> walls, cpus;
    bench::FredholmResult res;
    for (int rep = 0; rep < o.repeats; ++rep) {
      const Timing t = timed([&] { res = bench::fredholm_table(req.x, req.w, target, true, o.threads); });
      walls.push_back(t.wall);
      cpus.push_back(t.cpu);
    }
    fredholm_wall[k] = median(walls);
    fredholm_cpu[k] = median(cpus);
    if (target < finest_target) {
      finest_target = target;
      finest_index = k;
      finest = res;
    }
    std::printf("| Fredholm, shared per x (%d threads) | %.0e | %.2f | %.2f | %d | %.2e | | %ld factorisations, mean %.1f "
                "nodes | %.0f | %s |\n",
                o.threads, target, fredholm_wall[k], median(cpus), o.repeats, sample_error(res.cdf, res.survival),
                res.factorisations, res.mean_nodes, peak_rss_mib(), load_average().c_str());
    std::fflush(stdout);
  }

  // Fredholm with one factorisation per point, timed on evenly spread x columns and scaled.
  std::vector<double> per_point_wall(o.fredholm_targets.size(), NAN);
  if (o.per_point_columns > 0) {
    std::vector<double> xs;
    const int stride = std::max(1, cols / o.per_point_columns);
    for (int c = stride / 2; c < cols; c += stride) xs.push_back(req.x[c]);
    for (std::size_t k = 0; k < o.fredholm_targets.size(); ++k) {
      const double target = o.fredholm_targets[k];
      bench::FredholmResult res;
      const Timing t = timed([&] { res = bench::fredholm_table(xs, req.w, target, false, o.threads); });
      const double scale = double(cols) / xs.size();
      per_point_wall[k] = t.wall * scale;
      double diff = 0;
      for (std::size_t j = 0; j < xs.size(); ++j) {
        const int c = static_cast<int>(stride / 2 + j * stride);
        for (int r = 0; r < rows; ++r)
          diff = std::max({diff, std::abs(res.cdf(r, j) - finest.cdf(r, c)), std::abs(res.survival(r, j) - finest.survival(r, c))});
      }
      std::printf("| Fredholm, one factorisation per point (%d threads; %zu of %d x columns timed, scaled x%.1f) | %.0e "
                  "| %.2f | %.2f | 1 | | %.2e | %ld factorisations, mean %.1f nodes | %.0f | %s |\n",
                  o.threads, xs.size(), cols, scale, target, per_point_wall[k], t.cpu * scale, diff, res.factorisations,
                  res.mean_nodes, peak_rss_mib(), load_average().c_str());
      std::fflush(stdout);
    }
  }

  // edgelaw, the library call behind `edgelaw table` (finest grid on a second thread).
  std::vector<double> edgelaw_wall(o.edgelaw_targets.size(), NAN), edgelaw_cpu(o.edgelaw_targets.size(), NAN);
  for (std::size_t k = 0; k < o.edgelaw_targets.size(); ++k) {
    SolverOptions so;
    so.target_error = o.edgelaw_targets[k];
    so.moments = false;  // Fredholm gives no moments either
    std::vector<double> walls, cpus;
    LawTable t;
    bool failed = false;
    // A solve over a minute is run once, to keep the whole bench within its time budget.
    for (int rep = 0; rep < o.repeats && !failed && !(rep > 0 && walls.back() > 60); ++rep) {
      try {
        const Timing tm = timed([&] { t = solve_law(req, so); });
        walls.push_back(tm.wall);
        cpus.push_back(tm.cpu);
      } catch (const SolveError& e) {
        std::printf("| edgelaw | %.0e | failed: %s |\n", so.target_error, e.what());
        failed = true;
      }
    }
    if (failed) continue;
    edgelaw_wall[k] = median(walls);
    edgelaw_cpu[k] = median(cpus);
    double diff = 0;
    for (int r = 0; r < rows; ++r)
      for (int c = 0; c < cols; ++c)
        diff = std::max({diff, std::abs(t.cdf(r, c) - finest.cdf(r, c)), std::abs(t.survival(r, c) - finest.survival(r, c))});
    std::string grids;
    for (int n : t.summary.intervals) grids += (grids.empty() ? "" : "/") + std::to_string(n);
    std::printf("| edgelaw (estimate %.2e%s) | %.0e | %.2f | %.2f | %zu | %.2e | %.2e | grids %s, %ld steps on the finest "
                "| %.0f | %s |\n",
                std::max(t.summary.max_cdf_error, t.summary.max_survival_error), t.summary.converged ? "" : ", NOT converged",
                so.target_error, edgelaw_wall[k], median(cpus), walls.size(), sample_error(t.cdf, t.survival), diff,
                grids.c_str(), t.summary.steps.back(), peak_rss_mib(), load_average().c_str());
    std::fflush(stdout);
  }

  std::printf("\nRatios above 1 mean edgelaw is faster.\n\n| target | Fredholm shared per x / edgelaw, wall | same, CPU | Fredholm 1e-10 shared / edgelaw, wall | Fredholm per point / edgelaw, wall |\n|---|---|---|---|---|\n");
  for (std::size_t k = 0; k < o.edgelaw_targets.size(); ++k)
    for (std::size_t j = 0; j < o.fredholm_targets.size(); ++j)
      if (o.fredholm_targets[j] == o.edgelaw_targets[k] && std::isfinite(edgelaw_wall[k]))
        std::printf("| %.0e | %.2f | %.2f | %.2f | %.2f |\n", o.edgelaw_targets[k], fredholm_wall[j] / edgelaw_wall[k],
                    fredholm_cpu[j] / edgelaw_cpu[k], fredholm_wall[finest_index] / edgelaw_wall[k],
                    per_point_wall[j] / edgelaw_wall[k]);
  std::printf("\nLoad average at end: %s.\n", load_average().c_str());
}
