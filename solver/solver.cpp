// Certified solve of the spiked edge law: a grid sequence, Richardson extrapolation, error estimates.
//
// Method (see kolmogorov.h for the equation): for each grid level (theta intervals N0, 2 N0,
// 4 N0, ...) one backward integration from the terminal x down: of the survival S (value 1 at
// theta = pi) while S is small somewhere, then of the cdf F = 1 - S (value 0 there), so that
// each tail is carried by the quantity that is small in it, under relative error control
// (BackwardProblem::complement_above, Plan::complement_above). Requested w are reached by
// degree-7 interpolation in theta, requested x by CVODE's dense output, densities from the difference operator itself,
// moments by Gauss-Legendre quadrature of the density over every internal step. The last three
// levels give the observed order p, the extrapolated value and the error estimate
//     E = max(|d_fine|, |d_coarse| / 2^p) / (2^p - 1),
// where d are the level-to-level differences; taking the coarser difference into account
// protects entries where the finest difference crosses zero by accident.
#include "solver/solver.h"

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cmath>
#include <numbers>
#include <exception>
#include <sstream>
#include <atomic>
#include <future>
#include <utility>

#include "grids/angle_grid.h"
#include "solver/backward_run.h"
#include "solver/kolmogorov.h"
#include "solver/plan.h"
#include "solver/time_budget.h"

