// Tests of the tables library: file round trip, validation of bad files, atomic writes,
// interpolation accuracy against a closed-form Gaussian family, and range errors.
#include "tables/table_file.h"
#include "tables/table_seal.h"

#include <algorithm>
#include <gtest/gtest.h>
#include <hdf5.h>

#include <sys/stat.h>
#include <unistd.h>

#include <cmath>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <iterator>
#include <random>

namespace edgelaw::testing {
// Defined in tables_family.cpp.
extern double family_shift;
double family_mean(double w);
double family_scale(double w);
double family_cdf(double x, double w);
double family_survival(double x, double w);
double family_density(double x, double w);
LawTable make_family_table(const std::vector<double>& x, const std::vector<double>& w, double beta,
                           double stored_error);
std::vector<double> uniform_axis(double first, double step, int count);
}  // namespace edgelaw::testing

namespace edgelaw {
namespace {

namespace fs = std::filesystem;
using namespace edgelaw::testing;

// A fresh folder per test, removed afterwards.
class TablesTest : public ::testing::Test {
 protected:
  void SetUp() override {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ = fs::path("tables_test_tmp") / (std::string(info->name()) + "_" + std::to_string(::getpid()));
    fs::remove_all(dir_);
    fs::create_directories(dir_);
    family_shift = 0;
  }
  void TearDown() override {
    set_table_write_hook({});
    fs::permissions(dir_, fs::perms::owner_all);
    fs::remove_all(dir_);
  }
  std::string file(const std::string& name) const { return (dir_ / name).string(); }
  std::vector<std::string> listing() const {
    std::vector<std::string> names;
    for (const auto& e : fs::directory_iterator(dir_)) names.push_back(e.path().filename().string());
    return names;
  }
  fs::path dir_;
};

// Small but complete: 4 finite w rows and the +inf row, x step 0.05.
LawTable small_table(double beta = 2.0) {
  std::vector<double> w = {-1.0, -0.5, 0.0, 0.5, kInf};
  return make_family_table(uniform_axis(-7.0, 0.05, 241), w, beta, 1e-12);
}

TableMetadata small_metadata() {
  TableMetadata m;
  m.title = "spiked edge law, beta = 2 (synthetic Gaussian family)";
  const char* argv[] = {"edgelaw", "solve", "--beta", "2"};
  m.history = make_history_line("edgelaw", "0.1.0", 4, argv);
  m.settings["target_error"] = 1e-10;
  m.settings["max_levels"] = std::int64_t{5};
  m.settings["method"] = std::string("theta method of lines, BDF");
  return m;
}

// Checks that an exception message is one line and mentions `needle`.
template <class Error, class F>
void expect_error(F&& f, const std::string& needle) {
  try {
    f();
    ADD_FAILURE() << "no exception; expected one mentioning '" << needle << "'";
  } catch (const Error& e) {
    const std::string what = e.what();
    EXPECT_NE(what.find(needle), std::string::npos) << what;
    EXPECT_EQ(what.find('\n'), std::string::npos) << what;
  } catch (const std::exception& e) {
    ADD_FAILURE() << "wrong exception type: " << e.what();
  }
}

bool same(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }

void expect_bit_identical(const RowMatrix& a, const RowMatrix& b, const char* name) {
  ASSERT_EQ(a.rows(), b.rows()) << name;
  ASSERT_EQ(a.cols(), b.cols()) << name;
  for (Eigen::Index k = 0; k < a.size(); ++k)
    ASSERT_TRUE(same(a.data()[k], b.data()[k])) << name << " entry " << k;
}

void expect_same_table(const LawTable& a, const LawTable& b) {
  EXPECT_TRUE(same(a.beta, b.beta));
  ASSERT_EQ(a.x.size(), b.x.size());
  ASSERT_EQ(a.w.size(), b.w.size());
  for (std::size_t k = 0; k < a.x.size(); ++k) ASSERT_TRUE(same(a.x[k], b.x[k]));
  for (std::size_t k = 0; k < a.w.size(); ++k) ASSERT_TRUE(same(a.w[k], b.w[k]));
  expect_bit_identical(a.cdf, b.cdf, "cdf");
  expect_bit_identical(a.survival, b.survival, "survival");
  expect_bit_identical(a.density, b.density, "density");
  expect_bit_identical(a.cdf_error, b.cdf_error, "cdf_error");
  expect_bit_identical(a.survival_error, b.survival_error, "survival_error");
  expect_bit_identical(a.density_error, b.density_error, "density_error");
  ASSERT_EQ(a.moments.size(), b.moments.size());
  for (std::size_t j = 0; j < a.moments.size(); ++j) {
    EXPECT_TRUE(same(a.moments[j].mean, b.moments[j].mean));
    EXPECT_TRUE(same(a.moments[j].variance, b.moments[j].variance));
    EXPECT_TRUE(same(a.moments[j].skewness, b.moments[j].skewness));
    EXPECT_TRUE(same(a.moments[j].excess_kurtosis, b.moments[j].excess_kurtosis));
    EXPECT_TRUE(same(a.moment_errors[j].variance, b.moment_errors[j].variance));
  }
  EXPECT_EQ(a.summary.intervals, b.summary.intervals);
  EXPECT_EQ(a.summary.steps, b.summary.steps);
  EXPECT_EQ(a.summary.error_test_failures, b.summary.error_test_failures);
  EXPECT_TRUE(same(a.summary.observed_order, b.summary.observed_order));
  EXPECT_TRUE(same(a.summary.time_tolerance, b.summary.time_tolerance));
  EXPECT_EQ(a.summary.converged, b.summary.converged);
}

// Opens an existing file read-write with the raw HDF5 API to damage it on purpose.
void overwrite_dataset(const std::string& path, const char* name, const std::function<void(std::vector<double>&)>& edit) {
  hid_t f = H5Fopen(path.c_str(), H5F_ACC_RDWR, H5P_DEFAULT);
  ASSERT_GE(f, 0);
  hid_t d = H5Dopen2(f, name, H5P_DEFAULT);
  ASSERT_GE(d, 0);
  hid_t s = H5Dget_space(d);
  std::vector<double> v(static_cast<std::size_t>(H5Sget_simple_extent_npoints(s)));
  ASSERT_GE(H5Dread(d, H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, v.data()), 0);
  edit(v);
  ASSERT_GE(H5Dwrite(d, H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, v.data()), 0);
  H5Sclose(s);
  H5Dclose(d);
  H5Fclose(f);
  seal_table_file(path);  // a deliberate edit: the integrity header is made to match again
}

std::vector<char> slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}
void spill(const std::string& path, const std::vector<char>& bytes) {
  std::ofstream out(path, std::ios::binary | std::ios::trunc);
  out.write(bytes.data(), static_cast<std::streamsize>(bytes.size()));
}

// ---- round trip ---------------------------------------------------------------------------

TEST_F(TablesTest, RoundTripIsBitIdentical) {
  // Round trip exactness: common practice, no source (HDF5 stores IEEE doubles verbatim).
  const LawTable t = small_table();
  const TableMetadata m = small_metadata();
  write_table(file("law.h5"), t, m);
  const LawTableFile f = LawTableFile::open(file("law.h5"));
  EXPECT_FALSE(f.is_sweep());
  EXPECT_EQ(f.schema_version(), kTableSchemaVersion);
  expect_same_table(t, f.table());
  EXPECT_EQ(f.metadata().title, m.title);
  EXPECT_EQ(f.metadata().history, m.history);
  EXPECT_EQ(f.metadata().conventions, "CF-1.8");
  EXPECT_EQ(f.metadata().settings, m.settings);
  EXPECT_EQ(f.w().back(), kInf);
  // Only the writer's files are in the folder: the temporary was renamed away.
  EXPECT_EQ(listing(), std::vector<std::string>{"law.h5"});
}

TEST_F(TablesTest, NodeValuesAreTheStoredValues) {
  // At grid points the reader returns the stored numbers exactly (common practice, no source).
  const LawTable t = small_table();
  write_table(file("law.h5"), t, small_metadata());
  const LawTableFile f = LawTableFile::open(file("law.h5"));
  for (std::size_t j = 0; j < t.w.size(); ++j)
    for (std::size_t i = 0; i < t.x.size(); i += 17) {
      const auto jj = static_cast<Eigen::Index>(j), ii = static_cast<Eigen::Index>(i);
      EXPECT_TRUE(same(f.cdf(t.x[i], t.w[j]).value, t.cdf(jj, ii)));
      EXPECT_TRUE(same(f.survival(t.x[i], t.w[j]).value, t.survival(jj, ii)));
      EXPECT_TRUE(same(f.p_value(t.x[i], t.w[j]).value, t.survival(jj, ii)));
      EXPECT_TRUE(same(f.density(t.x[i], t.w[j]).value, t.density(jj, ii)));
    }
}

TEST_F(TablesTest, StoredQuantilesMatchTheExactFamily) {
  // Gaussian quantile m + s * Phi^-1(p): the cdf is inverted numerically here, so this
  // compares against the exact inverse obtained by bisection on erfc (common practice, no
  // source). x step 0.05: Hermite error <= h^4/384 max|F''''| ~ 1e-8, divided by the density.
  const LawTable t = small_table();
  write_table(file("law.h5"), t, small_metadata());
  const LawTableFile f = LawTableFile::open(file("law.h5"));
  const auto& p = f.probability_levels();
  ASSERT_EQ(p.size(), 17u);
  for (std::size_t j = 0; j < t.w.size(); ++j)
    for (std::size_t k = 0; k < p.size(); ++k) {
      double a = -7, b = 5;
      for (int it = 0; it < 200; ++it) {
        const double mid = 0.5 * (a + b);
        (p[k] < 0.5 ? family_cdf(mid, t.w[j]) < p[k] : family_survival(mid, t.w[j]) > 1 - p[k]) ? a = mid : b = mid;
      }
      const double q = f.stored_quantile()(static_cast<Eigen::Index>(j), static_cast<Eigen::Index>(k));
      const double qe = f.stored_quantile_error()(static_cast<Eigen::Index>(j), static_cast<Eigen::Index>(k));
      EXPECT_NEAR(q, a, 1e-7) << "w=" << t.w[j] << " p=" << p[k];
      EXPECT_LE(std::abs(q - a), qe + 1e-14) << "error estimate too small at w=" << t.w[j] << " p=" << p[k];
      EXPECT_TRUE(same(q, f.quantile(p[k], t.w[j]).value));  // reader and writer agree
    }
}

// ---- interpolation accuracy ---------------------------------------------------------------

TEST(TablesInterpolation, GaussianFamilyAccuracyAtStep001And005) {
  // Reference: the closed-form family (erfc). Grid: x step 0.01 on [-8, 6], w step 0.05 on
  // [-3, 3] plus +inf. The user's target is "well below 1e-10". For scale: cubic Hermite with
  // exact slopes would err by up to h^4/384 max|F^(4)| ~ 2e-11 (Burden & Faires, Numerical
  // Analysis, Thm 3.9); the quintic used here is sixth order, and 6-point Lagrange in w was
  // measured at 2.7e-11, hence 8 points by default.
  family_shift = 0;
  std::vector<double> w = uniform_axis(-3.0, 0.05, 121);
  w.push_back(kInf);
  const LawInterpolator interp(make_family_table(uniform_axis(-8.0, 0.01, 1401), w, 2.0, 0.0));
  std::mt19937_64 rng(20240601);
  std::uniform_real_distribution<double> ux(-8.0, 6.0), uw(-3.0, 3.0), up(0.0, 1.0);
  double cdf_err = 0, surv_err = 0, dens_err = 0, surv_rel = 0, cdf_rel = 0, q_err = 0;
  int underestimated = 0;
  const int n = 20000;
  for (int k = 0; k < n; ++k) {
    const double x = ux(rng), wv = (k % 10 == 0) ? kInf : uw(rng);
    const Estimate c = interp.cdf(x, wv), s = interp.survival(x, wv), d = interp.density(x, wv);
    const double ce = std::abs(c.value - family_cdf(x, wv)), se = std::abs(s.value - family_survival(x, wv));
    const double de = std::abs(d.value - family_density(x, wv));
    cdf_err = std::max(cdf_err, ce);
    surv_err = std::max(surv_err, se);
    dens_err = std::max(dens_err, de);
    if (family_cdf(x, wv) > 1e-300) cdf_rel = std::max(cdf_rel, ce / family_cdf(x, wv));
    if (family_survival(x, wv) > 1e-300) surv_rel = std::max(surv_rel, se / family_survival(x, wv));
    // The estimate must cover the actual error down to 1e-12: below that level the
    // order-difference and sampled-derivative estimates are indicative only (measured
    // misses stay below 1e-12), and stored solver errors (>= 1e-11) dominate anyway.
    underestimated += (ce > c.error + 1e-12) + (se > s.error + 1e-12) + (de > d.error + 1e-12);
    const double p = std::clamp(up(rng), 1e-4, 1 - 1e-4);
    const Estimate q = interp.quantile(p, wv);
    // Exact Gaussian quantile check through the cdf: |F(q) - p| / density(q) is the x error.
    const double back = p < 0.5 ? family_cdf(q.value, wv) - p : (1 - p) - family_survival(q.value, wv);
    q_err = std::max(q_err, std::abs(back) / family_density(q.value, wv));
  }
  std::cout << "[ accuracy ] max abs error: cdf " << cdf_err << ", survival " << surv_err << ", density "
            << dens_err << ", quantile " << q_err << "; max rel error: cdf " << cdf_rel << ", survival "
            << surv_rel << "; estimates below actual: " << underestimated << " of " << 3 * n << "\n";
  // Measured 1.2e-13 (cdf, survival), 1.8e-13 (density), 5.9e-13 (quantile): dominated by
  // the 8-point w Lagrange step; limits at ~4x the measurement leave room for other libm
  // roundings yet fail long before the 1e-10 target is approached.
  EXPECT_LT(cdf_err, 5e-13);
  EXPECT_LT(surv_err, 5e-13);
  EXPECT_LT(dens_err, 1e-12);
  EXPECT_LT(q_err, 3e-12);
  // Log-space interpolation keeps relative accuracy in the tails (cdf down to 1e-15 at
  // x = -8 here); measured 3.6e-13 (cdf) and 2.1e-12 (survival).
  EXPECT_LT(cdf_rel, 1e-11);
  EXPECT_LT(surv_rel, 1e-11);
  EXPECT_EQ(underestimated, 0);
}

TEST(TablesInterpolation, ErrorEstimateTracksCoarseGrids) {
  // On coarse x grids (steps 0.2, 0.1, 0.05, +inf row only) the interpolation error is
  // large; the estimate must still cover it, and the error must fall by ~2^6 per halving of
  // h (quintic Hermite is sixth order; Burden & Faires, Numerical Analysis, sec. 3.4).
  family_shift = 0;
  double previous = 0;
  for (double hx : {0.2, 0.1, 0.05}) {
    const int nx = static_cast<int>(std::lround(12.0 / hx)) + 1;
    const LawInterpolator interp(make_family_table(uniform_axis(-7.0, hx, nx), {kInf}, 2.0, 0.0));
    double worst = 0;
    for (int k = 0; k < 2001; ++k) {
      const double x = -6.0 + 10.0 * k / 2000.0;
      const Estimate c = interp.cdf(x, kInf);
      const double e = std::abs(c.value - family_cdf(x, kInf));
      worst = std::max(worst, e);
      EXPECT_LE(e, c.error + 1e-12) << "hx=" << hx << " x=" << x;  // floor as above
    }
    if (previous > 0) {
      std::cout << "[ order ] x step " << hx << ": max cdf error " << worst << ", ratio " << previous / worst << "\n";
      EXPECT_GT(previous / worst, 32.0) << "hx=" << hx;  // at least fifth order
    }
    previous = worst;
  }
}

// ---- range errors -------------------------------------------------------------------------

TEST_F(TablesTest, QueriesOutsideTheTableThrow) {
  // Refusing to extrapolate: the user's requirement; common practice, no source.
  write_table(file("law.h5"), small_table(), small_metadata());
  const LawTableFile f = LawTableFile::open(file("law.h5"));
  expect_error<TableRangeError>([&] { f.cdf(-7.01, 0.0); }, "outside the table's range");
  expect_error<TableRangeError>([&] { f.survival(5.01, 0.0); }, "outside the table's range");
  expect_error<TableRangeError>([&] { f.density(0.0, -1.5); }, "w = -1.5 is outside");
  expect_error<TableRangeError>([&] { f.cdf(0.0, 0.7); }, "nothing is interpolated between");
  expect_error<TableRangeError>([&] { f.cdf(std::nan(""), 0.0); }, "x is NaN");
  expect_error<TableRangeError>([&] { f.cdf(0.0, std::nan("")); }, "w is NaN");
  expect_error<TableRangeError>([&] { f.quantile(0.0, 0.0); }, "strictly between 0 and 1");
  expect_error<TableRangeError>([&] { f.quantile(1e-300, 0.0); }, "outside the table's cdf range");
  expect_error<TableRangeError>([&] { f.cdf(0.0, 0.0, 3.0); }, "beta = 3 is outside");
  // The +inf row itself is served, and between finite rows values are interpolated.
  EXPECT_NEAR(f.cdf(-1.8, kInf).value, 0.5, 1e-9);
  // 4 finite rows 0.5 apart: a coarse w grid, so only the estimate's honesty is checked.
  const Estimate c = f.cdf(0.3, 0.25);
  EXPECT_LE(std::abs(c.value - family_cdf(0.3, 0.25)), c.error);
  EXPECT_LT(c.error, 5e-3);
}

// ---- bad files ----------------------------------------------------------------------------

TEST_F(TablesTest, DamagedAndForeignFilesGiveOneClearError) {
  // Each check: the user's list of bad inputs; messages checked for the key phrase.
  const std::string good = file("good.h5");
  write_table(good, small_table(), small_metadata());
  const std::vector<char> bytes = slurp(good);

  expect_error<TableFormatError>([&] { LawTableFile::open(file("missing.h5")); }, "does not exist");

  spill(file("empty.h5"), {});
  expect_error<TableFormatError>([&] { LawTableFile::open(file("empty.h5")); }, "is empty (0 bytes)");

  std::vector<char> noise(4096);
  std::mt19937 rng(7);
  for (char& c : noise) c = static_cast<char>(rng());
  spill(file("noise.h5"), noise);
  expect_error<TableFormatError>([&] { LawTableFile::open(file("noise.h5")); }, "is not an HDF5 file");

  spill(file("half.h5"), std::vector<char>(bytes.begin(), bytes.begin() + static_cast<long>(bytes.size() / 2)));
  expect_error<TableFormatError>([&] { LawTableFile::open(file("half.h5")); }, "truncated or damaged");

  {  // valid HDF5 written by someone else
    hid_t f = H5Fcreate(file("foreign.h5").c_str(), H5F_ACC_TRUNC, H5P_DEFAULT, H5P_DEFAULT);
    hsize_t n = 3;
    hid_t s = H5Screate_simple(1, &n, nullptr);
    hid_t d = H5Dcreate2(f, "temperature", H5T_IEEE_F64LE, s, H5P_DEFAULT, H5P_DEFAULT, H5P_DEFAULT);
    const double v[3] = {1, 2, 3};
    H5Dwrite(d, H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, v);
    H5Dclose(d);
    H5Sclose(s);
    H5Fclose(f);
  }
  expect_error<TableFormatError>([&] { LawTableFile::open(file("foreign.h5")); }, "not an edgelaw table");

  TableMetadata future = small_metadata();
  future.schema_version = kTableSchemaVersion + 1;
  write_table(file("future.h5"), small_table(), future);
  expect_error<TableFormatError>([&] { LawTableFile::open(file("future.h5")); },
                                 "schema version 2, but this reader supports versions up to 1");

  fs::copy_file(good, file("nan.h5"));
  overwrite_dataset(file("nan.h5"), "cdf", [](std::vector<double>& v) { std::fill(v.begin(), v.end(), std::nan("")); });
  expect_error<TableFormatError>([&] { LawTableFile::open(file("nan.h5")); }, "is not a finite value in [0, 1]");

  fs::copy_file(good, file("unsorted.h5"));
  overwrite_dataset(file("unsorted.h5"), "x", [](std::vector<double>& v) { std::swap(v[10], v[11]); });
  expect_error<TableFormatError>([&] { LawTableFile::open(file("unsorted.h5")); },
                                 "axis 'x' is not strictly increasing at index 11");

  fs::copy_file(good, file("inf_inside.h5"));
  overwrite_dataset(file("inf_inside.h5"), "w", [](std::vector<double>& v) { v[1] = kInf; });
  expect_error<TableFormatError>([&] { LawTableFile::open(file("inf_inside.h5")); }, "only the last w may be +inf");

  fs::copy_file(good, file("swapped.h5"));
  overwrite_dataset(file("swapped.h5"), "log_cdf", [](std::vector<double>& v) { v[5] *= 0.5; });
  expect_error<TableFormatError>([&] { LawTableFile::open(file("swapped.h5")); }, "is not the logarithm");
}

// Files that missed their target mark the entries that did (FORMAT.md, "Accuracy mark"): the
// mark follows the stored errors against setting_target_error, converged files carry none,
// and a mark that disagrees with the errors is refused.
TEST_F(TablesTest, EntriesOverTheTargetAreMarked) {
  LawTable t = small_table();
  t.summary.converged = false;
  t.cdf_error(1, 7) = 3e-10;       // over the 1e-10 target of small_metadata
  t.survival_error(3, 200) = 2e-9;
  const std::string path = file("missed.h5");
  write_table(path, t, small_metadata());
  hid_t f = H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT);
  ASSERT_GE(f, 0);
  hid_t d = H5Dopen2(f, "within_target", H5P_DEFAULT);
  ASSERT_GE(d, 0);
  std::vector<double> mark(static_cast<std::size_t>(t.cdf.size()));
  ASSERT_GE(H5Dread(d, H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, mark.data()), 0);
  H5Dclose(d);
  H5Fclose(f);
  const auto nx = static_cast<std::size_t>(t.cdf.cols());
  EXPECT_EQ(mark[1 * nx + 7], 0.0);
  EXPECT_EQ(mark[3 * nx + 200], 0.0);
  EXPECT_EQ(std::count(mark.begin(), mark.end(), 0.0), 2);
  EXPECT_EQ(std::count(mark.begin(), mark.end(), 1.0), static_cast<long>(mark.size()) - 2);
  const LawTableFile back = LawTableFile::open(path);
  EXPECT_FALSE(back.table().summary.converged);

