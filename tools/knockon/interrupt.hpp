#pragma once
// Signals that end or interrupt a command, handled in this one place.
// - SIGTERM, SIGHUP, and SIGINT (Ctrl-C) outside a study: stop at once.  Every temporary output
//   file still being written is removed (tools/io/output_file), then the program ends by the same
//   signal (a shell reports 128 + its number, e.g. 143 for SIGTERM), so nothing half-written stays.
// - SIGINT during a study (while an InterruptGuard lives), the first time: the running study is
//   asked to stop after its current batch; the days finished are kept and reported as partial,
//   exit status 130, and a results file being written is still finished whole.  A second Ctrl-C
//   stops at once, as above, leaving no file.
// A signal that was ignored when the program started (nohup, a background job of a script) stays
// ignored.
#include <atomic>

namespace knockon::cli {

// Installs the handlers; called once at the start of main (calling it again does nothing).
void install_signal_handlers();

class InterruptGuard {
public:
    InterruptGuard();
    ~InterruptGuard();
    InterruptGuard(const InterruptGuard&) = delete;
    InterruptGuard& operator=(const InterruptGuard&) = delete;

    const std::atomic<bool>* stop_flag() const;   // for StudyOptions::stop
    bool interrupted() const;
};

// Exit status of a command stopped by Ctrl-C (128 + SIGINT, as shells report it).
inline constexpr int kInterruptedStatus = 130;

}  // namespace knockon::cli