namespace edgelaw {

namespace {

// Raw moments about a per-row centre, accumulated from the density.
struct RawMoments {
  std::vector<std::array<double, 5>> sums;  // k = 0..4 of (x - centre)^k f
};

struct LevelResult {
  RowMatrix cdf, survival, density;
  std::vector<Moments> moments;
  std::vector<double> mass;  // integral of the density over the range: ~1 when the range covers the law
  // Per requested x: 1 where the run carried the survival (x above the switch), 0 where the cdf.
  std::vector<char> survival_direct;
  IntegratorCounters counters;
};

// Smallest cdf or survival whose relative accuracy is certified.
constexpr double kTailLevel = 1e-20;
// Moments: Gauss-Legendre per internal step. Steps are ~0.003 to 0.03 long where the density
// matters and the density varies on scales ~0.1, so three points (exact to degree 5, error
// ~h^7 f^(6) / 2e6 per step) are ample; five cost 40% of a solve for no visible change.
constexpr int kQuadratureNodes = 3;
// Gauss-Legendre nodes and weights on [-1, 1] (Abramowitz & Stegun 25.4.30, three points).
constexpr std::array<double, kQuadratureNodes> kGaussNodes = {-0.7745966692414834, 0.0, 0.7745966692414834};
constexpr std::array<double, kQuadratureNodes> kGaussWeights = {5.0 / 9.0, 8.0 / 9.0, 5.0 / 9.0};

double angle_of(double w) { return std::isinf(w) ? 0.0 : std::atan2(1.0, w); }

// The survival at the terminal x (the run starts with it, solve_level).
double terminal_survival(double beta, double x, double theta) {
  // Near the unstable branch p = -sqrt(x) the Riccati diffusion is an unstable Ornstein-Uhlenbeck
  // process with rate 2 sqrt(x) and noise 2/sqrt(beta): escape upward (no explosion) has
  // probability Phi(sqrt(beta) x^{1/4} (p + sqrt(x))). Far from the branch this is 0 or 1 up to
  // terms far below double precision once x is as large as the plan makes it.
  if (theta == 0.0) return 0.0;
  const double p = std::cos(theta) / std::sin(theta);
  const double z = std::sqrt(beta) * std::pow(x, 0.25) * (p + std::sqrt(x));
  return 0.5 * std::erfc(z / std::numbers::sqrt2);
}

Moments central_moments(const std::array<double, 5>& m, double centre) {
  const double m1 = m[1], m2 = m[2], m3 = m[3], m4 = m[4];
  const double var = m2 - m1 * m1;
  const double mu3 = m3 - 3 * m1 * m2 + 2 * m1 * m1 * m1;
  const double mu4 = m4 - 4 * m1 * m3 + 6 * m1 * m1 * m2 - 3 * m1 * m1 * m1 * m1;
  return {centre + m1, var, mu3 / std::pow(var, 1.5), mu4 / (var * var) - 3.0};
}

LevelResult solve_level(const LawRequest& req, const Plan& plan, int level, const std::vector<double>& centres,
                        bool want_moments, const std::atomic<bool>* cancel) {
  const int intervals = plan.base_intervals << level;
  // Time tolerances shrink by 16 a level and are capped from the target (see
  // Plan::bulk_tolerance_at); the integrator's error reaches the estimate through
  // Plan::time_error_factor, since the sixth-order level differences hardly show it.
  const AngleGrid grid = AngleGrid::with_density(intervals, [&plan](double t) { return plan.grid_density(t); });
  const KolmogorovOperator op(req.beta, grid);
  const int n = op.unknowns();
  const int rows = static_cast<int>(req.w.size()), cols = static_cast<int>(req.x.size());

  std::vector<PointWeights> weights(rows);
  for (int r = 0; r < rows; ++r) weights[r] = grid.point_weights(angle_of(req.w[r]));
  auto interpolate = [&](const PointWeights& p, const double* full) {
    double v = 0.0;
    for (int k = 0; k < p.size; ++k) v += p.value[k] * full[p.first + k];
    return v;
  };

  std::vector<double> outputs(req.x.rbegin(), req.x.rend());  // decreasing
  LevelResult out;
  out.cdf.resize(rows, cols);
  out.survival.resize(rows, cols);
  out.density.resize(rows, cols);
  out.survival_direct.assign(cols, 1);

  std::vector<std::array<double, 5>> sums(rows, std::array<double, 5>{});
  std::vector<double> slope(n + 1, 0.0);
  // The run carries the survival S from the terminal x down to where S is large everywhere, then
  // the cdf F = 1 - S (BackwardProblem::complement_above): the density is dF/dx = -dS/dx before.
  const StepObserver accumulate = [&](double x_new, double x_old, const DenseOutput& dense, bool complemented) {
    const double sign = complemented ? 1.0 : -1.0;
    const double half = 0.5 * (x_old - x_new), mid = 0.5 * (x_old + x_new);
    for (int q = 0; q < kQuadratureNodes; ++q) {
      const double x = mid + half * kGaussNodes[q], wq = sign * half * kGaussWeights[q];
      dense(x, nullptr, slope.data());
      for (int r = 0; r < rows; ++r) {
        const double f = interpolate(weights[r], slope.data()) * wq;
        const double d = x - centres[r];
        auto& s = sums[r];
        s[0] += f;
        s[1] += f * d;
        s[2] += f * d * d;
        s[3] += f * d * d * d;
        s[4] += f * d * d * d * d;
      }
    }
  };

  BackwardProblem problem;
  problem.op = &op;
  problem.boundary = 1.0;  // the survival: explosion at theta = pi
  problem.x_start = plan.x_high;
  problem.x_end = plan.x_low;
  problem.bulk_tolerance = plan.bulk_tolerance_at(level);
  problem.tail_relative = plan.tail_relative_at(level);
  problem.floor = plan.floor;
  problem.complement_above = plan.complement_above;
  problem.cancel = cancel;
  // The last node with theta <= pi/2 (w >= 0), whose relative accuracy the cdf must keep.
  problem.reference_node = std::min(grid.last_node_at_most(std::numbers::pi / 2), n - 1);
  problem.left_tail_rate = req.beta / 24.0;  // log F ~ -(beta/24)|x|^3 (design notes, section 1)
  problem.initial.resize(n);
  for (int i = 0; i < n; ++i) problem.initial[i] = terminal_survival(req.beta, plan.x_high, grid.theta(i));
  const OutputObserver record = [&](int index, double, const double* nodal, const double* nodal_slope,
                                    bool complemented) {
    const int col = cols - 1 - index;
    RowMatrix& direct = complemented ? out.cdf : out.survival;
    RowMatrix& other = complemented ? out.survival : out.cdf;
    const double sign = complemented ? 1.0 : -1.0;
    out.survival_direct[col] = complemented ? 0 : 1;
    for (int r = 0; r < rows; ++r) {
      const double v = interpolate(weights[r], nodal);
      direct(r, col) = v;
      other(r, col) = 1.0 - v;
      out.density(r, col) = sign * interpolate(weights[r], nodal_slope);
    }
  };
  out.counters = integrate_backward(problem, outputs, record, want_moments ? accumulate : StepObserver{});
  if (want_moments) {
    out.moments.resize(rows);
    out.mass.resize(rows);
    for (int r = 0; r < rows; ++r) {
      auto m = sums[r];
      out.mass[r] = m[0];
      for (int k = 1; k < 5; ++k) m[k] /= m[0];
      out.moments[r] = central_moments(m, centres[r]);
    }
  }
  return out;
}

double observed_order(const RowMatrix& coarse, const RowMatrix& middle, const RowMatrix& fine) {
  const double d1 = (middle - coarse).cwiseAbs().maxCoeff();
  const double d2 = (fine - middle).cwiseAbs().maxCoeff();
  if (d2 == 0.0 || d1 == 0.0) return std::numeric_limits<double>::quiet_NaN();
  return std::log2(d1 / d2);
}

// Extrapolated value and error estimate from three levels with order p, plus the integrator's
// floor: the time error, which the level differences do not show (global error of BDF measured
// at up to ~490 times its local tolerance on this problem; see Plan::time_error_factor).
// `relative` marks the entries whose integrator error is relative (the quantity integrated
// directly and small); the others, computed as 1 - the integrated quantity or near 1, keep the
// absolute floor.
using EntryMask = Eigen::Array<bool, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;
void richardson(const RowMatrix& c, const RowMatrix& m, const RowMatrix& f, double p, double floor_absolute,
                double floor_relative, double floor_least, const EntryMask& relative, RowMatrix& value,
                RowMatrix& error) {
  const double g = std::pow(2.0, p);
  value.resize(f.rows(), f.cols());
  error.resize(f.rows(), f.cols());
  for (Eigen::Index i = 0; i < f.size(); ++i) {
    const double d_fine = f.data()[i] - m.data()[i];
    const double d_coarse = m.data()[i] - c.data()[i];
    value.data()[i] = f.data()[i] + d_fine / (g - 1.0);
    const double floor = relative.data()[i]
                             ? std::max(std::min(floor_absolute, floor_relative * std::abs(value.data()[i])), floor_least)
                             : floor_absolute;
    error.data()[i] = std::max(std::abs(d_fine), std::abs(d_coarse) / g) / (g - 1.0) + floor;
  }
}

// Probabilities lie in [0, 1]; an extrapolated value outside (by ~1e-14 in the far tails) is
// moved onto the interval, which brings it closer to the truth, and the move is added to its
// error estimate so the estimate stays a bound for the unclamped value too.
void clamp_probabilities(RowMatrix& value, RowMatrix& error) {
  for (Eigen::Index i = 0; i < value.size(); ++i) {
    const double v = value.data()[i], c = std::clamp(v, 0.0, 1.0);
    error.data()[i] += std::abs(v - c);
    value.data()[i] = c;
  }
}

double moment_field(const Moments& m, int k) {
  return k == 0 ? m.mean : k == 1 ? m.variance : k == 2 ? m.skewness : m.excess_kurtosis;
}
double& moment_field(Moments& m, int k) {
  return k == 0 ? m.mean : k == 1 ? m.variance : k == 2 ? m.skewness : m.excess_kurtosis;
}

// The integrator floor of the cdf (absolute, roughly uniform where 0 < F < 1) reaches the
// k-th central moment as k * floor * integral |x - mean|^{k-1} over the ~10 standard
// deviations where F is neither 0 nor 1: about 16 k floor sigma^k, taken 2.5 times larger
// (calibrated on TW_2, where the kurtosis missed 16 k by a factor 1.7). Propagated to the
// standardised skewness and kurtosis to first order.
void add_moment_floor(const Moments& m, double floor_abs, Moments& error) {
  const double sd = std::sqrt(m.variance);
  auto central = [&](int k) { return 40.0 * k * floor_abs * std::pow(sd, k); };
  error.mean += central(1);
  error.variance += central(2);
  error.skewness += central(3) / std::pow(sd, 3) + 1.5 * std::abs(m.skewness) * central(2) / m.variance;
  error.excess_kurtosis += central(4) / std::pow(sd, 4) + 2.0 * (m.excess_kurtosis + 3.0) * central(2) / m.variance;
}

std::string seconds_text(double s) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.3g", s);
  return buf;
}

}  // namespace

