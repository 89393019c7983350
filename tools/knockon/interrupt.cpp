#include "tools/knockon/interrupt.hpp"

#include <signal.h>
#include <time.h>

#include <cerrno>

#include "tools/results/output_file.hpp"

namespace knockon::cli {
namespace {

std::atomic<bool> g_stop{false};
std::atomic<int> g_guards{0};   // InterruptGuards alive: a study that stops after its batch
std::atomic<bool> g_installed{false};
std::atomic<unsigned> g_linger_seconds{0};   // linger_on_signals()

// Only async-signal-safe calls: unlink (in remove_temporary_files), nanosleep, sigaction, raise.
extern "C" void stop_now(int sig) {
    knockon::remove_temporary_files();
    // A process that lingers writes no file; its early end would cost another process its time to
    // remove its own (see linger_on_signals).  SIGKILL ends it sooner.
    struct timespec left {static_cast<time_t>(g_linger_seconds.load()), 0};
    while ((left.tv_sec > 0 || left.tv_nsec > 0) && nanosleep(&left, &left) != 0 && errno == EINTR) {
    }   // `left` is what an interrupted sleep had still to go
    struct sigaction dfl {};
    dfl.sa_handler = SIG_DFL;
    sigemptyset(&dfl.sa_mask);
    sigaction(sig, &dfl, nullptr);
    raise(sig);   // pending while this handler runs; ends the program as it returns
}

extern "C" void on_signal(int sig) {
    if (sig == SIGINT && g_guards.load() > 0 && !g_stop.exchange(true)) return;   // first Ctrl-C in a study
    stop_now(sig);
}

}  // namespace

void install_signal_handlers() {
    if (g_installed.exchange(true)) return;
    for (int sig : {SIGINT, SIGTERM, SIGHUP}) {
        struct sigaction old {};
        if (sigaction(sig, nullptr, &old) == 0 && old.sa_handler == SIG_IGN) continue;   // nohup, background job
        struct sigaction sa {};
        sa.sa_handler = on_signal;
        sigemptyset(&sa.sa_mask);
        sa.sa_flags = SA_RESTART;   // a first Ctrl-C must not fail the system call it interrupts
        sigaction(sig, &sa, nullptr);
    }
}

void linger_on_signals(unsigned seconds) { g_linger_seconds.store(seconds); }

InterruptGuard::InterruptGuard() {
    install_signal_handlers();
    ++g_guards;
}
InterruptGuard::~InterruptGuard() { --g_guards; }
const std::atomic<bool>* InterruptGuard::stop_flag() const { return &g_stop; }
bool InterruptGuard::interrupted() const { return g_stop.load(); }

}  // namespace knockon::cli
