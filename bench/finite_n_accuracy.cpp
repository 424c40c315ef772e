// Measures the finite-n maps (stats/finite_n_map.h) against the solved edge law by simulation and
// prints Markdown rows: Kolmogorov distance of each candidate map and the 95% sampling scale.
//   finite_n_accuracy hermite    BETA N SAMPLES THREADS SEED W...
//   finite_n_accuracy covariance BETA N P SAMPLES THREADS SEED W...   (bidiagonal model)
//   finite_n_accuracy dense      1    N P SAMPLES THREADS SEED W...   (real Gaussian data matrices)
// For each w the spike is the chosen map's (hermite_spike_for_w / covariance_spike_for_w); every
// candidate map is then applied to the same sample with its own (center, scale, w).
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "bench/finite_n_check.h"

using namespace edgelaw;

int main(int argc, char** argv) {
  if (argc < 8) {
    std::fprintf(stderr, "usage: see the header of finite_n_accuracy.cpp\n");
    return 2;
  }
  const std::string family = argv[1];
  const double beta = std::atof(argv[2]);
  const long n = std::atol(argv[3]);
  int a = 4;
  const long p = family == "hermite" ? 0 : std::atol(argv[a++]);
  const long samples = std::atol(argv[a++]);
  const int threads = std::atoi(argv[a++]);
  const std::uint64_t seed = std::strtoull(argv[a++], nullptr, 10);
  std::vector<double> ws;
  for (; a < argc; ++a) ws.push_back(std::atof(argv[a]));

  struct Candidate {
    const char* name;
    EdgeMap (*hermite)(double, long, double);
    EdgeMap (*covariance)(double, long, long, double);
  };
  const std::vector<Candidate> candidates = {
      {"chosen", hermite_edge_map, covariance_edge_map},
      {"no-scale", edge_map_candidates::hermite_shifted, edge_map_candidates::covariance_shifted},
      {"noise-free", [](double, long nn, double t) { return edge_map_candidates::hermite_noise_free(nn, t); },
       [](double, long nn, long pp, double l) { return edge_map_candidates::covariance_noise_free(nn, pp, l); }},
      {"exponential", [](double, long nn, double t) { return edge_map_candidates::hermite_exponential(nn, t); },
       [](double, long nn, long pp, double l) { return edge_map_candidates::covariance_exponential(nn, pp, l); }},
      {"leading", [](double, long nn, double t) { return edge_map_candidates::hermite_leading(nn, t); },
       [](double, long nn, long pp, double l) { return edge_map_candidates::covariance_leading(nn, pp, l); }},
  };
  auto map_of = [&](const Candidate& c, double spike) {
    return family == "hermite" ? c.hermite(beta, n, spike) : c.covariance(beta, n, p, spike);
  };
  std::vector<double> spikes, all_w;
  for (double w : ws) {
    const double s = family == "hermite" ? hermite_spike_for_w(beta, n, w) : covariance_spike_for_w(beta, n, p, w);
    spikes.push_back(s);
    for (const Candidate& c : candidates) all_w.push_back(map_of(c, s).w);
  }
  const double x_high = std::max(30.0, 12.0 + 8.0 / beta);
  const finite_n_check::LawCdf law(beta, all_w, 1e-6, -14.0 - 4.0 / beta, x_high, 0.02);
  std::printf("# %s beta %g n %ld p %ld samples %ld, law max cdf error %.1e\n", family.c_str(), beta, n, p, samples,
              law.max_error());
  std::printf("| w | spike |");
  for (const Candidate& c : candidates) std::printf(" %s |", c.name);
  std::printf(" 95%% scale |\n");
  for (std::size_t i = 0; i < ws.size(); ++i) {
    std::vector<double> lambda;
    const SampleOptions opt{samples, seed + 7919 * i, threads, true};
    if (family == "hermite")
      lambda = sample_top_eigenvalue(HermiteSpikeModel{beta, n, spikes[i]}, opt);
    else if (family == "covariance")
      lambda = sample_top_eigenvalue(LaguerreSpikeModel{beta, n, p, spikes[i]}, opt);
    else
      lambda = finite_n_check::dense_real_covariance_top(n, p, spikes[i], samples, seed + 7919 * i, threads);
    std::printf("| %g | %.5f |", ws[i], spikes[i]);
    double scale = 0;
    for (const Candidate& c : candidates) {
      const EdgeMap m = map_of(c, spikes[i]);
      const KolmogorovResult k = finite_n_check::distance_after_map(lambda, m, law);
      std::printf(" %.4f (w %.3g) |", k.distance, m.w);
      scale = k.critical_95;
    }
    std::printf(" %.4f |", scale);
    {  // mean and sd of the chosen map's x against the law's (solver moments)
      const EdgeMap m = map_of(candidates[0], spikes[i]);
      double s1 = 0, s2 = 0;
      for (double l : lambda) { const double x = (l - m.center) / m.scale; s1 += x; s2 += x * x; }
      const double mean = s1 / lambda.size(), sd = std::sqrt(s2 / lambda.size() - mean * mean);
      const Moments& lm = law.moments(m.w);
      std::printf(" mean %.4f law %.4f (se %.4f) sd %.4f law %.4f |\n", mean, lm.mean, sd / std::sqrt(double(lambda.size())), sd,
                  std::sqrt(lm.variance));
    }
    std::fflush(stdout);
  }
  return 0;
}
