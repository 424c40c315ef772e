// The integrity header of table files: a 512-byte HDF5 user block with the CRC-32 and size of
// everything after it, checked before HDF5 parses anything (see table_seal.h, FORMAT.md).
#include "tables/table_seal.h"

#include "tables/table_file.h"

#include <zlib.h>

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <cinttypes>
#include <cstdio>
#include <cstring>
#include <system_error>
#include <vector>

namespace edgelaw {

namespace {

constexpr char kMagic[] = "edgelaw table\n";

struct Fd {
  int fd;
  ~Fd() {
    if (fd >= 0) ::close(fd);
  }
};

std::string errno_text() { return std::generic_category().message(errno); }

// CRC-32 (zlib's, the ISO-HDLC polynomial) of bytes [offset, end) and the file size.
std::pair<std::uint32_t, std::uint64_t> crc_after(int fd, std::uint64_t offset, const std::string& path) {
  const off_t size = ::lseek(fd, 0, SEEK_END);
  if (size < 0) throw TableFormatError("table file '" + path + "': cannot be read: " + errno_text());
  uLong crc = crc32(0L, Z_NULL, 0);
  std::vector<unsigned char> buf(1 << 20);
  for (std::uint64_t at = offset; at < static_cast<std::uint64_t>(size);) {
    const ssize_t n = ::pread(fd, buf.data(), buf.size(), static_cast<off_t>(at));
    if (n < 0 && errno == EINTR) continue;
    if (n <= 0) throw TableFormatError("table file '" + path + "': cannot be read: " + errno_text());
    crc = crc32(crc, buf.data(), static_cast<uInt>(n));
    at += static_cast<std::uint64_t>(n);
  }
  return {static_cast<std::uint32_t>(crc), static_cast<std::uint64_t>(size)};
}

}  // namespace

void seal_table_file(const std::string& path) {
  Fd f{::open(path.c_str(), O_RDWR | O_CLOEXEC)};
  if (f.fd < 0) throw TableWriteError("cannot open '" + path + "' to seal it: " + errno_text());
  const auto [crc, size] = crc_after(f.fd, kTableUserBlock, path);
  char header[kTableUserBlock] = {};
  std::snprintf(header, sizeof header, "%scrc32 %08" PRIx32 "\nsize %" PRIu64 "\n", kMagic, crc, size);
  if (::pwrite(f.fd, header, sizeof header, 0) != static_cast<ssize_t>(sizeof header))
    throw TableWriteError("cannot seal '" + path + "': " + errno_text());
}

SealCheck check_table_seal(const std::string& path) {
  Fd f{::open(path.c_str(), O_RDONLY | O_CLOEXEC)};
  if (f.fd < 0) throw TableFormatError("table file '" + path + "': cannot be opened: " + errno_text());
  char header[kTableUserBlock + 1] = {};
  const ssize_t n = ::pread(f.fd, header, kTableUserBlock, 0);
  if (n < static_cast<ssize_t>(sizeof kMagic - 1) || std::memcmp(header, kMagic, sizeof kMagic - 1) != 0)
    return SealCheck::kAbsent;
  std::uint32_t crc = 0;
  std::uint64_t size = 0;
  if (n != static_cast<ssize_t>(kTableUserBlock) ||
      std::sscanf(header + sizeof kMagic - 1, "crc32 %8" SCNx32 "\nsize %" SCNu64, &crc, &size) != 2)
    return SealCheck::kMismatch;
  const auto [got_crc, got_size] = crc_after(f.fd, kTableUserBlock, path);
  return got_crc == crc && got_size == size ? SealCheck::kValid : SealCheck::kMismatch;
}

}  // namespace edgelaw
