// SIGINT/SIGTERM handlers that touch only lock-free atomics and call unlink and _exit
// (async-signal-safe, POSIX).
#include "sim/cli/interrupt.hpp"

#include <pthread.h>
#include <unistd.h>

#include <array>
#include <csignal>

namespace settle::cli {
namespace {

std::atomic<bool> flag{false};
std::atomic<int> which{0};
std::atomic<bool> polling{false};  // a command polls the flag: the first signal only sets it
static_assert(std::atomic<bool>::is_always_lock_free && std::atomic<int>::is_always_lock_free &&
                  std::atomic<const char*>::is_always_lock_free,
              "signal handlers may only touch lock-free atomics");

// Every temporary output file in existence; a signal that ends the process unlinks them.
constexpr std::size_t temporary_slots = 4096;
std::array<std::atomic<const char*>, temporary_slots> temporaries{};

void remove_temporaries() {
  for (auto& slot : temporaries)
    if (const char* p = slot.load(std::memory_order_acquire)) ::unlink(p);
}

extern "C" void on_signal(int sig) {
  const bool second = flag.load(std::memory_order_acquire);
  which.store(sig, std::memory_order_relaxed);
  flag.store(true, std::memory_order_release);
  if (polling.load(std::memory_order_acquire) && !second) return;
  remove_temporaries();
  ::_exit(130);  // 128 + SIGINT, the shell's status for a process ended by Ctrl-C (common practice)
}

void install() {
  struct sigaction sa {};
  sa.sa_handler = on_signal;
  sigemptyset(&sa.sa_mask);
  sigaddset(&sa.sa_mask, SIGINT);  // one handler at a time
  sigaddset(&sa.sa_mask, SIGTERM);
  sa.sa_flags = SA_RESTART;  // a blocked open or read resumes; the flag is polled after it
  sigaction(SIGINT, &sa, nullptr);
  sigaction(SIGTERM, &sa, nullptr);
}

}  // namespace

void install_exit_on_interrupt() {
  polling.store(false, std::memory_order_release);
  install();
}

void install_interrupt_handlers() {
  polling.store(true, std::memory_order_release);
  install();
}

bool interrupted() { return flag.load(std::memory_order_acquire); }

std::atomic<bool>* interrupt_flag() { return &flag; }

int interrupt_signal() { return which.load(std::memory_order_relaxed); }

const char* interrupt_signal_name() {
  switch (interrupt_signal()) {
    case SIGINT:
      return "SIGINT";
    case SIGTERM:
      return "SIGTERM";
    case 0:
      return "no signal";
    default:
      return "a signal";
  }
}

signals_held::signals_held() {
  sigset_t block;
  sigemptyset(&block);
  sigaddset(&block, SIGINT);
  sigaddset(&block, SIGTERM);
  pthread_sigmask(SIG_BLOCK, &block, &old_);
}

signals_held::~signals_held() { pthread_sigmask(SIG_SETMASK, &old_, nullptr); }

int register_temporary(const char* path) {
  for (std::size_t i = 0; i < temporaries.size(); ++i) {
    const char* empty = nullptr;
    if (temporaries[i].compare_exchange_strong(empty, path, std::memory_order_acq_rel))
      return static_cast<int>(i);
  }
  return -1;
}

void unregister_temporary(int slot) {
  if (slot >= 0 && static_cast<std::size_t>(slot) < temporaries.size())
    temporaries[static_cast<std::size_t>(slot)].store(nullptr, std::memory_order_release);
}

}  // namespace settle::cli
