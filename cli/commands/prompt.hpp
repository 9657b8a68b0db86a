// Asking a person for a value on a terminal: the question on stderr, the
// answer from stdin. Used only when stdin is a TTY (never in scripts).
#pragma once

#include <optional>
#include <string>
#include <string_view>

#include "cli/commands/context.hpp"

namespace pbfleet::cli {

// The answer, trimmed; nullopt at end of input. `hidden` turns off the
// terminal echo while typing (for tokens).
std::optional<std::string> ask(Context& ctx, std::string_view question, bool hidden = false);

}  // namespace pbfleet::cli
