// Temporary files this process is writing, so that an interrupt (SIGINT, SIGTERM) can remove them.
//
// Writers create a temporary beside the target, register it, and publish it with
// commit_temporary (rename under the registry lock). An interrupt handler calls
// remove_temporaries_and_hold: afterwards no registered temporary exists and no rename can
// happen, so the target is either the previous file or a complete new one.
#pragma once

#include <string>

namespace edgelaw {

void register_temporary(const std::string& path);
// Forgets path (after the writer removed it itself).
void unregister_temporary(const std::string& path);
// rename(temporary, target) and forget the temporary; returns the errno of a failed rename
// (the temporary then stays registered, for the caller to remove), 0 on success.
int commit_temporary(const std::string& temporary, const std::string& target);
// Unlinks every registered temporary and keeps the registry locked for good (the process is
// about to exit); returns how many files were removed. Not async-signal-safe: call it from a
// thread that received the signal with sigwait.
int remove_temporaries_and_hold();

}  // namespace edgelaw
