// Writing a text file so that readers see either the old file or the complete new one.
#pragma once

#include <stdexcept>
#include <string>

namespace edgelaw {

struct OutputError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// Writes text to a temporary file beside path, fsyncs it, renames it over path and fsyncs the
// directory. On any failure the temporary is removed and OutputError is thrown.
void write_file_atomically(const std::string& path, const std::string& text);

}  // namespace edgelaw
