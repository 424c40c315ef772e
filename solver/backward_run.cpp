// CVODE driver: RAII ownership of the SUNDIALS objects, one-step mode with dense output.
#include "solver/backward_run.h"

#include <cvode/cvode.h>
#include <nvector/nvector_serial.h>
#include <sundials/sundials_context.h>
#include <sunlinsol/sunlinsol_band.h>
#include <sunmatrix/sunmatrix_band.h>

#include <algorithm>
#include <cmath>
#include <exception>
#include <memory>
#include <string>

#include "solver/solver.h"

namespace edgelaw {

IntegratorCounters& IntegratorCounters::operator+=(const IntegratorCounters& o) {
  steps += o.steps;
  rhs_evals += o.rhs_evals;
  jac_evals += o.jac_evals;
  newton_iters += o.newton_iters;
  error_test_failures += o.error_test_failures;
  return *this;
}

namespace {

void check(int flag, const char* call) {
  if (flag < 0) {
    const char* name = CVodeGetReturnFlagName(flag);
    std::string text = std::string("CVODE ") + call + " failed: " + (name ? name : "unknown flag");
    throw SolveError(text);
  }
}
template <class T>
T* check_ptr(T* p, const char* call) {
  if (!p) throw SolveError(std::string("SUNDIALS ") + call + " returned null (out of memory?)");
  return p;
}

struct ContextDeleter { void operator()(SUNContext c) const { SUNContext_Free(&c); } };
struct VectorDeleter { void operator()(N_Vector v) const { N_VDestroy(v); } };
struct MatrixDeleter { void operator()(SUNMatrix m) const { SUNMatDestroy(m); } };
struct SolverDeleter { void operator()(SUNLinearSolver s) const { SUNLinSolFree(s); } };
struct CvodeDeleter { void operator()(void* m) const { CVodeFree(&m); } };
using Context = std::unique_ptr<std::remove_pointer_t<SUNContext>, ContextDeleter>;
using Vector = std::unique_ptr<std::remove_pointer_t<N_Vector>, VectorDeleter>;
using Matrix = std::unique_ptr<std::remove_pointer_t<SUNMatrix>, MatrixDeleter>;
using LinearSolver = std::unique_ptr<std::remove_pointer_t<SUNLinearSolver>, SolverDeleter>;
using CvodeMemory = std::unique_ptr<void, CvodeDeleter>;

struct CallbackData {
  const KolmogorovOperator* op;
  double boundary;
  double bulk, tail_relative, floor;  // error weights, see BackwardProblem
  std::exception_ptr error;  // exceptions never cross the C callbacks
};

int weight_callback(N_Vector u, N_Vector ewt, void* data) {
  auto* d = static_cast<CallbackData*>(data);
  const double* v = N_VGetArrayPointer(u);
  double* e = N_VGetArrayPointer(ewt);
  const sunindextype n = N_VGetLength(u);
  for (sunindextype i = 0; i < n; ++i) {
    const double tol = std::max(std::min(d->bulk, d->tail_relative * std::abs(v[i])), d->floor);
    e[i] = 1.0 / tol;
  }
  return 0;
}

int rhs_callback(realtype x, N_Vector u, N_Vector du, void* data) {
  auto* d = static_cast<CallbackData*>(data);
  try {
    d->op->rhs(x, N_VGetArrayPointer(u), d->boundary, N_VGetArrayPointer(du));
    return 0;
  } catch (...) {
    d->error = std::current_exception();
    return -1;
  }
}

int jacobian_callback(realtype x, N_Vector, N_Vector, SUNMatrix jac, void* data, N_Vector, N_Vector, N_Vector) {
  auto* d = static_cast<CallbackData*>(data);
  try {
    d->op->jacobian(x, jac);
    return 0;
  } catch (...) {
    d->error = std::current_exception();
    return -1;
  }
}

// CVODE reports through this handler; warnings are dropped (the counters and the error
// estimate tell the story), errors become the exception text.
void error_handler(int code, const char* module, const char* function, char* message, void* data) {
  if (code >= 0) return;
  auto* text = static_cast<std::string*>(data);
  *text = std::string(module) + " " + function + ": " + message;
}

}  // namespace

IntegratorCounters integrate_backward(const BackwardProblem& problem, std::span<const double> outputs,
                                      const OutputObserver& on_output, const StepObserver& on_step) {
  const int n = problem.op->unknowns();
  if (static_cast<int>(problem.initial.size()) != n) throw SolveError("initial data has the wrong size");

  SUNContext raw_context = nullptr;
  check(SUNContext_Create(nullptr, &raw_context), "SUNContext_Create");
  Context context(raw_context);
  Vector u(check_ptr(N_VNew_Serial(n, raw_context), "N_VNew_Serial"));
  Vector dense(check_ptr(N_VNew_Serial(n, raw_context), "N_VNew_Serial"));
  std::copy(problem.initial.begin(), problem.initial.end(), N_VGetArrayPointer(u.get()));

  CvodeMemory mem(check_ptr(CVodeCreate(CV_BDF, raw_context), "CVodeCreate"));
  void* cv = mem.get();
  CallbackData data{problem.op, problem.boundary, problem.bulk_tolerance, problem.tail_relative, problem.floor,
                    nullptr};
  check(CVodeInit(cv, rhs_callback, problem.x_start, u.get()), "CVodeInit");
  check(CVodeSetUserData(cv, &data), "CVodeSetUserData");
  check(CVodeWFtolerances(cv, weight_callback), "CVodeWFtolerances");
  check(CVodeSetStopTime(cv, problem.x_end), "CVodeSetStopTime");
  std::string last_error;
  check(CVodeSetErrHandlerFn(cv, error_handler, &last_error), "CVodeSetErrHandlerFn");
  // The terminal data is a sharp step; CVODE's own first-step guess can underflow against x.
  check(CVodeSetInitStep(cv, -1e-12 * std::max(1.0, std::abs(problem.x_start))), "CVodeSetInitStep");
  check(CVodeSetMaxErrTestFails(cv, 20), "CVodeSetMaxErrTestFails");
  check(CVodeSetMaxNumSteps(cv, 1000000), "CVodeSetMaxNumSteps");

  Matrix jac(check_ptr(SUNBandMatrix(n, KolmogorovOperator::kUpperBand, KolmogorovOperator::kLowerBand, raw_context),
                       "SUNBandMatrix"));
  LinearSolver ls(check_ptr(SUNLinSol_Band(u.get(), jac.get(), raw_context), "SUNLinSol_Band"));
  check(CVodeSetLinearSolver(cv, ls.get(), jac.get()), "CVodeSetLinearSolver");
  check(CVodeSetJacFn(cv, jacobian_callback), "CVodeSetJacFn");

  std::vector<double> full(n + 1), slope(n + 1);
  const DenseOutput dense_output = [&](double x, double* out, double* out_slope) {
    check(CVodeGetDky(cv, x, 0, dense.get()), "CVodeGetDky");
    const double* v = N_VGetArrayPointer(dense.get());
    std::copy(v, v + n, out);
    out[n] = problem.boundary;
    if (out_slope) {
      check(CVodeGetDky(cv, x, 1, dense.get()), "CVodeGetDky");
      std::copy(v, v + n, out_slope);
      out_slope[n] = 0.0;
    }
  };

  std::size_t next = 0;
  double x_old = problem.x_start;
  // Outputs at the terminal point itself come from the initial data.
  while (next < outputs.size() && outputs[next] >= problem.x_start) {
    std::copy(problem.initial.begin(), problem.initial.end(), full.begin());
    full[n] = problem.boundary;
    problem.op->rhs(problem.x_start, full.data(), problem.boundary, slope.data());
    slope[n] = 0.0;
    on_output(static_cast<int>(next), outputs[next], full.data(), slope.data());
    ++next;
  }
  while (x_old > problem.x_end) {
    realtype x_new = x_old;
    const int flag = CVode(cv, problem.x_end, u.get(), &x_new, CV_ONE_STEP);
    if (data.error) std::rethrow_exception(data.error);
    if (flag < 0) throw SolveError("CVODE failed at x = " + std::to_string(x_new) + ": " + last_error);
    while (next < outputs.size() && outputs[next] >= x_new) {
      dense_output(outputs[next], full.data(), slope.data());
      on_output(static_cast<int>(next), outputs[next], full.data(), slope.data());
      ++next;
    }
    if (on_step) on_step(x_new, x_old, dense_output);
    x_old = x_new;
  }

  IntegratorCounters c;
  check(CVodeGetNumSteps(cv, &c.steps), "CVodeGetNumSteps");
  check(CVodeGetNumRhsEvals(cv, &c.rhs_evals), "CVodeGetNumRhsEvals");
  check(CVodeGetNumJacEvals(cv, &c.jac_evals), "CVodeGetNumJacEvals");
  check(CVodeGetNumNonlinSolvIters(cv, &c.newton_iters), "CVodeGetNumNonlinSolvIters");
  check(CVodeGetNumErrTestFails(cv, &c.error_test_failures), "CVodeGetNumErrTestFails");
  return c;
}

}  // namespace edgelaw