  const std::string good = file("good.h5");
  write_table(good, small_table(), small_metadata());
  f = H5Fopen(good.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT);
  EXPECT_EQ(H5Lexists(f, "within_target", H5P_DEFAULT), 0) << "a file within its target needs no mark";
  H5Fclose(f);

  overwrite_dataset(path, "within_target", [](std::vector<double>& v) { v[0] = 0.0; });
  expect_error<TableFormatError>([&] { LawTableFile::open(path); }, "disagrees with the stored errors");
}

// A write removes what killed writers of the same target on this host left (their pid is not
// running), and nothing else: not a live writer's temporary (pid 1 always runs), not another
// host's, not another target's. Host names here use the writer's rule ([A-Za-z0-9.-]).
TEST_F(TablesTest, StaleTemporariesOfTheTargetAreRemoved) {
  char host[256] = {};
  ASSERT_EQ(::gethostname(host, sizeof host - 1), 0);
  std::string tag;
  for (const char* c = host; *c && tag.size() < 64; ++c)
    tag += (std::isalnum(static_cast<unsigned char>(*c)) || *c == '.' || *c == '-') ? *c : '_';
  // A pid that is surely not running: above the kernel's pid_max (at most 2^22).
  const std::string dead = file(".t.h5.tmp-" + tag + "-9999999-0");
  const std::string live = file(".t.h5.tmp-" + tag + "-1-0");
  const std::string elsewhere = file(".t.h5.tmp-another-host.example-9999999-0");
  const std::string other_target = file(".u.h5.tmp-" + tag + "-9999999-0");
  for (const auto& p : {dead, live, elsewhere, other_target}) spill(p, {'x'});
  write_table(file("t.h5"), small_table(), small_metadata());
  EXPECT_FALSE(fs::exists(dead));
  EXPECT_TRUE(fs::exists(live));
  EXPECT_TRUE(fs::exists(elsewhere));
  EXPECT_TRUE(fs::exists(other_target));
  EXPECT_NO_THROW(LawTableFile::open(file("t.h5")));
}

