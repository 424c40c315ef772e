// Implementation of the table and evaluate subcommands.
#include "cli/commands.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <iostream>
#include <iterator>
#include <map>
#include <sstream>

#include "cli/atomic_file.h"
#include "cli/exit_codes.h"
#include "cli/points_csv.h"

namespace edgelaw {

namespace {
struct UsageError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

std::string format_double(double v) {
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.17g", v);
  return buf;
}
}  // namespace

std::vector<double> axis(double first, double last, double step, const char* name) {
  const std::string n(name);
  if (!std::isfinite(first) || !std::isfinite(last) || !std::isfinite(step))
    throw UsageError(n + " range must be finite numbers");
  if (!(last > first)) throw UsageError(n + " range is empty or inverted (" + format_double(first) + " .. " + format_double(last) + ")");
  if (!(step > 0)) throw UsageError(n + " step must be positive");
  const double count = std::floor((last - first) / step + 1e-9) + 1;
  if (count > 1e7) throw UsageError(n + " axis would have more than 1e7 points");
  std::vector<double> v(static_cast<std::size_t>(count));
  for (std::size_t i = 0; i < v.size(); ++i) v[i] = first + step * static_cast<double>(i);
  return v;
}

int run_table(const TableCommand& c, const std::string&) {
  try {
    LawRequest req;
    req.beta = c.beta;
    req.x = axis(c.x_min, c.x_max, c.x_step, "x");
    req.w = axis(c.w_min, c.w_max, c.w_step, "w");
    if (c.with_unspiked) req.w.push_back(kInf);
    SolverOptions opt;
    opt.target_error = c.target;
    if (auto why = check_request(req); !why.empty()) throw UsageError(why);
    if (auto why = opt.check(); !why.empty()) throw UsageError(why);
    const LawTable t = solve_law(req, opt);
    std::cerr << t.summary.full();
    std::cout << "beta " << t.beta << ", " << t.x.size() << " thresholds x in [" << t.x.front() << ", " << t.x.back()
              << "], " << t.w.size() << " boundary parameters w in [" << t.w.front() << ", " << t.w.back() << "]\n";
    std::cout << "max estimated error: cdf " << t.summary.max_cdf_error << ", survival " << t.summary.max_survival_error
              << " (target " << c.target << ")\n";
    if (!t.moments.empty() && std::isfinite(t.moments.back().mean) && std::isinf(t.w.back())) {
      const auto& m = t.moments.back();
      const auto& e = t.moment_errors.back();
      std::printf("unspiked row (w = inf): mean %.12f (+- %.1e), variance %.12f (+- %.1e)\n", m.mean, e.mean, m.variance,
                  e.variance);
    }
    if (!t.summary.converged) {
      std::cerr << "edgelaw: error: accuracy target " << c.target << " not reached (max estimated error "
                << std::max(t.summary.max_cdf_error, t.summary.max_survival_error) << ")\n";
      return exit_code::kSoftware;
    }
    return exit_code::kOk;
  } catch (const UsageError& e) {
    std::cerr << "edgelaw: error: " << e.what() << "\n";
    return exit_code::kUsage;
  } catch (const SolveError& e) {
    std::cerr << "edgelaw: error: " << e.what() << "\n";
    return exit_code::kSoftware;
  }
}

int run_evaluate(const EvaluateCommand& c) {
  try {
    SolverOptions opt;
    opt.target_error = c.target;
    opt.moments = false;
    if (auto why = opt.check(); !why.empty()) throw UsageError(why);
    std::string text;
    if (c.input == "-") {
      text.assign(std::istreambuf_iterator<char>(std::cin), {});
    } else {
      std::ifstream in(c.input, std::ios::binary);
      if (!in) {
        std::cerr << "edgelaw: error: cannot read input file " << c.input << "\n";
        return exit_code::kNoInput;
      }
      text.assign(std::istreambuf_iterator<char>(in), {});
    }
    const std::vector<Point> points = parse_points_csv(text);

    // One solve per beta serves all its points: the table over its distinct x and w.
    std::map<double, std::vector<std::size_t>> by_beta;
    for (std::size_t i = 0; i < points.size(); ++i) by_beta[points[i].beta].push_back(i);
    struct Value {
      double cdf, survival, cdf_error, survival_error;
    };
    std::vector<Value> values(points.size());
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
      if (auto why = check_request(req); !why.empty()) throw DataError("beta " + format_double(beta) + ": " + why);
      const LawTable t = solve_law(req, opt);
      std::cerr << t.summary.brief() << "\n";
      if (!t.summary.converged)
        throw SolveError("accuracy target " + format_double(c.target) + " not reached for beta " + format_double(beta));
      for (auto i : members) {
        const auto col = std::lower_bound(req.x.begin(), req.x.end(), points[i].x) - req.x.begin();
        const auto row = std::lower_bound(req.w.begin(), req.w.end(), points[i].w) - req.w.begin();
        values[i] = {t.cdf(row, col), t.survival(row, col), t.cdf_error(row, col), t.survival_error(row, col)};
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
  } catch (const UsageError& e) {
    std::cerr << "edgelaw: error: " << e.what() << "\n";
    return exit_code::kUsage;
  } catch (const DataError& e) {
    std::cerr << "edgelaw: error: " << c.input << ": " << e.what() << "\n";
    return exit_code::kBadData;
  } catch (const SolveError& e) {
    std::cerr << "edgelaw: error: " << e.what() << "\n";
    return exit_code::kSoftware;
  } catch (const OutputError& e) {
    std::cerr << "edgelaw: error: " << e.what() << "\n";
    return exit_code::kCannotCreate;
  }
}

}  // namespace edgelaw
