// Tests of the command-line library: the table command's file against the solver, the
// sweep helpers (beta lists, parts, slice names) and the quantities stored in a table.
#include "cli/commands.h"
#include "cli/sweep.h"

#include <gtest/gtest.h>
#include <hdf5.h>
#include <unistd.h>

#include <cmath>
#include <filesystem>
#include <string>
#include <vector>

namespace edgelaw {
namespace {

namespace fs = std::filesystem;

// TW_2 quantiles from the Fredholm determinant (Bornemann 2010 method), design notes section 4.
constexpr double kTw2Quantile90 = -0.5968512971173513;
constexpr double kTw2Quantile95 = -0.23247446976400488;
constexpr double kTw2Quantile99 = 0.4776360473907985;

// One small beta = 2 table written by run_table, and the solver's own answer to the same
// request. x covers [-8, 6]: nearly all the mass except for the supercritical row w = -1.
// A coarse angle grid and a 1e-7 target keep the solve to about 2 s.
class TableCommandTest : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    dir_ = fs::path("cli_test_tmp_" + std::to_string(::getpid()));
    fs::remove_all(dir_);
    fs::create_directories(dir_);
    command_.beta = 2;
    command_.grid.x_min = -8;
    command_.grid.x_max = 6;
    command_.grid.x_step = 0.1;
    command_.grid.w_min = -1;
    command_.grid.w_max = 1;
    command_.grid.w_step = 1;
    command_.grid.target = 1e-7;
    command_.grid.base_intervals = 100;
    command_.output = (dir_ / "beta2.h5").string();
    const char* argv[] = {"edgelaw", "table", "--target", "1e-7"};
    exit_code_ = run_table(command_, Invocation{4, argv, "test"});

    LawRequest req = grid_request(command_.grid);
    req.beta = command_.beta;
    solved_ = solve_law(req, grid_solver_options(command_.grid));
  }
  static void TearDownTestSuite() { fs::remove_all(dir_); }

  static inline fs::path dir_;
  static inline TableCommand command_;
  static inline int exit_code_ = -1;
  static inline LawTable solved_;
};

TEST_F(TableCommandTest, FileEqualsSolverValues) {
  // Exact equality: the solver is deterministic (serial CVODE, no randomness) and HDF5
  // float64 storage is lossless. Common practice, no source.
  ASSERT_EQ(exit_code_, 0);
  const LawTableFile f = LawTableFile::open(command_.output);
  const LawTable& t = f.table();
  EXPECT_EQ(t.x, solved_.x);
  EXPECT_EQ(t.w, solved_.w);
  EXPECT_TRUE(t.cdf == solved_.cdf);
  EXPECT_TRUE(t.survival == solved_.survival);
  EXPECT_TRUE(t.density == solved_.density);
  EXPECT_TRUE(t.cdf_error == solved_.cdf_error);
  EXPECT_TRUE(t.survival_error == solved_.survival_error);
  EXPECT_TRUE(t.density_error == solved_.density_error);
  EXPECT_TRUE(std::isinf(t.w.back()));  // the Tracy-Widom row is there by default
}

TEST_F(TableCommandTest, MomentsEqualSolverMoments) {
  // Exact equality, as above. Plus the TW_2 mean and variance of Bornemann 2010 (design notes
  // section 4) within the stored moment error estimate plus the 1e-7 target.
  ASSERT_EQ(exit_code_, 0);
  const LawTableFile f = LawTableFile::open(command_.output);
  const LawTable& t = f.table();
  ASSERT_EQ(t.moments.size(), solved_.moments.size());
  for (std::size_t r = 0; r < t.moments.size(); ++r) {
    EXPECT_EQ(t.moments[r].mean, solved_.moments[r].mean);
    EXPECT_EQ(t.moments[r].variance, solved_.moments[r].variance);
    EXPECT_EQ(t.moments[r].skewness, solved_.moments[r].skewness);
    EXPECT_EQ(t.moments[r].excess_kurtosis, solved_.moments[r].excess_kurtosis);
  }
  EXPECT_NEAR(t.moments.back().mean, -1.7710868074116, t.moment_errors.back().mean + 1e-7);
  EXPECT_NEAR(t.moments.back().variance, 0.8131947928329, t.moment_errors.back().variance + 1e-7);
}

