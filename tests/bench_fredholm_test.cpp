// Smoke test of the benchmark's double-precision Fredholm competitor (bench/fredholm_beta2.h):
// it must agree with tests/reference (long double / __float128, itself checked against mpmath)
// at the accuracy it claims, or the timing comparison in BENCHMARKS.md compares nothing.
#include <gtest/gtest.h>

#include <boost/math/special_functions/airy.hpp>
#include <cmath>
#include <vector>

#include "bench/fredholm_beta2.h"
#include "tests/reference/fredholm.h"

namespace {

using edgelaw::kInf;
namespace bench = edgelaw::bench;
namespace reference = edgelaw::reference;

reference::Probability reference_at(double x, double w) {
  return std::isinf(w) ? reference::tracy_widom(2, x) : reference::spiked_beta2(x, w);
}

TEST(BenchAiryTable, MatchesBoost) {
  // Taylor steps of <= 1/128 from tabulated Boost values: relative error ~1e-15 expected
  // (8 series terms, each ratio <= 100 |h|^2 z); 1e-13 leaves room for Boost's own error.
  const bench::AiryTable ai;
  for (double z : {-35.3, -12.345, -3.21, -1.01, 0.0, 0.77, 4.4, 17.9, 44.4}) {
    const double b = boost::math::airy_ai(z);
    EXPECT_NEAR(ai(z), b, 1e-13 * std::max(std::abs(b), 1e-300)) << "z = " << z;
  }
}

TEST(BenchFredholm, PointsAgreeWithReference) {
  // The bench claims absolute error <= target; tests/reference is good to ~1e-15 on these
  // points (fredholm.h), so the full target is the tolerance.
  const double target = 1e-10;
  for (double x : {-7.0, -3.3, -1.0, 0.4, 2.5, 6.0})
    for (double w : {-5.0, -2.0, -0.5, 0.0, 1.0, 1.5, 3.0, 6.0, kInf}) {
      const auto ref = reference_at(x, w);
      const auto v = bench::fredholm_point(x, w, target);
      EXPECT_NEAR(v.cdf, ref.cdf, target) << "x = " << x << ", w = " << w;
      EXPECT_NEAR(v.survival, ref.survival, target) << "x = " << x << ", w = " << w;
    }
}

TEST(BenchFredholm, SharedTableMatchesPointwise) {
  // Sharing one factorisation per x across w (longer truncation for some rows) must not cost
  // accuracy: both are within 1e-10 of the reference, so within 2e-10 of each other.
  const std::vector<double> xs{-4.0, -1.5, 0.0, 3.0};
  const std::vector<double> ws{-3.3, -0.2, 0.7, 2.2, kInf};
  const auto shared = bench::fredholm_table(xs, ws, 1e-10, true, 2);
  const auto single = bench::fredholm_table(xs, ws, 1e-10, false, 1);
  for (std::size_t r = 0; r < ws.size(); ++r)
    for (std::size_t c = 0; c < xs.size(); ++c) {
      EXPECT_NEAR(shared.cdf(r, c), single.cdf(r, c), 2e-10);
      EXPECT_NEAR(shared.survival(r, c), single.survival(r, c), 2e-10);
      EXPECT_NEAR(shared.cdf(r, c), reference_at(xs[c], ws[r]).cdf, 1e-10);
    }
}

}  // namespace
