// Double-precision Fredholm-determinant tables of the spiked beta = 2 law (see fredholm_beta2.h).
//
// Same formulas as tests/reference/fredholm.cpp (Bornemann 2010; Baik, Ben Arous, Peche 2005):
//   s_w(u) = exp(w^3/3 - w u) - int_0^inf e^{w y} Ai(u + y) dy      (form A, w < 1.5)
//          = int_0^inf e^{-w y} Ai(u - y) dy                          (form B, w >= 1.5),
// form B through s_w(x) and the recurrence s_w(x + t') = e^{-w (t' - t)} s_w(x + t)
// + int_t^{t'} e^{-w (t' - tau)} Ai(x + tau) dtau along the nodes. What is tuned for speed:
// double precision, Cholesky of I - K (Eigen), Ai from a cached table, a node rule fitted to
// the target, and (share_per_x) one factorisation per x for every w needing the same truncation.
#include "bench/fredholm_beta2.h"

#include <Eigen/Cholesky>
#include <Eigen/Dense>
#include <Eigen/LU>
#include <boost/math/special_functions/airy.hpp>

#include <algorithm>
#include <cmath>
#include <map>
#include <memory>
#include <mutex>
#include <thread>

namespace edgelaw::bench {

namespace {
constexpr double kTableStep = 1.0 / 64.0;
// Below this w form A cancels (like exp(w^3/3 - w u) / s_w(u)); above it form B is used.
constexpr double kFormBFrom = 1.5;
}  // namespace

AiryTable::AiryTable() {
  const int n = static_cast<int>(std::lround((kHigh - kLow) / kTableStep)) + 1;
  ai_.resize(n);
  aip_.resize(n);
  for (int j = 0; j < n; ++j) {
    const double z = kLow + j * kTableStep;
    ai_[j] = boost::math::airy_ai(z);
    aip_[j] = boost::math::airy_ai_prime(z);
  }
}

double AiryTable::operator()(double z) const {
  if (z >= kHigh) return 0.0;
  if (z < kLow) return boost::math::airy_ai(z);
  const int j = static_cast<int>(std::lround((z - kLow) / kTableStep));
  const double z0 = kLow + j * kTableStep, h = z - z0;  // |h| <= 1/128
  // Taylor series of y'' = z y about z0: b_{k+2} = (z0 h^2 b_k + h^3 b_{k-1}) / ((k+2)(k+1)).
  // With |z0| <= 100 and |h| <= 1/128 the terms fall by >= 100 per order: 9 terms reach 1e-18.
  const double zh2 = z0 * h * h, h3 = h * h * h;
  double bm1 = ai_[j], b0 = aip_[j] * h, b1 = 0.5 * zh2 * ai_[j];
  double sum = bm1 + b0 + b1;
  for (int k = 1; k <= 7; ++k) {
    const double bn = (zh2 * b0 + h3 * bm1) / ((k + 2.0) * (k + 1.0));
    sum += bn;
    bm1 = b0;
    b0 = b1;
    b1 = bn;
  }
  return sum;
}

namespace {

const AiryTable& airy() {
  static const AiryTable table;
  return table;
}

struct Rule {
  Eigen::ArrayXd x, w;  // on (0, 1)
};

// Gauss-Legendre nodes by Newton iteration in long double (library rules in double lose digits
// at 40-100 nodes, design notes section 4), cached per size.
const Rule& gauss_legendre(int m) {
  static std::mutex mu;
  static std::map<int, std::unique_ptr<Rule>> cache;
  std::lock_guard<std::mutex> lock(mu);
  auto& slot = cache[m];
  if (!slot) {
    slot = std::make_unique<Rule>();
    slot->x.resize(m);
    slot->w.resize(m);
    for (int i = 0; i < m; ++i) {
      long double t = std::cos(3.14159265358979323846L * (i + 0.75L) / (m + 0.5L)), dp = 1;
      for (int it = 0; it < 100; ++it) {
        long double p0 = 1, p1 = t;
        for (int k = 2; k <= m; ++k) {
          const long double p2 = ((2 * k - 1) * t * p1 - (k - 1) * p0) / k;
          p0 = p1;
          p1 = p2;
        }
        dp = m * (t * p1 - p0) / (t * t - 1);
        const long double dt = p1 / dp;
        t -= dt;
        if (std::fabs(dt) < 1e-19L && it > 2) break;
      }
      slot->x[m - 1 - i] = double((1 + t) / 2);
      slot->w[m - 1 - i] = double(1 / ((1 - t * t) * dp * dp));
    }
  }
  return *slot;
}

// Crude log|Ai| bound for choosing the truncation (over-estimates for z <= 1).
double log_ai_bound(double z) {
  if (z <= 1.0) return std::log(0.54);
  return -2.0 / 3.0 * z * std::sqrt(z) - 0.25 * std::log(z) - std::log(2.0 * std::sqrt(M_PI));
}

// Truncation L of (0, inf) with |Ai(x + L)| e^{g (x + L)} <= tol * max_{z >= x} (same).
double truncation(double x, double g, double log_tol) {
  double best = -1e300, z = x;
  for (int i = 0; i < 100000; ++i, z += 0.05) {
    const double phi = log_ai_bound(z) + g * z;
    best = std::max(best, phi);
    if (phi < best + log_tol && z > x + 1.0) return z - x;
  }
  return z - x;
}

// Everything one factorisation of I - K serves: the rows of the table sharing a truncation.
struct Group {
  QuadraturePlan plan;
  std::vector<int> rows;  // indices into w
};

class Evaluator {
 public:
  Evaluator(const std::vector<double>& w, double target) : w_(w), target_(target) {}

