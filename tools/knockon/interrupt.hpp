#pragma once
// Ctrl-C during a study: the first SIGINT asks the running study to stop after its current batch
// (the days finished are kept and reported as partial, exit status 130).  While the guard lives,
// SIGINT only sets the flag; the previous handler comes back when it goes, so a Ctrl-C after
// that (e.g. while a results file is still being finished) cannot leave a half-written file.
#include <atomic>

namespace knockon::cli {

class InterruptGuard {
public:
    InterruptGuard();
    ~InterruptGuard();
    InterruptGuard(const InterruptGuard&) = delete;
    InterruptGuard& operator=(const InterruptGuard&) = delete;

    const std::atomic<bool>* stop_flag() const;   // for StudyOptions::stop
    bool interrupted() const;

private:
    void (*previous_)(int);
};

// Exit status of a command stopped by Ctrl-C (128 + SIGINT, as shells report it).
inline constexpr int kInterruptedStatus = 130;

}  // namespace knockon::cli
