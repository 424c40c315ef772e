// The spiked edge law of one beta as a function of (x, w) with error estimates, answered from a
// stored table or from a solve over the region a question needs; everything the statistics
// commands ask of the law goes through here.
#pragma once

#include <memory>
#include <string>

#include "tables/law_interpolator.h"

namespace edgelaw {

class LawTableFile;

// Where the law is needed: thresholds in [x_min, x_max], every w from w_min up to +inf.
struct LawRegion {
  double x_min = -10, x_max = 8;
  double w_min = -6;
};

struct XRange {
  double lo = 0, hi = 0;
};

// The thresholds where F_beta(.; w) is neither 0 nor 1 to about e^-30 ~ 1e-13 in both tails,
// for one w (+inf allowed), rounded outward to integers.
XRange law_support(double beta, double w);

// The strongest spike (smallest w, floored at w_floor) under which an observed threshold x
// is still not deep in the lower tail: F_beta(x; w) < ~1e-7 below it, by the Gaussian regime's
// mean w^2 and standard deviation 2 sqrt(|w|/beta) (design notes, section 1).
double w_min_for_observed(double beta, double x, double w_floor);

class EdgeLaw {
 public:
  // Solves over the region (x step 0.05, w evenly spaced in the angle arccot w, +inf
  // included) and refuses to answer unless the solve met `target`.
  static EdgeLaw solve(double beta, const LawRegion& region, double target);
  // Answers from a law or sweep file (beta must be one of its betas or between them).
  static EdgeLaw from_file(const std::string& path, double beta);

  double beta() const { return beta_; }
  // "solve at target 1e-08 ..." or "table FILE"
  const std::string& source() const { return source_; }
  // Largest estimated error of the underlying values (the solve's, or the file's).
  double max_stored_error() const { return max_stored_error_; }
  // The smallest w with values; below it (spikes beyond the region) the law's monotonicity in w
  // still bounds the cdf and survival from one side (reported as a wide bracket).
  double w_min() const { return w_min_; }

  // F_beta(x; w), the survival 1 - F (from its own table), the quantile in x. Outside the
  // region the law's monotonicity in x and w brackets the value; the bracket's half-width is
  // added to the error, so nothing is extrapolated silently.
  Estimate cdf(double x, double w) const;
  Estimate survival(double x, double w) const;
  Estimate quantile(double probability, double w) const;

 private:
  EdgeLaw() = default;
  Estimate value(double x, double w, bool upper) const;
  Estimate raw(double x, double w, bool upper) const;
  Estimate raw_quantile(double probability, double w) const;

  double beta_ = 0;
  std::string source_;
  double max_stored_error_ = 0;
  double x_min_ = 0, x_max_ = 0, w_min_ = 0, w_max_finite_ = 0;
  bool has_inf_ = false, gap_to_inf_ = false;
  std::shared_ptr<const LawInterpolator> solved_;
  std::shared_ptr<const LawTableFile> file_;
};

}  // namespace edgelaw