  // Fills cdf(r, col), survival(r, col) for the rows of the group at threshold x.
  void run(double x, const Group& g, RowMatrix& cdf, RowMatrix& survival, int col) {
    const int m = g.plan.nodes;
    const double L = g.plan.length;
    const Rule& rule = gauss_legendre(m);
    const Eigen::ArrayXd t = L * rule.x, W = L * rule.w, sw = W.sqrt();
    const AiryTable& ai = airy();
    A_.resize(m, m);
    for (int i = 0; i < m; ++i)
      for (int j = 0; j <= i; ++j) A_(i, j) = A_(j, i) = ai(x + t[i] + t[j]);
    B_ = (sw.matrix().asDiagonal() * A_ * sw.matrix().asDiagonal());
    M_.noalias() = -B_ * B_;
    M_.diagonal().array() += 1.0;
    Eigen::VectorXd a(m);
    for (int i = 0; i < m; ++i) a[i] = sw[i] * ai(x + t[i]);

    std::vector<int> spiked;
    for (int r : g.rows)
      if (std::isfinite(w_[r])) spiked.push_back(r);
    Eigen::MatrixXd S(m, static_cast<Eigen::Index>(spiked.size()));
    fill_form_b_cache(x, g, t, spiked);
    for (std::size_t c = 0; c < spiked.size(); ++c) {
      const double w = w_[spiked[c]];
      if (w < kFormBFrom) {
        const Eigen::VectorXd ew = (W * (w * t).exp()).matrix();
        S.col(c) = (sw * ((w * w * w / 3.0 - w * (x + t)).exp() - (A_ * ew).array())).matrix();
      } else {
        S.col(c) = (sw * form_b(w, t)).matrix();
      }
    }
    // I - K is symmetric positive definite; in the far left tail (F_2 ~ 1e-30) rounding can
    // make it numerically singular, and then the cdf is 0 to every digit a double shows.
    Eigen::LLT<Eigen::MatrixXd> llt(M_);
    double logdet = -INFINITY;
    Eigen::RowVectorXd r = Eigen::RowVectorXd::Zero(S.cols());
    if (llt.info() == Eigen::Success) {
      logdet = 2.0 * llt.matrixLLT().diagonal().array().log().sum();
      if (S.cols()) r = a.transpose() * llt.solve(S);
    } else {
      Eigen::PartialPivLU<Eigen::MatrixXd> lu(M_);
      const double det = lu.determinant();
      if (det > 0) logdet = std::log(det);
      if (S.cols()) r = a.transpose() * lu.solve(S);
    }
    const double f2 = std::exp(logdet), s2 = -std::expm1(logdet);
    std::size_t c = 0;
    for (int row : g.rows) {
      double f = f2, s = s2;
      if (std::isfinite(w_[row])) {
        f = f2 * (1.0 - r[c]);
        s = s2 + f2 * r[c];
        ++c;
      }
      cdf(row, col) = std::clamp(f, 0.0, 1.0);
      survival(row, col) = std::clamp(s, 0.0, 1.0);
    }
  }

