// EdgeLaw: a solve or a table file behind one interface, with monotone brackets at the edges.
#include "stats/edge_law.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <numbers>

#include "solver/solver.h"
#include "tables/table_file.h"

namespace edgelaw {
namespace {

std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}

constexpr double kAiryZero = 2.338107410459767;  // -a_1, DLMF 10.4 / 9.9.

// Nodes of the angle axis: theta = arccot(w) evenly spaced from 0 (w = +inf) to
// arccot(w_min). The spacing 0.004 in theta is 0.004 in w near w = 0 and finer for |w| > 1;
// with 8-point Lagrange that measured < 1e-10 interpolation error on beta = 2 (tests).
std::vector<double> angle_axis(double w_min) {
  const double top = std::atan2(1.0, w_min);
  const int count = static_cast<int>(std::ceil(top / 0.004));
  std::vector<double> w;
  for (int k = count; k >= 1; --k) w.push_back(1.0 / std::tan(top * k / count));
  w.push_back(kInf);
  return w;
}

}  // namespace

XRange law_support(double beta, double w) {
  // Left tail log F ~ -(beta/24)|x|^3 from the Airy zero; spiked right tail
  // exp(-(beta/3) x^{3/2}); Gaussian regime for w < 0 around w^2 with standard deviation
  // 2 sqrt(|w|/beta) (design notes, section 1). 8 standard deviations ~ e^-32.
  double lo = -kAiryZero - std::cbrt(24.0 * 30.0 / beta);
  double hi = std::max(2.0, std::pow(90.0 / beta, 2.0 / 3.0));
  if (w < 0) {
    const double sd = 2.0 * std::sqrt(-w / beta);
    lo = std::min(lo, w * w - 8.0 * sd);
    hi = std::max(hi, w * w + 8.0 * sd);
  }
  return {std::floor(lo), std::ceil(hi)};
}

double w_min_for_observed(double beta, double x, double w_floor) {
  // Largest |w| with w^2 - 5 sd(w) <= max(x, 0): beyond it x is 5 sd below the outlier's mean.
  const double target = std::max(x, 0.0);
  double a = 1.0;
  for (int k = 0; k < 60; ++k) a = std::sqrt(target + 5.0 * 2.0 * std::sqrt(a / beta));
  return std::max(w_floor, -a - 0.5);
}

EdgeLaw EdgeLaw::solve(double beta, const LawRegion& region, double target) {
  if (!(region.x_min < region.x_max) || !std::isfinite(region.x_min) || !std::isfinite(region.x_max))
    throw SolveError("law region: x range [" + num(region.x_min) + ", " + num(region.x_max) + "] is empty or not finite");
  if (!std::isfinite(region.w_min)) throw SolveError("law region: w_min must be finite");
  LawRequest req;
  req.beta = beta;
  const int nx = static_cast<int>(std::round((region.x_max - region.x_min) / 0.05));
  for (int i = 0; i <= nx; ++i) req.x.push_back(region.x_min + (region.x_max - region.x_min) * i / nx);
  req.w = angle_axis(region.w_min);
  SolverOptions opt;
  opt.target_error = target;
  opt.moments = false;
  LawTable t = solve_law(req, opt);
  if (!t.summary.converged)
    throw SolveError("the law for beta " + num(beta) + " missed the accuracy target " + num(target) +
                     " (max estimated error " + num(std::max(t.summary.max_cdf_error, t.summary.max_survival_error)) + ")");
  EdgeLaw law;
  law.beta_ = beta;
  law.max_stored_error_ = std::max(t.summary.max_cdf_error, t.summary.max_survival_error);
  law.source_ = "solve (target " + num(target) + ", max estimated error " + num(law.max_stored_error_) + ", " +
                num(t.summary.wall_seconds) + " s)";
  law.x_min_ = t.x.front();
  law.x_max_ = t.x.back();
  law.w_min_ = t.w.front();
  law.has_inf_ = true;
  law.w_max_finite_ = t.w[t.w.size() - 2];
  law.gap_to_inf_ = false;  // the angle coordinate reaches +inf
  InterpolationOptions io;
  io.w_in_angle = true;
  law.solved_ = std::make_shared<const LawInterpolator>(std::move(t), io);
  return law;
}

