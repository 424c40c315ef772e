// Accurate, range-checked evaluation of one LawTable between its grid points.
//
// In x (thresholds) the cdf and survival are Hermite interpolants that use the stored
// density as the exact slope: quintic (second derivatives from fourth-order differences of
// the density; sixth order) wherever that stays monotone on the cell, otherwise a cubic
// with Fritsch-Carlson limited slopes (monotone by construction, fourth order). They are
// taken on log_cdf / log_survival where the values are small so the tails keep their
// relative accuracy. In w the rows are combined by local Lagrange interpolation (8 points
// by default) before the x step, so the result is monotone in x for every w.
// The density is interpolated by local Lagrange in x. Each result carries an error
// estimate: the stored error carried through the interpolation weights plus an estimate of
// the interpolation error itself. Nothing is extrapolated: queries outside the table throw.
#pragma once

#include "solver/solver.h"
#include "tables/hdf5_handle.h"

#include <string>
#include <vector>

namespace edgelaw {

// A query outside the table (x, w, beta or probability); never answered by extrapolation.
struct TableRangeError : TableError {
  using TableError::TableError;
};

// A value with its estimated absolute error.
struct Estimate {
  double value = 0;
  double error = 0;
};

struct InterpolationOptions {
  // Rows combined in w (Lagrange); more points is more accurate on smooth tables and
  // costs linearly. Measured at w step 0.05 on the test family: max cdf error 2.7e-11
  // with 6 points, 1.2e-13 with 8, 3e-15 with 10. At least 2.
  int w_points = 8;
  // Columns combined in x for the density (Lagrange); at least 2.
  int density_points = 6;
  // Below this value the cdf (or survival) is interpolated as a logarithm, which keeps
  // the relative accuracy in the tails where absolute errors of ~1e-11 would be ruinous.
  double log_space_below = 0.1;
  // Interpolate in the angle theta = arccot(w) in (0, pi) instead of in w, with the +inf row
  // as the node theta = 0, so values between the last finite w and +inf are interpolated
  // too. For tables whose w nodes are evenly spaced in theta (the law is smooth in theta up
  // to and including w = +inf; in w it varies like 1/w there and a polynomial in w fits it
  // badly). Tables written with evenly spaced w keep the default.
  bool w_in_angle = false;

  // Empty when valid, otherwise one line naming the problem.
  std::string check() const;
};

// Empty string when `table` is a well-formed law table (shapes, finite strictly increasing
// axes with +inf allowed only as the last w, cdf and survival finite in [0, 1], finite
// density, finite non-negative errors, moments sized like w), otherwise one line.
std::string check_law_table(const LawTable& table);

class LawInterpolator {
 public:
  // Takes the table (validated with check_law_table; throws TableError when invalid).
  explicit LawInterpolator(LawTable table, InterpolationOptions options = {});

  const LawTable& table() const { return table_; }
  const InterpolationOptions& options() const { return options_; }

  // F_beta(x; w). w = +inf is accepted only when the table has the +inf row; between the
  // last finite w and +inf nothing is interpolated (TableRangeError).
  Estimate cdf(double x, double w) const;
  // 1 - F, from the survival table itself (not 1 - cdf) so the upper tail keeps its digits.
  Estimate survival(double x, double w) const;
  Estimate density(double x, double w) const;
  // Upper-tail p-value of an observed threshold x: the survival.
  Estimate p_value(double x, double w) const { return survival(x, w); }
  // The x with F(x; w) = probability, from the cdf for probability < 0.5 and from the
  // survival otherwise; error = cdf error estimate / density at the quantile.
  Estimate quantile(double probability, double w) const;

 private:
  struct Stencil;
  struct Row;
  Stencil w_stencil(double w) const;
  Row make_row(const Stencil& s, int col_begin, int col_end) const;
  int x_cell(double x) const;
  std::pair<int, int> columns_for(int cell) const;
  double column_value(const Stencil& s, int col, bool upper) const;
  Estimate tail_value(const Row& row, bool upper, int cell, double x) const;
  Estimate density_value(const Row& row, int cell, double x) const;
  Estimate point(double x, double w, int what) const;

  LawTable table_;
  InterpolationOptions options_;
  RowMatrix log_cdf_, log_survival_;  // log of the stored values (-inf where 0)
  int finite_w_ = 0;                  // rows with finite w (the +inf row, if any, is last)
};

}  // namespace edgelaw