 private:
  // Airy values for form B that do not depend on w: s_w(x) panels and the gaps between nodes.
  void fill_form_b_cache(double x, const Group& g, const Eigen::ArrayXd& t, const std::vector<int>& spiked) {
    double w_lo = INFINITY, w_hi = 0;
    for (int r : spiked)
      if (w_[r] >= kFormBFrom) {
        w_lo = std::min(w_lo, w_[r]);
        w_hi = std::max(w_hi, w_[r]);
      }
    if (!std::isfinite(w_lo)) return;
    const AiryTable& ai = airy();
    const Rule& pg = gauss_legendre(kPanelNodes);
    // e^{-w Y} |Ai| below target / 1000 for the smallest w of the group.
    const double Y = std::log(1e3 / target_) / w_lo;
    std::vector<double> y, wy, av;
    for (double y0 = 0; y0 < Y;) {
      const double h = std::min({1.0, 3.0 / std::sqrt(std::max(1.0, std::abs(x - y0))), 4.0 / w_hi});
      for (int k = 0; k < kPanelNodes; ++k) {
        y.push_back(y0 + h * pg.x[k]);
        wy.push_back(h * pg.w[k]);
        av.push_back(ai(x - y.back()));
      }
      y0 += h;
    }
    panel_y_ = Eigen::Map<Eigen::ArrayXd>(y.data(), y.size());
    panel_wa_ = Eigen::Map<Eigen::ArrayXd>(wy.data(), wy.size()) * Eigen::Map<Eigen::ArrayXd>(av.data(), av.size());
    const int m = static_cast<int>(t.size());
    const Rule& gr = gauss_legendre(kGapNodes);
    gap_span_.resize(m * kGapNodes);
    gap_wa_.resize(m * kGapNodes);
    for (int i = 0; i < m; ++i) {
      const double lo = i ? t[i - 1] : 0.0, hh = t[i] - lo;
      for (int k = 0; k < kGapNodes; ++k) {
        gap_span_[i * kGapNodes + k] = hh * (1.0 - gr.x[k]);  // t_i - tau
        gap_wa_[i * kGapNodes + k] = hh * gr.w[k] * ai(x + lo + hh * gr.x[k]);
      }
    }
    (void)g;
  }

  Eigen::ArrayXd form_b(double w, const Eigen::ArrayXd& t) const {
    const int m = static_cast<int>(t.size());
    double s = ((-w * panel_y_).exp() * panel_wa_).sum();  // s_w(x)
    const Eigen::ArrayXd gap = (-w * gap_span_).exp() * gap_wa_;
    Eigen::ArrayXd out(m);
    double prev = 0;
    for (int i = 0; i < m; ++i) {
      s = std::exp(-w * (t[i] - prev)) * s + gap.segment(i * kGapNodes, kGapNodes).sum();
      out[i] = s;
      prev = t[i];
    }
    return out;
  }

