// edgelaw command line: parses options and hands them to the subcommands (commands.cpp, sweep.cpp).
#include <CLI/CLI.hpp>
#include <hdf5.h>

#include <iostream>

#include "cli/commands.h"
#include "cli/exit_codes.h"
#include "cli/interrupt.h"
#include "cli/stats_commands.h"

namespace {

// The (x, w) grid and accuracy options that table and sweep share.
void add_grid_options(CLI::App* app, edgelaw::GridOptions& g) {
  app->add_option("--x-min", g.x_min, "Smallest threshold x")->capture_default_str();
  app->add_option("--x-max", g.x_max, "Largest threshold x")->capture_default_str();
  app->add_option("--x-step", g.x_step, "Threshold spacing")->capture_default_str();
  app->add_option("--w-min", g.w_min, "Smallest boundary parameter w")->capture_default_str();
  app->add_option("--w-max", g.w_max, "Largest finite boundary parameter w")->capture_default_str();
  app->add_option("--w-step", g.w_step, "Boundary parameter spacing")->capture_default_str();
  app->add_flag("!--no-unspiked", g.with_unspiked, "Leave out the w = +inf (Tracy-Widom) row");
  app->add_option("--target", g.target, "Largest accepted estimated absolute error")->capture_default_str();
  app->add_option("--base-intervals", g.base_intervals, "Coarsest angle grid (0: chosen from beta)")
      ->capture_default_str();
  app->add_option("--max-levels", g.max_levels, "Most grid levels (each halving the angle step) tried")
      ->capture_default_str();
  app->add_flag("--keep-unconverged", g.keep_unconverged,
                "Write the file even if the target is missed (marked converged = 0)");
  app->add_option("--max-memory", g.max_memory_mib, "Refuse requests estimated to need more MiB than this")
      ->capture_default_str();
  app->add_option("--max-time", g.max_seconds,
                  "Wall-time budget in seconds of each solve (one per beta): refused up front, or before a grid level, when the estimate exceeds it (default: none)");
}

void add_lookup_options(CLI::App* app, edgelaw::LookupCommand& c) {
  app->add_option("--beta", c.beta, "Symmetry index beta > 0")->capture_default_str();
  app->add_option("--w", c.w, "Boundary parameter w (inf: no spike)")->capture_default_str();
  app->add_option("--table", c.table, "Answer from this table file instead of solving");
  app->add_option("--target", c.target, "Largest accepted estimated error of a solve")->capture_default_str();
  app->add_flag("--json", c.json, "Print one JSON object");
}

// The model, the observation and the law source shared by the statistics subcommands. The
// direct model's boundary parameter is given as --w (stored in w_text), the others' as --spike.
void add_model_options(CLI::App* app, edgelaw::StatsCommand& c, std::string& w_text, bool observed) {
  auto& m = c.m;
  app->add_option("--model", m.model, "direct (x and w given), covariance (PCA: n samples, p variables) or signal (symmetric n x n matrix)")
      ->capture_default_str();
  app->add_option("--beta", m.beta, "Symmetry index beta > 0 (1 real, 2 complex, 4 quaternion)")->capture_default_str();
  app->add_option("--n", m.n, "covariance: samples; signal: matrix size");
  app->add_option("--p", m.p, "covariance: variables");
  app->add_option("--noise-variance", m.noise_variance,
                  "Noise variance sigma^2 (covariance: of the entries of X; signal: of the off-diagonal entries), or 'estimate' with --data (default: 1, or estimate with --data)");
  if (observed) {
    app->add_option("--eigenvalue", m.eigenvalue, "Observed top eigenvalue");
    app->add_option("--eigenvalue-of", m.eigenvalue_of, "covariance: the eigenvalue is of XtX (S = X^T X) or XtX/n (S = X^T X / n)");
    app->add_option("--data", m.data, "CSV data: rows = samples (covariance) or the symmetric matrix (signal)");
    app->add_flag("--columns-centred", m.columns_centred, "covariance --data: columns are already centred (default: subtract column means, n - 1 degrees of freedom)");
    app->add_option("--x", m.x, "direct model: observed threshold x");
  } else {
    app->add_option("--eigenvalue-of", m.eigenvalue_of, "covariance: report eigenvalues of XtX (S = X^T X) or XtX/n");
  }
  app->add_option("--w", w_text, "direct model: boundary parameter w (inf: no spike)");
  app->add_option("--table", m.table, "Answer from this table file instead of solving");
  app->add_option("--target", m.target, "Largest accepted estimated error of the law's solve")->capture_default_str();
  app->add_option("--w-floor", m.w_floor, "Smallest w (strongest spike) the law is solved for")->capture_default_str();
  app->add_flag("--json", m.json, "Print one JSON object");
}

// Moves --w into the spike of the direct model, refusing the mix-ups.
bool settle_spike(edgelaw::StatsCommand& c, const std::string& w_text) {
  if (c.m.model == "direct") {
    if (!c.spike.empty()) {
      std::cerr << "edgelaw: error: the direct model takes the boundary parameter as --w, not --spike\n";
      return false;
    }
    c.spike = w_text;
  } else if (!w_text.empty()) {
    std::cerr << "edgelaw: error: --w belongs to the direct model; give the spike as --spike\n";
    return false;
  }
  return true;
}

}  // namespace

