// libFuzzer harness for the text readers of the command line: the points CSV of evaluate, the
// number parser shared with the options, the --betas list and the --part i/N parser. Each must
// return a valid result or throw its documented error type; never crash or hang.
#include "cli/commands.h"
#include "cli/points_csv.h"
#include "cli/sweep.h"

#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <string>

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  try {
    const auto points = edgelaw::parse_points_csv(text);
    // What the parser promises: at least one point, finite beta and x, w a number or +inf.
    if (points.empty()) std::abort();
    for (const auto& p : points)
      if (!std::isfinite(p.beta) || !std::isfinite(p.x) || std::isnan(p.w) || p.w == -INFINITY) std::abort();
  } catch (const edgelaw::DataError&) {
  }
  try {
    const double v = edgelaw::parse_number(text, true);
    if (std::isnan(v) || v == -INFINITY) std::abort();
  } catch (const edgelaw::DataError&) {
  }
  try {
    const auto betas = edgelaw::parse_beta_list(text);
    for (std::size_t k = 0; k < betas.size(); ++k)
      if (!(betas[k] > 0) || !std::isfinite(betas[k]) || (k > 0 && !(betas[k] > betas[k - 1]))) std::abort();
  } catch (const edgelaw::UsageError&) {
  }
  try {
    const auto part = edgelaw::parse_part(text);
    if (part.index < 1 || part.index > part.count) std::abort();
  } catch (const edgelaw::UsageError&) {
  }
  return 0;
}
