#include "tools/knockon/interrupt.hpp"

#include <signal.h>

#include "tools/io/output_file.hpp"

namespace knockon::cli {
namespace {

std::atomic<bool> g_stop{false};
std::atomic<int> g_guards{0};   // InterruptGuards alive: a study that stops after its batch
std::atomic<bool> g_installed{false};

// Only async-signal-safe calls: unlink (in remove_temporary_files), sigaction, raise.
extern "C" void stop_now(int sig) {
    knockon::remove_temporary_files();
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

InterruptGuard::InterruptGuard() {
    install_signal_handlers();
    ++g_guards;
}
InterruptGuard::~InterruptGuard() { --g_guards; }
const std::atomic<bool>* InterruptGuard::stop_flag() const { return &g_stop; }
bool InterruptGuard::interrupted() const { return g_stop.load(); }

}  // namespace knockon::cli
