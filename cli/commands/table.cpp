#include "cli/commands/table.hpp"

#include <array>

namespace pbfleet::cli {
namespace {

constexpr std::array kCommands = {
    CommandSpec{"estimate", "State of charge, freeze point and cranking from one set of readings (offline)", &install_estimate},
    CommandSpec{"log", "Log one reading of one battery (from flags, or asked for on a terminal)", &install_log},
    CommandSpec{"import", "Import a round of readings from a CSV file", &install_import},
    CommandSpec{"history", "One battery's readings as a table and a chart", &install_history},
    CommandSpec{"winter", "Which batteries will not crank or may freeze at the coming low", &install_winter},
    CommandSpec{"sulfation", "Batteries showing signs of sulfation or ageing", &install_sulfation},
    CommandSpec{"replacements", "When batteries are expected to need replacing", &install_replacements},
    CommandSpec{"overdue", "Batteries whose readings are overdue", &install_overdue},
    CommandSpec{"depot", "Register and list depots", &install_depot},
    CommandSpec{"vehicle", "Register and list vehicles", &install_vehicle},
    CommandSpec{"battery", "Register, list, show, fit and retire batteries", &install_battery},
    CommandSpec{"token", "Create, list and revoke access tokens (admin)", &install_token},
    CommandSpec{"connect", "Store the server address and token for later commands", &install_connect},
};

}  // namespace

std::span<const CommandSpec> command_table() { return kCommands; }

std::string example(std::string_view lines) {
  std::string out = "\nExample:\n";
  std::size_t start = 0;
  while (start < lines.size()) {
    auto end = lines.find('\n', start);
    if (end == std::string_view::npos) end = lines.size();
    out += "  " + std::string(lines.substr(start, end - start)) + "\n";
    start = end + 1;
  }
  return out;
}

}  // namespace pbfleet::cli
