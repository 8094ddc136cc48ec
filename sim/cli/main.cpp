// The settle executable: installs the log sink, builds the command table, maps outcomes to exit
// statuses.
#include <fmt/format.h>
#include <spdlog/sinks/stdout_color_sinks.h>
#include <spdlog/spdlog.h>

#include <CLI/CLI.hpp>
#include <cstdio>
#include <exception>
#include <string>

#include "sim/cli/command.hpp"
#include "sim/cli/interrupt.hpp"

namespace {

// Logs go to stderr as "settle: warning: ...", coloured only on a terminal
// and never when NO_COLOR is set.
void install_logger() {
  const auto mode =
      settle::cli::use_colour(2) ? spdlog::color_mode::always : spdlog::color_mode::never;
  auto sink = std::make_shared<spdlog::sinks::stderr_color_sink_mt>(mode);
  auto logger = std::make_shared<spdlog::logger>("settle", sink);
  logger->set_pattern("%n: %^%l%$: %v");
  logger->set_level(spdlog::level::info);
  spdlog::set_default_logger(logger);
}

// The names of the commands, "check, run, sweep, explore, margin".
std::string command_list() {
  std::string list;
  for (const auto& c : settle::cli::commands())
    list += (list.empty() ? "" : ", ") + std::string(c.name);
  return list;
}

// A command-line error in words. CLI11's own texts are replaced where they
// would name its internals; our validators' messages ("--seed: ...") pass.
std::string usage_error(const CLI::App& app, const CLI::ParseError& e) {
  const auto used = app.get_subcommands();
  const std::string cmd = used.empty() ? "" : used.front()->get_name();
  const std::string where = cmd.empty() ? "" : cmd + ": ";
  if (cmd.empty() && !app.remaining().empty()) {
    const std::string first = app.remaining().front();
    if (!first.empty() && first[0] == '-')
      return fmt::format("unknown option '{}' before the command; the commands are {}", first,
                         command_list());
    return fmt::format("unknown command '{}'; the commands are {}", first, command_list());
  }
  if (cmd.empty() && dynamic_cast<const CLI::RequiredError*>(&e))
    return fmt::format("no command given; the commands are {} (settle --help)", command_list());
  if (dynamic_cast<const CLI::ExtrasError*>(&e)) {
    std::string extra;
    for (const auto& w : used.front()->remaining()) extra += (extra.empty() ? "" : " ") + w;
    return fmt::format("{}unexpected argument{} '{}'", where,
                       extra.find(' ') == std::string::npos ? "" : "s", extra);
  }
  // The option CLI11's text is about: its first word that starts with '-'.
  const std::string text = e.what();
  std::string option;
  for (std::size_t i = 0; i < text.size() && option.empty(); ++i)
    if (text[i] == '-' && (i == 0 || text[i - 1] == ' ') && i + 1 < text.size() &&
        text[i + 1] != ' ')
      option = text.substr(i, text.find_first_of(" :=", i) - i);
  if (dynamic_cast<const CLI::ArgumentMismatch*>(&e) && !option.empty())
    return text.find("missing") != std::string::npos || text.find("got 0") != std::string::npos
               ? fmt::format("{}{} needs a value", where, option)
               : fmt::format("{}{} is given more than once; give it once", where, option);
  if (dynamic_cast<const CLI::RequiredError*>(&e) && text.starts_with("DESIGN"))
    return fmt::format("{}no design file given: settle {} DESIGN [options]", where, cmd);
  if (dynamic_cast<const CLI::ConversionError*>(&e) && !option.empty())
    return fmt::format("{}{}: the value is not of the kind it takes (see --help)", where, option);
  return where + e.what();
}

}  // namespace

int main(int argc, char** argv) {
  using settle::cli::exit_status;
  install_logger();
  settle::cli::install_exit_on_interrupt();
  CLI::App app{"settle: event-driven timing simulation of gate-level asynchronous designs",
               "settle"};
  app.set_version_flag("--version", settle::cli::version_text(), "print the version and exit");
  app.require_subcommand(1);
  app.fallthrough(false);
  exit_status status = exit_status::ok;
  for (const auto& c : settle::cli::commands()) c.add(app, status);
  try {
    app.parse(argc, argv);
  } catch (const CLI::CallForHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForAllHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForVersion& e) {
    return app.exit(e);
  } catch (const CLI::ParseError& e) {
    spdlog::error("{}", usage_error(app, e));
    const auto used = app.get_subcommands();
    spdlog::info("see 'settle {}--help'", used.empty() ? "" : used.front()->get_name() + " ");
    return static_cast<int>(exit_status::error);
  } catch (const std::bad_alloc&) {
    spdlog::error("out of memory");
    return static_cast<int>(exit_status::error);
  } catch (const std::exception& e) {
    // A library's own text (nlohmann, std::) names no option and no file:
    // say what happened, keep the text for -v debugging.
    const auto used = app.get_subcommands();
    spdlog::error(
        "{} stopped by an unexpected internal error; nothing was written (please report it with "
        "the "
        "command line)",
        used.empty() ? std::string("settle") : "settle " + used.front()->get_name());
    spdlog::debug("internal error: {}", e.what());
    return static_cast<int>(exit_status::error);
  }
  std::fflush(stdout);
  return static_cast<int>(status);
}
