// SIGINT/SIGTERM handling for long commands: a flag the sweep workers and the margin search poll.
#pragma once

#include <atomic>

namespace settle::cli {

/// Installs handlers for SIGINT and SIGTERM that set the interruption flag.
/// A second signal of the same kind gets the default action (the process
/// ends at once), so a user who presses Ctrl-C twice is never stuck.
/// Idempotent; call it at the start of a command that runs for long.
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

}  // namespace settle::cli
