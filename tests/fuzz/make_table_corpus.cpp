// Writes the starting corpus of the table reader harness: tiny valid law and sweep files made by
// the project's own writer (a closed-form Gaussian family, tests/tables_family.cpp).
#include "tables/table_file.h"

#include <cstdio>
#include <string>

namespace edgelaw::testing {
LawTable make_family_table(const std::vector<double>& x, const std::vector<double>& w, double beta,
                           double stored_error);
std::vector<double> uniform_axis(double first, double step, int count);
extern double family_shift;
}  // namespace edgelaw::testing

int main(int argc, char** argv) {
  using namespace edgelaw;
  using namespace edgelaw::testing;
  if (argc != 2) {
    std::fprintf(stderr, "usage: make_table_corpus FOLDER\n");
    return 64;
  }
  const std::string dir = argv[1];
  TableMetadata meta;
  meta.title = "fuzz corpus";
  meta.history = "corpus";
  meta.settings["target_error"] = 1e-8;
  TableWriteOptions small;
  small.probability_levels = {0.1, 0.5, 0.9};
  // Checksums on, as the writer's default: the reader refuses datasets without them.
  const LawTable law = make_family_table(uniform_axis(-3.0, 0.5, 9), {-1.0, 0.0, 1.0, kInf}, 2.0, 1e-9);
  write_table(dir + "/law.h5", law, meta, small);
  std::vector<LawTable> sweep;
  for (double beta : {1.0, 2.0, 4.0}) {
    family_shift = 0.1 * beta;
    sweep.push_back(make_family_table(uniform_axis(-2.0, 1.0, 4), {0.0, kInf}, beta, 1e-9));
  }
  meta.settings["betas"] = std::string("1,2,4");
  write_sweep_table(dir + "/sweep.h5", sweep, meta, small);
  return 0;
}
