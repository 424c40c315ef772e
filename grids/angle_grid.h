// The grid in the compactified angle theta = arccot(w) in [0, pi] and its difference stencils.
#pragma once

#include <array>
#include <functional>
#include <span>
#include <vector>

namespace edgelaw {

// Weights for one node's derivative: value ~ sum_k weight[k] * u[first + k].
struct Stencil {
  int first = 0;
  int size = 0;
  std::array<double, 8> weight{};
};

// Interpolation weights at an arbitrary angle: value ~ sum_k value[k] * u[first + k].
struct PointWeights {
  int first = 0;
  int size = 0;
  std::array<double, 8> value{};
};

// Nodes 0..N with theta_0 = 0 (w = +inf, where the drift is +1 and the diffusion vanishes, so no
// boundary condition is imposed) and theta_N = pi (explosion: a Dirichlet node). Node i sits at
// theta = map(i / N); the map must be smooth, increasing, map(0) = 0 and map(1) = pi.
class AngleGrid {
 public:
  // Uniform grid with the given number of intervals (>= 8).
  explicit AngleGrid(int intervals);
  AngleGrid(int intervals, const std::function<double(double)>& map);
  // Nodes placed so that each interval holds the same integral of the density (nodes per
  // radian, up to a constant factor), which must be positive and continuous on [0, pi].
  static AngleGrid with_density(int intervals, const std::function<double(double)>& density);

  int intervals() const { return static_cast<int>(theta_.size()) - 1; }
  double theta(int i) const { return theta_[i]; }
  std::span<const double> nodes() const { return theta_; }

  // Order of the difference stencils (and of the semi-discrete scheme).
  static constexpr int kOrder = 6;
  // Sixth-order first-derivative stencils (7 points) biased one node toward the upwind side:
  // "plus" takes its extra node from larger theta (use where the drift a > 0), "minus" from
  // smaller theta. Stencils are shifted inward at theta = 0; the last three nodes before the
  // Dirichlet node N (which they may touch) use lower-order stable closures (angle_grid.cpp).
  const Stencil& first_plus(int i) const { return first_plus_[i]; }
  const Stencil& first_minus(int i) const { return first_minus_[i]; }
  // Sixth-order second-derivative stencil (7-point central, 8-point shifted near the ends).
  const Stencil& second(int i) const { return second_[i]; }

  // Degree-7 interpolation through the 8 nodes nearest to theta (theta in [0, pi]).
  PointWeights point_weights(double theta) const;
  // The last node with angle <= theta (theta in [0, pi]).
  int last_node_at_most(double theta) const;

 private:
  void build_stencils();
  Stencil make(int i, int first, int size, int order) const;

  std::vector<double> theta_;
  std::vector<Stencil> first_plus_, first_minus_, second_;
};

}  // namespace edgelaw
