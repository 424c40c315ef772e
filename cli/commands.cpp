// Implementation of the table, evaluate, quantile and pvalue subcommands (sweeps: cli/sweep.cpp).
#include "cli/commands.h"

#include <unistd.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <iterator>
#include <limits>
#include <map>
#include <sstream>

#include "cli/atomic_file.h"
#include "cli/exit_codes.h"
#include "cli/points_csv.h"
#include "stats/edge_law.h"

namespace edgelaw {

std::string format_double(double v) {
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  char buf[64];
  const auto [end, ec] = std::to_chars(buf, buf + sizeof buf, v);
  return ec == std::errc() ? std::string(buf, end) : std::string("nan");
}

int guarded(const std::function<int()>& body) {
  auto fail = [](const std::exception& e, int code) {
    std::cerr << "edgelaw: error: " << e.what() << "\n";
    return code;
  };
  try {
    return body();
  } catch (const UsageError& e) {
    return fail(e, exit_code::kUsage);
  } catch (const NoInputError& e) {
    return fail(e, exit_code::kNoInput);
  } catch (const DataError& e) {
    return fail(e, exit_code::kBadData);
  } catch (const TableFormatError& e) {
    return fail(e, exit_code::kBadData);
  } catch (const TableRangeError& e) {
    return fail(e, exit_code::kBadData);
  } catch (const OutputError& e) {
    return fail(e, exit_code::kCannotCreate);
  } catch (const TableWriteError& e) {
    return fail(e, exit_code::kCannotCreate);
  } catch (const OverBudgetError& e) {
    return fail(e, exit_code::kOverBudget);
  } catch (const SolveBudgetError& e) {
    return fail(e, exit_code::kOverBudget);
  } catch (const SolveError& e) {
    return fail(e, exit_code::kSoftware);
  } catch (const std::exception& e) {
    return fail(e, exit_code::kSoftware);
  }
}

std::vector<double> axis(double first, double last, double step, const char* name) {
  const std::string n(name);
  if (!std::isfinite(first) || !std::isfinite(last) || !std::isfinite(step))
    throw UsageError(n + " range must be finite numbers");
  if (!(last > first))
    throw UsageError(n + " range is empty or inverted (" + format_double(first) + " .. " + format_double(last) + ")");
  if (!(step > 0)) throw UsageError(n + " step must be positive");
  const double count = std::floor((last - first) / step + 1e-9) + 1;
  if (count > 1e7) throw UsageError(n + " axis would have more than 1e7 points");
  std::vector<double> v(static_cast<std::size_t>(count));
  for (std::size_t i = 0; i < v.size(); ++i) v[i] = first + step * static_cast<double>(i);
  return v;
}

LawRequest grid_request(const GridOptions& g) {
  LawRequest req;
  req.x = axis(g.x_min, g.x_max, g.x_step, "x");
  req.w = axis(g.w_min, g.w_max, g.w_step, "w");
  if (g.with_unspiked) req.w.push_back(kInf);
  return req;
}

SolverOptions grid_solver_options(const GridOptions& g) {
  SolverOptions opt;
  opt.target_error = g.target;
  opt.base_intervals = g.base_intervals;
  opt.max_levels = g.max_levels;
  opt.max_seconds = g.max_seconds;
  if (auto why = opt.check(); !why.empty()) throw UsageError(why);
  return opt;
}

std::map<std::string, SettingValue> grid_settings(const GridOptions& g) {
  const LawRequest req = grid_request(g);
  const SolverOptions opt = grid_solver_options(g);
  return {{"x_min", g.x_min},
          {"x_max", g.x_max},
          {"x_step", g.x_step},
          {"x_count", std::int64_t(req.x.size())},
          {"w_min", g.w_min},
          {"w_max", g.w_max},
          {"w_step", g.w_step},
          {"w_count", std::int64_t(req.w.size())},
          {"unspiked_row", std::int64_t(g.with_unspiked ? 1 : 0)},
          {"target_error", opt.target_error},
          {"tail_relative_error", opt.tail_relative_error},
          {"base_intervals", std::int64_t(opt.base_intervals)},
          {"min_levels", std::int64_t(opt.min_levels)},
          {"max_levels", std::int64_t(opt.max_levels)},
          {"moments", std::int64_t(opt.moments ? 1 : 0)}};
}

void check_output_path(const std::string& path) {
  namespace fs = std::filesystem;
  if (path.empty()) throw OutputError("empty output path");
  const fs::path target(path);
  const fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
  std::error_code ec;
  if (!target.has_filename() || fs::is_directory(target, ec))
    throw OutputError("cannot write " + path + ": it names a folder, not a file");
  if (!fs::is_directory(dir, ec)) throw OutputError("cannot write " + path + ": folder " + dir.string() + " does not exist");
  if (::access(dir.c_str(), W_OK | X_OK) != 0) throw OutputError("cannot write " + path + ": folder " + dir.string() + " is not writable");
}

namespace {

double max_error(const SolveSummary& s) { return std::max(s.max_cdf_error, s.max_survival_error); }

std::string table_title(double beta) {
  return "edgelaw: spiked edge law F_beta(x; w), cdf and survival with error estimates, beta = " + format_double(beta);
}

// A table file the user named: missing is kNoInput, unreadable content is kBadData.
LawTableFile open_table(const std::string& path) {
  std::error_code ec;
  if (!std::filesystem::is_regular_file(path, ec)) throw NoInputError("cannot read table file " + path);
  return LawTableFile::open(path);
}

std::string point_text(double beta, double x, double w) {
  return "(beta, x, w) = (" + format_double(beta) + ", " + format_double(x) + ", " + format_double(w) + ")";
}

// Evaluation at one point of a law or sweep file; a point outside the file is a DataError
// naming it (the error message of the interpolator says which coordinate is out).
template <class Eval>
Estimate from_table(const LawTableFile& f, double beta, const std::string& what, Eval eval) {
  if (!f.is_sweep() && beta != f.betas().front())
    throw DataError(what + ": table " + f.path() + " holds only beta = " +
                    format_double(f.betas().front()));
  try {
    return eval(f.is_sweep() ? beta : f.betas().front());
  } catch (const TableRangeError& e) {
    throw DataError(what + " is outside table " + f.path() + ": " + e.what());
  }
}

double parse_w(const std::string& text) {
  try {
    return parse_number(text, true);
  } catch (const DataError& e) {
    throw UsageError(std::string("--w: ") + e.what());
  }
}

std::string json_string(const std::string& s) {
  std::string out = "\"";
  for (char ch : s) {
    if (ch == '"' || ch == '\\') {
      out += '\\';
      out += ch;
    } else if (static_cast<unsigned char>(ch) < 0x20) {
      char buf[8];
      std::snprintf(buf, sizeof buf, "\\u%04x", ch);
      out += buf;
    } else {
      out += ch;
    }
  }
  return out + "\"";
}

// JSON has no infinity: w = +inf is written as the string "inf".
std::string json_number(double v) { return std::isfinite(v) ? format_double(v) : json_string(format_double(v)); }

void print_lookup(const LookupCommand& c, const char* input_name, double input, const char* name, Estimate e) {
  const double w = parse_w(c.w);
  const std::string source = c.table.empty() ? "solve" : "table " + c.table;
  if (c.json) {
    std::cout << "{\"beta\": " << json_number(c.beta) << ", \"w\": " << json_number(w) << ", \"" << input_name
              << "\": " << json_number(input) << ", \"" << name << "\": " << json_number(e.value)
              << ", \"error\": " << json_number(e.error) << ", \"source\": " << json_string(source) << "}\n";
  } else {
    std::cout << name << " " << format_double(e.value) << " (estimated error " << format_double(e.error) << ")\n";
  }
}

void check_lookup(const LookupCommand& c) {
  LawRequest req;
  req.beta = c.beta;
  req.x = {0.0};
  req.w = {parse_w(c.w)};
  if (auto why = check_request(req); !why.empty()) throw UsageError(why);
  SolverOptions opt;
  opt.target_error = c.target;
  if (auto why = opt.check(); !why.empty()) throw UsageError(why);
}

// The law's support at w (stats/edge_law.h: both tails to e^-30) on a 0.05 axis, which keeps
// the quintic Hermite interpolation error near 1e-10 at beta = 2 (the reader's own estimate is
// reported, so a coarser grid would show up in the error, not hide).
std::vector<double> lookup_axis(double beta, double w) {
  const XRange r = law_support(beta, w);
  return axis(r.lo, r.hi, 0.05, "x");
}

// Where a table misses its target: "N of M entries, w in [a, b], x in [c, d]" (the bounding box).
std::string region_over_target(const LawTable& t, double target) {
  long missed = 0;
  double w_lo = kInf, w_hi = -kInf, x_lo = kInf, x_hi = -kInf;
  for (Eigen::Index r = 0; r < t.cdf_error.rows(); ++r)
    for (Eigen::Index c = 0; c < t.cdf_error.cols(); ++c)
      if (!(t.cdf_error(r, c) <= target && t.survival_error(r, c) <= target)) {
        ++missed;
        w_lo = std::min(w_lo, t.w[r]), w_hi = std::max(w_hi, t.w[r]);
        x_lo = std::min(x_lo, t.x[c]), x_hi = std::max(x_hi, t.x[c]);
      }
  if (missed == 0) return "no entry over the target";
  return std::to_string(missed) + " of " + std::to_string(t.cdf_error.size()) + " entries over the target, w in [" +
         format_double(w_lo) + ", " + format_double(w_hi) + "], x in [" + format_double(x_lo) + ", " +
         format_double(x_hi) + "]";
}

LawTable solve_checked(const LawRequest& req, const SolverOptions& opt) {
  LawTable t = solve_law(req, opt);
  std::cerr << t.summary.brief() << "\n";
  if (!t.summary.converged)
    throw SolveError("accuracy target " + format_double(opt.target_error) + " not reached for beta " +
                     format_double(req.beta) + " (max estimated error " + format_double(max_error(t.summary)) + ")");
  return t;
}

}  // namespace

int run_table(const TableCommand& c, const Invocation& inv) {
  return guarded([&] {
    LawRequest req = grid_request(c.grid);
    req.beta = c.beta;
    const SolverOptions opt = grid_solver_options(c.grid);
    check_memory_budget("the table", double(req.x.size()) * double(req.w.size()), opt.max_levels, 1, 0,
                        c.grid.max_memory_mib);
    if (auto why = check_request(req); !why.empty()) throw UsageError(why);
    check_output_path(c.output);  // before minutes of solving, not after
    LawTable t = solve_law(req, opt);
    std::cerr << t.summary.full();
    const double worst = max_error(t.summary);
    if (!t.summary.converged && !c.grid.keep_unconverged)
      throw SolveError("accuracy target " + format_double(c.grid.target) + " not reached (max estimated error " +
                       format_double(worst) + "; " + region_over_target(t, c.grid.target) +
                       "); nothing written (--keep-unconverged writes it anyway, with those entries marked)");

    TableMetadata meta;
    meta.title = table_title(c.beta);
    meta.history = make_history_line("edgelaw", inv.version, inv.argc, inv.argv);
    meta.settings = grid_settings(c.grid);
    write_table(c.output, t, meta);
    if (!t.summary.converged)
      std::cerr << "edgelaw: warning: " << c.output << " missed the accuracy target " << format_double(c.grid.target)
                << " (max estimated error " << format_double(worst) << "; " << region_over_target(t, c.grid.target)
                << "); written with converged = 0 and those entries marked 0 in within_target\n";

    std::printf("wrote %s (beta %s, %zu x in [%s, %s], %zu w in [%s, %s])\n", c.output.c_str(),
                format_double(t.beta).c_str(), t.x.size(), format_double(t.x.front()).c_str(),
                format_double(t.x.back()).c_str(), t.w.size(), format_double(t.w.front()).c_str(),
                format_double(t.w.back()).c_str());
    std::printf("max estimated error: cdf %.2e, survival %.2e (target %.1e)%s\n", t.summary.max_cdf_error,
                t.summary.max_survival_error, c.grid.target, t.summary.converged ? "" : " NOT CONVERGED");
    if (!t.moments.empty() && std::isinf(t.w.back()) && std::isfinite(t.moments.back().mean)) {
      const auto& m = t.moments.back();
      const auto& e = t.moment_errors.back();
      std::printf("unspiked row (w = inf): mean %.12f (+- %.1e), variance %.12f (+- %.1e)\n", m.mean, e.mean,
                  m.variance, e.variance);
    }
    std::printf("solve: %.1f s, observed order %.2f\n", t.summary.wall_seconds, t.summary.observed_order);
    return exit_code::kOk;
  });
}

int run_evaluate(const EvaluateCommand& c) {
  return guarded([&] {
    SolverOptions opt;
    opt.target_error = c.target;
    opt.moments = false;
    opt.max_seconds = c.max_seconds;
    if (auto why = opt.check(); !why.empty()) throw UsageError(why);
    if (!c.output.empty() && c.output != "-") check_output_path(c.output);
    std::string text;
    if (c.input == "-") {
      text.assign(std::istreambuf_iterator<char>(std::cin), {});
    } else {
      std::error_code ec;
      if (std::filesystem::is_directory(c.input, ec)) throw NoInputError("cannot read input file " + c.input + ": it is a folder");
      std::ifstream in(c.input, std::ios::binary);
      if (!in) throw NoInputError("cannot read input file " + c.input);
      text.assign(std::istreambuf_iterator<char>(in), {});
      if (in.bad()) throw NoInputError("cannot read input file " + c.input + ": read error");
    }
    std::vector<Point> points;
    try {
      points = parse_points_csv(text);
    } catch (const DataError& e) {
      throw DataError(c.input + ": " + e.what());
    }

    struct Value {
      double cdf, survival, cdf_error, survival_error;
    };
    std::vector<Value> values(points.size());
    if (!c.table.empty()) {
      const LawTableFile f = open_table(c.table);
      for (std::size_t i = 0; i < points.size(); ++i) {
        const auto& p = points[i];
        const Estimate cdf = from_table(f, p.beta, "point " + point_text(p.beta, p.x, p.w), [&](double b) { return f.cdf(p.x, p.w, b); });
        const Estimate sv = from_table(f, p.beta, "point " + point_text(p.beta, p.x, p.w), [&](double b) { return f.survival(p.x, p.w, b); });
        values[i] = {cdf.value, sv.value, cdf.error, sv.error};
      }
    } else {
      // One solve per beta serves all its points: the table over its distinct x and w.
      std::map<double, std::vector<std::size_t>> by_beta;
      for (std::size_t i = 0; i < points.size(); ++i) by_beta[points[i].beta].push_back(i);
      // Every solve is checked against the budget before the first one starts.
      for (const auto& [beta, members] : by_beta) {
        std::vector<double> xs, ws;
        for (auto i : members) {
          xs.push_back(points[i].x);
          ws.push_back(points[i].w);
        }
        std::sort(xs.begin(), xs.end());
        std::sort(ws.begin(), ws.end());
        const double entries = double(std::unique(xs.begin(), xs.end()) - xs.begin()) *
                               double(std::unique(ws.begin(), ws.end()) - ws.begin());
        check_memory_budget(c.input + ": the solve for beta " + format_double(beta), entries, opt.max_levels, 1, 0,
                            c.max_memory_mib);
      }
      for (const auto& [beta, members] : by_beta) {
        LawRequest req;
        req.beta = beta;
        for (auto i : members) {
          req.x.push_back(points[i].x);
          req.w.push_back(points[i].w);
        }
        std::sort(req.x.begin(), req.x.end());
        req.x.erase(std::unique(req.x.begin(), req.x.end()), req.x.end());
        std::sort(req.w.begin(), req.w.end());
        req.w.erase(std::unique(req.w.begin(), req.w.end()), req.w.end());
        if (auto why = check_request(req); !why.empty())
          throw DataError(c.input + ": beta " + format_double(beta) + ": " + why);
        const LawTable t = solve_checked(req, opt);
        for (auto i : members) {
          const auto col = std::lower_bound(req.x.begin(), req.x.end(), points[i].x) - req.x.begin();
          const auto row = std::lower_bound(req.w.begin(), req.w.end(), points[i].w) - req.w.begin();
          values[i] = {t.cdf(row, col), t.survival(row, col), t.cdf_error(row, col), t.survival_error(row, col)};
        }
      }
    }
    std::ostringstream out;
    out << "beta,x,w,cdf,survival,cdf_error,survival_error\n";
    for (std::size_t i = 0; i < points.size(); ++i) {
      const auto& p = points[i];
      const auto& v = values[i];
      out << format_double(p.beta) << ',' << format_double(p.x) << ',' << format_double(p.w) << ','
          << format_double(v.cdf) << ',' << format_double(v.survival) << ',' << format_double(v.cdf_error) << ','
          << format_double(v.survival_error) << '\n';
    }
    if (c.output.empty() || c.output == "-")
      std::cout << out.str();
    else
      write_file_atomically(c.output, out.str());
    return exit_code::kOk;
  });
}

int run_quantile(const LookupCommand& c) {
  return guarded([&] {
    check_lookup(c);
    if (!(c.probability > 0 && c.probability < 1))
      throw UsageError("probability must lie strictly between 0 and 1, got " + format_double(c.probability));
    const double w = parse_w(c.w);
    Estimate q;
    if (!c.table.empty()) {
      const LawTableFile f = open_table(c.table);
      q = from_table(f, c.beta, "probability " + format_double(c.probability) + " at (beta, w) = (" + format_double(c.beta) + ", " + format_double(w) + ")", [&](double b) { return f.quantile(c.probability, w, b); });
    } else {
      LawRequest req;
      req.beta = c.beta;
      req.x = lookup_axis(c.beta, w);
      req.w = {w};
      SolverOptions opt;
      opt.target_error = c.target;
      opt.moments = false;
      const LawInterpolator interp(solve_checked(req, opt));
      q = interp.quantile(c.probability, w);
    }
    print_lookup(c, "probability", c.probability, "quantile", q);
    return exit_code::kOk;
  });
}

int run_pvalue(const LookupCommand& c) {
  return guarded([&] {
    check_lookup(c);
    if (!std::isfinite(c.x)) throw UsageError("threshold x must be finite");
    const double w = parse_w(c.w);
    Estimate p;
    if (!c.table.empty()) {
      const LawTableFile f = open_table(c.table);
      p = from_table(f, c.beta, "point " + point_text(c.beta, c.x, w), [&](double b) { return f.survival(c.x, w, b); });
    } else {
      LawRequest req;
      req.beta = c.beta;
      req.x = {c.x};
      req.w = {w};
      SolverOptions opt;
      opt.target_error = c.target;
      opt.moments = false;
      const LawTable t = solve_checked(req, opt);
      p = {t.survival(0, 0), t.survival_error(0, 0)};
    }
    print_lookup(c, "x", c.x, "pvalue", p);
    return exit_code::kOk;
  });
}

int run_pvalue_text(LookupCommand c, const std::string& x) {
  double value = 0;
  const int parsed = guarded([&] {
    try {
      value = parse_number(x, false);
    } catch (const DataError& e) {
      throw UsageError(std::string("--x: ") + e.what());
    }
    return exit_code::kOk;
  });
  if (parsed != exit_code::kOk) return parsed;
  c.x = value;
  return run_pvalue(c);
}

}  // namespace edgelaw
