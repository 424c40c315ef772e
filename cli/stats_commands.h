// The statistics subcommands: p-values, critical values, power and spike intervals for finite-n
// spiked models, and the Monte Carlo check; main.cpp parses options into these structs.
#pragma once

#include <cstdint>
#include <string>

namespace edgelaw {

// Which model and what was observed; shared by every statistics subcommand.
struct ModelOptions {
  std::string model = "direct";  // direct | covariance | signal
  double beta = 2.0;
  long n = 0, p = 0;
  std::string noise_variance;    // a number, or "estimate" (needs --data); empty: 1, or estimate with --data
  std::string eigenvalue_of;     // covariance: "XtX" or "XtX/n"
  std::string eigenvalue;        // observed top eigenvalue; empty: from --data
  std::string data;              // CSV: rows = samples (covariance) or the symmetric matrix (signal)
  bool columns_centred = false;  // covariance data: do not subtract column means
  std::string x;                 // direct model: observed threshold
  std::string table;             // answer from this table file instead of solving
  // 1e-7 keeps solves at three grid levels; the numbers' own error is still ~1e5 times below
  // the finite-n error of the asymptotic law.
  double target = 1e-7;
  double w_floor = -6;           // strongest spike (smallest w) the law is solved for
  bool json = false;
};

struct StatsCommand {
  ModelOptions m;
  std::string spike;         // null-hypothesis spike (covariance ell, signal theta, direct w); empty: none
  double alpha = 0.05;
  std::string alternative;   // power: one alternative spike
  std::string alternatives;  // power curve: "first:last:count"
  std::string output;        // power curve CSV (empty: standard output)
  long simulate = 0;         // Monte Carlo samples for the finite-n check (0: none)
  std::uint64_t seed = 1;
  int threads = 0;
  std::string samples_output;  // simulate: CSV of the scaled samples
};

int run_model_pvalue(const StatsCommand& c);
int run_critical_value(const StatsCommand& c);
int run_power(const StatsCommand& c);
int run_interval(const StatsCommand& c);
int run_simulate(const StatsCommand& c);

}  // namespace edgelaw
