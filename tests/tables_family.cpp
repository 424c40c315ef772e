// Synthetic law tables with closed-form values (a Gaussian family in x whose mean and scale
// depend on w), for testing the table format and its interpolation against exact numbers.
#include "solver/solver.h"

#include <cmath>

namespace edgelaw::testing {

// Mean and scale chosen to resemble the real law (mean near -1.2..-1.8, scale near 0.9..1.1,
// the cdf increasing in w), with a finite +inf limit so the +inf row exists:
// m(w) = -1.2 - 0.6 tanh(w/2), s(w) = 1 - 0.1 tanh(w/2).
// A sweep shifts the mean by `family_shift` (set per beta by the tests).
double family_shift = 0;
double family_mean(double w) { return -1.2 - 0.6 * (w == kInf ? 1.0 : std::tanh(w / 2)) + family_shift; }
double family_scale(double w) { return 1.0 - 0.1 * (w == kInf ? 1.0 : std::tanh(w / 2)); }

double family_cdf(double x, double w) {
  return 0.5 * std::erfc(-(x - family_mean(w)) / (family_scale(w) * std::sqrt(2.0)));
}
// Computed directly (not 1 - cdf) so it keeps full relative accuracy in the upper tail.
double family_survival(double x, double w) {
  return 0.5 * std::erfc((x - family_mean(w)) / (family_scale(w) * std::sqrt(2.0)));
}
double family_density(double x, double w) {
  const double s = family_scale(w), z = (x - family_mean(w)) / s;
  return std::exp(-0.5 * z * z) / (s * std::sqrt(2 * M_PI));
}

// The family tabulated on x and w (w may end with +inf), with a constant "stored error".
LawTable make_family_table(const std::vector<double>& x, const std::vector<double>& w, double beta,
                           double stored_error) {
  LawTable t;
  t.beta = beta;
  t.x = x;
  t.w = w;
  const auto nw = static_cast<Eigen::Index>(w.size()), nx = static_cast<Eigen::Index>(x.size());
  for (RowMatrix* m : {&t.cdf, &t.survival, &t.density, &t.cdf_error, &t.survival_error, &t.density_error})
    m->resize(nw, nx);
  for (Eigen::Index j = 0; j < nw; ++j)
    for (Eigen::Index i = 0; i < nx; ++i) {
      t.cdf(j, i) = family_cdf(x[i], w[j]);
      t.survival(j, i) = family_survival(x[i], w[j]);
      t.density(j, i) = family_density(x[i], w[j]);
    }
  t.cdf_error.setConstant(stored_error);
  t.survival_error.setConstant(stored_error);
  t.density_error.setConstant(stored_error);
  for (double wj : w) {
    const double s = family_scale(wj);
    t.moments.push_back({family_mean(wj), s * s, 0.0, 0.0});
    t.moment_errors.push_back({stored_error, stored_error, stored_error, stored_error});
  }
  t.summary.beta = beta;
  t.summary.x_low = x.front();
  t.summary.x_high = x.back();
  t.summary.intervals = {400, 800, 1600};
  t.summary.steps = {812, 1433, 2671};
  t.summary.rhs_evals = {2000, 3000, 5000};
  t.summary.jac_evals = {20, 30, 41};
  t.summary.newton_iters = {900, 1500, 2900};
  t.summary.error_test_failures = {3, 4, 7};
  t.summary.time_tolerance = 1e-11;
  t.summary.observed_order = 4.37;
  t.summary.max_cdf_error = stored_error;
  t.summary.max_survival_error = stored_error;
  t.summary.max_time_error = 0.1 * stored_error;
  t.summary.wall_seconds = 12.5;
  t.summary.converged = true;
  return t;
}

std::vector<double> uniform_axis(double first, double step, int count) {
  std::vector<double> v(static_cast<std::size_t>(count));
  for (int k = 0; k < count; ++k) v[static_cast<std::size_t>(k)] = first + step * k;
  return v;
}

}  // namespace edgelaw::testing