TEST_F(TableCommandTest, MetadataRecordsTheRequest) {
  ASSERT_EQ(exit_code_, 0);
  const LawTableFile f = LawTableFile::open(command_.output);
  const auto& s = f.metadata().settings;
  EXPECT_EQ(std::get<double>(s.at("x_step")), 0.1);
  EXPECT_EQ(std::get<double>(s.at("target_error")), 1e-7);
  EXPECT_EQ(std::get<std::int64_t>(s.at("base_intervals")), 100);
  EXPECT_EQ(std::get<std::int64_t>(s.at("w_count")), 4);
  EXPECT_NE(f.metadata().history.find("edgelaw test: edgelaw table --target 1e-7"), std::string::npos);
  EXPECT_NE(f.metadata().title.find("beta = 2"), std::string::npos);
  // The file-level converged flag (tables/FORMAT.md), read with plain HDF5.
  const hid_t file = H5Fopen(command_.output.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT);
  ASSERT_GE(file, 0);
  const hid_t attr = H5Aopen(file, "converged", H5P_DEFAULT);
  ASSERT_GE(attr, 0);
  std::int64_t converged = -1;
  H5Aread(attr, H5T_NATIVE_INT64, &converged);
  H5Aclose(attr);
  H5Fclose(file);
  EXPECT_EQ(converged, 1);
}

TEST_F(TableCommandTest, DensityIntegratesToOne) {
  // Trapezoid over the table's x. Its error is the Euler-Maclaurin end correction
  // h^2/12 (f'(b) - f'(a)) + O(h^4) (common practice, no source), estimated here from the
  // stored density (one-sided differences), doubled for the O(h^4) rest; the stored density
  // errors add at most (b - a) * max density_error. The integral must equal the cdf mass
  // inside [-8, 6], and 1 once the mass outside (cdf at -8 plus survival at 6, which is
  // ~2e-3 for the supercritical row w = -1) is added back.
  ASSERT_EQ(exit_code_, 0);
  const LawTableFile f = LawTableFile::open(command_.output);
  const LawTable& t = f.table();
  const double h = 0.1;
  const Eigen::Index last = t.density.cols() - 1;
  for (Eigen::Index r = 0; r < t.density.rows(); ++r) {
    double integral = 0;
    for (Eigen::Index c = 0; c < last; ++c) integral += h * (t.density(r, c) + t.density(r, c + 1)) / 2;
    const double slope_a = (t.density(r, 1) - t.density(r, 0)) / h;
    const double slope_b = (t.density(r, last) - t.density(r, last - 1)) / h;
    const double end_correction = h * h / 12 * std::abs(slope_b - slope_a);
    const double tolerance = 2 * end_correction + 1e-9 + 14.0 * t.density_error.row(r).maxCoeff() +
                             2 * t.cdf_error.row(r).maxCoeff();
    EXPECT_NEAR(integral, t.cdf(r, last) - t.cdf(r, 0), tolerance) << "w = " << t.w[r];
    EXPECT_NEAR(integral + t.cdf(r, 0) + t.survival(r, last), 1.0, tolerance) << "w = " << t.w[r];
  }
}

TEST_F(TableCommandTest, DensityMatchesDifferenceOfCdf) {
  // Fourth-order central difference (-F2 + 8 F1 - 8 F-1 + F-2) / (12 h): truncation error
  // h^4/30 |F^(5)| (common practice, no source). |F^(5)| = |density''''| is bounded here by
  // 16 max|fourth difference of density| / h^4 (estimated from the table itself), and the
  // cdf errors enter as 18 cdf_error / (12 h).
  ASSERT_EQ(exit_code_, 0);
  const LawTableFile f = LawTableFile::open(command_.output);
  const LawTable& t = f.table();
  const double h = 0.1;
  for (Eigen::Index r = 0; r < t.cdf.rows(); ++r) {
    double fourth = 0;
    for (Eigen::Index c = 2; c + 2 < t.cdf.cols(); ++c)
      fourth = std::max(fourth, std::abs(t.density(r, c - 2) - 4 * t.density(r, c - 1) + 6 * t.density(r, c) -
                                         4 * t.density(r, c + 1) + t.density(r, c + 2)));
    const double truncation = std::pow(h, 4) / 30 * 16 * fourth / std::pow(h, 4);
    for (Eigen::Index c = 2; c + 2 < t.cdf.cols(); ++c) {
      const double fd = (-t.cdf(r, c + 2) + 8 * t.cdf(r, c + 1) - 8 * t.cdf(r, c - 1) + t.cdf(r, c - 2)) / (12 * h);
      const double tolerance = truncation + 18 * t.cdf_error(r, c) / (12 * h) + t.density_error(r, c) + 1e-12;
      EXPECT_NEAR(t.density(r, c), fd, tolerance) << "w = " << t.w[r] << ", x = " << t.x[c];
    }
  }
}

