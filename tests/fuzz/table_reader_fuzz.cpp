// libFuzzer harness for the table reader: any byte string, saved as a file, must either open as
// a valid table (and then answer queries) or be refused with a TableError; never crash. Most
// mutations of the corpus fail the integrity header's CRC-32 before HDF5 sees them.
#include "tables/table_file.h"

#include <hdf5.h>

#include <unistd.h>

#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <string>

namespace {

// One scratch file per process; tmpfs when available, so each run costs no disk I/O.
const std::string& scratch_path() {
  static const std::string path = [] {
    namespace fs = std::filesystem;
    std::error_code ec;
    const fs::path dir = fs::is_directory("/dev/shm", ec) ? fs::path("/dev/shm") : fs::temp_directory_path();
    return (dir / ("edgelaw-fuzz-table-" + std::to_string(::getpid()) + ".h5")).string();
  }();
  return path;
}

void remove_scratch() { std::remove(scratch_path().c_str()); }

}  // namespace

extern "C" int LLVMFuzzerInitialize(int*, char***) {
  H5dont_atexit();  // as in cli/main.cpp: no HDF5 shutdown chatter after damaged inputs
  std::atexit(remove_scratch);
  return 0;
}

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string& path = scratch_path();
  if (std::FILE* f = std::fopen(path.c_str(), "wb")) {
    if (size > 0) std::fwrite(data, 1, size, f);
    std::fclose(f);
  } else {
    std::abort();  // the harness itself is broken, not the reader
  }
  try {
    const auto table = edgelaw::LawTableFile::open(path);
    // A file that validates must answer inside its range and throw outside it, never crash.
    const auto& x = table.x();
    const auto& w = table.w();
    const double beta = table.betas().front();
    const double xs[] = {x.front(), 0.5 * (x.front() + x.back()), x.back(), x.back() + 1};
    const double ws[] = {w.front(), w.back(), w.front() - 1};
    for (double xi : xs)
      for (double wj : ws) {
        try {
          (void)table.cdf(xi, wj, beta);
          (void)table.survival(xi, wj, beta);
          (void)table.density(xi, wj, beta);
        } catch (const edgelaw::TableError&) {
        }
      }
    for (double p : {0.01, 0.5, 0.99}) {
      try {
        (void)table.quantile(p, w.front(), beta);
      } catch (const edgelaw::TableError&) {
      }
    }
  } catch (const edgelaw::TableError&) {
    // Refused with a message: the intended outcome for damaged input.
  }
  return 0;
}
