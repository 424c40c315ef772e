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
  int reference_node = -1;  // after the switch to the complement, see weight_callback
  double scale_rate = 0.0;             // > 0 once the state is G = e^phi F (BackwardProblem::left_tail_rate)
  void* cvode = nullptr;               // for the current x in weight_callback
  std::exception_ptr error;  // exceptions never cross the C callbacks

  // phi = cap tanh(rate s^3 / cap), s = max(0, -x): the left tail's decay, smoothly bounded so that
  // e^phi stays finite for any x (below x ~ -(24 cap / beta)^{1/3} every value is under the floor).
  static constexpr double kCap = 200.0;
  double phi(double x) const {
    const double s = std::max(0.0, -x);
    return kCap * std::tanh(scale_rate * s * s * s / kCap);
  }
  double phi_slope(double x) const {  // d phi / dx
    const double s = std::max(0.0, -x), t = std::tanh(scale_rate * s * s * s / kCap);
    return -3.0 * scale_rate * s * s * (1.0 - t * t);
  }
};

// Share of the reference node's relative tolerance given to the nodes beyond it as a floor.
constexpr double kBelowReference = 1e-2;

int weight_callback(N_Vector u, N_Vector ewt, void* data) {
  auto* d = static_cast<CallbackData*>(data);
  const double* v = N_VGetArrayPointer(u);
  double* e = N_VGetArrayPointer(ewt);
  const sunindextype n = N_VGetLength(u);
  // With the scaled state G = e^phi F every absolute tolerance of F is multiplied by e^phi.
  double scale = 1.0;
  if (d->scale_rate > 0) {
    realtype x = 0;
    if (CVodeGetCurrentTime(d->cvode, &x) < 0) return -1;
    scale = std::exp(d->phi(x));
  }
  const double bulk = d->bulk * scale;
  double floor = d->floor * scale;
  // After the switch to the cdf: every value gets as floor the smaller of the bulk tolerance
  // and kBelowReference times the relative tolerance of the reference node (the last with
  // w >= 0; the cdf decreases toward theta = pi, so every node with relative accuracy to keep
  // is above it). Nodes beyond it (w < 0) reach those only through paths about to explode,
  // so their errors arrive attenuated. Without it, the complement 1 - S at the switch, right
  // only to ~1e-16 absolute where the cdf is far smaller, made CVODE follow roundoff at
  // relative 1e-10: ~3000 extra steps on 800 intervals.
  if (d->reference_node >= 0)
    floor = std::max(floor, std::min(bulk, kBelowReference * d->tail_relative * std::abs(v[d->reference_node])));
  for (sunindextype i = 0; i < n; ++i) {
    const double tol = std::max(std::min(bulk, d->tail_relative * std::abs(v[i])), floor);
    e[i] = 1.0 / tol;
  }
  return 0;
}

int rhs_callback(realtype x, N_Vector u, N_Vector du, void* data) {
  auto* d = static_cast<CallbackData*>(data);
  try {
    d->op->rhs(x, N_VGetArrayPointer(u), d->boundary, N_VGetArrayPointer(du));
    if (d->scale_rate > 0) N_VLinearSum(1.0, du, d->phi_slope(x), u, du);  // (e^phi F)' = phi' G + e^phi F'
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
    if (d->scale_rate > 0) {
      const double slope = d->phi_slope(x);
      for (sunindextype i = 0; i < SM_COLUMNS_B(jac); ++i) SM_ELEMENT_B(jac, i, i) += slope;
    }
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

// CVODE's counters since the last (re)initialisation.
IntegratorCounters counters_of(void* cv) {
  IntegratorCounters c;
  check(CVodeGetNumSteps(cv, &c.steps), "CVodeGetNumSteps");
  check(CVodeGetNumRhsEvals(cv, &c.rhs_evals), "CVodeGetNumRhsEvals");
  check(CVodeGetNumJacEvals(cv, &c.jac_evals), "CVodeGetNumJacEvals");
  check(CVodeGetNumNonlinSolvIters(cv, &c.newton_iters), "CVodeGetNumNonlinSolvIters");
  check(CVodeGetNumErrTestFails(cv, &c.error_test_failures), "CVodeGetNumErrTestFails");
  return c;
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
                    -1, 0.0, cv, nullptr};
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
  std::vector<double> value_scratch(n + 1);
  const DenseOutput dense_output = [&](double x, double* out, double* out_slope) {
    const double* v = N_VGetArrayPointer(dense.get());
    // The value is needed for itself, or to unscale the slope of G = e^phi F.
    if (!out && data.scale_rate > 0) out = value_scratch.data();
    if (out) {
      check(CVodeGetDky(cv, x, 0, dense.get()), "CVodeGetDky");
      std::copy(v, v + n, out);
      out[n] = data.boundary;
    }
    if (out_slope) {
      check(CVodeGetDky(cv, x, 1, dense.get()), "CVodeGetDky");
      std::copy(v, v + n, out_slope);
      out_slope[n] = 0.0;
    }
    if (data.scale_rate > 0) {  // back from G = e^phi F: F = e^-phi G, F' = e^-phi (G' - phi' G)
      const double unscale = std::exp(-data.phi(x)), phi_slope = data.phi_slope(x);
      if (out_slope)
        for (int i = 0; i < n; ++i) out_slope[i] = unscale * (out_slope[i] - phi_slope * out[i]);
      for (int i = 0; i < n; ++i) out[i] *= unscale;
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
    on_output(static_cast<int>(next), outputs[next], full.data(), slope.data(), false);
    ++next;
  }
  IntegratorCounters totals;
  bool complemented = false;
  while (x_old > problem.x_end) {
    if (problem.cancel && problem.cancel->load(std::memory_order_relaxed)) throw SolveError("solve abandoned");
    realtype x_new = x_old;
    const int flag = CVode(cv, problem.x_end, u.get(), &x_new, CV_ONE_STEP);
    if (data.error) std::rethrow_exception(data.error);
    if (flag < 0) throw SolveError("CVODE failed at x = " + std::to_string(x_new) + ": " + last_error);
    while (next < outputs.size() && outputs[next] >= x_new) {
      dense_output(outputs[next], full.data(), slope.data());
      on_output(static_cast<int>(next), outputs[next], full.data(), slope.data(), complemented);
      ++next;
    }
    if (on_step) on_step(x_new, x_old, dense_output, complemented);
    x_old = x_new;
    if (!complemented && problem.complement_above > 0 && x_new > problem.x_end) {
      double* v = N_VGetArrayPointer(u.get());
      if (*std::min_element(v, v + n) >= problem.complement_above) {
        // CVODE has no way to complement its history, so it restarts (at order 1, from its own
        // first-step estimate: the state is smooth here, unlike the terminal step).
        totals += counters_of(cv);
        data.boundary = 1.0 - data.boundary;
        data.scale_rate = data.boundary == 0.0 ? problem.left_tail_rate : 0.0;
        const double scale = std::exp(data.phi(x_new));
        for (int i = 0; i < n; ++i) v[i] = scale * (1.0 - v[i]);
        check(CVodeReInit(cv, x_new, u.get()), "CVodeReInit");
        check(CVodeSetInitStep(cv, 0.0), "CVodeSetInitStep");
        check(CVodeSetStopTime(cv, problem.x_end), "CVodeSetStopTime");
        complemented = true;
        data.reference_node = problem.reference_node;
      }
    }
  }

  totals += counters_of(cv);
  return totals;
}

}  // namespace edgelaw
