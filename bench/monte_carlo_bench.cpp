// Monte Carlo of the spiked tridiagonal (beta = 2 Hermite) model against the edgelaw table: the
// cost per sample and the measured cdf error at several matrix sizes n for one w, from which
// the time to a whole-row cdf error of 1e-3 follows; edgelaw's default table is timed in the
// same run. Prints Markdown tables for BENCHMARKS.md. `--help` lists the options.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <sstream>
#include <string>
#include <vector>

#include "bench/fredholm_beta2.h"
#include "simulate/simulate.h"
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

double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

}  // namespace

int main(int argc, char** argv) {
  double w = 0.0;
  long count = 40000;
  std::vector<long> sizes{100, 1000, 10000, 100000, 1000000, 10000000};
  double goal = 1e-3;
  int threads = 2;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    auto next = [&]() -> const char* {
      if (i + 1 >= argc) {
        std::fprintf(stderr, "monte_carlo_bench: %s needs a value\n", a.c_str());
        std::exit(64);
      }
      return argv[++i];
    };
    if (a == "--quick") {
      count = 10000;
      sizes = {1000, 10000, 100000};
    } else if (a == "--w") w = std::strtod(next(), nullptr);
    else if (a == "--count") count = std::max(100L, std::atol(next()));
    else if (a == "--goal") goal = std::strtod(next(), nullptr);
    else if (a == "--threads") threads = std::max(1, std::atoi(next()));
    else if (a == "--sizes") {
      sizes.clear();
      std::stringstream in(next());
      std::string item;
      while (std::getline(in, item, ',')) sizes.push_back(std::stol(item));
    } else {
      std::fprintf(stderr, "usage: monte_carlo_bench [--quick] [--w 0] [--count 40000] [--sizes 100,1000,...] "
                           "[--goal 1e-3] [--threads 2]\n");
      return a == "--help" ? 0 : 64;
    }
  }

  // The exact law on a fine x grid (Fredholm at 1e-10, bench/fredholm_beta2.h), linearly
  // interpolated: with step 0.005 the interpolation error is below f' h^2 / 8 ~ 2e-6.
  std::vector<double> xs;
  for (int i = 0; i <= 3600; ++i) xs.push_back(-10 + 0.005 * i);
  const auto exact = bench::fredholm_table(xs, {w}, 1e-10, true, threads);
  auto cdf = [&](double x) {
    if (x <= xs.front()) return 0.0;
    if (x >= xs.back()) return 1.0;
    const double u = (x - xs.front()) / 0.005;
    const int j = std::min(static_cast<int>(u), 3599);
    const double f = u - j;
    return (1 - f) * exact.cdf(0, j) + f * exact.cdf(0, j + 1);
  };

  std::printf("Monte Carlo: spiked beta = 2 Hermite model, w = %g, theta = exp(-w n^{-1/3}) (design notes section 3), "
              "%ld samples per n on %d threads. Error: Kolmogorov distance D of the edge statistic to F_2(x; w) "
              "(Fredholm); the 95%% sampling level of D is 1.36/sqrt(N) (Kolmogorov 1933).\n\n",
              w, count, threads);
  std::printf("| n | us per sample (wall) | D | 95%% sampling level | load |\n|---|---|---|---|---|\n");
  struct Row {
    long n;
    double per_sample, distance;
  };
  std::vector<Row> table;
  const double noise = 1.36 / std::sqrt(double(count));
  for (long n : sizes) {
    HermiteSpikeModel m;
    m.beta = 2;
    m.n = n;
    m.theta = std::isinf(w) ? 0.0 : std::exp(-w * std::cbrt(1.0 / n));
    SampleOptions so;
    so.count = count;
    so.seed = 7;
    so.threads = threads;
    const auto t0 = std::chrono::steady_clock::now();
    std::vector<double> lam = sample_top_eigenvalue(m, so);
    const double wall = seconds_since(t0);
    for (double& v : lam) v = hermite_edge_statistic(m, v);
    const auto ks = kolmogorov_distance(lam, cdf);
    table.push_back({n, wall / count, ks.distance});
    std::printf("| %ld | %.2f | %.4f | %.4f | %s |\n", n, 1e6 * wall / count, ks.distance, noise, load_average().c_str());
    std::fflush(stdout);
  }

  // Time to a whole-row error `goal`: half of it for the finite-n bias, half for sampling.
  // Bias: D at the largest n whose D is clearly (2x) above the sampling level, taken whole as
  // the bias (an over-estimate by at most the sampling part), gives C in C n^{-1/3}, the order
  // of the finite-n error in the spiked window (design notes section 3). If no n resolves it,
  // D at the largest n bounds the bias from above and C is an upper bound.
  const double stat_goal = goal / 2, bias_goal = goal / 2;
  const double samples_needed = std::pow(1.36 / stat_goal, 2);
  long n_ref = table.back().n;
  double bias_c = table.back().distance * std::cbrt(double(n_ref));
  bool resolved = false;
  for (const Row& r : table)
    if (r.distance > 2 * noise) {
      n_ref = r.n;
      bias_c = r.distance * std::cbrt(double(r.n));
      resolved = true;
    }
  const double n_needed = std::max(double(table.back().n), std::pow(bias_c / bias_goal, 3));
  // Cost per sample grows like the truncated block size ~ n^{1/3} (simulate/simulate.h).
  const Row& last = table.back();
  const double per_sample = last.per_sample * std::max(1.0, std::cbrt(n_needed / last.n));
  const double mc_seconds = samples_needed * per_sample;

  // edgelaw's whole default table (242 rows) at 1e-8, in the same run.
  LawRequest req;
  req.beta = 2;
  for (int i = 0; i <= 1800; ++i) req.x.push_back(-10 + 0.01 * i);
  for (int i = 0; i <= 240; ++i) req.w.push_back(-6 + 0.05 * i);
  req.w.push_back(kInf);
  SolverOptions o;
  o.target_error = 1e-8;
  o.moments = false;
  const auto t0 = std::chrono::steady_clock::now();
  const LawTable t = solve_law(req, o);
  const double edgelaw_seconds = seconds_since(t0);

  std::printf("\n| quantity | value |\n|---|---|\n");
  std::printf("| bias constant C in D ~ C n^{-1/3} | %.3f (from n = %ld%s) |\n", bias_c, n_ref,
              resolved ? "" : "; not resolved above sampling, upper bound");
  std::printf("| n for bias <= %.1e | %.2e |\n", bias_goal, n_needed);
  std::printf("| us per sample at that n (largest measured, scaled by n^{1/3}) | %.0f |\n", 1e6 * per_sample);
  std::printf("| samples for 95%% sampling level <= %.1e | %.2e |\n", stat_goal, samples_needed);
  std::printf("| Monte Carlo time to cdf error %.0e on one w row (%d threads, extrapolated) | %.3g s |\n", goal, threads, mc_seconds);
  std::printf("| edgelaw default table, 242 rows at 1e-8 (measured, estimate %.1e) | %.2f s |\n",
              std::max(t.summary.max_cdf_error, t.summary.max_survival_error), edgelaw_seconds);
  std::printf("| ratio, one Monte Carlo row / whole edgelaw table | %.3g |\n", mc_seconds / edgelaw_seconds);
  std::printf("| ratio, per row (Monte Carlo row / (edgelaw table / 242)) | %.3g |\n", mc_seconds / (edgelaw_seconds / 242));
  std::printf("\nLoad average at end: %s.\n", load_average().c_str());
}
