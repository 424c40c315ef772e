// SIGINT/SIGTERM watcher thread: removes registered temporaries and exits (see interrupt.h).
#include "cli/interrupt.h"

#include <signal.h>
#include <unistd.h>

#include <cstring>
#include <mutex>
#include <string>
#include <thread>

#include "tables/temporary_files.h"

namespace edgelaw {

namespace {
std::mutex note_lock;
std::mutex output_lock;  // held by status lines while written; taken for good by the watcher
std::string& note() {
  static auto* n = new std::string;  // never destroyed: read while the process exits
  return *n;
}

sigset_t interrupt_signals() {
  sigset_t set;
  sigemptyset(&set);
  sigaddset(&set, SIGINT);
  sigaddset(&set, SIGTERM);
  sigaddset(&set, SIGHUP);  // the terminal went away: same cleanup
  return set;
}

[[noreturn]] void watch(sigset_t set) {
  int sig = 0;
  while (sigwait(&set, &sig) != 0) {
  }
  // From here no temporary exists and no writer can rename one into place.
  const int removed = remove_temporaries_and_hold();
  std::string line = std::string("edgelaw: error: interrupted by ") + (sig == SIGINT ? "SIGINT" : sig == SIGTERM ? "SIGTERM" : "SIGHUP") +
                     "; no output written" +
                     (removed > 0 ? " (removed " + std::to_string(removed) + " temporary file" +
                                        (removed > 1 ? "s" : "") + ")"
                                  : std::string());
  {
    std::lock_guard guard(note_lock);
    if (!note().empty()) line += "; " + note();
  }
  line += "\n";
  output_lock.lock();  // never released: no status line can follow the interrupt line
  [[maybe_unused]] const ssize_t n = ::write(STDERR_FILENO, line.data(), line.size());
  ::_exit(128 + sig);
}
}  // namespace

void install_interrupt_cleanup() {
  const sigset_t set = interrupt_signals();
  pthread_sigmask(SIG_BLOCK, &set, nullptr);
  std::thread(watch, set).detach();
}

void set_interrupt_note(const std::string& text) {
  std::lock_guard guard(note_lock);
  note() = text;
}

void print_status_line(const std::string& line) {
  std::lock_guard guard(output_lock);
  const std::string text = line + "\n";
  [[maybe_unused]] const ssize_t n = ::write(STDERR_FILENO, text.data(), text.size());
}

}  // namespace edgelaw
