// The spiked largest-eigenvalue test through the finite-n maps and the edge law.
#include "stats/spike_test.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <stdexcept>

#include "simulate/simulate.h"

namespace edgelaw {
namespace {

std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}

// The angle u = arccot(w) in [0, pi): 0 is w = +inf (no spike), larger u a stronger spike.
double w_of_angle(double u) { return u == 0 ? kInf : 1.0 / std::tan(u); }
double angle_of_w(double w) { return std::atan2(1.0, w); }

}  // namespace

std::string SpikedModel::check() const {
  if (!(std::isfinite(beta) && beta > 0)) return "beta must be finite and > 0, got " + num(beta);
  if (family == ModelFamily::direct) return "";
  if (n < 2) return "the model needs at least 2 samples (n), got " + std::to_string(n);
  if (family == ModelFamily::covariance && p < 2)
    return "the covariance model needs at least 2 variables (p), got " + std::to_string(p);
  if (!(std::isfinite(noise_variance) && noise_variance > 0))
    return "noise variance must be finite and > 0, got " + num(noise_variance);
  return "";
}

double SpikedModel::no_spike() const {
  switch (family) {
    case ModelFamily::covariance: return 1.0;
    case ModelFamily::signal: return 0.0;
    case ModelFamily::direct: break;
  }
  return kInf;
}

std::string SpikedModel::check_spike(double spike) const {
  switch (family) {
    case ModelFamily::covariance:
      if (!(std::isfinite(spike) && spike >= 1))
        return "spike ell must be finite and >= 1 (the spiked variance in units of the noise variance; 1 = no spike), got " + num(spike);
      return "";
    case ModelFamily::signal:
      if (!(std::isfinite(spike) && spike >= 0))
        return "spike theta must be finite and >= 0 (0 = no spike, 1 = the detection threshold), got " + num(spike);
      return "";
    case ModelFamily::direct:
      if (std::isnan(spike) || spike == -kInf) return "w must be a number or +inf, got " + num(spike);
      return "";
  }
  return "";
}

double SpikedModel::critical_spike() const {
  switch (family) {
    case ModelFamily::covariance: return 1.0 + std::sqrt(static_cast<double>(p) / static_cast<double>(n));
    case ModelFamily::signal: return 1.0;
    case ModelFamily::direct: break;
  }
  return 0.0;
}

double SpikedModel::raw_eigenvalue(double eigenvalue) const {
  switch (family) {
    case ModelFamily::covariance: return eigenvalue * (divided_by_n ? static_cast<double>(n) : 1.0) / noise_variance;
    case ModelFamily::signal: return eigenvalue / std::sqrt(noise_variance);
    case ModelFamily::direct: break;
  }
  return eigenvalue;
}

double SpikedModel::user_eigenvalue(double raw) const {
  switch (family) {
    case ModelFamily::covariance: return raw * noise_variance / (divided_by_n ? static_cast<double>(n) : 1.0);
    case ModelFamily::signal: return raw * std::sqrt(noise_variance);
    case ModelFamily::direct: break;
  }
  return raw;
}

EdgeMap SpikedModel::map(double spike) const {
  switch (family) {
    case ModelFamily::covariance: return covariance_edge_map(beta, n, p, spike);
    case ModelFamily::signal: return hermite_edge_map(beta, n, spike);
    case ModelFamily::direct: break;
  }
  return {0.0, 1.0, spike};
}

double SpikedModel::spike_for_w(double w) const {
  switch (family) {
    case ModelFamily::covariance: return covariance_spike_for_w(beta, n, p, w);
    case ModelFamily::signal: return hermite_spike_for_w(beta, n, w);
    case ModelFamily::direct: break;
  }
  return w;
}

std::string regime_of(double w) {
  if (w > 3) return "subcritical";
  if (w >= -3) return "critical window";
  return "supercritical";
}

EdgeCoordinates edge_coordinates(const SpikedModel& m, double eigenvalue, double spike) {
  const EdgeMap e = m.map(spike);
  return {(m.raw_eigenvalue(eigenvalue) - e.center) / e.scale, e.w};
}

PValue p_value(const SpikedModel& m, const EdgeLaw& law, double eigenvalue, double spike) {
  PValue r;
  r.eigenvalue = eigenvalue;
  r.spike = spike;
  r.at = edge_coordinates(m, eigenvalue, spike);
  r.p_value = law.survival(r.at.x, r.at.w);
  return r;
}

CriticalValue critical_value(const SpikedModel& m, const EdgeLaw& law, double alpha, double spike) {
  if (!(alpha > 0 && alpha < 1)) throw std::invalid_argument("alpha must lie strictly between 0 and 1, got " + num(alpha));
  CriticalValue r;
  r.alpha = alpha;
  r.spike = spike;
  const EdgeMap e = m.map(spike);
  r.w = e.w;
  r.x = law.quantile(1.0 - alpha, e.w);
  const double raw = e.center + e.scale * r.x.value;
  r.eigenvalue = {m.user_eigenvalue(raw), std::abs(m.user_eigenvalue(raw + e.scale * r.x.error) - m.user_eigenvalue(raw))};
  return r;
}

