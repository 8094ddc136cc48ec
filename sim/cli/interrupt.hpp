// SIGINT/SIGTERM handling: a flag the long commands poll, and the removal of every temporary output
// file.
#pragma once

#include <signal.h>

#include <atomic>

namespace settle::cli {

/// Installs the handlers for SIGINT and SIGTERM in their first mode, which
/// main() sets before any command runs: a signal removes every registered
/// temporary file (register_temporary) and ends the process with status 130.
/// Nothing is left half-written, and no temporary stays behind.
void install_exit_on_interrupt();

/// Switches the handlers to their second mode, for a command that polls the
/// flag (run, sweep, margin) and then writes a partial report: the first
/// SIGINT or SIGTERM only sets the flag. A second signal removes the
/// temporaries and ends the process at once with status 130, so a user who
/// presses Ctrl-C twice is never stuck. Idempotent.
void install_interrupt_handlers();

/// True once SIGINT or SIGTERM arrived after install_interrupt_handlers().
bool interrupted();

/// The flag itself, for engines that take a `const std::atomic<bool>*`
/// (sweep_options::stop, run_options::stop). Never null.
std::atomic<bool>* interrupt_flag();

/// The signal that set the flag (SIGINT or SIGTERM), 0 when none.
int interrupt_signal();

/// "SIGINT", "SIGTERM" (or "no signal" before any).
const char* interrupt_signal_name();

/// Registers a temporary file the handlers unlink if a signal ends the
/// process. `path` must stay valid (unchanged) until unregister_temporary.
/// Returns a slot number for unregister_temporary, or -1 when the table is
/// full (the file then is not removed by a signal).
int register_temporary(const char* path);
/// Forgets the slot (the file was renamed into place or removed).
void unregister_temporary(int slot);

/// Holds SIGINT and SIGTERM back for its lifetime (pthread_sigmask, POSIX):
/// a file created and registered under it is never left unregistered by a
/// signal that arrives in between. A held signal is delivered at the end.
class signals_held {
 public:
  signals_held();
  ~signals_held();
  signals_held(const signals_held&) = delete;
  signals_held& operator=(const signals_held&) = delete;

 private:
  sigset_t old_;
};

}  // namespace settle::cli
