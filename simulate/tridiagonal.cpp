// Largest eigenvalue of symmetric tridiagonal and bidiagonal-Gram matrices by Sturm multisection.
//
// Method: the Sturm count c(x) = #{eigenvalues < x} is the number of negative pivots of the
// LDL^T factorization of T - x I, q_1 = d_1 - x, q_i = d_i - x - e_{i-1}^2 / q_{i-1}. Following
// LAPACK's dlaebz, a pivot with |q| < pivmin = DBL_MIN max(1, max e^2) is replaced by -pivmin,
// which keeps the recurrence finite and the count monotone in x (Kahan, "Accurate eigenvalues of
// a symmetric tridiagonal matrix", 1966; Demmel, "Applied Numerical Linear Algebra", sec. 5.3.4).
// The largest eigenvalue is the x where c jumps from m-1 to m.
//
// Each pivot depends on the previous one through a division, so a single count is bound by the
// division latency. Evaluating kPoints shifts per sweep gives independent chains the CPU can
// overlap, and each sweep shrinks the bracket by kPoints + 1 instead of 2: about 2.3x fewer
// passes over the data at about the cost of one. Once the top eigenvalue is isolated in a narrow
// bracket, Newton's method on det(T - x I) from the upper end finishes in a few passes: for a
// polynomial with real roots, Newton started above the largest root decreases monotonically to
// it (p/p' = 1 / sum_j 1/(x - lambda_j) <= x - lambda_1) and converges quadratically; above the
// spectrum all pivots are negative, so each pass also certifies that x is still an upper bound.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>
#include <stdexcept>
#include <string>
#include <vector>

#include "simulate/simulate.h"
#include "simulate/sturm.h"

