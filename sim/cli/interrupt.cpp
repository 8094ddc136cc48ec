// SIGINT/SIGTERM handlers that only set lock-free atomics (async-signal-safe), read by the commands.
#include "sim/cli/interrupt.hpp"

#include <csignal>

namespace settle::cli {
namespace {

std::atomic<bool> flag{false};
std::atomic<int> which{0};
static_assert(std::atomic<bool>::is_always_lock_free && std::atomic<int>::is_always_lock_free,
              "signal handlers may only touch lock-free atomics");

extern "C" void on_signal(int sig) {
  which.store(sig, std::memory_order_relaxed);
  flag.store(true, std::memory_order_release);
}

}  // namespace

void install_interrupt_handlers() {
  struct sigaction sa {};
  sa.sa_handler = on_signal;
  sigemptyset(&sa.sa_mask);
  sa.sa_flags = SA_RESETHAND;  // the second signal ends the process the default way
  sigaction(SIGINT, &sa, nullptr);
  sigaction(SIGTERM, &sa, nullptr);
}

bool interrupted() { return flag.load(std::memory_order_acquire); }

std::atomic<bool>* interrupt_flag() { return &flag; }

int interrupt_signal() { return which.load(std::memory_order_relaxed); }

const char* interrupt_signal_name() {
  switch (interrupt_signal()) {
    case SIGINT: return "SIGINT";
    case SIGTERM: return "SIGTERM";
    case 0: return "no signal";
    default: return "a signal";
  }
}

}  // namespace settle::cli
