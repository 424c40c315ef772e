// The statistics subcommands over stats/: model resolution, the law they need, and the
// human and JSON reports with their cautions.
#include "cli/stats_commands.h"

#include <nlohmann/json.hpp>

#include <cmath>
#include <cstdio>
#include <fstream>
#include <iostream>
#include <iterator>
#include <sstream>
#include <vector>

#include "cli/atomic_file.h"
#include "cli/commands.h"
#include "cli/exit_codes.h"
#include "cli/points_csv.h"
#include "simulate/empirical.h"
#include "stats/data_matrix.h"
#include "stats/spike_test.h"

namespace edgelaw {
namespace {

using Json = nlohmann::ordered_json;

// The caution printed with every probability that feeds a decision.
constexpr const char* kCaution =
    "caution: F_beta(x; w) is the n -> infinity law; at finite n it is off by O(n^{-1/3}) in the spiked window "
    "(see the README for measured sizes; --simulate N gives an exact finite-n check for Gaussian data). It assumes "
    "Gaussian noise and independent samples. It supports, and does not replace, the analyst's judgement.";

Json jnum(double v) { return std::isfinite(v) ? Json(v) : Json(format_double(v)); }
Json jest(const Estimate& e) { return Json{{"value", jnum(e.value)}, {"error", jnum(e.error)}}; }

std::string fmt(double v, int digits = 6) {
  if (!std::isfinite(v)) return format_double(v);
  char buf[48];
  std::snprintf(buf, sizeof buf, "%.*g", digits, v);
  return buf;
}

// A value whose error reaches zero (or one) is a bracket from beyond the computed region:
// say so instead of printing digits that mean nothing.
std::string fmt_est(const Estimate& e) {
  if (e.value > 0 && e.error >= e.value) return "below " + fmt(e.value + e.error, 2) + " (bounded by the computed region's edge)";
  if (e.value < 1 && e.value > 0.5 && e.error >= 1 - e.value)
    return "above " + fmt(e.value - e.error, 8) + " (bounded by the computed region's edge)";
  return fmt(e.value, 10) + " (numerical error " + fmt(e.error, 2) + ")";
}

// A number option given as text (so that absence and "inf" can be told apart).
double number_option(const std::string& text, const char* option, bool allow_inf) {
  try {
    return parse_number(text, allow_inf);
  } catch (const DataError& e) {
    throw UsageError(std::string(option) + ": " + e.what());
  }
}

std::string read_text(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw NoInputError("cannot read data file " + path);
  return std::string(std::istreambuf_iterator<char>(in), {});
}

struct Resolved {
  SpikedModel model;
  bool has_observed = false;
  double observed = 0;               // user units (x for the direct model)
  std::vector<std::string> lines;    // how the model and the observation were obtained
  Json description;
};

const char* family_name(ModelFamily f) {
  switch (f) {
    case ModelFamily::covariance: return "covariance";
    case ModelFamily::signal: return "signal";
    case ModelFamily::direct: break;
  }
  return "direct";
}

Resolved resolve(const ModelOptions& o, bool need_observed) {
  Resolved r;
  SpikedModel& m = r.model;
  if (o.model == "direct") m.family = ModelFamily::direct;
  else if (o.model == "covariance") m.family = ModelFamily::covariance;
  else if (o.model == "signal") m.family = ModelFamily::signal;
  else throw UsageError("--model must be direct, covariance or signal, got '" + o.model + "'");
  m.beta = o.beta;
  if (!(std::isfinite(o.beta) && o.beta > 0)) throw UsageError("--beta must be finite and > 0, got " + fmt(o.beta));
  r.description = Json{{"model", family_name(m.family)}, {"beta", jnum(m.beta)}};

  if (m.family == ModelFamily::direct) {
    if (!o.data.empty() || !o.eigenvalue.empty() || o.n != 0 || o.p != 0 || !o.noise_variance.empty())
      throw UsageError("the direct model takes --x and --w only (use --model covariance or signal for data or eigenvalues)");
    if (!o.x.empty()) {
      r.observed = number_option(o.x, "--x", false);
      r.has_observed = true;
    }
    if (need_observed && !r.has_observed) throw UsageError("the direct model needs the observed threshold --x");
    r.lines.push_back("model: direct (x and w given), beta " + fmt(m.beta));
    return r;
  }
  if (!o.x.empty()) throw UsageError("--x belongs to the direct model; give --eigenvalue or --data");
  if (o.n < 0 || o.p < 0) throw UsageError("--n and --p must be positive");
  if (m.family == ModelFamily::signal && o.p != 0) throw UsageError("the signal model has no --p (the matrix is n x n)");
  if (m.family == ModelFamily::signal && !o.eigenvalue_of.empty())
    throw UsageError("--eigenvalue-of belongs to the covariance model");
  if (o.columns_centred && (m.family != ModelFamily::covariance || o.data.empty()))
    throw UsageError("--columns-centred applies to covariance --data only");

  double noise_estimate = std::nan("");
  std::string data_line;
  if (!o.data.empty()) {
    if (!o.eigenvalue.empty()) throw UsageError("give either --data or --eigenvalue, not both");
    if (o.n != 0 || o.p != 0) throw UsageError("--n and --p are read from --data; do not give them too");
    if (!o.eigenvalue_of.empty()) throw UsageError("--eigenvalue-of is not used with --data (the top eigenvalue of X^T X is computed)");
    Eigen::MatrixXd x;
    try {
      x = parse_matrix_csv(read_text(o.data), o.data);
      if (m.family == ModelFamily::covariance) {
        const CovarianceData d = covariance_data(x, !o.columns_centred);
        m.n = d.effective_samples;
        m.p = d.variables;
        r.observed = d.top_eigenvalue;
        noise_estimate = d.noise_variance_estimate;
        data_line = "data: " + o.data + ", " + std::to_string(d.samples) + " samples x " + std::to_string(d.variables) +
                    " variables, " + (d.centred_here ? "columns centred here (n - 1 = " + std::to_string(d.effective_samples) + " degrees of freedom)"
                                                      : "columns taken as centred (not changed)") +
                    "; top eigenvalue of X^T X = " + fmt(d.top_eigenvalue, 10);
        r.description["samples"] = d.samples;
        r.description["centred_here"] = d.centred_here;
      } else {
        const SymmetricData d = symmetric_data(x);
        m.n = d.size;
        r.observed = d.top_eigenvalue;
        noise_estimate = d.noise_variance_estimate;
        data_line = "data: " + o.data + ", symmetric " + std::to_string(d.size) + " x " + std::to_string(d.size) +
                    " matrix; top eigenvalue " + fmt(d.top_eigenvalue, 10);
      }
    } catch (const DataMatrixError& e) {
      throw DataError(e.what());
    }
    r.has_observed = true;
    m.divided_by_n = false;
  } else {
    if (m.family == ModelFamily::covariance) {
      if (o.n < 2 || o.p < 2) throw UsageError("the covariance model needs --n (samples, >= 2) and --p (variables, >= 2), or --data");
      if (!o.eigenvalue.empty() || need_observed) {
        if (o.eigenvalue_of == "XtX") m.divided_by_n = false;
        else if (o.eigenvalue_of == "XtX/n") m.divided_by_n = true;
        else throw UsageError("say which matrix the eigenvalue is of: --eigenvalue-of XtX (S = X^T X) or XtX/n (S = X^T X / n)");
      }
    } else if (o.n < 2) {
      throw UsageError("the signal model needs --n (matrix size, >= 2), or --data");
    }
    m.n = o.n;
    m.p = o.p;
    if (!o.eigenvalue.empty()) {
      r.observed = number_option(o.eigenvalue, "--eigenvalue", false);
      r.has_observed = true;
    }
  }
  if (need_observed && !r.has_observed) throw UsageError("give the observed top eigenvalue (--eigenvalue) or the data (--data)");

  std::string noise_line;
  if (o.noise_variance == "estimate" || (o.noise_variance.empty() && !o.data.empty())) {
    if (o.data.empty()) throw UsageError("--noise-variance estimate needs --data");
    m.noise_variance = noise_estimate;
    noise_line = "noise variance " + fmt(noise_estimate) +
                 (m.family == ModelFamily::covariance ? " (estimated: trace of S without its top eigenvalue per sample and variable; "
                                                        "a plug-in estimate, its error is not in the p-value)"
                                                      : " (estimated: mean square of the off-diagonal entries; a plug-in "
                                                        "estimate, its error is not in the p-value)");
    r.description["noise_variance_estimated"] = true;
  } else {
    m.noise_variance = o.noise_variance.empty() ? 1.0 : number_option(o.noise_variance, "--noise-variance", false);
    noise_line = "noise variance " + fmt(m.noise_variance) + (o.noise_variance.empty() ? " (default)" : " (given)");
    r.description["noise_variance_estimated"] = false;
  }
  if (auto why = m.check(); !why.empty()) throw UsageError(why);

  if (m.family == ModelFamily::covariance) {
    r.lines.push_back("model: spiked covariance, beta " + fmt(m.beta) + ", n " + std::to_string(m.n) + ", p " +
                      std::to_string(m.p) + ", eigenvalue of " + (m.divided_by_n ? "X^T X / n" : "X^T X") + ", " + noise_line +
                      "; critical spike 1 + sqrt(p/n) = " + fmt(m.critical_spike()));
    r.description["p"] = m.p;
    r.description["eigenvalue_of"] = m.divided_by_n ? "XtX/n" : "XtX";
  } else {
    r.lines.push_back("model: spiked signal matrix (Gaussian beta-ensemble), beta " + fmt(m.beta) + ", n " +
                      std::to_string(m.n) + ", " + noise_line + "; spike theta in units of sigma sqrt(n), critical 1");
  }
  r.description["n"] = m.n;
  r.description["noise_variance"] = jnum(m.noise_variance);
  if (!data_line.empty()) r.lines.push_back(data_line);
  return r;
}

double parse_spike(const SpikedModel& m, const std::string& text, const char* option) {
  if (text.empty() || text == "none") return m.no_spike();
  const double s = number_option(text, option, m.family == ModelFamily::direct);
  if (auto why = m.check_spike(s); !why.empty()) throw UsageError(std::string(option) + ": " + why);
  return s;
}

std::string spike_text(const SpikedModel& m, double s) {
  switch (m.family) {
    case ModelFamily::covariance: return "ell = " + fmt(s, 8) + (s == 1 ? " (no spike)" : "");
    case ModelFamily::signal: return "theta = " + fmt(s, 8) + (s == 0 ? " (no spike)" : "");
    case ModelFamily::direct: break;
  }
  return "w = " + fmt(s, 8) + (std::isinf(s) ? " (no spike)" : "");
}

// The law the questions need: from --table, or solved for every w from w_min up to +inf
// over the thresholds `x`. Values beyond the region are bracketed by EdgeLaw (monotone in x and
// w), so the region need not hold the far tails, whose solve range would cost minutes.
EdgeLaw make_law(const ModelOptions& o, const SpikedModel& m, double w_min, XRange x) {
  if (!(o.target >= 5e-11 && o.target < 0.1)) throw UsageError("--target must be in [5e-11, 0.1), got " + fmt(o.target));
  if (!o.table.empty()) {
    if (!std::ifstream(o.table)) throw NoInputError("cannot read table file " + o.table);
    return EdgeLaw::from_file(o.table, m.beta);
  }
  LawRegion region;
  region.w_min = w_min;
  region.x_min = x.lo;
  region.x_max = x.hi;
  return EdgeLaw::solve(m.beta, region, o.target);
}

// Thresholds around an observed x (enough for the interpolation stencils), kept inside the
// support: beyond it the probability is below ~1e-13 and bracketed.
XRange around(double x, XRange support) {
  const double lo = std::clamp(std::floor(x - 2), support.lo, support.hi - 4);
  const double hi = std::clamp(std::ceil(x + 2), support.lo + 4, support.hi);
  return {lo, hi};
}

void check_w_floor(const ModelOptions& o) {
  if (!(std::isfinite(o.w_floor) && o.w_floor <= -1 && o.w_floor >= -12))
    throw UsageError("--w-floor must be in [-12, -1], got " + fmt(o.w_floor));
}

void print_lines(const Resolved& r) {
  for (const auto& l : r.lines) std::cout << l << "\n";
}

Json base_json(const Resolved& r, const EdgeLaw& law) {
  Json j = r.description;
  j["law_source"] = law.source();
  j["caution"] = kCaution;
  return j;
}

// Runs the body, turning the stats library's argument errors into usage errors.
int stats_guarded(const std::function<int()>& body) {
  return guarded([&] {
    try {
      return body();
    } catch (const std::invalid_argument& e) {
      throw UsageError(e.what());
    }
  });
}

}  // namespace

int run_model_pvalue(const StatsCommand& c) {
  return stats_guarded([&] {
    const Resolved r = resolve(c.m, true);
    const SpikedModel& m = r.model;
    const double spike = parse_spike(m, c.spike, "--spike");
    if (c.simulate < 0) throw UsageError("--simulate must be >= 0, got " + std::to_string(c.simulate));
    if (c.simulate > 0 && m.family == ModelFamily::direct) throw UsageError("--simulate needs a finite-n model (covariance or signal)");
    const EdgeCoordinates at = edge_coordinates(m, r.observed, spike);
    check_w_floor(c.m);
    const double w_min = needed_w_min(m, {spike}, c.m.w_floor);
    const EdgeLaw law = make_law(c.m, m, w_min, around(at.x, law_support(m.beta, std::max(at.w, w_min))));
    const PValue pv = p_value(m, law, r.observed, spike);
    SimulatedPValue sim;
    if (c.simulate > 0) sim = simulated_p_value(m, r.observed, spike, c.simulate, c.seed, c.threads);
    const std::string regime = regime_of(pv.at.w);
    if (c.m.json) {
      Json j = base_json(r, law);
      j["eigenvalue"] = jnum(r.observed);
      j["null_spike"] = jnum(spike);
      j["x"] = jnum(pv.at.x);
      j["w"] = jnum(pv.at.w);
      j["regime"] = regime;
      j["p_value"] = jest(pv.p_value);
      if (c.simulate > 0)
        j["simulated"] = Json{{"p_value", sim.p_value}, {"standard_error", sim.standard_error}, {"samples", sim.samples},
                              {"seed", sim.seed}, {"seconds", sim.seconds}};
      std::cout << j.dump(2) << "\n";
      return exit_code::kOk;
    }
    print_lines(r);
    if (m.family != ModelFamily::direct) std::cout << "observed top eigenvalue: " << fmt(r.observed, 10) << "\n";
    std::cout << "null hypothesis: spike " << spike_text(m, spike) << "\n";
    std::cout << "edge coordinates: x = " << fmt(pv.at.x, 8) << ", w = " << fmt(pv.at.w, 8) << " (" << regime << ")\n";
    std::cout << "p-value: " << fmt_est(pv.p_value) << "\n";
    if (c.simulate > 0)
      std::cout << "simulated finite-n p-value: " << fmt(sim.p_value) << " +- " << fmt(sim.standard_error, 2)
                << " (standard error; " << sim.samples << " samples, seed " << sim.seed << ", " << fmt(sim.seconds, 3)
                << " s)\n";
    std::cout << "law: " << law.source() << "\n" << kCaution << "\n";
    return exit_code::kOk;
  });
}

int run_critical_value(const StatsCommand& c) {
  return stats_guarded([&] {
    const Resolved r = resolve(c.m, false);
    const SpikedModel& m = r.model;
    const double spike = parse_spike(m, c.spike, "--spike");
    if (!(c.alpha > 0 && c.alpha < 1)) throw UsageError("--alpha must lie strictly between 0 and 1, got " + fmt(c.alpha));
    check_w_floor(c.m);
    const double w_min = needed_w_min(m, {spike}, c.m.w_floor);
    const EdgeLaw law = make_law(c.m, m, w_min, law_support(m.beta, std::max(m.map(spike).w, w_min)));
    const CriticalValue cv = critical_value(m, law, c.alpha, spike);
    if (c.m.json) {
      Json j = base_json(r, law);
      j["alpha"] = c.alpha;
      j["null_spike"] = jnum(spike);
      j["w"] = jnum(cv.w);
      j["regime"] = regime_of(cv.w);
      j["critical_x"] = jest(cv.x);
      if (m.family != ModelFamily::direct) j["critical_eigenvalue"] = jest(cv.eigenvalue);
      std::cout << j.dump(2) << "\n";
      return exit_code::kOk;
    }
    print_lines(r);
    std::cout << "null hypothesis: spike " << spike_text(m, spike) << ", w = " << fmt(cv.w, 8) << " (" << regime_of(cv.w) << ")\n";
    std::cout << "level alpha = " << fmt(c.alpha) << ": reject when the statistic exceeds\n";
    std::cout << "  critical x = " << fmt_est(cv.x) << "\n";
    if (m.family != ModelFamily::direct)
      std::cout << "  critical top eigenvalue = " << fmt_est(cv.eigenvalue) << " (of "
                << (m.family == ModelFamily::signal ? "the matrix" : (m.divided_by_n ? "X^T X / n" : "X^T X")) << ")\n";
    std::cout << "law: " << law.source() << "\n" << kCaution << "\n";
    return exit_code::kOk;
  });
}

namespace {

// "first:last:count" of a power curve.
std::vector<double> spike_range(const SpikedModel& m, const std::string& text) {
  std::vector<std::string> parts;
  std::stringstream in(text);
  for (std::string p; std::getline(in, p, ':');) parts.push_back(p);
  if (parts.size() != 3) throw UsageError("--alternatives must be FIRST:LAST:COUNT, got '" + text + "'");
  const double a = parse_spike(m, parts[0], "--alternatives (first)");
  const double b = parse_spike(m, parts[1], "--alternatives (last)");
  const double k = number_option(parts[2], "--alternatives (count)", false);
  if (!(k >= 2 && k <= 10000 && k == std::floor(k))) throw UsageError("--alternatives count must be an integer in [2, 10000]");
  if (!(a < b)) throw UsageError("--alternatives: FIRST must be smaller than LAST");
  if (!std::isfinite(a) || !std::isfinite(b)) throw UsageError("--alternatives: FIRST and LAST must be finite");
  std::vector<double> out;
  for (int i = 0; i < static_cast<int>(k); ++i) out.push_back(a + (b - a) * i / (k - 1));
  return out;
}

}  // namespace

int run_power(const StatsCommand& c) {
  return stats_guarded([&] {
    const Resolved r = resolve(c.m, false);
    const SpikedModel& m = r.model;
    const double spike = parse_spike(m, c.spike, "--spike");
    if (!(c.alpha > 0 && c.alpha < 1)) throw UsageError("--alpha must lie strictly between 0 and 1, got " + fmt(c.alpha));
    if (c.alternative.empty() == c.alternatives.empty())
      throw UsageError("give one alternative spike (--alternative) or a range for a power curve (--alternatives FIRST:LAST:COUNT)");
    if (!c.output.empty() && c.alternatives.empty()) throw UsageError("--output is for power curves (--alternatives)");
    const std::vector<double> alts =
        c.alternative.empty() ? spike_range(m, c.alternatives) : std::vector<double>{parse_spike(m, c.alternative, "--alternative")};
    if (!c.output.empty()) check_output_path(c.output);
    std::vector<double> spikes = alts;
    spikes.push_back(spike);
    check_w_floor(c.m);
    const double w_min = needed_w_min(m, spikes, c.m.w_floor);
    const EdgeLaw law = make_law(c.m, m, w_min, law_support(m.beta, std::max(m.map(spike).w, w_min)));
    std::vector<Power> results;
    for (double a : alts) results.push_back(power(m, law, c.alpha, spike, a));
    const CriticalValue& cv = results.front().critical;

    if (!c.alternatives.empty()) {
      std::ostringstream csv;
      csv << "alternative,w,x,power,power_error,regime\n";
      for (const auto& p : results)
        csv << format_double(p.alternative) << ',' << format_double(p.at.w) << ',' << format_double(p.at.x) << ','
            << format_double(p.power.value) << ',' << format_double(p.power.error) << ',' << regime_of(p.at.w) << '\n';
      if (c.output.empty()) {
        std::cout << csv.str();
      } else {
        write_file_atomically(c.output, csv.str());
        std::cerr << "wrote " << c.output << " (" << results.size() << " alternatives; critical x " << fmt(cv.x.value, 8)
                  << ")\n";
      }
      return exit_code::kOk;
    }
    const Power& p = results.front();
    if (c.m.json) {
      Json j = base_json(r, law);
      j["alpha"] = c.alpha;
      j["null_spike"] = jnum(spike);
      j["alternative"] = jnum(p.alternative);
      j["critical_x"] = jest(cv.x);
      if (m.family != ModelFamily::direct) j["critical_eigenvalue"] = jest(cv.eigenvalue);
      j["x"] = jnum(p.at.x);
      j["w"] = jnum(p.at.w);
      j["regime"] = regime_of(p.at.w);
      j["power"] = jest(p.power);
      std::cout << j.dump(2) << "\n";
      return exit_code::kOk;
    }
    print_lines(r);
    std::cout << "null hypothesis: spike " << spike_text(m, spike) << "; level alpha = " << fmt(c.alpha)
              << "; critical x = " << fmt_est(cv.x) << "\n";
    if (m.family != ModelFamily::direct) std::cout << "critical top eigenvalue: " << fmt_est(cv.eigenvalue) << "\n";
    std::cout << "alternative: spike " << spike_text(m, p.alternative) << ", w = " << fmt(p.at.w, 8) << " ("
              << regime_of(p.at.w) << "); the critical value sits at x = " << fmt(p.at.x, 8) << " there\n";
    std::cout << "power: " << fmt_est(p.power) << "\n";
    std::cout << "law: " << law.source() << "\n" << kCaution << "\n";
    return exit_code::kOk;
  });
}

int run_interval(const StatsCommand& c) {
  return stats_guarded([&] {
    const Resolved r = resolve(c.m, true);
    const SpikedModel& m = r.model;
    if (!(c.alpha > 0 && c.alpha < 1)) throw UsageError("--alpha must lie strictly between 0 and 1, got " + fmt(c.alpha));
    if (!c.spike.empty()) throw UsageError("interval takes no --spike: it inverts the test over all spikes");
    const EdgeCoordinates at = edge_coordinates(m, r.observed, m.no_spike());
    check_w_floor(c.m);
    const double w_min = w_min_for_observed(m.beta, at.x, c.m.w_floor);
    // The observed eigenvalue's x under every spike the inversion may visit (the maps' centre
    // and scale may depend on the spike).
    XRange xs{at.x, at.x};
    const double u_min = std::atan2(1.0, m.map(m.no_spike()).w), u_max = std::atan2(1.0, w_min);
    for (int k = 0; k <= 64; ++k) {
      const double u = u_min + (u_max - u_min) * k / 64;
      const double spike = k == 0 ? m.no_spike() : m.spike_for_w(1.0 / std::tan(u));
      const double x = edge_coordinates(m, r.observed, spike).x;
      xs = {std::min(xs.lo, x), std::max(xs.hi, x)};
    }
    const XRange support = law_support(m.beta, w_min);
    const XRange lo = around(xs.lo, support), hi = around(xs.hi, support);
    const EdgeLaw law = make_law(c.m, m, w_min, {lo.lo, std::max(lo.hi, hi.hi)});
    const SpikeInterval iv = spike_interval(m, law, r.observed, c.alpha);
    const bool direct = m.family == ModelFamily::direct;
    // Strength order: for the direct model a stronger spike is a smaller w.
    const std::string weak_note = iv.lower_is_no_spike ? "no spike is consistent with the data at this level"
                                  : regime_of(iv.lower_w) == "subcritical"
                                      ? "the weak end lies in the subcritical region, where spikes are hardly detectable"
                                      : "";
    const std::string strong_note = iv.upper_open ? "the strong end reached the edge of the computed region (w = " +
                                                        fmt(law.w_min()) + "); larger spikes are not excluded"
                                                  : "";
    if (c.m.json) {
      Json j = base_json(r, law);
      j["eigenvalue"] = jnum(r.observed);
      j["level"] = iv.level;
      j["weak_end"] = Json{{"spike", jnum(iv.lower)}, {"error", jnum(iv.lower_error)}, {"w", jnum(iv.lower_w)},
                           {"is_no_spike", iv.lower_is_no_spike}, {"regime", regime_of(iv.lower_w)}};
      j["strong_end"] = Json{{"spike", jnum(iv.upper)}, {"error", jnum(iv.upper_error)}, {"w", jnum(iv.upper_w)},
                             {"open", iv.upper_open}, {"regime", regime_of(iv.upper_w)}};
      if (!weak_note.empty()) j["weak_end_note"] = weak_note;
      if (!strong_note.empty()) j["strong_end_note"] = strong_note;
      std::cout << j.dump(2) << "\n";
      return exit_code::kOk;
    }
    print_lines(r);
    if (!direct) std::cout << "observed top eigenvalue: " << fmt(r.observed, 10) << "\n";
    std::cout << fmt(100 * iv.level) << "% interval for the spike (two-sided, by inverting the test):\n";
    auto end_line = [&](const char* name, double s, double err, double w, bool flag) {
      std::cout << "  " << name << ": " << spike_text(m, s);
      if (!flag) std::cout << " (numerical error " << fmt(err, 2) << ")";
      std::cout << ", w = " << fmt(w, 8) << " (" << regime_of(w) << ")\n";
    };
    end_line(direct ? "weak end (largest w)" : "lower", iv.lower, iv.lower_error, iv.lower_w, iv.lower_is_no_spike);
    end_line(direct ? "strong end (smallest w)" : "upper", iv.upper, iv.upper_error, iv.upper_w, iv.upper_open);
    if (!weak_note.empty()) std::cout << "note: " << weak_note << "\n";
    if (!strong_note.empty()) std::cout << "note: " << strong_note << "\n";
    std::cout << "law: " << law.source() << "\n" << kCaution << "\n";
    return exit_code::kOk;
  });
}

int run_simulate(const StatsCommand& c) {
  return stats_guarded([&] {
    const Resolved r = resolve(c.m, false);
    const SpikedModel& m = r.model;
    if (m.family == ModelFamily::direct) throw UsageError("simulate needs --model covariance or signal (and --n, --p)");
    if (r.has_observed) throw UsageError("simulate draws its own samples: no --eigenvalue or --data");
    if (c.simulate < 100 || c.simulate > 100000000)
      throw UsageError("--samples must be in [100, 1e8], got " + std::to_string(c.simulate));
    if (c.threads < 0) throw UsageError("--threads must be >= 0");
    const double spike = parse_spike(m, c.spike, "--spike");
    if (!c.samples_output.empty()) check_output_path(c.samples_output);
    const EdgeMap e = m.map(spike);
    check_w_floor(c.m);
    const double w_min = needed_w_min(m, {spike}, c.m.w_floor);
    const EdgeLaw law = make_law(c.m, m, w_min, law_support(m.beta, std::max(e.w, w_min)));
    const auto start = std::chrono::steady_clock::now();
    std::vector<double> xs = simulate_raw_eigenvalues(m, spike, c.simulate, c.seed, c.threads);
    const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    for (double& v : xs) v = (v - e.center) / e.scale;
    const KolmogorovResult ks = kolmogorov_distance(xs, [&](double x) { return std::clamp(law.cdf(x, e.w).value, 0.0, 1.0); });
    const EmpiricalCdf ecdf(xs);
    const double levels[] = {0.05, 0.5, 0.95, 0.99};
    if (!c.samples_output.empty()) {
      std::ostringstream out;
      out << "x\n";
      for (double v : xs) out << format_double(v) << '\n';
      write_file_atomically(c.samples_output, out.str());
    }
    if (c.m.json) {
      Json j = base_json(r, law);
      j["spike"] = jnum(spike);
      j["w"] = jnum(e.w);
      j["regime"] = regime_of(e.w);
      j["center"] = e.center;
      j["scale"] = e.scale;
      j["samples"] = c.simulate;
      j["seed"] = c.seed;
      j["seconds"] = seconds;
      j["kolmogorov_distance"] = ks.distance;
      j["kolmogorov_location"] = ks.location;
      j["sampling_95"] = ks.critical_95;
      j["kolmogorov_p_value"] = ks.p_value;
      Json q = Json::array();
      for (double p : levels)
        q.push_back(Json{{"probability", p}, {"simulated", ecdf.quantile(p)}, {"law", jest(law.quantile(p, e.w))}});
      j["quantiles"] = q;
      std::cout << j.dump(2) << "\n";
      return exit_code::kOk;
    }
    print_lines(r);
    std::cout << "spike " << spike_text(m, spike) << " -> w = " << fmt(e.w, 8) << " (" << regime_of(e.w)
              << "); x = (lambda_max - " << fmt(e.center, 10) << ") / " << fmt(e.scale, 10) << "\n";
    std::cout << c.simulate << " samples (seed " << c.seed << ") in " << fmt(seconds, 3) << " s\n";
    std::cout << "Kolmogorov distance to F_beta(x; w): " << fmt(ks.distance, 4) << " at x = " << fmt(ks.location, 4)
              << " (95% sampling scale " << fmt(ks.critical_95, 3) << ", asymptotic p-value " << fmt(ks.p_value, 3) << ")\n";
    std::cout << "quantiles (probability: simulated / law):\n";
    for (double p : levels)
      std::cout << "  " << fmt(p) << ": " << fmt(ecdf.quantile(p), 6) << " / " << fmt(law.quantile(p, e.w).value, 6) << "\n";
    std::cout << "a distance well above the sampling scale is the finite-n error of the asymptotic law at this n.\n";
    std::cout << "law: " << law.source() << "\n";
    return exit_code::kOk;
  });
}

}  // namespace edgelaw
