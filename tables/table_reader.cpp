// Reads and validates law and sweep table files, and evaluates them across beta.
#include "tables/table_file.h"
#include "tables/table_seal.h"

#include "tables/lagrange.h"
#include "tables/summary_fields.h"

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <memory>

namespace edgelaw {

namespace {

std::string num(double v) { return format_number(v); }

bool has_link(hid_t file, const char* name) { return h5_check(H5Lexists(file, name, H5P_DEFAULT), "H5Lexists") > 0; }
bool has_attr(hid_t obj, const char* name) { return h5_check(H5Aexists(obj, name), "H5Aexists") > 0; }

std::string get_string(hid_t obj, const char* name) {
  Hdf5Handle attr(H5Aopen(obj, name, H5P_DEFAULT), "H5Aopen");
  Hdf5Handle type(H5Aget_type(attr.get()), "H5Aget_type");
  if (H5Tget_class(type.get()) != H5T_STRING) throw TableFormatError(std::string("attribute ") + name + " is not a string");
  Hdf5Handle space(H5Aget_space(attr.get()), "H5Aget_space");
  if (h5_check(H5Sget_simple_extent_npoints(space.get()), "H5Sget_simple_extent_npoints") != 1)
    throw TableFormatError(std::string("attribute ") + name + " is not a single string");
  if (h5_check(H5Tis_variable_str(type.get()), "H5Tis_variable_str") > 0) {
    Hdf5Handle mem(H5Tcopy(H5T_C_S1), "H5Tcopy");
    h5_check(H5Tset_size(mem.get(), H5T_VARIABLE), "H5Tset_size");
    h5_check(H5Tset_cset(mem.get(), H5Tget_cset(type.get())), "H5Tset_cset");
    char* text = nullptr;
    h5_check(H5Aread(attr.get(), mem.get(), &text), "H5Aread");
    std::string out = text ? text : "";
    H5free_memory(text);
    return out;
  }
  const std::size_t size = H5Tget_size(type.get());
  std::string out(size, '\0');
  h5_check(H5Aread(attr.get(), type.get(), out.data()), "H5Aread");
  out.resize(out.find('\0') == std::string::npos ? size : out.find('\0'));
  return out;
}

// Numbers of any integer or float type, converted by HDF5; empty when absent.
template <class T>
std::vector<T> get_numbers(hid_t obj, const char* name, H5T_class_t want = H5T_NO_CLASS) {
  if (!has_attr(obj, name)) return {};
  Hdf5Handle attr(H5Aopen(obj, name, H5P_DEFAULT), "H5Aopen");
  Hdf5Handle type(H5Aget_type(attr.get()), "H5Aget_type");
  const H5T_class_t cls = H5Tget_class(type.get());
  if (cls != H5T_INTEGER && cls != H5T_FLOAT) throw TableFormatError(std::string("attribute ") + name + " is not numeric");
  if (want != H5T_NO_CLASS && cls != want)
    throw TableFormatError(std::string("attribute ") + name + " must be " + (want == H5T_INTEGER ? "an integer" : "a float"));
  Hdf5Handle space(H5Aget_space(attr.get()), "H5Aget_space");
  const auto n = h5_check(H5Sget_simple_extent_npoints(space.get()), "H5Sget_simple_extent_npoints");
  std::vector<T> out(static_cast<std::size_t>(n));
  h5_check(H5Aread(attr.get(), std::is_floating_point_v<T> ? H5T_NATIVE_DOUBLE : H5T_NATIVE_INT64, out.data()),
           "H5Aread");
  return out;
}

// A float dataset of exactly `shape` (HDF5 converts to double); names the mismatch otherwise.
std::vector<double> get_dataset(hid_t file, const std::string& name, const std::vector<hsize_t>& shape) {
  if (!has_link(file, name.c_str())) throw TableFormatError("required dataset '" + name + "' is missing");
  Hdf5Handle ds(H5Dopen2(file, name.c_str(), H5P_DEFAULT), "H5Dopen2");
  Hdf5Handle type(H5Dget_type(ds.get()), "H5Dget_type");
  if (H5Tget_class(type.get()) != H5T_FLOAT) throw TableFormatError("dataset '" + name + "' is not floating point");
  // Only the layout the writer makes is read: IEEE float64 little endian, chunked, each chunk
  // with a Fletcher-32 checksum. Anything else would send HDF5 down conversion and unfiltered
  // chunk paths where HDF5 1.10.8 reads past its buffers on damaged files (found by
  // tests/fuzz/table_reader_fuzz); with the checksum a damaged chunk fails cleanly.
  if (h5_check(H5Tequal(type.get(), H5T_IEEE_F64LE), "H5Tequal") <= 0)
    throw TableFormatError("dataset '" + name + "' is not IEEE float64 little endian");
  {
    Hdf5Handle dcpl(H5Dget_create_plist(ds.get()), "H5Dget_create_plist");
    unsigned flags = 0;
    std::size_t nvalues = 0;
    unsigned filter_config = 0;
    if (H5Pget_layout(dcpl.get()) != H5D_CHUNKED ||
        H5Pget_filter_by_id2(dcpl.get(), H5Z_FILTER_FLETCHER32, &flags, &nvalues, nullptr, 0, nullptr,
                             &filter_config) < 0) {
      hdf5_error_reason();  // clears the stack of the failed filter query
      throw TableFormatError("dataset '" + name + "' is not chunked with a Fletcher-32 checksum");
    }
    // Every chunk must be stored, inside the file, with exactly its data and the 4-byte
    // checksum; a damaged chunk index otherwise makes HDF5 allocate what it says (up to 4 GiB).
    Hdf5Handle fspace(H5Dget_space(ds.get()), "H5Dget_space");
    const int rank = h5_check(H5Sget_simple_extent_ndims(fspace.get()), "H5Sget_simple_extent_ndims");
    std::vector<hsize_t> dims(static_cast<std::size_t>(std::max(rank, 0))), chunk(dims.size());
    h5_check(H5Sget_simple_extent_dims(fspace.get(), dims.data(), nullptr), "H5Sget_simple_extent_dims");
    if (rank < 1 || H5Pget_chunk(dcpl.get(), rank, chunk.data()) != rank)
      throw TableFormatError("dataset '" + name + "' has an unreadable chunk layout");
    hsize_t expected_chunks = 1, chunk_values = 1;
    for (int k = 0; k < rank; ++k) {
      if (chunk[k] == 0) throw TableFormatError("dataset '" + name + "' has an empty chunk");
      expected_chunks *= (dims[k] + chunk[k] - 1) / chunk[k];
      chunk_values *= chunk[k];
    }
    hsize_t chunks = 0, file_size = 0;
    h5_check(H5Dget_num_chunks(ds.get(), fspace.get(), &chunks), "H5Dget_num_chunks");
    h5_check(H5Fget_filesize(file, &file_size), "H5Fget_filesize");
    if (chunks != expected_chunks)
      throw TableFormatError("dataset '" + name + "' has " + std::to_string(chunks) + " stored chunks, expected " +
                             std::to_string(expected_chunks) + " (damaged file)");
    for (hsize_t i = 0; i < chunks; ++i) {
      unsigned mask = 0;
      haddr_t addr = 0;
      hsize_t size = 0;
      h5_check(H5Dget_chunk_info(ds.get(), fspace.get(), i, nullptr, &mask, &addr, &size), "H5Dget_chunk_info");
      if (mask != 0 || size != chunk_values * 8 + 4 || addr > file_size || size > file_size - addr)
        throw TableFormatError("dataset '" + name + "' has a damaged chunk index (chunk " + std::to_string(i) +
                               ": " + std::to_string(size) + " bytes)");
    }
  }
  Hdf5Handle space(H5Dget_space(ds.get()), "H5Dget_space");
  const int rank = h5_check(H5Sget_simple_extent_ndims(space.get()), "H5Sget_simple_extent_ndims");
  std::vector<hsize_t> dims(static_cast<std::size_t>(std::max(rank, 0)));
  h5_check(H5Sget_simple_extent_dims(space.get(), dims.data(), nullptr), "H5Sget_simple_extent_dims");
  if (!shape.empty() && dims != shape) {
    auto str = [](const std::vector<hsize_t>& d) {
      std::string s = "(";
      for (std::size_t k = 0; k < d.size(); ++k) s += (k ? ", " : "") + std::to_string(d[k]);
      return s + ")";
    };
    throw TableFormatError("dataset '" + name + "' has shape " + str(dims) + ", expected " + str(shape));
  }
  if (shape.empty() && rank != 1) throw TableFormatError("axis '" + name + "' is not one-dimensional");
  hsize_t count = 1;
  for (hsize_t d : dims) count *= d;
  std::vector<double> out(count);
  if (count > 0 && H5Dread(ds.get(), H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, out.data()) < 0)
    throw TableFormatError("dataset '" + name + "' cannot be read (checksum mismatch or damaged data): " +
                           hdf5_error_reason());
  return out;
}

void check_axis(const std::string& name, const std::vector<double>& v, bool inf_last_ok) {
  if (v.empty()) throw TableFormatError("axis '" + name + "' is empty");
  for (std::size_t k = 0; k < v.size(); ++k) {
    const bool inf_ok = inf_last_ok && k + 1 == v.size() && v[k] == kInf;
    if (!std::isfinite(v[k]) && !inf_ok)
      throw TableFormatError("axis '" + name + "'[" + std::to_string(k) + "] = " + num(v[k]) + " is not finite" +
                             (inf_last_ok ? " (only the last w may be +inf)" : ""));
    if (k > 0 && !(v[k] > v[k - 1]))
      throw TableFormatError("axis '" + name + "' is not strictly increasing at index " + std::to_string(k) + " (" +
                             num(v[k - 1]) + ", " + num(v[k]) + ")");
  }
}

RowMatrix slice(const std::vector<double>& all, std::size_t index, Eigen::Index rows, Eigen::Index cols) {
  const std::size_t n = static_cast<std::size_t>(rows * cols);
  return Eigen::Map<const RowMatrix>(all.data() + index * n, rows, cols);
}

herr_t collect_settings(hid_t obj, const char* name, const H5A_info_t*, void* data) {
  static constexpr std::string_view prefix = "setting_";
  std::string_view n(name);
  if (n.substr(0, prefix.size()) != prefix) return 0;
  auto* meta = static_cast<TableMetadata*>(data);
  try {
    Hdf5Handle attr(H5Aopen(obj, name, H5P_DEFAULT), "H5Aopen");
    Hdf5Handle type(H5Aget_type(attr.get()), "H5Aget_type");
    const std::string key(n.substr(prefix.size()));
    switch (H5Tget_class(type.get())) {
      case H5T_STRING: meta->settings[key] = get_string(obj, name); break;
      case H5T_INTEGER: meta->settings[key] = get_numbers<std::int64_t>(obj, name).at(0); break;
      case H5T_FLOAT: meta->settings[key] = get_numbers<double>(obj, name).at(0); break;
      default: return -1;
    }
  } catch (...) {
    return -1;  // exceptions must not cross HDF5's C frames
  }
  return 0;
}

void read_summaries(hid_t file, std::vector<LawTable>& tables, bool sweep) {
  using S = SolveSummary;
  const auto& scalars = kSummaryScalars;
  const std::size_t nb = tables.size();
  for (auto& t : tables) t.summary.beta = t.beta;
  for (const auto& [name, field] : scalars) {
    auto v = get_numbers<double>(file, name);
    if (v.empty()) continue;  // summaries are informative, not required
    if (v.size() != nb) throw TableFormatError(std::string("attribute ") + name + " has the wrong length");
    for (std::size_t b = 0; b < nb; ++b) tables[b].summary.*field = v[b];
  }
  if (auto v = get_numbers<std::int64_t>(file, "solve_converged"); v.size() == nb)
    for (std::size_t b = 0; b < nb; ++b) tables[b].summary.converged = v[b] != 0;
  auto levels = [&](const char* name, auto target) {
    auto v = get_numbers<std::int64_t>(file, name);
    if (v.empty()) return;
    if (v.size() % nb) throw TableFormatError(std::string("attribute ") + name + " has the wrong length");
    const std::size_t width = v.size() / nb;
    for (std::size_t b = 0; b < nb; ++b) {
      auto& dst = target(tables[b].summary);
      dst.clear();
      for (std::size_t k = 0; k < width; ++k)
        if (!sweep || v[b * width + k] >= 0) dst.push_back(static_cast<std::remove_reference_t<decltype(dst[0])>>(v[b * width + k]));
    }
  };
  levels("solve_intervals", [](S& s) -> std::vector<int>& { return s.intervals; });
  levels("solve_steps", [](S& s) -> std::vector<long>& { return s.steps; });
  levels("solve_rhs_evals", [](S& s) -> std::vector<long>& { return s.rhs_evals; });
  levels("solve_jac_evals", [](S& s) -> std::vector<long>& { return s.jac_evals; });
  levels("solve_newton_iters", [](S& s) -> std::vector<long>& { return s.newton_iters; });
  levels("solve_error_test_failures", [](S& s) -> std::vector<long>& { return s.error_test_failures; });
}

}  // namespace

LawTableFile LawTableFile::open(const std::string& path, InterpolationOptions options) {
  namespace fs = std::filesystem;
  auto fail = [&](const std::string& why) -> TableFormatError {
    return TableFormatError("table file '" + path + "': " + why);
  };
  std::error_code ec;
  if (!fs::exists(path, ec)) throw fail("does not exist");
  if (fs::is_directory(path, ec)) throw fail("is a folder, not a file");
  const auto size = fs::file_size(path, ec);
  if (ec) throw fail("cannot be inspected: " + ec.message());
  if (size == 0) throw fail("is empty (0 bytes)");
  if (auto e = options.check(); !e.empty()) throw TableError("interpolation options: " + e);

  Hdf5QuietErrors quiet;
  LawTableFile out;
  out.path_ = path;
  try {
    // The integrity header first: HDF5 parses only files whose contents are as written.
    const SealCheck seal = check_table_seal(path);
    if (seal == SealCheck::kMismatch)
      throw fail("is truncated or damaged (its contents do not match the CRC-32 and size in its header)");
    const htri_t is_hdf5 = H5Fis_hdf5(path.c_str());
    if (is_hdf5 <= 0) throw fail("is not an HDF5 file" + (is_hdf5 < 0 ? ": " + hdf5_error_reason() : std::string()));
    if (seal == SealCheck::kAbsent)
      throw fail("is not an edgelaw table (HDF5 without the edgelaw integrity header)");
    // No HDF5 file locking (see FORMAT.md, "Concurrent access"): consistency comes from the
    // writers' rename, and flock fails on some network file systems.
    Hdf5Handle fapl(H5Pcreate(H5P_FILE_ACCESS), "H5Pcreate");
    h5_check(H5Pset_file_locking(fapl.get(), false, true), "H5Pset_file_locking");
    const hid_t id = H5Fopen(path.c_str(), H5F_ACC_RDONLY, fapl.get());
    if (id < 0) throw fail("cannot be opened as HDF5 (truncated or damaged?): " + hdf5_error_reason());
    Hdf5Handle file(id, "H5Fopen");
    const hid_t f = file.get();

    if (!has_attr(f, "edgelaw_schema_version"))
      throw fail("is not an edgelaw table (no edgelaw_schema_version attribute)");
    auto version = get_numbers<std::int64_t>(f, "edgelaw_schema_version", H5T_INTEGER);
    if (version.size() != 1) throw fail("edgelaw_schema_version is not a single integer");
    if (version[0] > kTableSchemaVersion)
      throw fail("uses table schema version " + std::to_string(version[0]) + ", but this reader supports versions up to " +
                 std::to_string(kTableSchemaVersion) + " (a newer edgelaw wrote it)");
    if (version[0] < 1) throw fail("has invalid schema version " + std::to_string(version[0]));
    out.schema_version_ = static_cast<int>(version[0]);

    out.sweep_ = has_link(f, "beta");
    std::vector<double> x = get_dataset(f, "x", {}), w = get_dataset(f, "w", {});
    out.probability_ = get_dataset(f, "probability", {});
    check_axis("x", x, false);
    check_axis("w", w, true);
    check_axis("probability", out.probability_, false);
    if (x.size() < 2) throw fail("axis 'x' needs at least 2 thresholds");
    for (double p : out.probability_)
      if (!(p > 0 && p < 1)) throw fail("probability level " + num(p) + " is not in (0, 1)");
    if (out.sweep_) {
      out.betas_ = get_dataset(f, "beta", {});
      check_axis("beta", out.betas_, false);
    } else {
      auto b = get_numbers<double>(f, "beta");
      if (b.size() != 1) throw fail("has no scalar beta attribute");
      out.betas_ = b;
    }
    const std::size_t nb = out.betas_.size(), nw = w.size(), nx = x.size(), np = out.probability_.size();
    std::vector<hsize_t> grid{nw, nx}, per_w{nw}, per_p{nw, np};
    if (out.sweep_)
      for (auto* s : {&grid, &per_w, &per_p}) s->insert(s->begin(), nb);

    std::vector<LawTable> tables(nb);
    const std::pair<const char*, RowMatrix LawTable::*> mats[] = {
        {"cdf", &LawTable::cdf},
        {"survival", &LawTable::survival},
        {"density", &LawTable::density},
        {"cdf_error", &LawTable::cdf_error},
        {"survival_error", &LawTable::survival_error},
        {"density_error", &LawTable::density_error}};
    for (const auto& [name, field] : mats) {
      auto all = get_dataset(f, name, grid);
      for (std::size_t b = 0; b < nb; ++b) tables[b].*field = slice(all, b, nw, nx);
    }
    for (std::size_t b = 0; b < nb; ++b) {
      tables[b].beta = out.betas_[b];
      tables[b].x = x;
      tables[b].w = w;
    }
    for (std::size_t b = 0; b < nb; ++b)
      if (std::string e = check_law_table(tables[b]); !e.empty())
        throw fail(out.sweep_ ? "beta = " + num(out.betas_[b]) + ": " + e : e);
    // Stored logarithms must be the logarithms of the stored values; a mismatch means the
    // file was edited or mixed up. 1e-12 relative allows for a different libm.
    for (const auto& [name, field] : {std::pair{"log_cdf", &LawTable::cdf}, std::pair{"log_survival", &LawTable::survival}}) {
      auto all = get_dataset(f, name, grid);
      for (std::size_t b = 0; b < nb; ++b) {
        const RowMatrix lg = slice(all, b, nw, nx);
        const RowMatrix& v = tables[b].*field;
        for (Eigen::Index j = 0; j < lg.rows(); ++j)
          for (Eigen::Index i = 0; i < lg.cols(); ++i) {
            const double expect = std::log(v(j, i)), got = lg(j, i);
            const bool ok = (expect == -kInf && got == -kInf) ||
                            std::abs(got - expect) <= 1e-12 * std::max(1.0, std::abs(expect));
            if (!ok)
              throw fail(std::string(name) + "[w=" + num(w[j]) + ", x=" + num(x[i]) + "] = " + num(got) +
                         " is not the logarithm of the stored value (" + num(expect) + ")");
          }
      }
    }
    // The accuracy mark of files that missed their target must agree with the stored errors.
    if (has_link(f, "within_target")) {
      auto mark = get_dataset(f, "within_target", grid);
      auto target = get_numbers<double>(f, "setting_target_error");
      if (target.size() != 1) throw fail("has within_target but no scalar setting_target_error");
      for (std::size_t b = 0; b < nb; ++b)
        for (std::size_t k = 0; k < nw * nx; ++k) {
          const bool ok = tables[b].cdf_error.data()[k] <= target[0] && tables[b].survival_error.data()[k] <= target[0];
          if (mark[b * nw * nx + k] != (ok ? 1.0 : 0.0))
            throw fail("within_target[w=" + num(w[k / nx]) + ", x=" + num(x[k % nx]) +
                       "] disagrees with the stored errors and setting_target_error");
        }
    }
    if (has_link(f, "mean")) {
      const std::pair<const char*, double Moments::*> fields[] = {{"mean", &Moments::mean},
                                                                   {"variance", &Moments::variance},
                                                                   {"skewness", &Moments::skewness},
                                                                   {"excess_kurtosis", &Moments::excess_kurtosis}};
      for (auto& t : tables) t.moments.resize(nw), t.moment_errors.resize(nw);
      for (const auto& [name, field] : fields) {
        auto v = get_dataset(f, name, per_w);
        auto e = get_dataset(f, std::string(name) + "_error", per_w);
        for (std::size_t b = 0; b < nb; ++b)
          for (std::size_t j = 0; j < nw; ++j) {
            tables[b].moments[j].*field = v[b * nw + j];
            tables[b].moment_errors[j].*field = e[b * nw + j];
          }
      }
    }
    auto q = get_dataset(f, "quantile", per_p), qe = get_dataset(f, "quantile_error", per_p);
    for (std::size_t b = 0; b < nb; ++b) {
      RowMatrix qm = slice(q, b, nw, np), qem = slice(qe, b, nw, np);
      for (std::size_t j = 0; j < nw; ++j)
        for (std::size_t k = 0; k < np; ++k) {
          const double p = out.probability_[k], v = qm(j, k), err = qem(j, k);
          // NaN is the documented marker for a level the x range does not reach.
          const bool reachable = tables[b].cdf(j, 0) <= p && p <= tables[b].cdf(j, nx - 1);
          const bool ok = std::isnan(v) ? (!reachable && std::isnan(err))
                                        : (v >= x.front() && v <= x.back() && err >= 0);
          if (!ok)
            throw fail("quantile[w=" + num(w[j]) + ", probability=" + num(p) + "] = " + num(v) + " (error " + num(err) +
                       ") is invalid");
        }
      out.quantile_.push_back(qm);
      out.quantile_error_.push_back(qem);
    }
    read_summaries(f, tables, out.sweep_);

    if (has_attr(f, "title")) out.metadata_.title = get_string(f, "title");
    if (has_attr(f, "history")) out.metadata_.history = get_string(f, "history");
    if (has_attr(f, "Conventions")) out.metadata_.conventions = get_string(f, "Conventions");
    out.metadata_.schema_version = out.schema_version_;
    hsize_t idx = 0;
    if (H5Aiterate2(f, H5_INDEX_NAME, H5_ITER_INC, &idx, collect_settings, &out.metadata_) < 0)
      throw fail("a setting_ attribute cannot be read");
    file.close();
    for (auto& t : tables) out.slices_.emplace_back(std::move(t), options);
  } catch (const TableFormatError& e) {
    const std::string what = e.what();
    if (what.rfind("table file '", 0) == 0) throw;
    throw fail(what);
  } catch (const TableError& e) {
    throw fail(e.what());
  }
  return out;
}

const LawInterpolator& LawTableFile::single() const {
  if (sweep_)
    throw TableRangeError("table file '" + path_ + "' is a beta sweep; pass beta to evaluate it");
  return slices_.front();
}

template <class Eval>
Estimate LawTableFile::across_beta(double beta, Eval eval) const {
  if (std::isnan(beta) || beta < betas_.front() || beta > betas_.back())
    throw TableRangeError("beta = " + num(beta) + " is outside the table's range [" + num(betas_.front()) + ", " +
                          num(betas_.back()) + "]");
  const int nb = static_cast<int>(betas_.size());
  auto it = std::lower_bound(betas_.begin(), betas_.end(), beta);
  if (*it == beta) return eval(slices_[static_cast<std::size_t>(it - betas_.begin())]);
  // Betas are usually few and far apart (1, 2, 4): at most 4 slices, and the estimate
  // from the order difference says honestly how good that is.
  const int points = std::min(4, nb);
  const int start = lagrange::window_start(static_cast<int>(it - betas_.begin()) - 1, nb, points);
  double hi[4], lo[4];
  lagrange::weight_pair(betas_.data() + start, points, beta, hi, lo);
  double v = 0, vl = 0, err = 0;
  for (int k = 0; k < points; ++k) {
    Estimate e = eval(slices_[static_cast<std::size_t>(start + k)]);
    v += hi[k] * e.value;
    vl += lo[k] * e.value;
    err += std::abs(hi[k]) * e.error;
  }
  // Factor 2: with so few, widely spaced slices the order difference alone can fall short.
  return {v, err + 2 * std::abs(v - vl)};
}

Estimate LawTableFile::cdf(double x, double w, double beta) const {
  Estimate e = across_beta(beta, [&](const LawInterpolator& s) { return s.cdf(x, w); });
  e.value = std::clamp(e.value, 0.0, 1.0);
  return e;
}

Estimate LawTableFile::survival(double x, double w, double beta) const {
  Estimate e = across_beta(beta, [&](const LawInterpolator& s) { return s.survival(x, w); });
  e.value = std::clamp(e.value, 0.0, 1.0);
  return e;
}

Estimate LawTableFile::density(double x, double w, double beta) const {
  Estimate e = across_beta(beta, [&](const LawInterpolator& s) { return s.density(x, w); });
  e.value = std::max(e.value, 0.0);
  return e;
}

Estimate LawTableFile::quantile(double probability, double w, double beta) const {
  if (!(probability > 0 && probability < 1))
    throw TableRangeError("probability = " + num(probability) + " must lie strictly between 0 and 1");
  (void)across_beta(beta, [&](const LawInterpolator&) { return Estimate{}; });  // range check
  auto it = std::lower_bound(betas_.begin(), betas_.end(), beta);
  if (*it == beta) return slices_[static_cast<std::size_t>(it - betas_.begin())].quantile(probability, w);
  // Between slices: bisection in x on the beta-interpolated cdf (survival above the median).
  const bool upper = probability >= 0.5;
  const double target = upper ? 1 - probability : probability;
  auto before = [&](double xv) {
    const double v = upper ? survival(xv, w, beta).value : cdf(xv, w, beta).value;
    return upper ? v > target : v < target;
  };
  double a = x().front(), b = x().back();
  if (!before(a) || before(b))
    throw TableRangeError("probability = " + num(probability) + " at w = " + num(w) + ", beta = " + num(beta) +
                          " is outside the table's cdf range; widen the x range");
  for (int k = 0; k < 200; ++k) {
    const double mid = 0.5 * (a + b);
    if (mid <= a || mid >= b) break;
    (before(mid) ? a : b) = mid;
  }
  const double xq = 0.5 * (a + b);
  const Estimate c = upper ? survival(xq, w, beta) : cdf(xq, w, beta);
  const Estimate d = density(xq, w, beta);
  return {xq, d.value > 0 ? c.error / d.value + (b - a) : kInf};
}

}  // namespace edgelaw
