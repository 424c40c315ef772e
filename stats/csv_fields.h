// Field splitting shared by the CSV readers (stats/data_matrix.cpp, cli/points_csv.cpp): plain
// comma-separated fields, no quoting, surrounding blanks (space, tab, CR) removed.
#pragma once

#include <string>
#include <vector>

namespace edgelaw::csv {

inline std::string trim(const std::string& s) {
  const auto b = s.find_first_not_of(" \t\r");
  if (b == std::string::npos) return {};
  const auto e = s.find_last_not_of(" \t\r");
  return s.substr(b, e - b + 1);
}

// "a, b,,c," gives {"a", "b", "", "c", ""}: a trailing comma is an empty last field.
inline std::vector<std::string> split(const std::string& line) {
  std::vector<std::string> out;
  std::string::size_type start = 0;
  while (true) {
    const auto comma = line.find(',', start);
    out.push_back(trim(line.substr(start, comma == std::string::npos ? std::string::npos : comma - start)));
    if (comma == std::string::npos) break;
    start = comma + 1;
  }
  if (line.empty()) out.clear();  // as before: an empty line has no fields
  return out;
}

}  // namespace edgelaw::csv
