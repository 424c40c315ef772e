// edgelaw command line: parses options and hands them to the subcommands in commands.cpp.
#include <CLI/CLI.hpp>

#include <iostream>

#include "cli/commands.h"
#include "cli/exit_codes.h"

namespace {
std::string joined(int argc, char** argv) {
  std::string s;
  for (int i = 0; i < argc; ++i) s += (i ? " " : "") + std::string(argv[i]);
  return s;
}
}  // namespace

int main(int argc, char** argv) {
  CLI::App app{"edgelaw: the spiked edge law F_beta(x; w) of random-matrix theory, certified by a PDE solve"};
  app.set_version_flag("--version", std::string("edgelaw ") + EDGELAW_VERSION);
  app.require_subcommand(1);

  edgelaw::TableCommand table;
  auto* t = app.add_subcommand("table", "Solve for the cdf and survival over an (x, w) grid and report the error");
  t->add_option("--beta", table.beta, "Symmetry index beta > 0 (1 real, 2 complex, 4 quaternion)")->capture_default_str();
  t->add_option("--x-min", table.x_min, "Smallest threshold x")->capture_default_str();
  t->add_option("--x-max", table.x_max, "Largest threshold x")->capture_default_str();
  t->add_option("--x-step", table.x_step, "Threshold spacing")->capture_default_str();
  t->add_option("--w-min", table.w_min, "Smallest boundary parameter w")->capture_default_str();
  t->add_option("--w-max", table.w_max, "Largest finite boundary parameter w")->capture_default_str();
  t->add_option("--w-step", table.w_step, "Boundary parameter spacing")->capture_default_str();
  t->add_flag("!--no-unspiked", table.with_unspiked, "Leave out the w = +inf (Tracy-Widom) row");
  t->add_option("--target", table.target, "Largest accepted estimated error")->capture_default_str();

  edgelaw::EvaluateCommand evaluate;
  auto* e = app.add_subcommand("evaluate", "cdf and survival at the points of a CSV file (columns beta,x,w)");
  e->add_option("--input", evaluate.input, "Input CSV (- for standard input)")->required();
  e->add_option("--output", evaluate.output, "Output CSV (default: standard output)");
  e->add_option("--target", evaluate.target, "Largest accepted estimated error")->capture_default_str();

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& error) {
    const int code = app.exit(error);
    return code == 0 ? 0 : edgelaw::exit_code::kUsage;
  }
  if (*t) return edgelaw::run_table(table, joined(argc, argv));
  if (*e) return edgelaw::run_evaluate(evaluate);
  return edgelaw::exit_code::kUsage;
}
