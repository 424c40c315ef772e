// Temporary-file-and-rename writer (POSIX).
#include "cli/atomic_file.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>

namespace edgelaw {

void write_file_atomically(const std::string& path, const std::string& text) {
  const std::filesystem::path target(path);
  const std::filesystem::path dir = target.has_parent_path() ? target.parent_path() : ".";
  std::string temp = (dir / ("." + target.filename().string() + ".tmpXXXXXX")).string();
  const int fd = mkstemp(temp.data());
  if (fd < 0) throw OutputError("cannot create a file in " + dir.string() + ": " + std::strerror(errno));
  auto fail = [&](const char* what) {
    const std::string reason = std::strerror(errno);
    ::close(fd);
    ::unlink(temp.c_str());
    throw OutputError(std::string("cannot write ") + path + " (" + what + "): " + reason);
  };
  std::size_t done = 0;
  while (done < text.size()) {
    const ssize_t n = ::write(fd, text.data() + done, text.size() - done);
    if (n < 0) {
      if (errno == EINTR) continue;
      fail("write");
    }
    done += static_cast<std::size_t>(n);
  }
  if (::fchmod(fd, 0644) != 0 || ::fsync(fd) != 0) fail("fsync");
  if (::close(fd) != 0) {
    ::unlink(temp.c_str());
    throw OutputError("cannot write " + path + " (close): " + std::strerror(errno));
  }
  if (::rename(temp.c_str(), path.c_str()) != 0) {
    const std::string reason = std::strerror(errno);
    ::unlink(temp.c_str());
    throw OutputError("cannot write " + path + " (rename): " + reason);
  }
  if (const int dfd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY); dfd >= 0) {
    ::fsync(dfd);
    ::close(dfd);
  }
}

}  // namespace edgelaw
