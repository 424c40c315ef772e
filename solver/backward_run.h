// One CVODE (BDF, banded exact Jacobian) integration of the semi-discrete equation from large x down.
#pragma once

#include <atomic>
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
  // In (0, 1) to let one run carry both tails: after the first step at whose end every unknown
  // is at least this, the run goes on with the complement 1 - u (boundary 1 - boundary). The
  // equation is linear and constants solve it, so the complement solves it too; the switch only
  // moves the error control from S (tiny in the right tail) to F = 1 - S (tiny in the left).
  // 0 never switches.
  double complement_above = 0.0;
  // After the switch: the node whose relative accuracy bounds that of all nodes before it
  // (the last with w >= 0); nodes beyond get a floor from it (weight_callback). -1: none.
  int reference_node = -1;
  // If > 0, the run carries G = e^phi(x) F after the switch, phi ~ rate * max(0, -x)^3 (capped):
  // with rate = beta / 24 that is the left tail's own decay, log F ~ -(beta/24) |x|^3, so CVODE
  // no longer has to follow a super-exponential decay to relative accuracy step by step.
  // Tolerances, outputs and slopes stay those of F.
  double left_tail_rate = 0.0;
  // When set and true, the run stops at its next step with SolveError (an abandoned solve).
  const std::atomic<bool>* cancel = nullptr;
};

// The dense-output state at any x of the current step: fills the full nodal vector (N+1 values)
// if `full` is not null and, if slope is not null, its x-derivative (the derivative of CVODE's
// interpolating polynomial, which unlike the right-hand side at the interpolated state does not
// amplify the interpolation error of stiff components).
using DenseOutput = std::function<void(double x, double* full, double* slope)>;
// Called once per output point (outputs in decreasing order) with the nodal vector and slope;
// `complemented` says whether they are of 1 - (the terminal quantity), see complement_above.
using OutputObserver =
    std::function<void(int index, double x, const double* full, const double* slope, bool complemented)>;
// Called after every internal step that covered [x_new, x_old] (a step never straddles the switch).
using StepObserver = std::function<void(double x_new, double x_old, const DenseOutput& dense, bool complemented)>;

// Integrates from x_start down to x_end, reporting the requested outputs (each in
// [x_end, x_start], decreasing) through dense output. Throws SolveError on integrator failure.
IntegratorCounters integrate_backward(const BackwardProblem& problem, std::span<const double> outputs,
                                      const OutputObserver& on_output, const StepObserver& on_step);

}  // namespace edgelaw
