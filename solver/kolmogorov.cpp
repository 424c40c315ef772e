// Method-of-lines right-hand side and Jacobian of the angle-form backward Kolmogorov equation.
#include "solver/kolmogorov.h"

#include <sunmatrix/sunmatrix_band.h>

#include <cmath>
#include <utility>

namespace edgelaw {

KolmogorovOperator::KolmogorovOperator(double beta, const AngleGrid& grid) : grid_(grid) {
  const int n = grid.intervals();
  cos2_.resize(n);
  sin2_.resize(n);
  extra_.resize(n);
  diffusion_.resize(n);
  for (int i = 0; i < n; ++i) {
    const double t = grid.theta(i), c = std::cos(t), s = std::sin(t);
    cos2_[i] = c * c;
    sin2_[i] = s * s;
    extra_[i] = (4.0 / beta) * s * s * s * c;
    diffusion_[i] = (2.0 / beta) * s * s * s * s;
  }
}

namespace {
inline double apply(const Stencil& st, const double* u, int n, double boundary) {
  double sum = 0.0;
  for (int k = 0; k < st.size; ++k) {
    const int j = st.first + k;
    sum += st.weight[k] * (j < n ? u[j] : boundary);
  }
  return sum;
}
}  // namespace

double KolmogorovOperator::upwind_share(double a) {
  // Both biased stencils are sixth-order, so any convex blend is too; blending smoothly instead
  // of switching at a = 0 keeps the right-hand side smooth in x, which BDF needs to take long
  // steps (a hard switch puts a kink at every node the branches cross).
  return 0.5 * (1.0 + a / std::sqrt(a * a + kBlendWidth * kBlendWidth));
}

void KolmogorovOperator::rhs(double x, const double* u, double boundary, double* du) const {
  const int n = unknowns();
  for (int i = 0; i < n; ++i) {
    const double a = cos2_[i] - x * sin2_[i] + extra_[i];
    // Upwind bias: for a > 0 information arrives from larger theta as x decreases.
    const double plus = upwind_share(a);
    double value = a * (plus * apply(grid_.first_plus(i), u, n, boundary) +
                        (1.0 - plus) * apply(grid_.first_minus(i), u, n, boundary));
    if (diffusion_[i] != 0.0) value += diffusion_[i] * apply(grid_.second(i), u, n, boundary);
    du[i] = -value;
  }
}

void KolmogorovOperator::jacobian(double x, SUNMatrix band) const {
  const int n = unknowns();
  SUNMatZero(band);
  for (int i = 0; i < n; ++i) {
    const double a = cos2_[i] - x * sin2_[i] + extra_[i];
    const double plus = upwind_share(a);
    for (const auto& [first, share] : {std::pair{&grid_.first_plus(i), plus}, std::pair{&grid_.first_minus(i), 1.0 - plus}}) {
      for (int k = 0; k < first->size; ++k) {
        const int j = first->first + k;
        if (j < n) SM_ELEMENT_B(band, i, j) -= a * share * first->weight[k];
      }
    }
    if (diffusion_[i] != 0.0) {
      const Stencil& second = grid_.second(i);
      for (int k = 0; k < second.size; ++k) {
        const int j = second.first + k;
        if (j < n) SM_ELEMENT_B(band, i, j) -= diffusion_[i] * second.weight[k];
      }
    }
  }
}

}  // namespace edgelaw
