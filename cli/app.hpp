// pbfleet's entry point: builds the command tree from commands/table.hpp,
// parses the command line with CLI11 and runs the chosen command.
//
// Exit codes: 0 ok, 1 runtime or server error, 2 usage error, 3 data
// rejected by validation. Results on stdout; messages and errors on stderr.
#pragma once

#include <string>
#include <vector>

#include "cli/commands/context.hpp"
#include "cli/io.hpp"

namespace pbfleet::cli {

// Runs pbfleet with `args` (without the program name) against `io`.
int run(const std::vector<std::string>& args, Io& io, Seams seams = {});

// The real process.
int run(int argc, char** argv);

}  // namespace pbfleet::cli