int main(int argc, char** argv) {
  edgelaw::install_interrupt_cleanup();  // SIGINT, SIGTERM, SIGHUP: remove temporaries, exit 128 + signal
  // Every file is closed before exit; HDF5 1.10.8's shutdown would print "infinite loop closing
  // library" after a damaged file failed a checksum (it loses a cache block), so skip it.
  H5dont_atexit();
  CLI::App app{"edgelaw: the spiked edge law F_beta(x; w) of random-matrix theory, certified by a PDE solve"};
  app.set_version_flag("--version", std::string("edgelaw ") + EDGELAW_VERSION);
  app.require_subcommand(1);
  const edgelaw::Invocation inv{argc, argv, EDGELAW_VERSION};

  edgelaw::TableCommand table;
  auto* t = app.add_subcommand("table", "Solve for the law over an (x, w) grid and write it to an HDF5 file");
  t->add_option("--beta", table.beta, "Symmetry index beta > 0 (1 real, 2 complex, 4 quaternion)")
      ->capture_default_str();
  t->add_option("--output", table.output, "HDF5 file to write")->capture_default_str();
  add_grid_options(t, table.grid);

  edgelaw::EvaluateCommand evaluate;
  auto* e = app.add_subcommand("evaluate", "cdf and survival at the points of a CSV file (columns beta,x,w)");
  e->add_option("--input", evaluate.input, "Input CSV (- for standard input)")->required();
  e->add_option("--output", evaluate.output, "Output CSV (default: standard output)");
  e->add_option("--table", evaluate.table, "Answer from this table file instead of solving");
  e->add_option("--target", evaluate.target, "Largest accepted estimated error of a solve")->capture_default_str();
  e->add_option("--max-memory", evaluate.max_memory_mib, "Refuse solves estimated to need more MiB than this")
      ->capture_default_str();
  e->add_option("--max-time", evaluate.max_seconds, "Wall-time budget in seconds of each solve (one per beta; default: none)");

  edgelaw::LookupCommand quantile;
  auto* q = app.add_subcommand("quantile", "The threshold x with F_beta(x; w) = probability");
  add_lookup_options(q, quantile);
  q->add_option("--probability", quantile.probability, "Probability level in (0, 1)")->required();

  edgelaw::StatsCommand pvalue;
  std::string pvalue_w;
  auto* p = app.add_subcommand("pvalue", "p-value of an observed top eigenvalue (or threshold x) under a null spike");
  add_model_options(p, pvalue, pvalue_w, true);
  p->add_option("--spike", pvalue.spike, "Null-hypothesis spike: covariance ell (1 = none), signal theta (0 = none)");
  p->add_option("--simulate", pvalue.simulate, "Also an exact finite-n p-value for Gaussian data from N simulated samples");
  p->add_option("--seed", pvalue.seed, "Random number seed of --simulate")->capture_default_str();
  p->add_option("--threads", pvalue.threads, "Threads of --simulate (0: all cores)")->capture_default_str();

  edgelaw::StatsCommand critical;
  std::string critical_w;
  auto* cv = app.add_subcommand("critical-value", "Critical value of the largest-eigenvalue test at level alpha");
  add_model_options(cv, critical, critical_w, false);
  cv->add_option("--spike", critical.spike, "Null-hypothesis spike (default: none)");
  cv->add_option("--alpha", critical.alpha, "Level of the test, in (0, 1)")->capture_default_str();

  edgelaw::StatsCommand power;
  std::string power_w;
  auto* pw = app.add_subcommand("power", "Power of the level-alpha test at an alternative spike, or a power curve");
  add_model_options(pw, power, power_w, false);
  pw->add_option("--spike", power.spike, "Null-hypothesis spike (default: none)");
  pw->add_option("--alpha", power.alpha, "Level of the test, in (0, 1)")->capture_default_str();
  pw->add_option("--alternative", power.alternative, "Alternative spike (direct model: its w)");
  pw->add_option("--alternatives", power.alternatives, "Power curve over FIRST:LAST:COUNT alternative spikes (CSV)");
  pw->add_option("--output", power.output, "CSV file of the power curve (default: standard output)");

  edgelaw::StatsCommand interval;
  std::string interval_w;
  auto* iv = app.add_subcommand("interval", "Confidence interval for the spike strength by inverting the test");
  add_model_options(iv, interval, interval_w, true);
  iv->add_option("--alpha", interval.alpha, "1 - confidence level, in (0, 1)")->capture_default_str();

  edgelaw::StatsCommand simulate;
  std::string simulate_w;
  auto* sim = app.add_subcommand("simulate", "Monte Carlo of a finite-n spiked model against the law (Kolmogorov distance)");
  add_model_options(sim, simulate, simulate_w, false);
  sim->add_option("--spike", simulate.spike, "The model's spike (default: none)");
  sim->add_option("--samples", simulate.simulate, "Number of samples")->capture_default_str();
  sim->add_option("--seed", simulate.seed, "Random number seed")->capture_default_str();
  sim->add_option("--threads", simulate.threads, "Threads (0: all cores)")->capture_default_str();
  sim->add_option("--samples-output", simulate.samples_output, "CSV file of the scaled samples x");
  simulate.simulate = 20000;

  edgelaw::SweepCommand sweep;
  auto* s = app.add_subcommand("sweep", "Tables for several betas in one file (parallel, resumable, splittable)");
  s->add_option("--betas", sweep.betas, "Comma-separated betas, e.g. 1,2,4");
  s->add_option("--beta-min", sweep.beta_min, "First beta of an evenly spaced range");
  s->add_option("--beta-max", sweep.beta_max, "Last beta of the range");
  s->add_option("--beta-count", sweep.beta_count, "Number of betas in the range");
  s->add_option("--output", sweep.output, "HDF5 file to write (checkpoints go to OUTPUT.parts/)")->required();
  s->add_option("--threads", sweep.threads, "Betas solved at once (0: all cores)")->capture_default_str();
  s->add_option("--part", sweep.part, "Solve only part i of N (betas with index % N == i - 1)");
  add_grid_options(s, sweep.grid);

  edgelaw::MergeCommand merge;
  auto* m = app.add_subcommand("merge", "Combine the part files of a split sweep into one sweep file");
  m->add_option("--output", merge.output, "HDF5 file to write")->required();
  m->add_option("parts", merge.parts, "Part files written by sweep --part")->required();

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& error) {
    // Help and version go to stdout with exit 0; a bad command line gets one stderr line.
    if (error.get_exit_code() == 0) return app.exit(error);
    std::cerr << "edgelaw: error: " << error.what() << " (see edgelaw --help)\n";
    return edgelaw::exit_code::kUsage;
  }
  if (*t) return edgelaw::run_table(table, inv);
  if (*e) return edgelaw::run_evaluate(evaluate);
  if (*q) return edgelaw::run_quantile(quantile);
  if (*p) {
    if (!settle_spike(pvalue, pvalue_w)) return edgelaw::exit_code::kUsage;
    // The direct model without statistics options keeps the plain lookup (and its output).
    if (pvalue.m.model == "direct" && pvalue.simulate == 0) {
      edgelaw::LookupCommand direct;
      direct.beta = pvalue.m.beta;
      direct.w = pvalue.spike.empty() ? "inf" : pvalue.spike;
      direct.table = pvalue.m.table;
      direct.target = pvalue.m.target;
      direct.json = pvalue.m.json;
      if (pvalue.m.x.empty()) {
        std::cerr << "edgelaw: error: pvalue: give --x (direct model) or --model covariance|signal with the eigenvalue\n";
        return edgelaw::exit_code::kUsage;
      }
      if (!pvalue.m.data.empty() || !pvalue.m.eigenvalue.empty() || pvalue.m.n || pvalue.m.p || !pvalue.m.noise_variance.empty()) {
        std::cerr << "edgelaw: error: the direct model takes --x and --w only (use --model covariance or signal)\n";
        return edgelaw::exit_code::kUsage;
      }
      return edgelaw::run_pvalue_text(direct, pvalue.m.x);
    }
    return edgelaw::run_model_pvalue(pvalue);
  }
  if (*cv) return settle_spike(critical, critical_w) ? edgelaw::run_critical_value(critical) : edgelaw::exit_code::kUsage;
  if (*pw) return settle_spike(power, power_w) ? edgelaw::run_power(power) : edgelaw::exit_code::kUsage;
  if (*iv) return settle_spike(interval, interval_w) ? edgelaw::run_interval(interval) : edgelaw::exit_code::kUsage;
  if (*sim) return settle_spike(simulate, simulate_w) ? edgelaw::run_simulate(simulate) : edgelaw::exit_code::kUsage;
  if (*s) return edgelaw::run_sweep(sweep, inv);
  if (*m) return edgelaw::run_merge(merge, inv);
  return edgelaw::exit_code::kUsage;
}