TEST_F(TablesTest, FilesWithoutChecksumsAreRefused) {
  // The reader only reads the writer's layout (chunked, Fletcher-32); without the checksum a
  // damaged chunk index sends HDF5 1.10.8 past its buffers (tests/fuzz/table_reader_fuzz).
  TableWriteOptions plain;
  plain.checksums = false;
  write_table(file("plain.h5"), small_table(), small_metadata(), plain);
  expect_error<TableFormatError>([&] { LawTableFile::open(file("plain.h5")); },
                                 "is not chunked with a Fletcher-32 checksum");
}

TEST_F(TablesTest, ChecksumDetectsOneFlippedBit) {
  // Fletcher-32 detects every single-bit error in a chunk (Fletcher, IEEE Trans. Commun. 30
  // (1982)); the flipped bit is located by searching the file for one cdf row's bytes.
  const LawTable t = small_table();
  write_table(file("law.h5"), t, small_metadata());
  std::vector<char> bytes = slurp(file("law.h5"));
  const char* row = reinterpret_cast<const char*>(t.cdf.row(2).data());
  const std::size_t len = 8 * 64;
  auto it = std::search(bytes.begin(), bytes.end(), row + 800, row + 800 + len);
  ASSERT_NE(it, bytes.end()) << "cdf row bytes not found in the file";
  ASSERT_EQ(std::search(it + 1, bytes.end(), row + 800, row + 800 + len), bytes.end()) << "pattern not unique";
  *(it + 100) ^= 0x10;
  spill(file("flipped.h5"), bytes);
  // First line of defence: the CRC-32 of the integrity header (CRC-32 detects every burst
  // error up to 32 bits; Peterson & Brown, Proc. IRE 49 (1961)), before HDF5 reads anything.
  expect_error<TableFormatError>([&] { LawTableFile::open(file("flipped.h5")); }, "is truncated or damaged");
  // Second: with the header recomputed, HDF5's Fletcher-32 on the chunk still refuses it.
  seal_table_file(file("flipped.h5"));
  expect_error<TableFormatError>([&] { LawTableFile::open(file("flipped.h5")); }, "dataset 'cdf' cannot be read (checksum");
}

