// Local Lagrange interpolation weights shared by the w, x and beta directions of the tables.
#pragma once

#include <algorithm>
#include <cmath>

namespace edgelaw::lagrange {

// Basis weights of `n` nodes at `t`; exactly 1 and 0s when t is a node, which keeps stored
// values bit-identical at grid points.
inline void weights(const double* nodes, int n, double t, double* out) {
  for (int j = 0; j < n; ++j) {
    double l = 1;
    for (int k = 0; k < n; ++k)
      if (k != j) l *= (t - nodes[k]) / (nodes[j] - nodes[k]);
    out[j] = l;
  }
}

// First index of a window of `points` consecutive nodes out of `size`, centred on the cell
// [cell, cell + 1] and shifted inward at the ends.
inline int window_start(int cell, int size, int points) {
  return std::clamp(cell - (points / 2 - 1), 0, size - points);
}

// Weights with `points` nodes (hi) and with the node farthest from t dropped (lo), and
// with the other end node dropped (lo2): the differences of the interpolants estimate the
// error of the lower order, an overestimate for the higher one; taking the larger of the
// two guards against one of them vanishing by accident (common practice, no source).
inline void weight_pair(const double* nodes, int points, double t, double* hi, double* lo,
                        double* lo2 = nullptr) {
  weights(nodes, points, t, hi);
  std::fill(lo, lo + points, 0.0);
  if (lo2) std::fill(lo2, lo2 + points, 0.0);
  if (points < 2) {
    std::copy(hi, hi + points, lo);
    if (lo2) std::copy(hi, hi + points, lo2);
    return;
  }
  const bool drop_first = std::abs(t - nodes[0]) > std::abs(t - nodes[points - 1]);
  weights(nodes + (drop_first ? 1 : 0), points - 1, t, lo + (drop_first ? 1 : 0));
  if (lo2) weights(nodes + (drop_first ? 0 : 1), points - 1, t, lo2 + (drop_first ? 0 : 1));
}

}  // namespace edgelaw::lagrange

namespace edgelaw::lagrange {

// Weights of the derivative at node k of the interpolant through `n` nodes (finite
// differences on any grid; 5 nodes give a fourth-order first derivative).
inline void derivative_weights_at_node(const double* nodes, int n, int k, double* out) {
  double diag = 0;
  for (int j = 0; j < n; ++j) {
    if (j == k) continue;
    diag += 1 / (nodes[k] - nodes[j]);
    double l = 1 / (nodes[j] - nodes[k]);
    for (int m = 0; m < n; ++m)
      if (m != j && m != k) l *= (nodes[k] - nodes[m]) / (nodes[j] - nodes[m]);
    out[j] = l;
  }
  out[k] = diag;
}

}  // namespace edgelaw::lagrange
