// Public interface of the spiked edge law solver: F_beta(x; w) and its survival on a grid.
//
// The law: F_beta(x; w) = P(-Lambda_0 <= x), Lambda_0 the lowest eigenvalue of the stochastic
// Airy operator with boundary condition f'(0) = w f(0) (w = +inf is Dirichlet and gives the
// Tracy-Widom law TW_beta). It solves the backward Kolmogorov equation of the Riccati diffusion
//     dF/dx + (x - w^2) dF/dw + (2/beta) d^2F/dw^2 = 0,
// integrated here by the method of lines in the compactified angle theta = arccot(w);
// see solver.cpp for the method and design.md-derived reasoning.
#pragma once

#include <Eigen/Core>
#include <limits>
#include <stdexcept>
#include <string>
#include <vector>

namespace edgelaw {

inline constexpr double kInf = std::numeric_limits<double>::infinity();

// Row-major so a (w, x) table can be handed to HDF5 without copying.
using RowMatrix = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;

// What the user asks for: one beta, the thresholds x and the boundary parameters w.
struct LawRequest {
  double beta = 2.0;
  // Thresholds, finite and strictly increasing.
  std::vector<double> x;
  // Boundary parameters, strictly increasing; +inf (the unspiked TW_beta row) may be last.
  std::vector<double> w;
};

struct SolverOptions {
  // Largest estimated absolute error accepted for any cdf or survival entry. The solver
  // refines the grid until the Richardson estimate is below it, or fails loudly.
  // The integrator's global error does not fall below ~2e-11 (measured), so targets below
  // 5e-11 are refused.
  double target_error = 1e-10;
  // Relative accuracy sought in the tails, for entries >= 1e-20: every survival entry and the
  // cdf on rows w >= 0 (see SolveSummary::max_tail_relative_error). Always estimated and
  // reported; part of convergence only when require_tail_accuracy is set, because deep tails
  // (1e-16 and below) can need grids several times finer than the absolute target does.
  double tail_relative_error = 1e-6;
  bool require_tail_accuracy = false;
  // Number of theta intervals on the coarsest grid; 0 chooses from beta.
  int base_intervals = 0;
  // Grid levels (each halving h). At least 3 are needed for an observed order.
  int min_levels = 3;
  int max_levels = 5;
  // Compute mean, variance, skewness and excess kurtosis for every w.
  bool moments = true;
  // Solve the finest of the first min_levels grids on a second thread while the coarser ones
  // run (false when the caller already runs several solves at once, as a sweep does).
  bool parallel_levels = true;
  // Wall-time budget in seconds (+inf: none). Refused before any work when the a-priori
  // estimate exceeds it, and before each further grid level when the projection from the
  // levels already solved does (SolveBudgetError, with the estimate in the message).
  double max_seconds = kInf;

  // Empty string when valid, otherwise one line naming the problem.
  std::string check() const;
};

struct Moments {
  double mean = 0, variance = 0, skewness = 0, excess_kurtosis = 0;
};

// What a solve did, for logs, files and honesty about the error.
struct SolveSummary {
  double beta = 0;
  double x_low = 0, x_high = 0;          // integration range actually used
  std::vector<int> intervals;            // theta intervals per grid level
  std::vector<long> steps, rhs_evals, jac_evals, newton_iters, error_test_failures;
  std::vector<double> level_seconds;     // wall time per grid level
  double estimated_seconds = 0;          // a-priori estimate of the minimum levels (see budget)
  double time_tolerance = 0;             // CVODE bulk (absolute) tolerance on the coarsest level
  double observed_order = 0;             // from the last three levels (max norm)
  double nominal_order = 6;              // order of the difference stencils
  double max_cdf_error = 0;              // over all requested entries
  double max_survival_error = 0;
  double max_tail_relative_error = 0;    // over the tail entries that are certified
  double max_time_error = 0;             // integrator part of the estimate
  double wall_seconds = 0;
  bool converged = false;                // max errors <= target_error
  std::string brief() const;             // one line
  std::string full() const;              // several lines
};

// The answer: every table is (w.size(), x.size()); rows follow w, columns follow x.
struct LawTable {
  double beta = 0;
  std::vector<double> x, w;
  RowMatrix cdf, survival, density;
  RowMatrix cdf_error, survival_error, density_error;
  std::vector<Moments> moments, moment_errors;  // per w, empty unless requested
  SolveSummary summary;
};

// Thrown for requests that cannot be served (bad input, budget, solver failure).
struct SolveError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// Thrown before work that the time budget (SolverOptions::max_seconds) does not cover.
struct SolveBudgetError : SolveError {
  using SolveError::SolveError;
};

// Validates, solves and returns the table. Throws SolveError with a one-line message.
LawTable solve_law(const LawRequest& request, const SolverOptions& options = {});

// Empty string when the request is valid, otherwise one line naming the problem.
std::string check_request(const LawRequest& request);

}  // namespace edgelaw
