// Bad requests and options are refused with a one-line reason, before any work is done.
#include <gtest/gtest.h>

#include <cmath>
#include <limits>

#include "solver/solver.h"

namespace edgelaw {
namespace {

LawRequest valid() {
  LawRequest r;
  r.beta = 2;
  r.x = {-1, 0, 1};
  r.w = {0, kInf};
  return r;
}

void expect_refused(const LawRequest& r, const SolverOptions& o, const char* fragment) {
  try {
    solve_law(r, o);
    FAIL() << "accepted a bad request (" << fragment << ")";
  } catch (const SolveError& e) {
    const std::string what = e.what();
    EXPECT_NE(what.find(fragment), std::string::npos) << what;
    EXPECT_EQ(what.find('\n'), std::string::npos) << "message must be one line: " << what;
  }
}

TEST(SolverInput, RefusesBadBeta) {
  for (double beta : {0.0, -1.0, std::nan(""), kInf}) {
    auto r = valid();
    r.beta = beta;
    expect_refused(r, {}, "beta");
  }
}

TEST(SolverInput, RefusesBadAxes) {
  auto r = valid();
  r.x = {1, 0};
  expect_refused(r, {}, "increasing");
  r = valid();
  r.x = {};
  expect_refused(r, {}, "no thresholds");
  r = valid();
  r.x = {0, std::nan("")};
  expect_refused(r, {}, "finite");
  r = valid();
  r.w = {kInf, 0};
  expect_refused(r, {}, "last");
  r = valid();
  r.w = {-kInf, 0};
  expect_refused(r, {}, "+inf");
  r = valid();
  r.w = {std::nan("")};
  expect_refused(r, {}, "number");
}

TEST(SolverInput, RefusesUndeliverableAccuracyAndAbsurdGrids) {
  SolverOptions o;
  o.target_error = 1e-16;
  expect_refused(valid(), o, "cannot certify");
  o = {};
  o.base_intervals = 100000000;
  expect_refused(valid(), o, "intervals");
  o = {};
  o.max_levels = 2;
  expect_refused(valid(), o, "levels");
}

}  // namespace
}  // namespace edgelaw
