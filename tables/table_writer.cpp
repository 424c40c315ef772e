// Writes law and sweep tables as netCDF-4 compatible HDF5, atomically (see tables/FORMAT.md).
#include "tables/table_file.h"
#include "tables/table_seal.h"
#include "tables/summary_fields.h"
#include "tables/temporary_files.h"

#include <hdf5_hl.h>

#include <fcntl.h>
#include <signal.h>
#include <unistd.h>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdlib>
#include <cstdio>
#include <ctime>
#include <filesystem>
#include <system_error>

namespace edgelaw {

namespace {

std::function<void(std::string_view)>& write_hook() {
  static std::function<void(std::string_view)> hook;
  return hook;
}

void run_hook(std::string_view stage) {
  if (write_hook()) write_hook()(stage);
}

// ---- attributes -------------------------------------------------------------------------

// Variable-length UTF-8 strings: h5py and h5netcdf return str, netCDF-C reads NC_STRING.
void put_string(hid_t obj, const char* name, const std::string& value) {
  Hdf5Handle type(H5Tcopy(H5T_C_S1), "H5Tcopy");
  h5_check(H5Tset_size(type.get(), H5T_VARIABLE), "H5Tset_size");
  h5_check(H5Tset_cset(type.get(), H5T_CSET_UTF8), "H5Tset_cset");
  Hdf5Handle space(H5Screate(H5S_SCALAR), "H5Screate");
  Hdf5Handle attr(H5Acreate2(obj, name, type.get(), space.get(), H5P_DEFAULT, H5P_DEFAULT), "H5Acreate2");
  const char* text = value.c_str();
  h5_check(H5Awrite(attr.get(), type.get(), &text), "H5Awrite");
}

// Numbers as numbers: scalar when dims is empty, otherwise an array of that shape.
template <class T>
void put_numbers(hid_t obj, const char* name, const std::vector<T>& values,
                 std::vector<hsize_t> dims = {}) {
  const hid_t file_type = std::is_floating_point_v<T> ? H5T_IEEE_F64LE : H5T_STD_I64LE;
  const hid_t mem_type = std::is_floating_point_v<T> ? H5T_NATIVE_DOUBLE : H5T_NATIVE_INT64;
  Hdf5Handle space = dims.empty()
                         ? Hdf5Handle(H5Screate(H5S_SCALAR), "H5Screate")
                         : Hdf5Handle(H5Screate_simple(static_cast<int>(dims.size()), dims.data(), nullptr),
                                      "H5Screate_simple");
  Hdf5Handle attr(H5Acreate2(obj, name, file_type, space.get(), H5P_DEFAULT, H5P_DEFAULT), "H5Acreate2");
  h5_check(H5Awrite(attr.get(), mem_type, values.data()), "H5Awrite");
}

void put_int32(hid_t obj, const char* name, int value) {
  Hdf5Handle space(H5Screate(H5S_SCALAR), "H5Screate");
  Hdf5Handle attr(H5Acreate2(obj, name, H5T_STD_I32LE, space.get(), H5P_DEFAULT, H5P_DEFAULT), "H5Acreate2");
  h5_check(H5Awrite(attr.get(), H5T_NATIVE_INT, &value), "H5Awrite");
}

// ---- datasets ---------------------------------------------------------------------------

struct Writer {
  hid_t file;
  bool checksums;
  std::map<std::string, Hdf5Handle> scales;  // axis name -> open coordinate dataset
  std::map<std::string, hsize_t> sizes;