EdgeLaw EdgeLaw::from_file(const std::string& path, double beta) {
  auto file = std::make_shared<const LawTableFile>(LawTableFile::open(path));
  EdgeLaw law;
  law.beta_ = beta;
  law.source_ = "table " + path;
  const auto& t = file->table();
  law.x_min_ = t.x.front();
  law.x_max_ = t.x.back();
  law.w_min_ = t.w.front();
  law.has_inf_ = std::isinf(t.w.back());
  law.w_max_finite_ = law.has_inf_ ? (t.w.size() > 1 ? t.w[t.w.size() - 2] : kInf) : t.w.back();
  if (law.has_inf_ && t.w.size() == 1) throw TableRangeError("table " + path + " holds only the w = +inf row");
  law.gap_to_inf_ = law.has_inf_;
  const auto& betas = file->betas();
  if (!file->is_sweep() && beta != betas.front())
    throw TableRangeError("table " + path + " holds only beta = " + num(betas.front()) + ", not " + num(beta));
  if (file->is_sweep() && (beta < betas.front() || beta > betas.back()))
    throw TableRangeError("beta " + num(beta) + " is outside the betas [" + num(betas.front()) + ", " +
                          num(betas.back()) + "] of table " + path);
  for (std::size_t k = 0; k < betas.size(); ++k) {
    const auto& s = file->table(k).summary;
    law.max_stored_error_ = std::max({law.max_stored_error_, s.max_cdf_error, s.max_survival_error});
  }
  law.file_ = std::move(file);
  return law;
}

Estimate EdgeLaw::raw(double x, double w, bool upper) const {
  if (solved_) return upper ? solved_->survival(x, w) : solved_->cdf(x, w);
  return upper ? file_->survival(x, w, beta_) : file_->cdf(x, w, beta_);
}

// Both ends of an interval [a, b] known with errors: the midpoint, with half the width plus
// the larger error as its error.
static Estimate bracket(Estimate a, Estimate b) {
  const double lo = std::min(a.value, b.value), hi = std::max(a.value, b.value);
  return {0.5 * (lo + hi), 0.5 * (hi - lo) + std::max(a.error, b.error)};
}

Estimate EdgeLaw::value(double x, double w, bool upper) const {
  if (std::isnan(x) || std::isnan(w)) throw TableRangeError("x or w is NaN");
  // A stronger spike than the region holds (w < w_min): F(x; w) <= F(x; w_min) and
  // S(x; w) >= S(x; w_min), so the value lies between the w_min row and 0 (cdf) or 1 (survival).
  if (w < w_min_) return bracket(value(x, w_min_, upper), {upper ? 1.0 : 0.0, 0.0});
  // F is increasing in x, and increasing in w (w = +inf is the Dirichlet, unspiked law).
  if (x > x_max_ || x < x_min_) {
    const double edge = x > x_max_ ? x_max_ : x_min_;
    const Estimate at_edge = value(edge, w, upper);
    // Beyond the upper edge the survival lies in [0, S(x_max)] and the cdf in [F(x_max), 1];
    // below the lower edge the cdf lies in [0, F(x_min)] and the survival in [S(x_min), 1].
    const bool toward_zero = (x > x_max_) == upper;
    return bracket(at_edge, {toward_zero ? 0.0 : 1.0, 0.0});
  }
  if (gap_to_inf_ && w > w_max_finite_ && w != kInf)
    return bracket(raw(x, w_max_finite_, upper), raw(x, kInf, upper));
  return raw(x, w, upper);
}

Estimate EdgeLaw::cdf(double x, double w) const { return value(x, w, false); }
Estimate EdgeLaw::survival(double x, double w) const { return value(x, w, true); }

Estimate EdgeLaw::raw_quantile(double probability, double w) const {
  if (solved_) return solved_->quantile(probability, w);
  return file_->quantile(probability, w, beta_);
}

Estimate EdgeLaw::quantile(double probability, double w) const {
  if (!(probability > 0 && probability < 1))
    throw TableRangeError("probability must lie strictly between 0 and 1, got " + num(probability));
  if (std::isnan(w) || w < w_min_)
    throw TableRangeError("w = " + num(w) + " is below the smallest w of the law's region (" + num(w_min_) + ")");
  // The quantile decreases in w; across the gap to +inf it is bracketed by the two rows.
  if (gap_to_inf_ && w > w_max_finite_ && w != kInf)
    return bracket(raw_quantile(probability, w_max_finite_), raw_quantile(probability, kInf));
  return raw_quantile(probability, w);
}

}  // namespace edgelaw