namespace edgelaw::simulate {
namespace {

constexpr int kPoints = 4;
// Relative bracket width at which Newton takes over (if lambda_max is isolated): narrow enough
// that Newton is in its quadratic regime after a step or two for the model matrices (measured:
// about 4 Newton passes after 7 multisection sweeps at n = 2000).
constexpr double kNewtonWidth = 1e-3;
constexpr double kEps = std::numeric_limits<double>::epsilon();

// Sturm counts at kPoints shifts at once.
void sturm_counts(const double* d, const double* e2, std::size_t m, const double* x, double pivmin,
                  std::size_t* count) {
  double q[kPoints];
  std::size_t c[kPoints];
  for (int j = 0; j < kPoints; ++j) {
    q[j] = d[0] - x[j];
    q[j] = std::abs(q[j]) < pivmin ? -pivmin : q[j];
    c[j] = q[j] < 0.0 ? 1 : 0;
  }
  for (std::size_t i = 1; i < m; ++i) {
    const double di = d[i];
    const double ei = e2[i - 1];
    for (int j = 0; j < kPoints; ++j) {
      q[j] = (di - x[j]) - ei / q[j];
      q[j] = std::abs(q[j]) < pivmin ? -pivmin : q[j];
      c[j] += q[j] < 0.0 ? 1 : 0;
    }
  }
  for (int j = 0; j < kPoints; ++j) count[j] = c[j];
}

std::size_t sturm_count(const double* d, const double* e2, std::size_t m, double x, double pivmin) {
  double xs[kPoints];
  std::size_t c[kPoints];
  std::fill(xs, xs + kPoints, x);
  sturm_counts(d, e2, m, xs, pivmin, c);
  return c[0];
}

// One Newton pass at x: if every pivot of T - x I is negative (x above the spectrum), sets step to
// det/det' = 1 / sum_i q_i'/q_i, with q_i' = dq_i/dx = -1 + e_{i-1}^2 q_{i-1}' / q_{i-1}^2.
bool newton_step(const double* d, const double* e2, std::size_t m, double x, double& step) {
  double q = d[0] - x;
  if (!(q < 0.0)) return false;
  double qp = -1.0;
  double sum = 0.0;
  for (std::size_t i = 1; i < m; ++i) {
    const double r = 1.0 / q;
    sum += qp * r;
    qp = -1.0 + e2[i - 1] * qp * r * r;
    q = (d[i] - x) - e2[i - 1] * r;
    if (!(q < 0.0)) return false;
  }
  sum += qp / q;
  step = 1.0 / sum;
  return std::isfinite(step) && step > 0.0;
}

}  // namespace

double largest_eigenvalue_squared_offdiag(const double* d, const double* e2, std::size_t m) {
  if (m == 1) return d[0];
  double max_e2 = 1.0;
  // Bracket: every eigenvalue is below the Gershgorin bound max_i (d_i + |e_{i-1}| + |e_i|), and
  // the top eigenvalue of any 2 x 2 principal block is a Rayleigh quotient, so a lower bound.
  double hi = -std::numeric_limits<double>::infinity();
  double lo = -std::numeric_limits<double>::infinity();
  double e_prev = 0.0;
  for (std::size_t i = 0; i < m; ++i) {
    const double e_next = i + 1 < m ? std::sqrt(e2[i]) : 0.0;
    hi = std::max(hi, d[i] + e_prev + e_next);
    if (i + 1 < m) {
      max_e2 = std::max(max_e2, e2[i]);
      const double half_gap = 0.5 * (d[i] - d[i + 1]);
      lo = std::max(lo, 0.5 * (d[i] + d[i + 1]) + std::sqrt(half_gap * half_gap + e2[i]));
    }
    e_prev = e_next;
  }
  const double pivmin = std::numeric_limits<double>::min() * max_e2;
  // Rounding in the bounds and the counts: widen until the invariants c(lo) < m = c(hi) hold.
  // The first sweep checks both ends and also splits the bracket in three.
  double pad = 4.0 * kEps * std::max(std::abs(hi), std::abs(lo)) + pivmin;
  hi += pad;
  lo -= pad;
  std::size_t count_lo = 0;
  {
    const double first[kPoints] = {lo, lo + (hi - lo) / 3.0, lo + 2.0 * (hi - lo) / 3.0, hi};
    std::size_t c[kPoints];
    sturm_counts(d, e2, m, first, pivmin, c);
    if (c[3] == m && c[0] < m) {
      count_lo = c[0];
      for (int j = 1; j < 3; ++j) {
        if (c[j] < m) {
          lo = first[j];
          count_lo = c[j];
        } else {
          hi = first[j];
          break;
        }
      }
    } else {
      while (sturm_count(d, e2, m, hi, pivmin) < m) {
        pad *= 2.0;
        hi += pad;
      }
      while ((count_lo = sturm_count(d, e2, m, lo, pivmin)) >= m) {
        pad *= 2.0;
        lo -= pad;
      }
    }
  }
  // Multisection until the bracket is 4 ulps of its end points (or the underflow threshold),
  // switching once to Newton when lambda_max is alone in [lo, hi] and hi - lo <= kNewtonWidth |hi|.
  double x[kPoints];
  std::size_t c[kPoints];
  bool newton_done = false;
  auto tolerance = [&] { return std::max(4.0 * kEps * std::max(std::abs(lo), std::abs(hi)), 2.0 * pivmin); };
  while (hi - lo > tolerance()) {
    if (!newton_done && count_lo + 1 == m && hi - lo <= kNewtonWidth * std::abs(hi)) {
      newton_done = true;
      double at = hi, step = 0.0;
      for (int it = 0; it < 30 && newton_step(d, e2, m, at, step); ++it) {
        hi = at;  // certified upper bound
        if (step <= kEps * std::abs(at)) break;
        at -= step;
        if (at <= lo) break;
      }
      if (at < hi && at > lo && sturm_count(d, e2, m, at, pivmin) < m) lo = at;  // rounding undershoot
      // Newton stops within about an ulp above lambda_max: certify a 4-ulp lower end directly.
      const double guess = hi - 4.0 * kEps * std::abs(hi);
      if (guess > lo && sturm_count(d, e2, m, guess, pivmin) < m) lo = guess;
      continue;
    }
    const double step = (hi - lo) / (kPoints + 1);
    for (int j = 0; j < kPoints; ++j) x[j] = lo + (j + 1) * step;
    sturm_counts(d, e2, m, x, pivmin, c);
    double new_lo = lo;
    double new_hi = hi;
    std::size_t new_count_lo = count_lo;
    for (int j = 0; j < kPoints; ++j) {
      if (c[j] < m) {
        new_lo = x[j];
        new_count_lo = c[j];
      } else {
        new_hi = x[j];
        break;
      }
    }
    if (new_lo == lo && new_hi == hi) break;  // rounding no longer separates the points
    lo = new_lo;
    hi = new_hi;
    count_lo = new_count_lo;
  }
  return 0.5 * (lo + hi);
}

double eigenvector_tail_weight(const double* d, const double* e2, std::size_t m, double mu, double enough) {
  if (m == 1) return 1.0;
  // u_{m-1} = 1; row j gives u_{j-1} = -(r_j / e_{j-1}) u_j with the bottom-up pivots
  // r_{m-1} = d_{m-1} - mu, r_j = d_j - mu - e_j^2 / r_{j+1}. weight = u_i^2 / u_{m-1}^2.
  const double pivmin = std::numeric_limits<double>::min();
  double r = d[m - 1] - mu;
  double weight = 1.0;
  double max_weight = 1.0;
  for (std::size_t i = m - 1; i-- > 0;) {
    // A vanishing coupling splits the matrix; the tail is then not bounded by this recurrence.
    if (!(e2[i] > 0.0)) return 1.0;
    if (std::abs(r) < pivmin) r = -pivmin;
    weight *= (r * r) / e2[i];
    max_weight = std::max(max_weight, weight);
    if (1.0 / max_weight < enough) break;
    r = (d[i] - mu) - e2[i] / r;
  }
  return 1.0 / max_weight;
}

}  // namespace edgelaw::simulate

