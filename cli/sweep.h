// Beta sweeps: which betas a run owns, checkpoint slices on disk, and merging part files.
//
// A sweep solves one law table per beta on a common (x, w) grid. Each finished beta is
// written atomically as a law file into the checkpoint folder "<output>.parts/", named by
// slice_file_name(beta); a restarted run reuses the slices whose grid and solver settings
// match. The final file is always assembled from the slice files (never from memory), so
// an interrupted and resumed run writes the same numbers as an uninterrupted one.
#pragma once

#include <map>
#include <string>
#include <vector>

#include "tables/table_file.h"

namespace edgelaw {

// "1,2,4" -> {1, 2, 4}; sorted, each finite and > 0, no duplicates; UsageError otherwise.
std::vector<double> parse_beta_list(const std::string& text);
// count betas evenly spaced over [first, last]; count 1 needs first == last.
std::vector<double> beta_range(double first, double last, int count);

// "i/N" with 1 <= i <= N -> {i, N}; empty text is {1, 1}.
struct SweepPart {
  int index = 1, count = 1;
};
SweepPart parse_part(const std::string& text);
// Indices k of betas with k % count == index - 1 (round robin, so costs spread evenly).
std::vector<std::size_t> part_members(std::size_t beta_count, SweepPart part);

// Stable, exact and file-name safe: "beta_" + shortest round-trip decimal + ".h5".
std::string slice_file_name(double beta);

// Empty when the slice file `f` was solved for beta, x, w and settings (only the keys in
// `settings` are compared), otherwise one line saying what differs.
std::string slice_mismatch(const LawTableFile& f, double beta, const std::vector<double>& x,
                           const std::vector<double>& w, const std::map<std::string, SettingValue>& settings);

// The title every whole-sweep file carries (unsplit runs and merges agree on it).
std::string sweep_title(const std::vector<double>& betas);
// The betas list as stored in the setting "betas" ("1,2,4", shortest round-trip decimals).
std::string beta_list_text(const std::vector<double>& betas);

}  // namespace edgelaw
