// The subcommands of the edgelaw program; main.cpp only parses options and dispatches.
#pragma once

#include <string>
#include <vector>

#include "solver/solver.h"

namespace edgelaw {

struct TableCommand {
  double beta = 2.0;
  double x_min = -10, x_max = 8, x_step = 0.01;
  double w_min = -6, w_max = 6, w_step = 0.05;
  bool with_unspiked = true;  // append w = +inf (the Tracy-Widom row)
  double target = 1e-8;
  std::string output;         // HDF5 path; empty: summary only
};

struct EvaluateCommand {
  std::string input;   // CSV beta,x,w ("-" = stdin)
  std::string output;  // CSV; empty or "-" = stdout
  double target = 1e-8;
};

// Each returns the process exit code; errors are reported as one line on stderr.
int run_table(const TableCommand& c, const std::string& command_line);
int run_evaluate(const EvaluateCommand& c);

// An evenly spaced axis from first to last (inclusive within rounding), or a one-line error.
std::vector<double> axis(double first, double last, double step, const char* name);

}  // namespace edgelaw
