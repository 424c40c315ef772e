// CSV parsing for the evaluate command: strict, with line numbers in every error.
#include "cli/points_csv.h"

#include "stats/csv_fields.h"

#include <charconv>
#include <cmath>
#include <limits>
#include <sstream>

namespace edgelaw {

namespace {
using csv::split;
using csv::trim;
}  // namespace

double parse_number(const std::string& text, bool allow_inf) {
  const std::string field = trim(text);
  if (field == "inf" || field == "+inf" || field == "Inf" || field == "+Inf" || field == "infinity") {
    if (allow_inf) return std::numeric_limits<double>::infinity();
    throw DataError("'" + field + "' is not allowed here (must be finite)");
  }
  double v = 0;
  const char* first = field.data();
  const char* last = first + field.size();
  if (!field.empty() && *first == '+') ++first;
  const auto [ptr, ec] = std::from_chars(first, last, v);
  if (field.empty() || ec != std::errc() || ptr != last || std::isnan(v) || std::isinf(v))
    throw DataError("'" + field + "' is not a number");
  return v;
}

std::vector<Point> parse_points_csv(const std::string& text) {
  std::istringstream in(text);
  std::string line;
  int number = 0;
  bool header = false;
  std::vector<Point> points;
  while (std::getline(in, line)) {
    ++number;
    if (trim(line).empty() || trim(line)[0] == '#') continue;
    const auto fields = split(line);
    if (!header) {
      if (fields != std::vector<std::string>{"beta", "x", "w"})
        throw DataError("line " + std::to_string(number) + ": expected the header beta,x,w");
      header = true;
      continue;
    }
    if (fields.size() != 3)
      throw DataError("line " + std::to_string(number) + ": expected 3 fields, found " + std::to_string(fields.size()));
    try {
      points.push_back({parse_number(fields[0], false), parse_number(fields[1], false), parse_number(fields[2], true)});
    } catch (const DataError& e) {
      throw DataError("line " + std::to_string(number) + ": " + e.what());
    }
  }
  if (!header) throw DataError("empty input: expected the header beta,x,w");
  if (points.empty()) throw DataError("no points after the header");
  return points;
}

}  // namespace edgelaw