TEST_F(TableCommandTest, Tw2QuantilesWithinReportedError) {
  // Reference: Fredholm-determinant quantiles (Bornemann 2010 method), design notes section 4;
  // the tolerance is the table's own reported error estimate for each quantile.
  ASSERT_EQ(exit_code_, 0);
  const LawTableFile f = LawTableFile::open(command_.output);
  for (auto [p, ref] : {std::pair{0.90, kTw2Quantile90}, {0.95, kTw2Quantile95}, {0.99, kTw2Quantile99}}) {
    const Estimate q = f.quantile(p, kInf);
    EXPECT_NEAR(q.value, ref, q.error) << "p = " << p;
    EXPECT_LT(q.error, 1e-4) << "p = " << p;  // an honest but useless error would pass otherwise
  }
}

TEST(SweepHelpers, BetaList) {
  // Common practice, no source: parsing rules as documented in cli/sweep.h.
  EXPECT_EQ(parse_beta_list("4,1,2"), (std::vector<double>{1, 2, 4}));
  EXPECT_EQ(parse_beta_list(" 0.5 ,2.5"), (std::vector<double>{0.5, 2.5}));
  EXPECT_THROW(parse_beta_list("1,1"), UsageError);
  EXPECT_THROW(parse_beta_list("1,-2"), UsageError);
  EXPECT_THROW(parse_beta_list("1,nan"), UsageError);
  EXPECT_THROW(parse_beta_list("1,"), UsageError);
  EXPECT_THROW(parse_beta_list(""), UsageError);
}

TEST(SweepHelpers, BetaRange) {
  const auto b = beta_range(1, 4, 4);
  ASSERT_EQ(b.size(), 4u);
  EXPECT_EQ(b.front(), 1.0);
  EXPECT_EQ(b.back(), 4.0);
  EXPECT_NEAR(b[1], 2.0, 1e-15);  // one rounding of (last - first) * k / (count - 1)
  EXPECT_EQ(beta_range(2, 2, 1), std::vector<double>{2});
  EXPECT_THROW(beta_range(4, 1, 3), UsageError);
  EXPECT_THROW(beta_range(0, 1, 3), UsageError);
  EXPECT_THROW(beta_range(1, 2, 0), UsageError);
}

TEST(SweepHelpers, PartsCoverEveryBetaOnce) {
  EXPECT_EQ(parse_part("").count, 1);
  EXPECT_EQ(parse_part("2/3").index, 2);
  EXPECT_THROW(parse_part("0/2"), UsageError);
  EXPECT_THROW(parse_part("3/2"), UsageError);
  EXPECT_THROW(parse_part("1/2x"), UsageError);
  EXPECT_THROW(parse_part("1-2"), UsageError);
  std::vector<int> seen(7, 0);
  for (int i = 1; i <= 3; ++i)
    for (auto k : part_members(7, {i, 3})) {
      EXPECT_EQ(static_cast<int>(k % 3), i - 1);
      ++seen[k];
    }
  EXPECT_EQ(seen, std::vector<int>(7, 1));
}

TEST(SweepHelpers, SliceNamesAreStableAndExact) {
  EXPECT_EQ(slice_file_name(2), "beta_2.h5");
  EXPECT_EQ(slice_file_name(0.1), "beta_0.1.h5");
  EXPECT_EQ(slice_file_name(1e-5), "beta_1e-05.h5");
  // Neighbouring doubles get different names (shortest round-trip text is injective).
  EXPECT_NE(slice_file_name(0.1), slice_file_name(std::nextafter(0.1, 1.0)));
}

TEST(CommandHelpers, Axis) {
  EXPECT_EQ(axis(-1, 1, 0.5, "x").size(), 5u);
  EXPECT_EQ(axis(0, 1, 0.3, "x").size(), 4u);  // 0, 0.3, 0.6, 0.9: the end is not forced
  EXPECT_THROW(axis(1, -1, 0.5, "x"), UsageError);
  EXPECT_THROW(axis(-1, 1, 0, "x"), UsageError);
  EXPECT_THROW(axis(-1, NAN, 0.1, "x"), UsageError);
}

}  // namespace
}  // namespace edgelaw
