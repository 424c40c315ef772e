// Temporary-file-and-rename writer (POSIX).
#include "cli/atomic_file.h"

#include "tables/temporary_files.h"

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
  register_temporary(temp);  // an interrupt from now on removes it
  auto discard = [&] {
    ::unlink(temp.c_str());
    unregister_temporary(temp);
  };
  auto fail = [&](const char* what) {
    const std::string reason = std::strerror(errno);
    ::close(fd);
    discard();
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
    const std::string reason = std::strerror(errno);
    discard();
    throw OutputError("cannot write " + path + " (close): " + reason);
  }
  if (const int err = commit_temporary(temp, path); err != 0) {
    discard();
    throw OutputError("cannot write " + path + " (rename): " + std::strerror(err));
  }
  if (const int dfd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY); dfd >= 0) {
    ::fsync(dfd);
    ::close(dfd);
  }
}

}  // namespace edgelaw
