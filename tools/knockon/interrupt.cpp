#include "tools/knockon/interrupt.hpp"

#include <csignal>

namespace knockon::cli {
namespace {

std::atomic<bool> g_stop{false};
extern "C" void on_interrupt(int) { g_stop.store(true); }

}  // namespace

InterruptGuard::InterruptGuard() : previous_(std::signal(SIGINT, on_interrupt)) {}
InterruptGuard::~InterruptGuard() { std::signal(SIGINT, previous_); }
const std::atomic<bool>* InterruptGuard::stop_flag() const { return &g_stop; }
bool InterruptGuard::interrupted() const { return g_stop.load(); }

}  // namespace knockon::cli
