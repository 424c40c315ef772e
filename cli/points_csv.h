// Reading and writing the CSV files of the evaluate command (columns beta,x,w and results).
#pragma once

#include <stdexcept>
#include <string>
#include <vector>

namespace edgelaw {

struct Point {
  double beta, x, w;
};

// Error in an input file's content (bad header, non-numeric or ragged row).
struct DataError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// Parses "beta,x,w" (header required; w may be inf or +inf). Throws DataError naming the line.
std::vector<Point> parse_points_csv(const std::string& text);

// Parses one number the way the CSV and the options accept it ("inf", "+inf" allowed when
// allow_inf); throws DataError otherwise.
double parse_number(const std::string& field, bool allow_inf);

}  // namespace edgelaw
