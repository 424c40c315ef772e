// Exit codes of the edgelaw command line (values from sysexits.h and the shell's 128 + signal
// convention, documented in the README).
#pragma once

namespace edgelaw::exit_code {
inline constexpr int kOk = 0;
inline constexpr int kUsage = 64;          // bad option or option value
inline constexpr int kBadData = 65;        // input file content is malformed or out of range
inline constexpr int kNoInput = 66;        // input file missing or unreadable
inline constexpr int kOverBudget = 69;     // request refused up front: over the memory budget
inline constexpr int kSoftware = 70;       // the solver failed or missed its accuracy target
inline constexpr int kCannotCreate = 73;   // output cannot be written
inline constexpr int kInterrupted = 130;   // SIGINT (128 + 2); SIGTERM 143, SIGHUP 129
}  // namespace edgelaw::exit_code
