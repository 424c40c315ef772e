// Internal numerics of the Fredholm-determinant reference (Bornemann 2010); included by
// fredholm.cpp and reference_values.cpp only. Templated on the working precision T:
// long double (fast path) or __float128 (left tails, where det(I -+ B) is ill conditioned).
#pragma once
#include <quadmath.h>

#include <algorithm>
#include <cmath>
#include <vector>

namespace edgelaw::reference::detail {

using quad = __float128;

// Elementary functions for both working precisions.
inline long double exp_(long double v) { return std::exp(v); }
inline long double log_(long double v) { return std::log(v); }
inline long double sqrt_(long double v) { return std::sqrt(v); }
inline long double log1p_(long double v) { return std::log1p(v); }
inline long double expm1_(long double v) { return std::expm1(v); }
inline long double cos_(long double v) { return std::cos(v); }
inline long double abs_(long double v) { return std::fabs(v); }
inline quad exp_(quad v) { return expq(v); }
inline quad log_(quad v) { return logq(v); }
inline quad sqrt_(quad v) { return sqrtq(v); }
inline quad log1p_(quad v) { return log1pq(v); }
inline quad expm1_(quad v) { return expm1q(v); }
inline quad cos_(quad v) { return cosq(v); }
inline quad abs_(quad v) { return fabsq(v); }

template <class T> T eps_of();
template <> inline long double eps_of<long double>() { return 1.0842021724855044e-19L; }
template <> inline quad eps_of<quad>() { return FLT128_EPSILON; }
template <class T> T pi_of();
template <> inline long double pi_of<long double>() { return 3.14159265358979323846264338327950288L; }
template <> inline quad pi_of<quad>() { return M_PIq; }

// Gauss-Legendre rule with m nodes on (0,1), nodes by Newton iteration in T
// (design.md section 4: library weights in double are not accurate enough).
template <class T> void gauss_legendre(int m, std::vector<T>& x, std::vector<T>& w);

// Ai at every point of z (any order), by an asymptotic expansion at the top point and Taylor
// marching of y'' = z y toward smaller z (stable: the Bi component decays in that direction).
template <class T> void airy_batch(const std::vector<T>& z, std::vector<T>& ai);

}  // namespace edgelaw::reference::detail
