// The settle executable: installs the log sink, builds the command table, maps outcomes to exit statuses.
#include <cstdio>
#include <exception>
#include <string>

#include <CLI/CLI.hpp>
#include <spdlog/sinks/stdout_color_sinks.h>
#include <spdlog/spdlog.h>

#include "sim/cli/command.hpp"

#ifndef SETTLE_VERSION
#define SETTLE_VERSION "0"
#endif

namespace {

// Logs go to stderr as "settle: warning: ...", coloured only on a terminal
// and never when NO_COLOR is set.
void install_logger() {
  const auto mode = settle::cli::use_colour(2) ? spdlog::color_mode::always : spdlog::color_mode::never;
  auto sink = std::make_shared<spdlog::sinks::stderr_color_sink_mt>(mode);
  auto logger = std::make_shared<spdlog::logger>("settle", sink);
  logger->set_pattern("%n: %^%l%$: %v");
  logger->set_level(spdlog::level::info);
  spdlog::set_default_logger(logger);
}

}  // namespace

int main(int argc, char** argv) {
  using settle::cli::exit_status;
  install_logger();
  CLI::App app{"settle: event-driven timing simulation of gate-level asynchronous designs", "settle"};
  app.set_version_flag("--version", std::string("settle ") + SETTLE_VERSION, "print the version and exit");
  app.require_subcommand(1);
  app.fallthrough(false);
  exit_status status = exit_status::ok;
  for (const auto& c : settle::cli::commands()) c.add(app, status);
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);  // prints help, the version or the error
    return code == 0 ? 0 : static_cast<int>(exit_status::error);
  } catch (const std::bad_alloc&) {
    spdlog::error("out of memory");
    return static_cast<int>(exit_status::error);
  } catch (const std::exception& e) {
    spdlog::error("{}", e.what());
    return static_cast<int>(exit_status::error);
  }
  std::fflush(stdout);
  return static_cast<int>(status);
}