TEST_F(TablesTest, IntegrityHeaderCoversEveryByte) {
  // Any change after the header, and a truncation by one byte, is refused before HDF5 runs.
  write_table(file("law.h5"), small_table(), small_metadata());
  EXPECT_EQ(check_table_seal(file("law.h5")), SealCheck::kValid);
  const std::vector<char> bytes = slurp(file("law.h5"));
  for (std::size_t at : {kTableUserBlock, kTableUserBlock + 1000, bytes.size() - 1}) {
    std::vector<char> changed = bytes;
    changed[at] ^= 0x01;
    spill(file("changed.h5"), changed);
    EXPECT_EQ(check_table_seal(file("changed.h5")), SealCheck::kMismatch) << "byte " << at;
  }
  spill(file("short.h5"), std::vector<char>(bytes.begin(), bytes.end() - 1));
  expect_error<TableFormatError>([&] { LawTableFile::open(file("short.h5")); }, "is truncated or damaged");
}

// ---- writing ------------------------------------------------------------------------------

TEST_F(TablesTest, UnwritableDestinationsFailCleanly) {
  // Clear errors and no file left behind: the user's requirement (atomic-write rules).
  expect_error<TableWriteError>([&] { write_table(file("no/such/folder/law.h5"), small_table(), small_metadata()); },
                                "does not exist");
  spill(file("plain"), {'a'});
  expect_error<TableWriteError>([&] { write_table(file("plain/law.h5"), small_table(), small_metadata()); },
                                "does not exist");
  // /proc refuses new files even for root, so this case fails on every Linux machine.
  expect_error<TableWriteError>([&] { write_table("/proc/edgelaw_table.h5", small_table(), small_metadata()); },
                                "cannot create");
  EXPECT_FALSE(fs::exists("/proc/edgelaw_table.h5"));
  if (::geteuid() != 0) {  // permission bits do not bind root
    fs::create_directories(dir_ / "locked");
    fs::permissions(dir_ / "locked", fs::perms::owner_read | fs::perms::owner_exec);
    expect_error<TableWriteError>([&] { write_table(file("locked/law.h5"), small_table(), small_metadata()); },
                                  "cannot create");
    EXPECT_TRUE(fs::is_empty(dir_ / "locked"));
    fs::permissions(dir_ / "locked", fs::perms::owner_all);
  }
  EXPECT_EQ(listing(), std::vector<std::string>{"plain"});
}

