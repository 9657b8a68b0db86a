// The command tree of pbfleet, in one table: each entry names a subcommand,
// says what it is for, and installs its options and action.
#pragma once

#include <span>
#include <string_view>

#include <CLI/CLI.hpp>

#include "cli/commands/context.hpp"

namespace pbfleet::cli {

struct CommandSpec {
  std::string_view name;
  std::string_view summary;
  // Adds options, the example in the help footer, and the callback that runs it.
  void (*install)(CLI::App& command, Context& context);
};

// Every top-level subcommand, in the order `pbfleet --help` lists them.
std::span<const CommandSpec> command_table();

// One installer per command file.
void install_estimate(CLI::App& command, Context& context);
void install_log(CLI::App& command, Context& context);
void install_import(CLI::App& command, Context& context);
void install_history(CLI::App& command, Context& context);
void install_winter(CLI::App& command, Context& context);
void install_sulfation(CLI::App& command, Context& context);
void install_replacements(CLI::App& command, Context& context);
void install_overdue(CLI::App& command, Context& context);
void install_depot(CLI::App& command, Context& context);
void install_vehicle(CLI::App& command, Context& context);
void install_battery(CLI::App& command, Context& context);
void install_token(CLI::App& command, Context& context);
void install_connect(CLI::App& command, Context& context);

// The help footer every command ends with: one example, indented.
std::string example(std::string_view lines);

}  // namespace pbfleet::cli