std::string SolverOptions::check() const {
  if (!(target_error >= 5e-11 && target_error < 0.1))
    return "target error must be in [5e-11, 0.1): the time integration cannot certify less than 5e-11";
  if (!(tail_relative_error > 0 && tail_relative_error < 1)) return "tail relative error must be in (0, 1)";
  // Levels first: the finest-grid check below shifts by max_levels - 1.
  if (min_levels < 3 || max_levels < min_levels || max_levels > 8)
    return "grid levels must satisfy 3 <= min_levels <= max_levels <= 8";
  // The finest level has base * 2^(levels-1) intervals; beyond ~1e5 a solve takes hours.
  if (base_intervals != 0 && (base_intervals < 16 || (static_cast<double>(base_intervals) * (1 << (max_levels - 1))) > 2e5))
    return "base grid must have at least 16 intervals and at most 2e5 on the finest level (or 0 for automatic)";
  if (!(max_seconds > 0)) return "time budget must be a positive number of seconds";
  return {};
}

std::string check_request(const LawRequest& req) {
  if (!(req.beta > 0) || !std::isfinite(req.beta)) return "beta must be a positive finite number";
  if (req.beta < 0.1 || req.beta > 1e4) return "beta outside the supported range [0.1, 10000]";
  if (req.x.empty()) return "no thresholds x requested";
  if (req.w.empty()) return "no boundary parameters w requested";
  if (req.x.size() > 10000000 || req.w.size() > 100000 || req.x.size() * req.w.size() > 100000000)
    return "too many requested points (more than 1e8 table entries)";
  for (std::size_t i = 0; i < req.x.size(); ++i) {
    if (!std::isfinite(req.x[i])) return "threshold x must be finite";
    if (i > 0 && !(req.x[i] > req.x[i - 1])) return "thresholds x must be strictly increasing";
  }
  if (req.x.front() < -60 || req.x.back() > 200) return "thresholds x outside the supported range [-60, 200]";
  for (std::size_t i = 0; i < req.w.size(); ++i) {
    const double w = req.w[i];
    if (std::isnan(w) || w == -kInf) return "boundary parameter w must be a number or +inf";
    if (std::isinf(w) && i + 1 != req.w.size()) return "w = +inf may only be the last boundary parameter";
    if (i > 0 && !(w > req.w[i - 1])) return "boundary parameters w must be strictly increasing";
  }
  if (req.w.front() < -12) return "boundary parameters below -12 are outside the supported range";
  return {};
}

