// Clean interrupts: SIGINT, SIGTERM and SIGHUP remove this process's temporary files, print one
// line on stderr and exit with 128 + the signal number (130 SIGINT, 143 SIGTERM, 129 SIGHUP).
#pragma once

#include <string>

namespace edgelaw {

// Blocks those signals in the calling thread (threads started later inherit the mask)
// and starts a thread that waits for them with sigwait, so the cleanup runs in a normal
// context rather than in a signal handler. Call at the start of main, before other threads.
void install_interrupt_cleanup();

// Text appended to the interrupt line, e.g. where a sweep keeps its finished betas; "" clears.
void set_interrupt_note(const std::string& note);

// Writes one line (newline added) to stderr, for progress reports from worker threads. Once an
// interrupt is being reported no such line is written any more, so the interrupt line stays the
// last line on stderr (scripts read the last line for the reason).
void print_status_line(const std::string& line);

}  // namespace edgelaw
