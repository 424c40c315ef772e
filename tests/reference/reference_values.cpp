// Prints reference values for scripts: reference_values tw BETA X... | spiked W X... | quantile BETA P...
// Output: one CSV line per point, "x,cdf,survival" (or "p,x" for quantile), 17 significant digits.
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>

#include "tests/reference/fredholm.h"

int main(int argc, char** argv) {
  using namespace edgelaw::reference;
  if (argc < 4) {
    std::fprintf(stderr, "usage: %s tw BETA X... | spiked W X... | quantile BETA P...\n", argv[0]);
    return 64;
  }
  const std::string mode = argv[1];
  const double param = std::strtod(argv[2], nullptr);
  try {
    for (int i = 3; i < argc; ++i) {
      const double v = std::strtod(argv[i], nullptr);
      auto t0 = std::chrono::steady_clock::now();
      if (mode == "quantile") {
        std::printf("%.17g,%.17g\n", v, tracy_widom_quantile(static_cast<int>(param), v));
        continue;
      }
      Probability p = mode == "tw" ? tracy_widom(static_cast<int>(param), v) : spiked_beta2(v, param);
      double ms = std::chrono::duration<double, std::milli>(std::chrono::steady_clock::now() - t0).count();
      std::printf("%.17g,%.17g,%.17g\n", v, p.cdf, p.survival);
      if (std::getenv("REFERENCE_TIMING")) std::fprintf(stderr, "%g ms\n", ms);
    }
  } catch (const std::exception& e) {
    std::fprintf(stderr, "error: %s\n", e.what());
    return 65;
  }
  return 0;
}
