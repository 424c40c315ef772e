// Beta sweeps (parallel, resumable, splittable) and the merge of part files.
#include "cli/sweep.h"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <exception>
#include <filesystem>
#include <iostream>
#include <mutex>
#include <set>
#include <sstream>
#include <thread>

#include <fcntl.h>
#include <signal.h>
#include <sys/file.h>
#include <unistd.h>

#include <cerrno>
#include <cstdlib>
#include <cstring>

#include "cli/atomic_file.h"
#include "cli/commands.h"
#include "cli/exit_codes.h"
#include "cli/interrupt.h"
#include "cli/points_csv.h"

namespace edgelaw {

namespace fs = std::filesystem;

std::vector<double> parse_beta_list(const std::string& text) {
  std::vector<double> betas;
  std::stringstream in(text);
  std::string field;
  while (std::getline(in, field, ',')) {
    double b = 0;
    try {
      b = parse_number(field, false);
    } catch (const DataError& e) {
      throw UsageError(std::string("--betas: ") + e.what());
    }
    if (!(b > 0)) throw UsageError("--betas: beta must be positive, got " + format_double(b));
    betas.push_back(b);
  }
  if (betas.empty() || (!text.empty() && text.back() == ','))
    throw UsageError("--betas: expected a comma-separated list such as 1,2,4");
  std::sort(betas.begin(), betas.end());
  if (std::adjacent_find(betas.begin(), betas.end()) != betas.end())
    throw UsageError("--betas: a beta is listed twice");
  return betas;
}

std::vector<double> beta_range(double first, double last, int count) {
  if (!std::isfinite(first) || !std::isfinite(last) || !(first > 0))
    throw UsageError("beta range must be finite and positive (--beta-min " + format_double(first) + ")");
  if (count < 1) throw UsageError("--beta-count must be at least 1");
  // Each beta is a full table solve (seconds to minutes): beyond this it is a typo.
  if (count > 10000) throw UsageError("--beta-count must be at most 10000, got " + std::to_string(count));
  if (count == 1) {
    if (first != last) throw UsageError("--beta-count 1 needs --beta-min equal to --beta-max");
    return {first};
  }
  if (!(last > first))
    throw UsageError("beta range is empty or inverted (" + format_double(first) + " .. " + format_double(last) + ")");
  std::vector<double> betas(static_cast<std::size_t>(count));
  for (int k = 0; k < count; ++k) betas[k] = first + (last - first) * k / (count - 1);
  betas.back() = last;  // exact end point, whatever the rounding of the step
  return betas;
}

SweepPart parse_part(const std::string& text) {
  if (text.empty()) return {};
  SweepPart p;
  char slash = 0;
  std::istringstream in(text);
  std::string rest;
  if (!(in >> p.index >> slash >> p.count) || slash != '/' || (in >> rest) || p.index < 1 || p.count < 1 ||
      p.index > p.count)
    throw UsageError("--part must be i/N with 1 <= i <= N, got '" + text + "'");
  return p;
}

std::vector<std::size_t> part_members(std::size_t beta_count, SweepPart part) {
  std::vector<std::size_t> out;
  for (std::size_t k = 0; k < beta_count; ++k)
    if (k % static_cast<std::size_t>(part.count) == static_cast<std::size_t>(part.index - 1)) out.push_back(k);
  return out;
}

std::string slice_file_name(double beta) { return "beta_" + format_double(beta) + ".h5"; }

std::string beta_list_text(const std::vector<double>& betas) {
  std::string s;
  for (std::size_t k = 0; k < betas.size(); ++k) s += (k ? "," : "") + format_double(betas[k]);
  return s;
}

std::string sweep_title(const std::vector<double>& betas) {
  return "edgelaw: spiked edge law F_beta(x; w), cdf and survival with error estimates, sweep over beta = " +
         beta_list_text(betas);
}

std::string slice_mismatch(const LawTableFile& f, double beta, const std::vector<double>& x,
                           const std::vector<double>& w, const std::map<std::string, SettingValue>& settings) {
  if (f.is_sweep() || f.betas().front() != beta) return "it is not the law file of beta " + format_double(beta);
  if (f.x() != x) return "its x axis differs";
  if (f.w() != w) return "its w axis differs";
  const auto& have = f.metadata().settings;
  for (const auto& [key, value] : settings) {
    const auto it = have.find(key);
    if (it == have.end() || !(it->second == value)) return "its setting " + key + " differs";
  }
  return {};
}

namespace {

// One sweep at a time per output: an exclusive flock on FILE.parts/.lock, held until the
// process ends. Two sweeps to the same file would otherwise share the checkpoint folder and one
// could delete it under the other's assembly. File systems without flock (ENOLCK, EOPNOTSUPP on
// some NFS setups) run unlocked, as before.
class SweepLock {
 public:
  SweepLock(const fs::path& parts_dir, const std::string& output) : path_(parts_dir / ".lock") {
    fd_ = ::open(path_.c_str(), O_RDWR | O_CREAT | O_CLOEXEC, 0644);
    if (fd_ < 0) throw OutputError("cannot create the sweep lock " + path_.string() + ": " + std::strerror(errno));
    if (::flock(fd_, LOCK_EX | LOCK_NB) != 0) {
      const int err = errno;
      if (err == EWOULDBLOCK) {
        ::close(fd_);
        fd_ = -1;
        throw OutputError("another sweep is writing " + output + " (it holds " + path_.string() +
                          "); wait for it or choose another --output");
      }
      // No locking on this file system: carry on unlocked.
    }
  }
  SweepLock(const SweepLock&) = delete;
  SweepLock& operator=(const SweepLock&) = delete;
  ~SweepLock() {
    if (fd_ >= 0) ::close(fd_);
  }
  // Before the folder itself is removed (or found empty): the lock file goes first.
  void remove_file() {
    std::error_code ec;
    fs::remove(path_, ec);
  }

