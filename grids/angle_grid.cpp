// Angle grid construction and stencil weights (via Fornberg's algorithm on the actual nodes).
#include "grids/angle_grid.h"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <stdexcept>
#include <string>

#include "grids/finite_difference.h"

namespace edgelaw {

AngleGrid::AngleGrid(int intervals) : AngleGrid(intervals, [](double s) { return std::numbers::pi * s; }) {}

AngleGrid::AngleGrid(int intervals, const std::function<double(double)>& map) {
  if (intervals < 8) throw std::invalid_argument("angle grid needs at least 8 intervals, got " + std::to_string(intervals));
  theta_.resize(intervals + 1);
  for (int i = 0; i <= intervals; ++i) theta_[i] = map(static_cast<double>(i) / intervals);
  theta_.front() = 0.0;
  theta_.back() = std::numbers::pi;
  for (int i = 1; i <= intervals; ++i)
    if (!(theta_[i] > theta_[i - 1])) throw std::invalid_argument("angle grid map is not increasing");
  build_stencils();
}

AngleGrid AngleGrid::with_density(int intervals, const std::function<double(double)>& density) {
  // Tabulate the cumulative density finely (Simpson per cell) and invert it by cubic Hermite
  // interpolation with the exact slope 1/density, so the map is smooth on every grid level.
  const int table = 1 << 16;
  std::vector<double> theta(table + 1), cumulative(table + 1), slope(table + 1);
  for (int k = 0; k <= table; ++k) {
    theta[k] = std::numbers::pi * k / table;
    slope[k] = density(theta[k]);
    if (!(slope[k] > 0) || !std::isfinite(slope[k])) throw std::invalid_argument("grid density must be positive");
  }
  cumulative[0] = 0;
  for (int k = 1; k <= table; ++k) {
    const double mid = density(0.5 * (theta[k - 1] + theta[k]));
    cumulative[k] = cumulative[k - 1] + (theta[k] - theta[k - 1]) * (slope[k - 1] + 4 * mid + slope[k]) / 6;
  }
  const double total = cumulative[table];
  auto map = [&](double s) {
    const double c = s * total;
    const int k = std::clamp(static_cast<int>(std::upper_bound(cumulative.begin(), cumulative.end(), c) -
                                              cumulative.begin()) - 1, 0, table - 1);
    const double dc = cumulative[k + 1] - cumulative[k], t = (c - cumulative[k]) / dc;
    const double m0 = dc / slope[k], m1 = dc / slope[k + 1];  // d theta / dt at the ends
    const double h00 = (1 + 2 * t) * (1 - t) * (1 - t), h10 = t * (1 - t) * (1 - t);
    const double h01 = t * t * (3 - 2 * t), h11 = t * t * (t - 1);
    return h00 * theta[k] + h10 * m0 + h01 * theta[k + 1] + h11 * m1;
  };
  return AngleGrid(intervals, map);
}

Stencil AngleGrid::make(int i, int first, int size, int order) const {
  Stencil s;
  s.first = first;
  s.size = size;
  const auto w = finite_difference_weights(theta_[i], std::span(theta_).subspan(first, size), order);
  for (int k = 0; k < size; ++k) s.weight[k] = w(k, order);
  return s;
}

void AngleGrid::build_stencils() {
  const int n = intervals();
  first_plus_.resize(n);
  first_minus_.resize(n);
  second_.resize(n);
  for (int i = 0; i < n; ++i) {
    // Sixth order (measured on the default table: the former fourth-order stencils needed 3200
    // intervals for 1e-9 and 6400 for 1e-10; these reach 1e-10 with 800).
    // First derivative: 7 points biased one node toward the upwind side, the most upwind
    // choice that is stable for pure advection (four upwind, two downwind nodes); a stencil
    // clamped toward the downwind side near the inflow node N has nearly imaginary
    // eigenvalues that stall BDF, and central stencils there can grow (measured: a central
    // seven-point stencil at node N-3 gave Re lambda = +0.56 at 100 intervals, x = 15.3; the
    // former central stencils at N-1, N-2 gave +2.8 at 16 and 32 intervals). So the last three
    // nodes use stencils biased upwind of orders 1, 3 and 4: dissipative, and the solution is
    // ~0 or ~1 there, so the lower order costs nothing. Near theta = 0 the stencils are shifted
    // inward (outflow, drift +1). The discrete operator's spectrum stays in the left
    // half-plane up to the near-null mode: tests/solver_operator_test.cpp.
    if (i == n - 1)
      first_plus_[i] = make(i, n - 1, 2, 1);
    else if (i == n - 2)
      first_plus_[i] = make(i, n - 3, 4, 1);
    else if (i == n - 3)
      first_plus_[i] = make(i, n - 4, 5, 1);
    else
      first_plus_[i] = make(i, std::clamp(i - 2, 0, n - 6), 7, 1);
    first_minus_[i] = make(i, std::clamp(i - 4, 0, n - 6), 7, 1);
    // Second derivative: 7-point central, 8-point shifted near the ends.
    if (i - 3 >= 0 && i + 3 <= n)
      second_[i] = make(i, i - 3, 7, 2);
    else
      second_[i] = make(i, std::clamp(i - 3, 0, n - 7), 8, 2);
  }
}

int AngleGrid::last_node_at_most(double theta) const {
  if (!(theta >= 0.0 && theta <= std::numbers::pi)) throw std::invalid_argument("angle outside [0, pi]");
  return static_cast<int>(std::upper_bound(theta_.begin(), theta_.end(), theta) - theta_.begin()) - 1;
}

PointWeights AngleGrid::point_weights(double theta) const {
  const int n = intervals();
  if (!(theta >= 0.0 && theta <= std::numbers::pi)) throw std::invalid_argument("angle outside [0, pi]");
  const int right = static_cast<int>(std::upper_bound(theta_.begin(), theta_.end(), theta) - theta_.begin());
  PointWeights p;
  p.size = 8;
  p.first = std::clamp(right - 4, 0, n + 1 - p.size);
  const auto w = finite_difference_weights(theta, std::span(theta_).subspan(p.first, p.size), 0);
  for (int k = 0; k < p.size; ++k) p.value[k] = w(k, 0);
  return p;
}

}  // namespace edgelaw
