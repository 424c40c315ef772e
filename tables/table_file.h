// Certified law tables on disk: the HDF5 (netCDF-4 compatible) writer and the validating reader.
//
// Format: tables/FORMAT.md (schema version 1). A "law" file holds one beta with variables
// over (w, x); a "sweep" file holds several betas with variables over (beta, w, x).
#pragma once

#include "solver/solver.h"
#include "tables/hdf5_handle.h"
#include "tables/law_interpolator.h"

#include <cstdint>
#include <functional>
#include <map>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

namespace edgelaw {

// The schema version this library writes and the newest it reads.
inline constexpr int kTableSchemaVersion = 1;

// The file is not a readable edgelaw table (not HDF5, truncated, foreign layout, future
// schema, inconsistent shapes, non-finite or out-of-range values, failed checksum).
struct TableFormatError : TableError {
  using TableError::TableError;
};

// Writing failed (bad input, unwritable folder, disk or HDF5 failure); no file was left.
struct TableWriteError : TableError {
  using TableError::TableError;
};

// A setting value: stored as a 64-bit integer, a double or a UTF-8 string attribute.
using SettingValue = std::variant<std::int64_t, double, std::string>;

struct TableMetadata {
  std::string title;
  // One line: date, program version and the full command line (see make_history_line).
  std::string history;
  std::string conventions = "CF-1.8";
  // Written as the integer attribute edgelaw_schema_version; readers refuse newer ones.
  int schema_version = kTableSchemaVersion;
  // Solver and request settings, stored as attributes "setting_<key>"; keys are
  // [A-Za-z0-9_] and do not start with '_' (netCDF reserves those).
  std::map<std::string, SettingValue> settings;
};

struct TableWriteOptions {
  // Levels of the stored quantile table (strictly increasing, in (0, 1)).
  std::vector<double> probability_levels = {0.0001, 0.001, 0.005, 0.01, 0.025, 0.05, 0.1,  0.25,
                                            0.5,    0.75,  0.9,   0.95, 0.975, 0.99, 0.995, 0.999,
                                            0.9999};
  // Fletcher-32 checksum on every dataset (needs chunking; one chunk per w row).
  bool checksums = true;
};

// "<UTC ISO-8601 time> <program> <version>: <argv joined by spaces>", for TableMetadata::history.
std::string make_history_line(std::string_view program, std::string_view version, int argc,
                              const char* const* argv);

// Writes one table atomically: a temporary file in the same folder is written, closed,
// fsynced and renamed over `path`, and the folder is fsynced; on any failure the temporary
// is removed and TableWriteError (or TableError for invalid input) is thrown.
void write_table(const std::string& path, const LawTable& table, const TableMetadata& metadata,
                 const TableWriteOptions& options = {});

// Several betas on the same (x, w) grid, beta strictly increasing; variables gain a leading
// beta dimension. Per-beta solve summaries are stored as attribute arrays over beta.
void write_sweep_table(const std::string& path, const std::vector<LawTable>& tables,
                       const TableMetadata& metadata, const TableWriteOptions& options = {});

// Test hook: called with a stage name ("created", "datasets", "closed") while writing; a
// throwing hook simulates a failure midway. Empty (the default) in normal use.
void set_table_write_hook(std::function<void(std::string_view stage)> hook);

// A validated table file held in memory, with interpolating evaluation.
class LawTableFile {
 public:
  // Reads and validates everything (throws TableFormatError with one line naming the file
  // and the problem). HDF5's own error printing is suppressed while reading.
  static LawTableFile open(const std::string& path, InterpolationOptions options = {});

  bool is_sweep() const { return sweep_; }
  int schema_version() const { return schema_version_; }
  const std::string& path() const { return path_; }
  // File attributes as read (title, history, Conventions, settings without the prefix).
  const TableMetadata& metadata() const { return metadata_; }
  const std::vector<double>& x() const { return slices_.front().table().x; }
  const std::vector<double>& w() const { return slices_.front().table().w; }
  // The betas of the slices (one entry for a law file).
  const std::vector<double>& betas() const { return betas_; }
  // The stored quantile levels and table (w, probability) of slice `index`.
  const std::vector<double>& probability_levels() const { return probability_; }
  const RowMatrix& stored_quantile(std::size_t index = 0) const { return quantile_.at(index); }
  const RowMatrix& stored_quantile_error(std::size_t index = 0) const { return quantile_error_.at(index); }
  // Slice `index` as a LawTable (bit-identical to what was written).
  const LawTable& table(std::size_t index = 0) const { return slices_.at(index).table(); }
  const LawInterpolator& interpolator(std::size_t index = 0) const { return slices_.at(index); }

  // Law files: evaluation at (x, w). Sweep files must pass beta (TableRangeError otherwise).
  Estimate cdf(double x, double w) const { return single().cdf(x, w); }
  Estimate survival(double x, double w) const { return single().survival(x, w); }
  Estimate density(double x, double w) const { return single().density(x, w); }
  Estimate p_value(double x, double w) const { return single().p_value(x, w); }
  Estimate quantile(double probability, double w) const { return single().quantile(probability, w); }

  // Any file at (x, w, beta): beta on a slice uses that slice; between slices, Lagrange in
  // beta over up to 4 slices with the order-difference error estimate. Outside the betas:
  // TableRangeError.
  Estimate cdf(double x, double w, double beta) const;
  Estimate survival(double x, double w, double beta) const;
  Estimate density(double x, double w, double beta) const;
  Estimate p_value(double x, double w, double beta) const { return survival(x, w, beta); }
  Estimate quantile(double probability, double w, double beta) const;

 private:
  LawTableFile() = default;
  const LawInterpolator& single() const;
  template <class Eval>
  Estimate across_beta(double beta, Eval eval) const;

  std::string path_;
  bool sweep_ = false;
  int schema_version_ = 0;
  TableMetadata metadata_;
  std::vector<double> betas_, probability_;
  std::vector<LawInterpolator> slices_;
  std::vector<RowMatrix> quantile_, quantile_error_;
};

}  // namespace edgelaw
