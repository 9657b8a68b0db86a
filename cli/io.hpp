// The process environment as the commands see it: streams, whether each is a
// terminal, and a snapshot of the environment variables.
//
// Passed in (never read from globals) so tests drive every command with
// string streams and a made-up environment.
#pragma once

#include <iosfwd>
#include <map>
#include <optional>
#include <string>

namespace pbfleet::cli {

struct Io {
  std::istream* in = nullptr;
  std::ostream* out = nullptr;   // results only
  std::ostream* err = nullptr;   // messages, warnings, progress, errors
  bool in_tty = false;
  bool out_tty = false;
  bool err_tty = false;
  int terminal_columns = 80;
  std::map<std::string, std::string> env;

  // Value of an environment variable; nullopt when unset.
  [[nodiscard]] std::optional<std::string> getenv(const std::string& name) const {
    auto it = env.find(name);
    if (it == env.end()) return std::nullopt;
    return it->second;
  }
};

// The real process: std::cin/cout/cerr, isatty(), environ, terminal width.
Io process_io();

}  // namespace pbfleet::cli