  Hdf5Handle create(const std::string& name, const std::vector<std::string>& dims,
                    const double* data, const char* units, const std::string& long_name) {
    std::vector<hsize_t> shape, chunk;
    for (const auto& d : dims) shape.push_back(sizes.at(d));
    // One chunk per innermost row: a checksum failure then names a small region and a
    // reader of one row touches one chunk.
    chunk.assign(shape.size(), 1);
    chunk.back() = std::max<hsize_t>(shape.back(), 1);
    Hdf5Handle space(H5Screate_simple(static_cast<int>(shape.size()), shape.data(), nullptr),
                     "H5Screate_simple");
    Hdf5Handle dcpl(H5Pcreate(H5P_DATASET_CREATE), "H5Pcreate");
    h5_check(H5Pset_attr_creation_order(dcpl.get(), H5P_CRT_ORDER_TRACKED | H5P_CRT_ORDER_INDEXED),
             "H5Pset_attr_creation_order");
    h5_check(H5Pset_chunk(dcpl.get(), static_cast<int>(chunk.size()), chunk.data()), "H5Pset_chunk");
    if (checksums) h5_check(H5Pset_fletcher32(dcpl.get()), "H5Pset_fletcher32");
    Hdf5Handle ds(H5Dcreate2(file, name.c_str(), H5T_IEEE_F64LE, space.get(), H5P_DEFAULT,
                             dcpl.get(), H5P_DEFAULT),
                  "H5Dcreate2");
    h5_check(H5Dwrite(ds.get(), H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, data), "H5Dwrite");
    put_string(ds.get(), "units", units);
    put_string(ds.get(), "long_name", long_name);
    return ds;
  }

  void axis(const std::string& name, const std::vector<double>& values, const std::string& long_name,
            const std::string& comment = "") {
    sizes[name] = values.size();
    Hdf5Handle ds = create(name, {name}, values.data(), "1", long_name);
    if (!comment.empty()) put_string(ds.get(), "comment", comment);
    h5_check(H5DSset_scale(ds.get(), name.c_str()), "H5DSset_scale");
    scales[name] = std::move(ds);
  }

