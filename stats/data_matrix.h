// Data input for the statistics commands: a numeric CSV matrix, and the top eigenvalue and
// noise level the spiked models need from it.
#pragma once

#include <stdexcept>
#include <string>

#include <Eigen/Core>

namespace edgelaw {

// Malformed data (non-numeric, ragged, too small, not symmetric): one line naming the file
// position and the problem.
struct DataMatrixError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// Resource bounds, refused up front: a data file of more entries (~200 MiB of doubles), and
// symmetric eigenproblems larger than this (O(m^3): about a minute at 5000 on one core).
inline constexpr double kMaxEntries = 2.5e7;
inline constexpr long kMaxGramSize = 5000;

// Parses CSV text into a matrix: comma-separated numbers, one row per line; blank lines and
// lines starting with '#' are skipped; a first row in which no field is a number is taken as
// column names. Non-numeric, non-finite or missing fields and ragged rows are errors.
Eigen::MatrixXd parse_matrix_csv(const std::string& text, const std::string& name);

// Sample-covariance summary of a data matrix X (rows = samples, columns = variables).
struct CovarianceData {
  long samples = 0;            // rows of X
  long effective_samples = 0;  // samples - 1 when the columns were centred here, else samples
  long variables = 0;
  bool centred_here = false;
  double top_eigenvalue = 0;   // of S = X^T X (after centring), not divided by n
  // Noise variance estimate: (trace S - top eigenvalue) / (effective_samples (p - 1)), the
  // mean variance of the directions other than the top one. Biased low by about
  // top / (n p) when a spike is present, and by the bulk's own spread; a caution, not a fit.
  double noise_variance_estimate = 0;
};

// centre = true subtracts each column's mean (so X^T X follows a Wishart law with n - 1
// degrees of freedom for Gaussian rows). At least 2 samples and 2 variables.
CovarianceData covariance_data(const Eigen::MatrixXd& x, bool centre);

// A symmetric signal-plus-noise matrix (deformed Wigner model).
struct SymmetricData {
  long size = 0;
  double top_eigenvalue = 0;
  // Mean square of the off-diagonal entries: the noise variance when the spike's share,
  // about theta^2 / n per entry, is small.
  double noise_variance_estimate = 0;
};

// Requires a square matrix, symmetric to 1e-9 of its largest entry, size >= 2.
SymmetricData symmetric_data(const Eigen::MatrixXd& a);

}  // namespace edgelaw