Power power(const SpikedModel& m, const EdgeLaw& law, double alpha, double spike, double alternative) {
  Power r;
  r.critical = critical_value(m, law, alpha, spike);
  r.alternative = alternative;
  r.at = edge_coordinates(m, r.critical.eigenvalue.value, alternative);
  const Estimate s = law.survival(r.at.x, r.at.w);
  // The critical value's own error moves x by dx in the alternative's coordinates.
  const double dx = r.critical.x.error * m.map(spike).scale / m.map(alternative).scale;
  const double spread = 0.5 * std::abs(law.survival(r.at.x - dx, r.at.w).value - law.survival(r.at.x + dx, r.at.w).value);
  r.power = {s.value, s.error + spread};
  return r;
}

double needed_w_min(const SpikedModel& m, const std::vector<double>& spikes, double w_floor) {
  double w_min = 0.0;  // always cover the critical window's centre
  for (double s : spikes) w_min = std::min(w_min, m.map(s).w);
  return std::max(w_min - 0.5, w_floor);
}

SpikeInterval spike_interval(const SpikedModel& m, const EdgeLaw& law, double eigenvalue, double alpha) {
  if (!(alpha > 0 && alpha < 1)) throw std::invalid_argument("alpha must lie strictly between 0 and 1, got " + num(alpha));
  SpikeInterval r;
  r.level = 1 - alpha;
  r.eigenvalue = eigenvalue;
  // g(u) = F(x(s(u)); w(u)), decreasing in the spike angle u.
  auto g = [&](double u) {
    const double w = w_of_angle(u);
    const EdgeCoordinates c = edge_coordinates(m, eigenvalue, m.spike_for_w(w));
    return law.cdf(c.x, c.w);
  };
  // From the no-spike model (whose w need not be +inf at finite n) to the region's strongest.
  const double u_min = angle_of_w(m.map(m.no_spike()).w);
  const double u_max = angle_of_w(law.w_min());
  if (!(u_min < u_max)) throw std::invalid_argument("the law's region holds no spike stronger than none");
  auto solve_for = [&](double level) {
    double lo = u_min, hi = u_max;  // g(lo) > level >= g(hi)
    for (int k = 0; k < 100 && hi - lo > 1e-15; ++k) {
      const double mid = 0.5 * (lo + hi);
      (g(mid).value > level ? lo : hi) = mid;
    }
    return 0.5 * (lo + hi);
  };
  // Error of an end: the law's error at it over the slope of g, carried to the spike.
  auto end_error = [&](double u) {
    const double h = 1e-4;
    const double a = std::max(u_min, u - h), b = std::min(u_max, u + h);
    const double slope = std::abs(g(b).value - g(a).value) / (b - a);
    const double du = slope > 0 ? g(u).error / slope : kInf;
    const double s_lo = m.spike_for_w(w_of_angle(std::max(u_min, u - du)));
    const double s_hi = m.spike_for_w(w_of_angle(std::min(u_max, u + du)));
    return 0.5 * std::abs(s_hi - s_lo);
  };
  const double upper_level = 1 - alpha / 2, lower_level = alpha / 2;
  double u_weak = u_min;
  if (g(u_min).value > upper_level) {
    u_weak = solve_for(upper_level);
  } else {
    r.lower_is_no_spike = true;
  }
  double u_strong = u_max;
  if (g(u_max).value <= lower_level) {
    u_strong = solve_for(lower_level);
  } else {
    r.upper_open = true;
  }
  r.lower_w = w_of_angle(u_weak);
  r.upper_w = w_of_angle(u_strong);
  r.lower = r.lower_is_no_spike ? m.no_spike() : m.spike_for_w(r.lower_w);
  r.upper = m.spike_for_w(r.upper_w);
  r.lower_error = r.lower_is_no_spike ? 0.0 : end_error(u_weak);
  r.upper_error = r.upper_open ? 0.0 : end_error(u_strong);
  return r;
}

std::vector<double> simulate_raw_eigenvalues(const SpikedModel& m, double spike, long samples, std::uint64_t seed,
                                             int threads) {
  SampleOptions opt;
  opt.count = samples;
  opt.seed = seed;
  opt.threads = threads;
  switch (m.family) {
    case ModelFamily::covariance: return sample_top_eigenvalue(LaguerreSpikeModel{m.beta, m.n, m.p, spike}, opt);
    case ModelFamily::signal: return sample_top_eigenvalue(HermiteSpikeModel{m.beta, m.n, spike}, opt);
    case ModelFamily::direct: break;
  }
  throw std::invalid_argument("the direct model (x and w given) has no finite-n matrix to simulate");
}

SimulatedPValue simulated_p_value(const SpikedModel& m, double eigenvalue, double spike, long samples,
                                  std::uint64_t seed, int threads) {
  if (samples < 1) throw std::invalid_argument("the number of simulated samples must be >= 1, got " + std::to_string(samples));
  const auto start = std::chrono::steady_clock::now();
  const std::vector<double> raw = simulate_raw_eigenvalues(m, spike, samples, seed, threads);
  const double observed = m.raw_eigenvalue(eigenvalue);
  const long hits = std::count_if(raw.begin(), raw.end(), [&](double v) { return v >= observed; });
  SimulatedPValue r;
  r.samples = samples;
  r.seed = seed;
  r.p_value = (1.0 + static_cast<double>(hits)) / (static_cast<double>(samples) + 1.0);
  r.standard_error = std::sqrt(r.p_value * (1 - r.p_value) / static_cast<double>(samples));
  r.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  return r;
}

}  // namespace edgelaw
