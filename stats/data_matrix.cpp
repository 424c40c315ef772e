// CSV matrices, their top eigenvalues (Eigen's symmetric eigensolver) and noise estimates.
#include "stats/data_matrix.h"

#include "stats/csv_fields.h"

#include <Eigen/Eigenvalues>

#include <charconv>
#include <cmath>
#include <sstream>
#include <vector>

namespace edgelaw {
namespace {

using csv::split;
using csv::trim;

bool parse(const std::string& s, double& v) {
  if (s.empty()) return false;
  const char* b = s.data();
  const char* e = b + s.size();
  if (*b == '+') ++b;
  auto [ptr, ec] = std::from_chars(b, e, v);
  return ec == std::errc() && ptr == e;
}

// Largest eigenvalue of the symmetric matrix m (values only).
double top_eigenvalue(const Eigen::MatrixXd& m) {
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(m, Eigen::EigenvaluesOnly);
  if (es.info() != Eigen::Success) throw DataMatrixError("the eigenvalue solver did not converge");
  return es.eigenvalues()(es.eigenvalues().size() - 1);
}

}  // namespace

Eigen::MatrixXd parse_matrix_csv(const std::string& text, const std::string& name) {
  std::vector<std::vector<double>> rows;
  std::istringstream in(text);
  std::string line;
  long line_no = 0;
  bool header_allowed = true;
  while (std::getline(in, line)) {
    ++line_no;
    const std::string t = trim(line);
    if (t.empty() || t[0] == '#') continue;
    const auto fields = split(t);
    std::vector<double> values(fields.size());
    bool any_number = false, all_numbers = true;
    std::size_t bad = 0;
    for (std::size_t k = 0; k < fields.size(); ++k) {
      const bool ok = parse(fields[k], values[k]) && std::isfinite(values[k]);
      any_number = any_number || ok;
      if (!ok && all_numbers) bad = k;
      all_numbers = all_numbers && ok;
    }
    if (header_allowed && !any_number) {  // column names
      header_allowed = false;
      continue;
    }
    header_allowed = false;
    if (!all_numbers)
      throw DataMatrixError(name + ": line " + std::to_string(line_no) + ", column " + std::to_string(bad + 1) +
                            ": '" + fields[bad] + "' is not a finite number");
    if (!rows.empty() && values.size() != rows.front().size())
      throw DataMatrixError(name + ": line " + std::to_string(line_no) + " has " + std::to_string(values.size()) +
                            " fields, the first data row has " + std::to_string(rows.front().size()));
    rows.push_back(std::move(values));
    // Checked while reading, so an oversized file is refused before it fills the memory.
    if (static_cast<double>(rows.size()) * static_cast<double>(rows.front().size()) > kMaxEntries)
      throw DataMatrixError(name + ": more than " + std::to_string(static_cast<long>(kMaxEntries)) + " entries (about " +
                            std::to_string(static_cast<long>(kMaxEntries * 8 / 1048576)) +
                            " MiB), beyond the budget; reduce the data first");
  }
  if (rows.empty()) throw DataMatrixError(name + ": no data rows");
  Eigen::MatrixXd m(static_cast<Eigen::Index>(rows.size()), static_cast<Eigen::Index>(rows.front().size()));
  for (Eigen::Index i = 0; i < m.rows(); ++i)
    for (Eigen::Index j = 0; j < m.cols(); ++j) m(i, j) = rows[i][j];
  return m;
}

CovarianceData covariance_data(const Eigen::MatrixXd& x, bool centre) {
  if (x.rows() < 2) throw DataMatrixError("a covariance test needs at least 2 samples (rows), got " + std::to_string(x.rows()));
  if (x.cols() < 2) throw DataMatrixError("a covariance test needs at least 2 variables (columns), got " + std::to_string(x.cols()));
  if (centre && x.rows() < 3)
    throw DataMatrixError("centring the columns leaves " + std::to_string(x.rows() - 1) + " degree of freedom; at least 3 samples are needed");
  if (std::min(x.rows(), x.cols()) > kMaxGramSize)
    throw DataMatrixError("the Gram matrix would be " + std::to_string(std::min(x.rows(), x.cols())) + " x " +
                          std::to_string(std::min(x.rows(), x.cols())) + "; eigenvalues beyond " + std::to_string(kMaxGramSize) +
                          " x " + std::to_string(kMaxGramSize) + " (minutes of O(m^3) work) are refused: give --eigenvalue instead");
  Eigen::MatrixXd xc = x;
  if (centre) xc.rowwise() -= x.colwise().mean();
  CovarianceData d;
  d.samples = x.rows();
  d.effective_samples = centre ? x.rows() - 1 : x.rows();
  d.variables = x.cols();
  d.centred_here = centre;
  // The nonzero eigenvalues of X^T X and X X^T agree; use the smaller Gram matrix.
  const Eigen::MatrixXd gram = xc.rows() >= xc.cols() ? Eigen::MatrixXd(xc.transpose() * xc) : Eigen::MatrixXd(xc * xc.transpose());
  d.top_eigenvalue = top_eigenvalue(gram);
  const double trace = xc.squaredNorm();
  d.noise_variance_estimate = (trace - d.top_eigenvalue) / (static_cast<double>(d.effective_samples) * static_cast<double>(d.variables - 1));
  if (!(d.noise_variance_estimate > 0))
    throw DataMatrixError("the data have no variance outside their top direction; the noise variance cannot be estimated");
  return d;
}

SymmetricData symmetric_data(const Eigen::MatrixXd& a) {
  if (a.rows() != a.cols())
    throw DataMatrixError("a symmetric matrix is needed, got " + std::to_string(a.rows()) + " rows and " + std::to_string(a.cols()) + " columns");
  if (a.rows() < 2) throw DataMatrixError("the matrix must be at least 2 x 2");
  if (a.rows() > kMaxGramSize)
    throw DataMatrixError("a " + std::to_string(a.rows()) + " x " + std::to_string(a.rows()) + " eigenproblem is beyond the " +
                          std::to_string(kMaxGramSize) + " x " + std::to_string(kMaxGramSize) + " budget: give --eigenvalue instead");
  const double scale = a.cwiseAbs().maxCoeff();
  const double asym = (a - a.transpose()).cwiseAbs().maxCoeff();
  if (asym > 1e-9 * scale)
    throw DataMatrixError("the matrix is not symmetric (largest |a_ij - a_ji| = " + std::to_string(asym) + ")");
  SymmetricData d;
  d.size = a.rows();
  const Eigen::MatrixXd sym = 0.5 * (a + a.transpose());
  d.top_eigenvalue = top_eigenvalue(sym);
  const double off = sym.squaredNorm() - sym.diagonal().squaredNorm();
  d.noise_variance_estimate = off / (static_cast<double>(d.size) * static_cast<double>(d.size - 1));
  if (!(d.noise_variance_estimate > 0)) throw DataMatrixError("the matrix has no off-diagonal noise; its variance cannot be estimated");
  return d;
}

}  // namespace edgelaw