namespace edgelaw {
namespace {

void require_finite(std::span<const double> v, const char* what) {
  for (double x : v) {
    if (!std::isfinite(x)) throw std::invalid_argument(std::string(what) + " has a non-finite entry");
  }
}

}  // namespace

double largest_eigenvalue_tridiagonal(std::span<const double> diag, std::span<const double> offdiag) {
  if (diag.empty()) throw std::invalid_argument("largest_eigenvalue_tridiagonal: empty diagonal");
  if (offdiag.size() + 1 != diag.size())
    throw std::invalid_argument("largest_eigenvalue_tridiagonal: off-diagonal size must be diagonal size - 1");
  require_finite(diag, "largest_eigenvalue_tridiagonal: diagonal");
  require_finite(offdiag, "largest_eigenvalue_tridiagonal: off-diagonal");
  std::vector<double> e2(offdiag.size());
  for (std::size_t i = 0; i < offdiag.size(); ++i) e2[i] = offdiag[i] * offdiag[i];
  return simulate::largest_eigenvalue_squared_offdiag(diag.data(), e2.data(), diag.size());
}

double largest_eigenvalue_bidiagonal_gram(std::span<const double> diag, std::span<const double> superdiag) {
  const std::size_t m = diag.size();
  if (m == 0) throw std::invalid_argument("largest_eigenvalue_bidiagonal_gram: empty diagonal");
  if (superdiag.size() + 1 != m && superdiag.size() != m)
    throw std::invalid_argument("largest_eigenvalue_bidiagonal_gram: superdiagonal size must be m - 1 or m");
  require_finite(diag, "largest_eigenvalue_bidiagonal_gram: diagonal");
  require_finite(superdiag, "largest_eigenvalue_bidiagonal_gram: superdiagonal");
  // B^T B is tridiagonal: (B^T B)_{kk} = a_k^2 + b_{k-1}^2, (B^T B)_{k,k+1} = a_k b_k. If B has a
  // last superdiagonal entry b_m (m x (m+1)), row m+1 of B^T B is (.., a_m b_m, b_m^2).
  const std::size_t size = superdiag.size() == m ? m + 1 : m;
  std::vector<double> d(size), e2(size - 1);
  for (std::size_t k = 0; k < size; ++k) {
    const double a = k < m ? diag[k] : 0.0;
    const double b_prev = k > 0 ? superdiag[k - 1] : 0.0;
    d[k] = a * a + b_prev * b_prev;
    if (k + 1 < size) e2[k] = (a * superdiag[k]) * (a * superdiag[k]);
  }
  return simulate::largest_eigenvalue_squared_offdiag(d.data(), e2.data(), size);
}

}  // namespace edgelaw