  void variable(const std::string& name, const std::vector<std::string>& dims,
                const std::vector<double>& data, const char* units, const std::string& long_name) {
    Hdf5Handle ds = create(name, dims, data.data(), units, long_name);
    for (unsigned k = 0; k < dims.size(); ++k)
      h5_check(H5DSattach_scale(ds.get(), scales.at(dims[k]).get(), k), "H5DSattach_scale");
  }
};

std::string num(double v) { return format_number(v); }

bool valid_key(const std::string& key) {
  if (key.empty() || key[0] == '_') return false;
  for (char c : key)
    if (!(std::isalnum(static_cast<unsigned char>(c)) || c == '_')) return false;
  return true;
}

void check_inputs(const std::vector<LawTable>& tables, bool sweep, const TableMetadata& meta,
                  const TableWriteOptions& options) {
  if (tables.empty()) throw TableError("no table to write");
  for (std::size_t b = 0; b < tables.size(); ++b) {
    if (std::string e = check_law_table(tables[b]); !e.empty())
      throw TableError("invalid law table" + (sweep ? " for beta = " + num(tables[b].beta) : "") + ": " + e);
    if (b > 0) {
      if (tables[b].x != tables[0].x || tables[b].w != tables[0].w)
        throw TableError("sweep tables must share the same x and w grids (beta = " + num(tables[b].beta) + " differs)");
      if (!(tables[b].beta > tables[b - 1].beta))
        throw TableError("sweep betas must be strictly increasing (" + num(tables[b - 1].beta) + ", " +
                         num(tables[b].beta) + ")");
      if (tables[b].moments.empty() != tables[0].moments.empty())
        throw TableError("sweep tables must all have moments or all lack them");
    }
  }
  if (meta.schema_version < 1) throw TableError("schema_version must be >= 1, got " + num(meta.schema_version));
  for (const auto& [key, value] : meta.settings)
    if (!valid_key(key)) throw TableError("setting name '" + key + "' must be [A-Za-z0-9_] and not start with '_'");
  const auto& p = options.probability_levels;
  if (p.empty()) throw TableError("probability_levels is empty");
  for (std::size_t k = 0; k < p.size(); ++k)
    if (!(p[k] > 0 && p[k] < 1) || (k > 0 && !(p[k] > p[k - 1])))
      throw TableError("probability_levels must be strictly increasing in (0, 1)");
}

// Matrices of all slices, concatenated in (beta, w, x) row-major order.
std::vector<double> stack(const std::vector<LawTable>& tables, RowMatrix LawTable::*m) {
  std::vector<double> out;
  for (const auto& t : tables) out.insert(out.end(), (t.*m).data(), (t.*m).data() + (t.*m).size());
  return out;
}

std::vector<double> stack_log(const std::vector<LawTable>& tables, RowMatrix LawTable::*m) {
  std::vector<double> out = stack(tables, m);
  for (double& v : out) v = std::log(v);
  return out;
}

std::vector<double> stack_moment(const std::vector<LawTable>& tables, std::vector<Moments> LawTable::*m,
                                 double Moments::*field) {
  std::vector<double> out;
  for (const auto& t : tables)
    for (const auto& mm : t.*m) out.push_back(mm.*field);
  return out;
}

void write_summaries(hid_t file, const std::vector<LawTable>& tables, bool sweep) {
  using S = SolveSummary;
  const auto& scalars = kSummaryScalars;
  const hsize_t nb = tables.size();
  for (const auto& [name, field] : scalars) {
    std::vector<double> v;
    for (const auto& t : tables) v.push_back(t.summary.*field);
    put_numbers(file, name, v, sweep ? std::vector<hsize_t>{nb} : std::vector<hsize_t>{});
  }
  std::vector<std::int64_t> converged;
  for (const auto& t : tables) converged.push_back(t.summary.converged ? 1 : 0);
  put_numbers(file, "solve_converged", converged, sweep ? std::vector<hsize_t>{nb} : std::vector<hsize_t>{});
  // One flag for the whole file, so a reader need not scan the per-beta array to learn that
  // some slice missed its accuracy target (written only on request, e.g. --keep-unconverged).
  const bool all_converged = std::all_of(converged.begin(), converged.end(), [](std::int64_t c) { return c == 1; });
  put_numbers(file, "converged", std::vector<std::int64_t>{all_converged ? 1 : 0}, std::vector<hsize_t>{});

  // Per grid level counters; a sweep pads shorter level lists with -1 (counts are >= 0).
  auto levels = [&](const char* name, auto get) {
    std::size_t width = 0;
    for (const auto& t : tables) width = std::max(width, get(t.summary).size());
    if (width == 0) return;  // zero-length attributes are avoided for netCDF's sake
    std::vector<std::int64_t> v;
    for (const auto& t : tables) {
      const auto& src = get(t.summary);
      for (std::size_t k = 0; k < width; ++k) v.push_back(k < src.size() ? std::int64_t(src[k]) : -1);
    }
    // netCDF attributes are 1-D: a sweep stores the (beta, level) block flattened row-major.
    put_numbers(file, name, v, std::vector<hsize_t>{sweep ? nb * width : width});
  };
  levels("solve_intervals", [](const S& s) -> const std::vector<int>& { return s.intervals; });
  levels("solve_steps", [](const S& s) -> const std::vector<long>& { return s.steps; });
  levels("solve_rhs_evals", [](const S& s) -> const std::vector<long>& { return s.rhs_evals; });
  levels("solve_jac_evals", [](const S& s) -> const std::vector<long>& { return s.jac_evals; });
  levels("solve_newton_iters", [](const S& s) -> const std::vector<long>& { return s.newton_iters; });
  levels("solve_error_test_failures",
         [](const S& s) -> const std::vector<long>& { return s.error_test_failures; });
}

void write_contents(hid_t file, const std::vector<LawTable>& tables, bool sweep,
                    const TableMetadata& meta, const TableWriteOptions& options) {
  const LawTable& first = tables.front();
  const auto& levels = options.probability_levels;

  // Quantiles from the same interpolant the reader uses, so both agree at the rows.
  std::vector<double> quantile, quantile_error;
  for (const auto& t : tables) {
    LawInterpolator interp(t);
    for (double w : t.w)
      for (double p : levels) {
        try {
          Estimate q = interp.quantile(p, w);
          quantile.push_back(q.value);
          quantile_error.push_back(q.error);
        } catch (const TableRangeError&) {
          // The level is not reached inside the x range: no honest value exists.
          quantile.push_back(std::nan(""));
          quantile_error.push_back(std::nan(""));
        }
      }
  }

  Writer wr{file, options.checksums, {}, {}};
  // Axes first: netCDF numbers dimensions in creation order.
  std::vector<std::string> grid, per_w, per_p;
  if (sweep) {
    std::vector<double> betas;
    for (const auto& t : tables) betas.push_back(t.beta);
    wr.axis("beta", betas, "beta (Dyson index) of the ensemble");
    grid.push_back("beta");
  }
  wr.axis("w", first.w, "boundary parameter w (spike strength; +inf: no spike)",
          first.w.back() == kInf ? "the last w is +inf: the unspiked Tracy-Widom row" : "");
  wr.axis("x", first.x, "threshold x (edge-scaled largest eigenvalue)");
  wr.axis("probability", levels, "probability level of the quantile");
  per_w = grid;
  per_w.push_back("w");
  per_p = per_w;
  per_p.push_back("probability");
  grid = per_w;
  grid.push_back("x");

  wr.variable("cdf", grid, stack(tables, &LawTable::cdf), "1", "cumulative distribution function F_beta(x; w)");
  wr.variable("survival", grid, stack(tables, &LawTable::survival), "1", "survival function 1 - F_beta(x; w)");
  wr.variable("density", grid, stack(tables, &LawTable::density), "1", "probability density dF/dx");
  wr.variable("log_cdf", grid, stack_log(tables, &LawTable::cdf), "1", "natural logarithm of the cdf");
  wr.variable("log_survival", grid, stack_log(tables, &LawTable::survival), "1",
              "natural logarithm of the survival function");
  wr.variable("cdf_error", grid, stack(tables, &LawTable::cdf_error), "1", "estimated absolute error of cdf");
  wr.variable("survival_error", grid, stack(tables, &LawTable::survival_error), "1",
              "estimated absolute error of survival");
  wr.variable("density_error", grid, stack(tables, &LawTable::density_error), "1",
              "estimated absolute error of density");
  // A file whose solve missed its target marks the entries that did (FORMAT.md, "Accuracy
  // mark"), so downstream software need not compare every error with the setting itself.
  if (auto it = meta.settings.find("target_error"); it != meta.settings.end()) {
    if (const double* target = std::get_if<double>(&it->second)) {
      std::vector<double> mark;
      std::int64_t missed = 0;
      for (const auto& t : tables)
        for (Eigen::Index k = 0; k < t.cdf_error.size(); ++k) {
          const bool ok = t.cdf_error.data()[k] <= *target && t.survival_error.data()[k] <= *target;
          mark.push_back(ok ? 1.0 : 0.0);
          missed += ok ? 0 : 1;
        }
      if (missed > 0) {
        wr.variable("within_target", grid, mark, "1",
                    "1 where cdf_error and survival_error are within setting_target_error, 0 where the solve missed it");
        put_numbers(file, "entries_over_target", std::vector<std::int64_t>{missed}, std::vector<hsize_t>{});
      }
    }
  }
  run_hook("datasets");
  if (!first.moments.empty()) {
    const std::pair<const char*, double Moments::*> fields[] = {{"mean", &Moments::mean},
                                                                 {"variance", &Moments::variance},
                                                                 {"skewness", &Moments::skewness},
                                                                 {"excess_kurtosis", &Moments::excess_kurtosis}};
    for (const auto& [name, field] : fields) {
      wr.variable(name, per_w, stack_moment(tables, &LawTable::moments, field), "1",
                  std::string(name) + " of the law");
      wr.variable(std::string(name) + "_error", per_w, stack_moment(tables, &LawTable::moment_errors, field),
                  "1", std::string("estimated absolute error of ") + name);
    }
  }
  wr.variable("quantile", per_p, quantile, "1", "quantile: x with F_beta(x; w) = probability (NaN: outside the x range)");
  wr.variable("quantile_error", per_p, quantile_error, "1", "estimated absolute error of quantile");

  put_string(file, "title", meta.title);
  put_string(file, "history", meta.history);
  put_string(file, "Conventions", meta.conventions);
  put_int32(file, "edgelaw_schema_version", meta.schema_version);
  put_string(file, "edgelaw_layout", sweep ? "sweep" : "law");
  if (!sweep) put_numbers(file, "beta", std::vector<double>{first.beta});
  for (const auto& [key, value] : meta.settings) {
    const std::string name = "setting_" + key;
    if (auto* s = std::get_if<std::string>(&value)) put_string(file, name.c_str(), *s);
    else if (auto* d = std::get_if<double>(&value)) put_numbers(file, name.c_str(), std::vector<double>{*d});
    else put_numbers(file, name.c_str(), std::vector<std::int64_t>{std::get<std::int64_t>(value)});
  }
  write_summaries(file, tables, sweep);
}

void fsync_path(const std::string& path, bool directory) {
  int fd = ::open(path.c_str(), (directory ? O_DIRECTORY : 0) | O_RDONLY | O_CLOEXEC);
  if (fd < 0) throw TableWriteError("cannot open '" + path + "' for fsync: " + std::generic_category().message(errno));
  int rc = ::fsync(fd);
  int err = errno;
  ::close(fd);
  if (rc != 0) throw TableWriteError("fsync of '" + path + "' failed: " + std::generic_category().message(err));
}

// This host's name for temporary file names: [A-Za-z0-9.-] only, at most 64 characters.
std::string host_tag() {
  char name[256] = {};
  if (::gethostname(name, sizeof name - 1) != 0) return "host";
  std::string tag;
  for (const char* c = name; *c && tag.size() < 64; ++c)
    tag += (std::isalnum(static_cast<unsigned char>(*c)) || *c == '.' || *c == '-') ? *c : '_';
  return tag.empty() ? "host" : tag;
}

// Removes "<prefix><pid>-<n>" files in dir whose pid is no longer running: what SIGKILL (or a
// power cut) left of an earlier write of the same target on this host. The host in the prefix
// keeps a writer on another machine sharing the folder safe; a live pid is never touched.
void remove_stale_temporaries(const std::filesystem::path& dir, const std::string& prefix) {
  std::error_code ec;
  for (const auto& entry : std::filesystem::directory_iterator(dir, ec)) {
    const std::string name = entry.path().filename().string();
    if (name.compare(0, prefix.size(), prefix) != 0) continue;
    const std::string rest = name.substr(prefix.size());
    const auto dash = rest.find('-');
    if (dash == 0 || dash == std::string::npos || rest.find_first_not_of("0123456789-") != std::string::npos) continue;
    const long pid = std::strtol(rest.substr(0, dash).c_str(), nullptr, 10);
    if (pid <= 0 || pid == ::getpid()) continue;
    if (::kill(static_cast<pid_t>(pid), 0) == 0 || errno != ESRCH) continue;  // alive, or not ours to judge
    std::error_code ignored;
    std::filesystem::remove(entry.path(), ignored);
  }
}

void write_file(const std::string& path, const std::vector<LawTable>& tables, bool sweep,
                const TableMetadata& meta, const TableWriteOptions& options) {
  namespace fs = std::filesystem;
  check_inputs(tables, sweep, meta, options);
  if (path.empty()) throw TableWriteError("empty output path");
  const fs::path target(path);
  if (!target.has_filename()) throw TableWriteError("output path '" + path + "' names a folder, not a file");
  const fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
  std::error_code ec;
  if (!fs::is_directory(dir, ec))
    throw TableWriteError("cannot write '" + path + "': folder '" + dir.string() + "' does not exist");
  if (fs::is_directory(target, ec)) throw TableWriteError("cannot write '" + path + "': it is a folder");

  // Same folder as the target so the rename is atomic; the name is unique per host, process
  // and call. Temporaries that a killed writer on this host left for this target go first.
  static std::atomic<unsigned> counter{0};
  const std::string prefix = "." + target.filename().string() + ".tmp-" + host_tag() + "-";
  remove_stale_temporaries(dir, prefix);
  const fs::path tmp = dir / (prefix + std::to_string(::getpid()) + "-" + std::to_string(counter++));
  Hdf5QuietErrors quiet;
  bool created = false;
  try {
    Hdf5Handle fcpl(H5Pcreate(H5P_FILE_CREATE), "H5Pcreate");
    h5_check(H5Pset_link_creation_order(fcpl.get(), H5P_CRT_ORDER_TRACKED | H5P_CRT_ORDER_INDEXED),
             "H5Pset_link_creation_order");
    h5_check(H5Pset_attr_creation_order(fcpl.get(), H5P_CRT_ORDER_TRACKED | H5P_CRT_ORDER_INDEXED),
             "H5Pset_attr_creation_order");
    h5_check(H5Pset_userblock(fcpl.get(), kTableUserBlock), "H5Pset_userblock");  // the integrity header
    Hdf5Handle fapl(H5Pcreate(H5P_FILE_ACCESS), "H5Pcreate");
    // v1.8 object format: readable by every netCDF-4 and HDF5 >= 1.8 consumer.
    h5_check(H5Pset_libver_bounds(fapl.get(), H5F_LIBVER_V18, H5F_LIBVER_V18), "H5Pset_libver_bounds");
    // No file locking: the temporary has a unique name and nobody else opens it (FORMAT.md).
    h5_check(H5Pset_file_locking(fapl.get(), false, true), "H5Pset_file_locking");
    register_temporary(tmp.string());  // an interrupt from now on removes it
    created = true;
    hid_t id = H5Fcreate(tmp.c_str(), H5F_ACC_EXCL, fcpl.get(), fapl.get());
    if (id < 0)
      throw TableWriteError("cannot create '" + tmp.string() + "' (is the folder writable?): " + hdf5_error_reason());
    Hdf5Handle file(id, "H5Fcreate");
    run_hook("created");
    write_contents(file.get(), tables, sweep, meta, options);
    h5_check(H5Fflush(file.get(), H5F_SCOPE_GLOBAL), "H5Fflush");
    file.close();
    run_hook("closed");
    seal_table_file(tmp.string());
    fsync_path(tmp.string(), false);
    if (const int err = commit_temporary(tmp.string(), target.string()); err != 0)
      throw TableWriteError("cannot rename '" + tmp.string() + "' to '" + path + "': " + std::generic_category().message(err));
    created = false;
    fsync_path(dir.string(), true);
  } catch (const std::exception& e) {
    if (created) {
      fs::remove(tmp, ec);
      unregister_temporary(tmp.string());
    }
    if (dynamic_cast<const TableError*>(&e) && !dynamic_cast<const Hdf5Error*>(&e)) throw;
    throw TableWriteError("writing '" + path + "' failed: " + e.what());
  }
}

}  // namespace

void set_table_write_hook(std::function<void(std::string_view)> hook) { write_hook() = std::move(hook); }

std::string make_history_line(std::string_view program, std::string_view version, int argc,
                              const char* const* argv) {
  std::time_t now = std::chrono::system_clock::to_time_t(std::chrono::system_clock::now());
  std::tm utc{};
  gmtime_r(&now, &utc);
  char stamp[32];
  std::strftime(stamp, sizeof stamp, "%Y-%m-%dT%H:%M:%SZ", &utc);
  std::string line = std::string(stamp) + " " + std::string(program) + " " + std::string(version) + ":";
  for (int i = 0; i < argc; ++i) {
    line += ' ';
    line += argv[i];
  }
  for (char& c : line)
    if (c == '\n' || c == '\r') c = ' ';
  return line;
}

void write_table(const std::string& path, const LawTable& table, const TableMetadata& metadata,
                 const TableWriteOptions& options) {
  write_file(path, {table}, false, metadata, options);
}

void write_sweep_table(const std::string& path, const std::vector<LawTable>& tables,
                       const TableMetadata& metadata, const TableWriteOptions& options) {
  write_file(path, tables, true, metadata, options);
}

}  // namespace edgelaw