TEST_F(TablesTest, FailureMidwayLeavesOldFileAndNoTemporary) {
  // Atomic replacement: an earlier good file survives a failed rewrite; common practice
  // (write-fsync-rename), no source.
  LawTable old_table = small_table();
  write_table(file("law.h5"), old_table, small_metadata());
  for (const char* stage : {"created", "datasets", "closed"}) {
    set_table_write_hook([stage](std::string_view s) {
      if (s == stage) throw std::runtime_error(std::string("simulated failure at ") + stage);
    });
    family_shift = 0.25;  // the new table differs from the old one
    expect_error<TableWriteError>([&] { write_table(file("law.h5"), small_table(), small_metadata()); },
                                  std::string("simulated failure at ") + stage);
    expect_error<TableWriteError>([&] { write_table(file("fresh.h5"), small_table(), small_metadata()); },
                                  "simulated failure");
    EXPECT_EQ(listing(), std::vector<std::string>{"law.h5"}) << stage;
  }
  set_table_write_hook({});
  expect_same_table(old_table, LawTableFile::open(file("law.h5")).table());

  // Invalid input is refused before any file is created.
  LawTable bad = small_table();
  bad.survival(1, 3) = std::nan("");
  expect_error<TableError>([&] { write_table(file("bad.h5"), bad, small_metadata()); }, "survival[w=-0.5");
  EXPECT_EQ(listing(), std::vector<std::string>{"law.h5"});
}

