// The subcommands of the edgelaw program; main.cpp only parses options and dispatches.
#pragma once

#include <functional>
#include <map>
#include <stdexcept>
#include <string>
#include <vector>

#include "cli/budget.h"
#include "solver/solver.h"
#include "tables/table_file.h"

namespace edgelaw {

// A bad option or option value (exit code kUsage).
struct UsageError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// An input file is missing or unreadable (exit code kNoInput).
struct NoInputError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// The program's own name, version and argv, for the history line of written files.
struct Invocation {
  int argc = 0;
  const char* const* argv = nullptr;
  std::string version;
};

// The (x, w) grid and solver settings shared by table and sweep.
struct GridOptions {
  double x_min = -10, x_max = 8, x_step = 0.01;
  double w_min = -6, w_max = 6, w_step = 0.05;
  bool with_unspiked = true;  // append w = +inf (the Tracy-Widom row)
  double target = 1e-10;      // about 5 s at beta = 2 on the default grid (BENCHMARKS.md)
  int base_intervals = 0;     // coarsest theta grid; 0 lets the solver choose from beta
  int max_levels = SolverOptions{}.max_levels;  // grid halvings allowed before giving up
  // Write files whose solve missed the target (marked converged = 0) instead of failing.
  bool keep_unconverged = false;
  // Requests whose memory estimate (cli/budget.h) exceeds this are refused before solving.
  double max_memory_mib = kDefaultMemoryBudgetMiB;
  // Wall-time budget of each solve (one per beta), seconds; +inf: none (SolverOptions::max_seconds).
  double max_seconds = kInf;
};

struct TableCommand {
  double beta = 2.0;
  GridOptions grid;
  std::string output = "edgelaw-beta2.h5";
};

struct EvaluateCommand {
  std::string input;   // CSV beta,x,w ("-" = stdin)
  std::string output;  // CSV; empty or "-" = stdout
  std::string table;   // HDF5 table to answer from; empty: solve
  double target = 1e-8;
  double max_memory_mib = kDefaultMemoryBudgetMiB;
  double max_seconds = kInf;  // per solve, as GridOptions::max_seconds
};

// quantile and pvalue: one number with its error, from a table or from a solve.
struct LookupCommand {
  double beta = 2.0;
  std::string w = "inf";  // text so that "inf" is accepted
  double probability = 0.5;  // quantile only
  double x = 0;              // pvalue only
  std::string table;
  double target = 1e-8;
  bool json = false;
};

struct SweepCommand {
  std::string betas;  // "1,2,4"; empty: use the range below
  double beta_min = 0, beta_max = 0;
  int beta_count = 0;
  GridOptions grid;
  std::string output;
  int threads = 0;    // 0: all cores
  std::string part;   // "i/N"; empty: the whole sweep
};

struct MergeCommand {
  std::string output;
  std::vector<std::string> parts;
};

// Each returns the process exit code; errors are reported as one line on stderr.
int run_table(const TableCommand& c, const Invocation& inv);
int run_evaluate(const EvaluateCommand& c);
int run_quantile(const LookupCommand& c);
int run_pvalue(const LookupCommand& c);
// run_pvalue with the threshold given as text (--x of the pvalue subcommand).
int run_pvalue_text(LookupCommand c, const std::string& x);
int run_sweep(const SweepCommand& c, const Invocation& inv);
int run_merge(const MergeCommand& c, const Invocation& inv);

// An evenly spaced axis from first to last (inclusive within rounding), or UsageError.
std::vector<double> axis(double first, double last, double step, const char* name);

// The request (without beta) and solver options a GridOptions describes; UsageError when invalid.
LawRequest grid_request(const GridOptions& g);
SolverOptions grid_solver_options(const GridOptions& g);
// The settings stored in every file written from g: they define which slices may be reused.
std::map<std::string, SettingValue> grid_settings(const GridOptions& g);

// Throws OutputError (from cli/atomic_file.h) unless a file could be created at path; run
// before a long solve so that a typo in the folder fails at once.
void check_output_path(const std::string& path);

// Shortest text that reads back as exactly v ("inf" for +infinity).
std::string format_double(double v);

// Runs body and maps the exceptions of the libraries to one stderr line and an exit code.
int guarded(const std::function<int()>& body);

}  // namespace edgelaw