LawTable solve_law(const LawRequest& req, const SolverOptions& options) {
  const auto start = std::chrono::steady_clock::now();
  if (auto why = check_request(req); !why.empty()) throw SolveError(why);
  if (auto why = options.check(); !why.empty()) throw SolveError(why);
  const Plan plan = make_plan(req, options);

  const int rows = static_cast<int>(req.w.size()), cols = static_cast<int>(req.x.size());
  std::vector<double> centres(rows);
  for (int r = 0; r < rows; ++r) centres[r] = plan.moment_centre(req.w[r]);

  std::vector<LevelResult> levels;
  LawTable t;
  t.beta = req.beta;
  t.x = req.x;
  t.w = req.w;
  SolveSummary& s = t.summary;
  s.beta = req.beta;
  s.x_low = plan.x_low;
  s.x_high = plan.x_high;
  s.time_tolerance = plan.bulk_tolerance_at(0);
  s.nominal_order = AngleGrid::kOrder;

  const bool prefetch_top = options.parallel_levels && options.min_levels >= 2;
  s.estimated_seconds = a_priori_seconds(plan, options.min_levels, prefetch_top);
  if (s.estimated_seconds > options.max_seconds)
    throw SolveBudgetError("the solve for beta " + seconds_text(req.beta) + " is estimated to take at least " +
                           seconds_text(s.estimated_seconds) + " s (" + std::to_string(options.min_levels) +
                           " grid levels from " + std::to_string(plan.base_intervals) + " intervals, x in [" +
                           seconds_text(plan.x_low) + ", " + seconds_text(plan.x_high) +
                           "]), over the time budget of " + seconds_text(options.max_seconds) + " s");
  // The first min_levels levels are all needed, and the finest of them is most of the work
  // (~70% with three): it starts at once on a second thread, the coarser ones run here in turn.
  struct Prefetch {
    int level = -1;
    std::atomic<bool> cancel{false};
    std::future<std::pair<LevelResult, double>> result;
    ~Prefetch() {
      cancel = true;  // an early exit (error, budget) must not wait for a whole level
      if (result.valid()) result.wait();
    }
  } prefetch;
  if (prefetch_top) {
    prefetch.level = options.min_levels - 1;
    prefetch.result = std::async(std::launch::async, [&, centres_now = centres] {
      const auto level_start = std::chrono::steady_clock::now();
      LevelResult r = solve_level(req, plan, prefetch.level, centres_now, options.moments, &prefetch.cancel);
      return std::pair{std::move(r), std::chrono::duration<double>(std::chrono::steady_clock::now() - level_start).count()};
    });
  }
  for (int level = 0; level < options.max_levels; ++level) {
    const int intervals = plan.base_intervals << level;
    if (level > 0 && level != prefetch.level) {
      const double elapsed = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
      double ahead = projected_seconds(s.level_seconds, level, options.min_levels);
      if (level < prefetch.level) {  // the top level is already running beside this thread
        const double here = projected_seconds(s.level_seconds, level, prefetch.level);
        const double top = projected_seconds(s.level_seconds, level, prefetch.level + 1) - here;
        ahead = std::max(here, top - elapsed);
      }
      if (elapsed + ahead > options.max_seconds)
        throw SolveBudgetError("the solve for beta " + seconds_text(req.beta) + " would exceed the time budget of " +
                               seconds_text(options.max_seconds) + " s: after " + seconds_text(elapsed) + " s, grid " +
                               std::to_string(intervals) + " is projected to need about " + seconds_text(ahead) +
                               " s more (grid " + std::to_string(intervals / 2) + " took " +
                               seconds_text(s.level_seconds.back()) + " s); no result kept");
    }
    // Levels beyond the first min_levels centre their moment sums on the means found so far;
    // the first ones all use the rough a-priori centres, so that a result never depends on
    // whether the finest of them ran beside the others (a resumed sweep must reproduce an
    // uninterrupted one bit for bit: tests/cli_sweep_check.py).
    if (level >= options.min_levels && options.moments)
      for (int r = 0; r < rows; ++r)
        if (std::isfinite(levels.back().moments[r].mean)) centres[r] = levels.back().moments[r].mean;
    if (level == prefetch.level) {
      auto [result, seconds] = prefetch.result.get();
      levels.push_back(std::move(result));
      s.level_seconds.push_back(seconds);
    } else {
      const auto level_start = std::chrono::steady_clock::now();
      levels.push_back(solve_level(req, plan, level, centres, options.moments, nullptr));
      s.level_seconds.push_back(std::chrono::duration<double>(std::chrono::steady_clock::now() - level_start).count());
    }
    const auto& c = levels.back().counters;
    s.intervals.push_back(intervals);
    s.steps.push_back(c.steps);
    s.rhs_evals.push_back(c.rhs_evals);
    s.jac_evals.push_back(c.jac_evals);
    s.newton_iters.push_back(c.newton_iters);
    s.error_test_failures.push_back(c.error_test_failures);
    if (static_cast<int>(levels.size()) < options.min_levels) continue;

    const auto& L0 = levels[levels.size() - 3];
    const auto& L1 = levels[levels.size() - 2];
    const auto& L2 = levels[levels.size() - 1];
    const double p_cdf = observed_order(L0.cdf, L1.cdf, L2.cdf);
    const double p_sur = observed_order(L0.survival, L1.survival, L2.survival);
    s.observed_order = std::min(std::isnan(p_cdf) ? s.nominal_order : p_cdf, std::isnan(p_sur) ? s.nominal_order : p_sur);
    // Never extrapolate with more than the scheme's order, nor estimate with less than 1.
    const double p = std::clamp(s.observed_order, 1.0, s.nominal_order);
    const int finest = static_cast<int>(levels.size()) - 1;
    const double floor_abs = std::max(plan.time_error_factor * plan.bulk_tolerance_at(finest), plan.time_error_floor);
    const double floor_rel = plan.time_error_factor * plan.tail_relative_at(finest);
    s.max_time_error = floor_abs;
    // An entry's error is relative only if every level integrated its quantity directly, and for
    // the cdf only on rows w >= 0: at the switch, 1 - S gives the cdf beyond the unstable branch
    // (w < 0, where it is far below 1e-16) only to the absolute accuracy of S, and that error
    // decays below the switch only as those rows' own values do. Paths reaching rows w >= 0
    // from there explode soon, so those rows keep their relative accuracy (measured on the
    // default table against tests/reference: 7.4e-9 relative at most over 150 left-tail entries
    // between 1e-20 and 1e-3).
    EntryMask cdf_direct(rows, cols), survival_direct(rows, cols), density_relative(rows, cols);
    for (Eigen::Index c = 0; c < cols; ++c) {
      bool s_all = true, f_all = true;
      for (const auto* L : {&L0, &L1, &L2}) {
        s_all = s_all && L->survival_direct[c];
        f_all = f_all && !L->survival_direct[c];
      }
      for (Eigen::Index r = 0; r < rows; ++r) {
        cdf_direct(r, c) = f_all && req.w[r] >= 0;
        survival_direct(r, c) = s_all;
        // The density is the slope of the integrated quantity: relative where that is the small one.
        density_relative(r, c) = (cdf_direct(r, c) && L2.cdf(r, c) <= 0.5) || (s_all && L2.survival(r, c) <= 0.5);
      }
    }
    // Below the integrator's own floor (Plan::floor) values are not controlled at all.
    const double floor_least = plan.time_error_factor * plan.floor;
    richardson(L0.cdf, L1.cdf, L2.cdf, p, floor_abs, floor_rel, floor_least, cdf_direct, t.cdf, t.cdf_error);
    richardson(L0.survival, L1.survival, L2.survival, p, floor_abs, floor_rel, floor_least, survival_direct,
               t.survival, t.survival_error);
    clamp_probabilities(t.cdf, t.cdf_error);
    clamp_probabilities(t.survival, t.survival_error);
    // Densities reach ~10 at most; their integrator floor scales with the steepest slope.
    richardson(L0.density, L1.density, L2.density, p, 10 * floor_abs, floor_rel, floor_least, density_relative,
               t.density, t.density_error);
    s.max_cdf_error = t.cdf_error.maxCoeff();
    s.max_survival_error = t.survival_error.maxCoeff();
    if (options.moments) {
      t.moments.assign(rows, {});
      t.moment_errors.assign(rows, {});
      for (int r = 0; r < rows; ++r) {
        // A law not covered by the integration range has no trustworthy moments.
        const bool covered = std::abs(L2.mass[r] - 1.0) < 1e-9;
        for (int k = 0; k < 4; ++k) {
          const double c = moment_field(L0.moments[r], k), m = moment_field(L1.moments[r], k),
                       f = moment_field(L2.moments[r], k);
          const double g = std::pow(2.0, p);
          moment_field(t.moments[r], k) = covered ? f + (f - m) / (g - 1) : std::numeric_limits<double>::quiet_NaN();
          // Moments integrate errors over the whole x range, where the levels are further from
          // the asymptotic regime than at the requested points (measured on TW_1: the
          // extrapolation gained less than its estimate claimed). So the estimate is that of the
          // finest level itself, g times the extrapolation's, plus the mass defect.
          moment_field(t.moment_errors[r], k) =
              covered ? std::max(g * std::abs(f - m), std::abs(m - c)) / (g - 1) + std::abs(L2.mass[r] - 1.0)
                      : std::numeric_limits<double>::quiet_NaN();
        }
        if (covered) add_moment_floor(t.moments[r], floor_abs, t.moment_errors[r]);
      }
    }
    // Tails: relative accuracy for entries down to 1e-20, where it can be certified: the
    // survival everywhere, the cdf on rows w >= 0 (for w < 0 the left tail lies beyond the
    // unstable branch, where the cdf decays like a Gaussian tail in w and keeps only its
    // absolute accuracy).
    s.max_tail_relative_error = 0;
    for (int r = 0; r < rows; ++r)
      for (Eigen::Index c = 0; c < t.survival.cols(); ++c) {
        if (t.survival(r, c) >= kTailLevel)
          s.max_tail_relative_error = std::max(s.max_tail_relative_error, t.survival_error(r, c) / t.survival(r, c));
        if (req.w[r] >= 0 && t.cdf(r, c) >= kTailLevel)
          s.max_tail_relative_error = std::max(s.max_tail_relative_error, t.cdf_error(r, c) / t.cdf(r, c));
      }
    s.converged = s.max_cdf_error <= options.target_error && s.max_survival_error <= options.target_error &&
                  (!options.require_tail_accuracy || s.max_tail_relative_error <= options.tail_relative_error);
    if (s.converged) break;
  }
  s.wall_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  return t;
}

std::string SolveSummary::brief() const {
  std::ostringstream o;
  o.precision(3);
  o << "beta " << beta << ": " << intervals.size() << " grids up to " << (intervals.empty() ? 0 : intervals.back())
    << " intervals, observed order " << observed_order << ", max error cdf " << max_cdf_error << " survival "
    << max_survival_error << ", tails relative " << max_tail_relative_error << ", " << wall_seconds << " s" << (converged ? "" : " (NOT converged)");
  return o.str();
}

std::string SolveSummary::full() const {
  std::ostringstream o;
  o << brief() << "\n  x range [" << x_low << ", " << x_high << "], CVODE bulk tolerance (coarsest level) " << time_tolerance << "\n";
  for (std::size_t i = 0; i < intervals.size(); ++i) {
    o << "  grid " << intervals[i] << ": steps " << steps[i] << ", rhs " << rhs_evals[i] << ", jacobians "
      << jac_evals[i] << ", newton " << newton_iters[i] << ", error-test failures " << error_test_failures[i];
    if (i < level_seconds.size()) o << ", " << level_seconds[i] << " s";
    o << "\n";
  }
  return o.str();
}

}  // namespace edgelaw