TEST_F(TablesTest, SweepRoundTripAndBetaInterpolation) {
  // Each beta gets a different mean shift c(beta) = 0.2 / beta so beta interpolation has
  // something to do; the reference is the closed-form family (erfc) at the shifted mean.
  std::vector<LawTable> tables;
  const std::vector<double> betas = {1.0, 2.0, 3.0, 4.0, 6.0};
  const std::vector<double> w = {-1.0, -0.5, 0.0, 0.5, 1.0, 1.5, kInf};
  for (double b : betas) {
    family_shift = 0.2 / b;
    tables.push_back(make_family_table(uniform_axis(-7.0, 0.05, 241), w, b, 1e-12));
  }
  write_sweep_table(file("sweep.h5"), tables, small_metadata());
  const LawTableFile f = LawTableFile::open(file("sweep.h5"));
  ASSERT_TRUE(f.is_sweep());
  ASSERT_EQ(f.betas(), betas);
  for (std::size_t b = 0; b < betas.size(); ++b) expect_same_table(tables[b], f.table(b));
  expect_error<TableRangeError>([&] { f.cdf(0.0, 0.0); }, "is a beta sweep; pass beta");
  expect_error<TableRangeError>([&] { f.cdf(0.0, 0.0, 0.5); }, "beta = 0.5 is outside");
  // At a stored beta: the slice itself.
  EXPECT_TRUE(same(f.cdf(0.123, 0.2, 2.0).value, f.interpolator(1).cdf(0.123, 0.2).value));
  // Between betas: cubic Lagrange in beta of a 1/beta shift; the estimate must cover the error.
  for (double beta : {1.5, 2.5, 5.0}) {
    family_shift = 0.2 / beta;
    for (double x : {-2.5, -1.0, 0.4}) {
      const Estimate c = f.cdf(x, 0.2, beta);
      const double exact = family_cdf(x, 0.2);
      EXPECT_LE(std::abs(c.value - exact), c.error) << "beta=" << beta << " x=" << x;
      EXPECT_LT(std::abs(c.value - exact), 5e-3) << "beta=" << beta << " x=" << x;
    }
    const Estimate q = f.quantile(0.9, 0.2, beta);
    EXPECT_NEAR(family_cdf(q.value, 0.2), 0.9, 5e-3);
  }
}

}  // namespace
}  // namespace edgelaw
