// Integrity header of table files (FORMAT.md, "Integrity"): the first kTableUserBlock bytes are
// an HDF5 user block holding "edgelaw table", the CRC-32 and the size of the rest. The reader
// checks it before HDF5 parses the file, so a damaged file never reaches HDF5's parser (HDF5
// 1.10.8 reads out of bounds on some damaged files; found by tests/fuzz/table_reader_fuzz).
#pragma once

#include <cstddef>
#include <string>

namespace edgelaw {

inline constexpr std::size_t kTableUserBlock = 512;

enum class SealCheck { kAbsent, kMismatch, kValid };
// kAbsent: no edgelaw header (a foreign or non-HDF5 file); kMismatch: header present but the
// contents or size differ. Throws TableFormatError when the file cannot be read.
SealCheck check_table_seal(const std::string& path);

// Recomputes the header of a table file (the writer calls it on every file it writes; tests
// call it after editing a file in place with HDF5 on purpose). Throws TableWriteError.
void seal_table_file(const std::string& path);

}  // namespace edgelaw
