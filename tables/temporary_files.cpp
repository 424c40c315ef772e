// Registry of the temporary files being written, for clean interrupts (see temporary_files.h).
#include "tables/temporary_files.h"

#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <mutex>
#include <set>

namespace edgelaw {

namespace {
struct Registry {
  std::mutex lock;
  std::set<std::string> paths;
};
// Never destroyed: an interrupt may arrive while static destructors run at exit.
Registry& registry() {
  static auto* r = new Registry;
  return *r;
}
}  // namespace

void register_temporary(const std::string& path) {
  std::lock_guard guard(registry().lock);
  registry().paths.insert(path);
}

void unregister_temporary(const std::string& path) {
  std::lock_guard guard(registry().lock);
  registry().paths.erase(path);
}

int commit_temporary(const std::string& temporary, const std::string& target) {
  std::lock_guard guard(registry().lock);
  if (std::rename(temporary.c_str(), target.c_str()) != 0) return errno;
  registry().paths.erase(temporary);
  return 0;
}

int remove_temporaries_and_hold() {
  registry().lock.lock();  // released only by process exit
  int removed = 0;
  for (const auto& p : registry().paths)
    if (::unlink(p.c_str()) == 0) ++removed;
  registry().paths.clear();
  return removed;
}

}  // namespace edgelaw
