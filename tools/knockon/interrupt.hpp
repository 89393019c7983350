#pragma once
// Signals that end or interrupt a command, handled in this one place.
// - SIGTERM, SIGHUP, and SIGINT (Ctrl-C) outside a study: stop at once.  Every temporary output
//   file still being written is removed (tools/results/output_file), then the program ends by the same
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

// From now on a signal that stops this process at once still removes its temporary files at once,
// but ends the process only `seconds` later (or at a SIGKILL before then).  For the processes of an
// MPI run other than the first (tools/knockon/ranks_mpi.cpp), which write no file: Open MPI's
// mpirun, stopping a run, sends SIGTERM to every process and SIGKILL as soon as the first of them
// has ended (its wait of odls_base_sigkill_timeout, 1 s by default, is cut short by that process's
// SIGCHLD), so a process that ended at once could have the first process killed before its handler
// had removed the temporary output file.  Lingering, they leave the first process that second.
void linger_on_signals(unsigned seconds);

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
