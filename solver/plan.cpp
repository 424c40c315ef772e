// Range and grid choices from the tail asymptotics of the law (design notes, section 1).
#include "solver/plan.h"

#include <algorithm>
#include <cmath>
#include <numbers>

namespace edgelaw {

namespace {
constexpr double kAiryZero = -2.338107410459767;  // a_1, first zero of Ai (DLMF 9.9.1, Table 9.9.1)
// Tail depth in e-folds: e^-40 ~ 4e-18 is below anything a double cdf or a moment can see.
constexpr double kTailDepth = 40.0;
// Nodes per front width on the coarsest level at the narrowest front (x = x_high). The default
// beta = 2 table (x_high ~ 15) has 5.4 with the standing weight 4 and 200 intervals (beta = 1:
// 4.6, beta = 4: 6.0), so its plan is unchanged;
// with 0.36 (beta = 2, x_high = 160, needed for w = -12) the semi-discrete operator had a
// growing mode (Re lambda = +6.7 at 200 intervals, stable at 400: measured with the spectrum
// probe of tests/solver_operator_test.cpp). So every plan gets at least kNodesPerFront.
constexpr double kNodesPerFront = 4.0;

// Width in theta of the cdf's jump across the unstable branch at x (see grid_density).
double front_width(double beta, double x) {
  const double sigma = 2.0 / std::sqrt(beta);
  return sigma / (2.0 * std::pow(x, 0.25) * (1.0 + x));  // sin^2(psi) = 1 / (1 + x)
}

// Raises the front weight, and the coarsest grid if the weight alone cannot do it, until the
// coarsest level puts kNodesPerFront nodes across the narrowest front. Node spacing there is
// total / (N (1 + W)) with total = pi + W S, S the integral of the front share.
// A base grid fixed by the caller (refinement studies, benchmarks) keeps the standing weight.
void resolve_narrowest_front(Plan& plan) {
  const double width = front_width(plan.beta, std::max(plan.front_until, 1.0));
  // S by the midpoint rule on a grid much finer than any front (grid_density - 1 at weight 1).
  const double weight = plan.front_weight;
  plan.front_weight = 1.0;
  double share = 0.0;
  const int cells = 1 << 16;
  for (int k = 0; k < cells; ++k) share += plan.grid_density(std::numbers::pi * (k + 0.5) / cells) - 1.0;
  share *= std::numbers::pi / cells;
  plan.front_weight = weight;
  double c = plan.base_intervals * width / kNodesPerFront;  // total / (1 + W) must not exceed c
  if (c <= 2.0 * share) {
    plan.base_intervals = static_cast<int>(std::ceil(2.0 * share * kNodesPerFront / width / 8.0) * 8);
    c = plan.base_intervals * width / kNodesPerFront;
  }
  plan.front_weight = std::max(weight, (std::numbers::pi - c) / (c - share));  // c >= 2 S: W <= pi / S
}
}  // namespace

double Plan::grid_density(double theta) const {
  // For x > 0 the cdf jumps from 1 to 0 across the unstable branch p = -sqrt(x), i.e.
  // psi = pi - theta = arctan(1/sqrt(x)), over a width sigma / (2 x^{1/4}) in p (the escape law
  // of the linearised unstable Ornstein-Uhlenbeck process, sigma = 2/sqrt(beta)), which is
  // sigma sin^2(psi) / (2 sqrt(cot psi)) in theta. Put nodes in inverse proportion to it.
  const double sigma = 2.0 / std::sqrt(beta);
  auto inverse_width = [sigma](double psi) {
    const double s = std::sin(psi);
    return 2.0 * std::sqrt(std::cos(psi) / s) / (sigma * s * s);
  };
  const double psi = std::numbers::pi - theta;
  const double psi_last = std::atan(1.0 / std::sqrt(front_until));
  const double reference = inverse_width(psi_last);
  double share = 0.0;
  if (psi >= std::numbers::pi / 2)
    share = 0.0;
  else if (psi >= psi_last)
    share = inverse_width(psi) / reference;
  else  // beyond the last front that matters: relax smoothly back to uniform
    share = std::exp(-std::pow(3.0 * (psi_last - psi) / psi_last, 2));
  return 1.0 + front_weight * share;
}

double Plan::bulk_tolerance_at(int level) const {
  return std::min(bulk_tolerance * std::pow(16.0, -level), bulk_cap);
}
double Plan::tail_relative_at(int level) const {
  return std::min(tail_relative * std::pow(16.0, -level), tail_relative_cap);
}

double Plan::moment_centre(double w) const {
  // Supercritical laws sit near w^2 (design notes, section 1); others near the TW scale.
  if (w < 0) return w * w;
  return kAiryZero * std::pow(2.0 / beta, 1.0 / 6.0) * 0.75;
}

Plan make_plan(const LawRequest& req, const SolverOptions& options) {
  Plan plan;
  plan.beta = req.beta;
  const double beta = req.beta;
  const double x_top = std::max(req.x.back(), 0.0);
  // Left tail: log F ~ -(beta/24)|x|^3; start it from the beta -> inf location a_1.
  const double left = kAiryZero - std::cbrt(24.0 * kTailDepth / beta);
  plan.x_low = options.moments ? std::min(req.x.front(), left) : req.x.front();
  // Right end: spiked rows have 1 - F ~ exp(-(beta/3) x^{3/2}). The terminal data is exact up to
  // that order, so its influence on the survival at the largest requested x is damped by
  // exp(-(beta/3)(x_high^{3/2} - x_top^{3/2})); ask for half the tail depth there and the full
  // depth in absolute terms.
  const double need_relative = std::pow(std::pow(x_top, 1.5) + 1.5 * kTailDepth / beta, 2.0 / 3.0);
  const double need_absolute = std::pow(3.0 * kTailDepth / beta, 2.0 / 3.0);
  // The terminal data puts the explode / survive boundary at the unstable branch -sqrt(x), while
  // the deterministic separatrix is Ai'(x)/Ai(x) = -sqrt(x) - 1/(4x) + ...; backward in x the
  // flow contracts toward the branch only like exp(-(4/3)(x_high^{3/2} - x^{3/2})), whatever
  // beta. For large beta (weak noise) nothing else damps that mismatch: at beta = 100, 400 an
  // x_high of ~2 moved the w = -1 median by 5e-3 with a Richardson estimate of 5e-10 (found by
  // comparing solves over different x ranges). e^-24 ~ 4e-11 suffices.
  const double need_deterministic = std::pow(std::pow(x_top, 1.5) + 18.0, 2.0 / 3.0);
  plan.x_high = std::max({need_relative, need_absolute, need_deterministic, req.x.back() + 1.0});
  if (options.base_intervals > 0) {
    plan.base_intervals = options.base_intervals;
  } else {
    // Front widths in theta shrink like beta^{-1/2}, but the levels added on demand take care
    // of that; a base growing like beta^{1/4} from the 200 intervals that suit beta = 2 with
    // the sixth-order stencils (400 with the former fourth-order ones) keeps large beta
    // affordable (beta = 100 with a quarter of 400 sqrt(beta/2) converged to 1e-7 at fourth order).
    plan.base_intervals = static_cast<int>(std::ceil(200.0 * std::max(1.0, std::pow(beta / 2.0, 0.25)) / 8.0) * 8);
  }
  // The front must be resolved over the whole integration, not only the requested x: errors
  // made above x_top are carried down (measured on the default table with the fourth-order
  // stencils: the largest estimate sat at w ~ -4, x = 8 and fell from 6.0e-9 to 2.2e-9 when the
  // grid followed the front up to x_high instead of x_top + 1).
  plan.front_until = plan.x_high;
  if (options.base_intervals == 0) resolve_narrowest_front(plan);
  // The integrator's share of the estimate is time_error_factor times the finest tolerance:
  // cap the tolerances so that it is a quarter of the target on every level. The level
  // differences cannot be relied on to show time errors: with the sixth-order scheme they are
  // divided by 2^p - 1 ~ 55 (measured with the former factor 64 and tolerance 9.8e-13: errors of
  // 4.6e-10 under estimates of 1e-10). Below the integrator's own floor (time_error_floor) a
  // tighter tolerance buys nothing.
  plan.bulk_cap = std::max(options.target_error / 4.0, plan.time_error_floor) / plan.time_error_factor;
  plan.tail_relative_cap = options.tail_relative_error / (4.0 * plan.time_error_factor);
  plan.complement_above = std::clamp(4.0 * plan.bulk_cap / plan.tail_relative_cap, 1e-6, 0.5);
  return plan;
}

}  // namespace edgelaw