  static constexpr int kPanelNodes = 12, kGapNodes = 10;
  const std::vector<double>& w_;
  double target_;
  Eigen::MatrixXd A_, B_, M_;
  Eigen::ArrayXd panel_y_, panel_wa_, gap_span_, gap_wa_;
};

// Bucket of growth rates when rows share a factorisation (a longer truncation than a row
// needs costs nodes, never accuracy).
double bucket_of(double g) {
  if (g <= 0) return 0;
  return g <= 2 ? std::ceil(2 * g) / 2 : std::ceil(g);
}

// Node rule constants at target 1e-10, scaled by (digits + 2) / 12 for other targets. Fitted
// on 19 x 17 points (x = -10..8 step 1, w from -6 to +inf; `fredholm_table_bench --calibrate`):
// the smallest node count meeting target / 10 (and staying there 2 and 4 nodes further) is at
// most 0.96 of the rule at 1e-8 and 1e-10; the rule spends about 2.2 times the total minimum.
constexpr double kNodeBase = 22.0, kNodePerLength = 0.25, kNodePerOsc = 0.35;

}  // namespace

double growth_of(double w) { return (std::isfinite(w) && w < kFormBFrom) ? std::abs(w) : 0.0; }

PointValue fredholm_point(double x, double w, const QuadraturePlan& plan, double target) {
  const std::vector<double> ws{w};
  RowMatrix cdf(1, 1), survival(1, 1);
  Evaluator ev(ws, target);
  ev.run(x, Group{plan, {0}}, cdf, survival, 0);
  return {cdf(0, 0), survival(0, 0)};
}

PointValue fredholm_point(double x, double w, double target) {
  return fredholm_point(x, w, plan_for(x, growth_of(w), target), target);
}

// Node rule m = scale (c0 + c1 L + c2 |x|^{3/2}) (x < 0: oscillations of Ai on [x, 0]); the
// truncation keeps the neglected tail of the kernel and of s_w below target / 1000.
QuadraturePlan plan_for(double x, double growth, double target) {
  const double digits = -std::log10(target);
  QuadraturePlan p;
  p.length = truncation(x, growth, std::log(target * 1e-3));
  const double osc = x < 0 ? std::pow(-x, 1.5) : 0.0;
  const double scale = (digits + 2.0) / 12.0;
  p.nodes = static_cast<int>(std::ceil(scale * (kNodeBase + kNodePerLength * p.length + kNodePerOsc * osc)));
  p.nodes = std::clamp(p.nodes, 8, 400);
  return p;
}

FredholmResult fredholm_table(const std::vector<double>& x, const std::vector<double>& w, double target,
                              bool share_per_x, int threads) {
  FredholmResult out;
  const int rows = static_cast<int>(w.size()), cols = static_cast<int>(x.size());
  out.cdf.resize(rows, cols);
  out.survival.resize(rows, cols);
  airy();
  threads = std::max(1, threads);
  std::vector<long> facts(threads, 0);
  std::vector<double> nodes(threads, 0.0);
  auto work = [&](int id) {
    Evaluator ev(w, target);
    for (int col = id; col < cols; col += threads) {
      std::map<double, Group> groups;
      for (int r = 0; r < rows; ++r) {
        const double g = growth_of(w[r]);
        const double key = share_per_x ? bucket_of(g) : double(r);
        auto& grp = groups[key];
        if (grp.rows.empty()) grp.plan = plan_for(x[col], share_per_x ? key : g, target);
        grp.rows.push_back(r);
      }
      for (auto& [key, grp] : groups) {
        ev.run(x[col], grp, out.cdf, out.survival, col);
        ++facts[id];
        nodes[id] += grp.plan.nodes;
      }
    }
  };
  std::vector<std::thread> pool;
  for (int i = 1; i < threads; ++i) pool.emplace_back(work, i);
  work(0);
  for (auto& th : pool) th.join();
  for (int i = 0; i < threads; ++i) {
    out.factorisations += facts[i];
    out.mean_nodes += nodes[i];
  }
  out.mean_nodes /= std::max(1L, out.factorisations);
  return out;
}

}  // namespace edgelaw::bench
