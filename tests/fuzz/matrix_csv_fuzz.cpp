// libFuzzer harness for the data-matrix reader of the statistics commands (--data): the CSV
// parser and the two summaries computed from what it returns. Each must return a valid result
// or throw DataMatrixError; never crash, hang or return a non-finite statistic.
#include "stats/data_matrix.h"

#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <string>

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  Eigen::MatrixXd m;
  try {
    m = edgelaw::parse_matrix_csv(text, "fuzz.csv");
  } catch (const edgelaw::DataMatrixError&) {
    return 0;
  }
  // What the parser promises: a non-empty matrix of finite numbers.
  if (m.size() == 0 || !m.allFinite()) std::abort();
  for (bool centre : {true, false}) {
    try {
      const auto c = edgelaw::covariance_data(m, centre);
      if (!std::isfinite(c.top_eigenvalue) || c.top_eigenvalue < 0 || c.samples != m.rows() || c.variables != m.cols())
        std::abort();
    } catch (const edgelaw::DataMatrixError&) {
    }
  }
  try {
    const auto s = edgelaw::symmetric_data(m);
    if (!std::isfinite(s.top_eigenvalue) || s.size != m.rows() || m.rows() != m.cols()) std::abort();
  } catch (const edgelaw::DataMatrixError&) {
  }
  return 0;
}
