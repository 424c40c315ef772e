// Sturm-sequence kernels on (diagonal, squared off-diagonal) arrays, shared by the samplers.
#pragma once

#include <cstddef>

namespace edgelaw::simulate {

// Largest eigenvalue of the m x m symmetric tridiagonal matrix with diagonal d[0..m-1] and
// squared off-diagonals e2[0..m-2] (e2[i] couples rows i and i+1). All inputs finite, m >= 1.
// Only squares of off-diagonals enter a Sturm count, so callers that draw chi^2 variates never
// take square roots except for the Gershgorin bound.
double largest_eigenvalue_squared_offdiag(const double* d, const double* e2, std::size_t m);

// Tail weight of the top eigenvector u of that matrix at eigenvalue mu: an upper bound on
// u[m-1]^2 / max_i u[i]^2, found by the backward recurrence from the last row (stable in the
// direction in which the vector grows). Stops as soon as the bound drops below `enough`.
double eigenvector_tail_weight(const double* d, const double* e2, std::size_t m, double mu, double enough);

}  // namespace edgelaw::simulate