 private:
  fs::path path_;
  int fd_ = -1;
};

using Clock = std::chrono::steady_clock;

double seconds_since(Clock::time_point start) {
  return std::chrono::duration<double>(Clock::now() - start).count();
}

// Betas of the sweep from either --betas or the --beta-min/--beta-max/--beta-count range.
std::vector<double> sweep_betas(const SweepCommand& c) {
  const bool range = c.beta_count != 0 || c.beta_min != 0 || c.beta_max != 0;
  if (!c.betas.empty() && range) throw UsageError("give either --betas or --beta-min/--beta-max/--beta-count");
  if (!c.betas.empty()) return parse_beta_list(c.betas);
  if (!range) throw UsageError("no betas: give --betas or --beta-min/--beta-max/--beta-count");
  return beta_range(c.beta_min, c.beta_max, c.beta_count);
}

// A solve's time and error, for the summary lines.
double worst_error(const std::vector<LawTable>& tables) {
  double e = 0;
  for (const auto& t : tables) e = std::max({e, t.summary.max_cdf_error, t.summary.max_survival_error});
  return e;
}

}  // namespace

int run_sweep(const SweepCommand& c, const Invocation& inv) {
  return guarded([&] {
    const std::vector<double> betas = sweep_betas(c);
    const SweepPart part = parse_part(c.part);
    const std::vector<std::size_t> mine = part_members(betas.size(), part);
    if (mine.empty())
      throw UsageError("--part " + c.part + " owns no beta (the sweep has " + std::to_string(betas.size()) + ")");
    if (c.threads < 0) throw UsageError("--threads must be positive (0: all cores)");
    LawRequest base = grid_request(c.grid);
    const SolverOptions opt = grid_solver_options(c.grid);
    for (double b : betas) {
      base.beta = b;
      if (auto why = check_request(base); !why.empty()) throw UsageError("beta " + format_double(b) + ": " + why);
    }
    const unsigned cores = std::max(1u, std::thread::hardware_concurrency());
    check_memory_budget("the sweep", double(base.x.size()) * double(base.w.size()), opt.max_levels,
                        std::min<std::size_t>(mine.size(), c.threads > 0 ? c.threads : cores), mine.size(),
                        c.grid.max_memory_mib);
    check_output_path(c.output);
    const std::map<std::string, SettingValue> slice_settings = grid_settings(c.grid);
    const std::string history = make_history_line("edgelaw", inv.version, inv.argc, inv.argv);

    const fs::path parts_dir = c.output + ".parts";
    std::error_code ec;
    fs::create_directories(parts_dir, ec);
    if (ec || !fs::is_directory(parts_dir))
      throw OutputError("cannot create checkpoint folder " + parts_dir.string() + ": " + ec.message());
    SweepLock lock_output(parts_dir, c.output);
    // Slice temporaries a killed sweep left are removed when their slice is written again
    // (write_table: same host, writer no longer running).

    // Which slices are already done (and valid for this request)?
    std::vector<std::size_t> todo;
    std::size_t reused = 0;
    for (std::size_t k : mine) {
      const fs::path slice = parts_dir / slice_file_name(betas[k]);
      if (!fs::exists(slice, ec)) {
        todo.push_back(k);
        continue;
      }
      std::string why;
      try {
        const LawTableFile f = LawTableFile::open(slice.string());
        why = slice_mismatch(f, betas[k], base.x, base.w, slice_settings);
        if (why.empty() && !f.table().summary.converged && !c.grid.keep_unconverged) why = "it missed the target";
      } catch (const TableError& e) {
        why = e.what();
      }
      if (why.empty()) {
        ++reused;
      } else {
        std::cerr << "edgelaw: sweep: solving beta " << format_double(betas[k]) << " again: checkpoint "
                  << slice.string() << " does not fit (" << why << ")\n";
        todo.push_back(k);
      }
    }
    if (reused > 0) std::cerr << "edgelaw: sweep: " << reused << " of " << mine.size() << " betas reused from " << parts_dir.string() << "\n";

    // Workers take the next beta; every finished slice is on disk before it counts as done.
    set_interrupt_note("finished betas stay in " + parts_dir.string() + "; run the same command again to resume");
    const std::size_t workers = std::min<std::size_t>(todo.size(), c.threads > 0 ? c.threads : cores);
    // Concurrent betas already fill the cores; a lone worker may split its own grid levels.
    SolverOptions solve_options = opt;
    solve_options.parallel_levels = workers <= 1;
    std::atomic<std::size_t> next{0};
    std::atomic<bool> stop{false};
    std::mutex lock;  // guards progress output, the first error and HDF5 (not known to be thread safe)
    std::exception_ptr first_error;
    std::size_t done = reused;
    const auto start = Clock::now();
    std::size_t solved = 0;
    auto work = [&] {
      while (!stop) {
        const std::size_t n = next++;
        if (n >= todo.size()) return;
        const double beta = betas[todo[n]];
        try {
          LawRequest req = base;
          req.beta = beta;
          LawTable t = solve_law(req, solve_options);
          if (!t.summary.converged && !c.grid.keep_unconverged)
            throw SolveError("beta " + format_double(beta) + ": accuracy target " + format_double(c.grid.target) +
                             " not reached (max estimated error " +
                             format_double(std::max(t.summary.max_cdf_error, t.summary.max_survival_error)) +
                             "); finished betas stay in " + parts_dir.string());
          TableMetadata meta;
          meta.title = "edgelaw: checkpoint slice of a beta sweep, beta = " + format_double(beta);
          meta.history = history;
          meta.settings = slice_settings;
          std::lock_guard guard(lock);
          write_table((parts_dir / slice_file_name(beta)).string(), t, meta);
          ++done;
          ++solved;
          const double elapsed = seconds_since(start);
          const double left = elapsed / static_cast<double>(solved) * static_cast<double>(todo.size() - solved);
          char text[256];
          std::snprintf(text, sizeof text, "edgelaw: sweep: beta %s done (%zu/%zu), %s, elapsed %.1f s, about %.0f s left",
                        format_double(beta).c_str(), done, mine.size(),
                        t.summary.converged ? "converged" : "NOT converged", elapsed, left);
          print_status_line(text);
        } catch (...) {
          std::lock_guard guard(lock);
          if (!first_error) first_error = std::current_exception();
          stop = true;
        }
      }
    };
    {
      std::vector<std::jthread> pool;
      for (std::size_t k = 0; k < workers; ++k) pool.emplace_back(work);
    }
    if (first_error) {
      // Finished slices stay for a resume; a checkpoint folder with none is only clutter.
      lock_output.remove_file();
      if (fs::is_empty(parts_dir, ec)) fs::remove(parts_dir, ec);
      std::rethrow_exception(first_error);
    }

    // Assemble from the slice files, so a resumed run and an uninterrupted one agree exactly.
    std::vector<LawTable> tables;
    std::vector<double> part_betas;
    for (std::size_t k : mine) {
      tables.push_back(LawTableFile::open((parts_dir / slice_file_name(betas[k])).string()).table());
      part_betas.push_back(betas[k]);
    }
    TableMetadata meta;
    meta.title = sweep_title(betas);
    if (part.count > 1) meta.title += " (part " + c.part + ")";
    meta.history = history;
    meta.settings = slice_settings;
    meta.settings["betas"] = beta_list_text(betas);
    if (part.count > 1) meta.settings["part"] = std::to_string(part.index) + "/" + std::to_string(part.count);
    write_sweep_table(c.output, tables, meta);
    set_interrupt_note("");
    fs::remove_all(parts_dir, ec);
    if (ec) std::cerr << "edgelaw: warning: could not remove " << parts_dir.string() << ": " << ec.message() << "\n";

    const bool all_converged =
        std::all_of(tables.begin(), tables.end(), [](const LawTable& t) { return t.summary.converged; });
    if (!all_converged)
      std::cerr << "edgelaw: warning: some betas missed the accuracy target; " << c.output << " has converged = 0\n";
    std::printf("wrote %s (%zu of %zu betas: %s; %zu x, %zu w)\n", c.output.c_str(), part_betas.size(), betas.size(),
                beta_list_text(part_betas).c_str(), base.x.size(), base.w.size());
    std::printf("max estimated error: %.2e (target %.1e)%s\n", worst_error(tables), c.grid.target,
                all_converged ? "" : " NOT CONVERGED");
    std::printf("solved %zu betas in %.1f s with %zu threads, reused %zu from checkpoint\n", solved,
                seconds_since(start), workers, reused);
    return exit_code::kOk;
  });
}

int run_merge(const MergeCommand& c, const Invocation& inv) {
  return guarded([&] {
    if (c.parts.empty()) throw UsageError("merge needs at least one part file");
    check_output_path(c.output);
    std::vector<LawTableFile> files;
    for (const auto& p : c.parts) {
      if (!fs::is_regular_file(p)) throw NoInputError("cannot read part file " + p);
      files.push_back(LawTableFile::open(p));
      if (!files.back().is_sweep()) throw DataError(p + " is not a sweep file (edgelaw_layout is not \"sweep\")");
    }
    // Everything but the part label must agree: grid, solver settings and the full beta list.
    auto common = [](const LawTableFile& f) {
      auto s = f.metadata().settings;
      s.erase("part");
      return s;
    };
    const auto settings = common(files.front());
    const auto list = settings.find("betas");
    if (list == settings.end() || !std::holds_alternative<std::string>(list->second))
      throw DataError(c.parts.front() + " has no setting betas (not written by edgelaw sweep)");
    const std::vector<double> betas = parse_beta_list(std::get<std::string>(list->second));
    std::map<double, std::pair<std::size_t, std::size_t>> where;  // beta -> (file, slice)
    for (std::size_t i = 0; i < files.size(); ++i) {
      const auto& f = files[i];
      if (f.x() != files.front().x() || f.w() != files.front().w())
        throw DataError(c.parts[i] + " has a different (x, w) grid than " + c.parts.front());
      const auto s = common(f);
      for (const auto& [key, value] : settings) {
        const auto it = s.find(key);
        if (it == s.end() || !(it->second == value))
          throw DataError(c.parts[i] + " differs from " + c.parts.front() + " in setting " + key);
      }
      if (s.size() != settings.size()) throw DataError(c.parts[i] + " has other settings than " + c.parts.front());
      for (std::size_t k = 0; k < f.betas().size(); ++k) {
        const double b = f.betas()[k];
        if (!std::binary_search(betas.begin(), betas.end(), b))
          throw DataError(c.parts[i] + " holds beta " + format_double(b) + ", which is not in the sweep");
        if (!where.emplace(b, std::pair{i, k}).second)
          throw DataError("beta " + format_double(b) + " is in more than one part (" + c.parts[where[b].first] +
                          ", " + c.parts[i] + ")");
      }
    }
    for (double b : betas)
      if (!where.count(b)) throw DataError("beta " + format_double(b) + " is missing from the parts");

    std::vector<LawTable> tables;
    for (const auto& [b, at] : where) tables.push_back(files[at.first].table(at.second));
    TableMetadata meta;
    meta.title = sweep_title(betas);
    meta.history = make_history_line("edgelaw", inv.version, inv.argc, inv.argv);
    meta.settings = settings;
    write_sweep_table(c.output, tables, meta);
    std::printf("wrote %s (%zu betas from %zu parts; %zu x, %zu w)\n", c.output.c_str(), tables.size(),
                files.size(), files.front().x().size(), files.front().w().size());
    std::printf("max estimated error: %.2e\n", worst_error(tables));
    return exit_code::kOk;
  });
}

}  // namespace edgelaw
