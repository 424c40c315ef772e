// Fornberg's recursion for finite-difference weights; see finite_difference.h.
#include "grids/finite_difference.h"

#include <stdexcept>

namespace edgelaw {

Eigen::MatrixXd finite_difference_weights(double z, std::span<const double> nodes, int max_order) {
  const int n = static_cast<int>(nodes.size());
  if (n == 0 || max_order < 0) throw std::invalid_argument("finite_difference_weights: empty stencil");
  Eigen::MatrixXd c = Eigen::MatrixXd::Zero(n, max_order + 1);
  double c1 = 1.0;
  double c4 = nodes[0] - z;
  c(0, 0) = 1.0;
  for (int i = 1; i < n; ++i) {
    const int mn = std::min(i, max_order);
    double c2 = 1.0;
    const double c5 = c4;
    c4 = nodes[i] - z;
    for (int j = 0; j < i; ++j) {
      const double c3 = nodes[i] - nodes[j];
      c2 *= c3;
      if (j == i - 1) {
        for (int k = mn; k >= 1; --k) c(i, k) = c1 * (k * c(i - 1, k - 1) - c5 * c(i - 1, k)) / c2;
        c(i, 0) = -c1 * c5 * c(i - 1, 0) / c2;
      }
      for (int k = mn; k >= 1; --k) c(j, k) = (c4 * c(j, k) - k * c(j, k - 1)) / c3;
      c(j, 0) = c4 * c(j, 0) / c3;
    }
    c1 = c2;
  }
  return c;
}

}  // namespace edgelaw
