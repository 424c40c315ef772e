// edgelaw command line: parses options and hands them to the subcommands (commands.cpp, sweep.cpp).
#include <CLI/CLI.hpp>
#include <hdf5.h>

#include <iostream>

#include "cli/commands.h"
#include "cli/exit_codes.h"
#include "cli/interrupt.h"

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
}

void add_lookup_options(CLI::App* app, edgelaw::LookupCommand& c) {
  app->add_option("--beta", c.beta, "Symmetry index beta > 0")->capture_default_str();
  app->add_option("--w", c.w, "Boundary parameter w (inf: no spike)")->capture_default_str();
  app->add_option("--table", c.table, "Answer from this table file instead of solving");
  app->add_option("--target", c.target, "Largest accepted estimated error of a solve")->capture_default_str();
  app->add_flag("--json", c.json, "Print one JSON object");
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

  edgelaw::LookupCommand quantile;
  auto* q = app.add_subcommand("quantile", "The threshold x with F_beta(x; w) = probability");
  add_lookup_options(q, quantile);
  q->add_option("--probability", quantile.probability, "Probability level in (0, 1)")->required();

  edgelaw::LookupCommand pvalue;
  auto* p = app.add_subcommand("pvalue", "Upper-tail p-value 1 - F_beta(x; w) of an observed threshold x");
  add_lookup_options(p, pvalue);
  p->add_option("--x", pvalue.x, "Observed threshold x")->required();

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
  if (*p) return edgelaw::run_pvalue(pvalue);
  if (*s) return edgelaw::run_sweep(sweep, inv);
  if (*m) return edgelaw::run_merge(merge, inv);
  return edgelaw::exit_code::kUsage;
}
