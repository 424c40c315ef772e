// Finite-difference and interpolation weights on arbitrary nodes (Fornberg's algorithm).
#pragma once

#include <Eigen/Core>
#include <span>

namespace edgelaw {

// Weights c(j, k) such that  d^k f / dz^k (z) ~= sum_j c(j, k) f(nodes[j])  for k = 0..max_order,
// exact for polynomials of degree < nodes.size(). Fornberg, "Generation of finite difference
// formulas on arbitrarily spaced grids", Math. Comp. 51 (1988). Column 0 is Lagrange interpolation.
Eigen::MatrixXd finite_difference_weights(double z, std::span<const double> nodes, int max_order);

}  // namespace edgelaw
