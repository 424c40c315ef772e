// One CVODE (BDF, banded exact Jacobian) integration of the semi-discrete equation from large x down.
#pragma once

#include <functional>
#include <span>
#include <vector>

#include "solver/kolmogorov.h"

namespace edgelaw {

struct IntegratorCounters {
  long steps = 0, rhs_evals = 0, jac_evals = 0, newton_iters = 0, error_test_failures = 0;
  IntegratorCounters& operator+=(const IntegratorCounters& o);
};

struct BackwardProblem {
  const KolmogorovOperator* op = nullptr;
  double boundary = 0.0;        // value at theta = pi: 0 for the cdf, 1 for the survival
  double x_start = 0.0;         // terminal x (largest)
  double x_end = 0.0;           // x_end < x_start
  std::vector<double> initial;  // nodal values 0..N-1 at x_start
  // Error control per component: tolerance max(min(bulk, tail_relative * |u|), floor). Values
  // near 1 get the absolute bulk tolerance, tiny tail values keep tail_relative digits, and
  // values below the floor do not matter to any reported number.
  double bulk_tolerance = 1e-12;
  double tail_relative = 1e-9;
  double floor = 1e-30;
};

// The dense-output state at any x of the current step: fills the full nodal vector (N+1 values)
// and, if slope is not null, its x-derivative (the derivative of CVODE's interpolating
// polynomial, which unlike the right-hand side at the interpolated state does not amplify the
// interpolation error of stiff components).
using DenseOutput = std::function<void(double x, double* full, double* slope)>;
// Called once per output point (outputs in decreasing order) with the nodal vector and slope.
using OutputObserver = std::function<void(int index, double x, const double* full, const double* slope)>;
// Called after every internal step that covered [x_new, x_old].
using StepObserver = std::function<void(double x_new, double x_old, const DenseOutput& dense)>;

// Integrates from x_start down to x_end, reporting the requested outputs (each in
// [x_end, x_start], decreasing) through dense output. Throws SolveError on integrator failure.
IntegratorCounters integrate_backward(const BackwardProblem& problem, std::span<const double> outputs,
                                      const OutputObserver& on_output, const StepObserver& on_step);

}  // namespace edgelaw
