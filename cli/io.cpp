#include "cli/io.hpp"

#include <sys/ioctl.h>
#include <unistd.h>

#include <algorithm>
#include <iostream>

extern char** environ;

namespace pbfleet::cli {
namespace {

// Narrowest and widest layout we draw for; outside it we clamp.
constexpr int kMinColumns = 40;
constexpr int kMaxColumns = 200;

int terminal_width(bool out_tty) {
  winsize ws{};
  if (out_tty && ioctl(STDOUT_FILENO, TIOCGWINSZ, &ws) == 0 && ws.ws_col > 0) {
    return std::clamp<int>(ws.ws_col, kMinColumns, kMaxColumns);
  }
  return 80;
}

}  // namespace

Io process_io() {
  Io io;
  io.in = &std::cin;
  io.out = &std::cout;
  io.err = &std::cerr;
  io.in_tty = isatty(STDIN_FILENO) == 1;
  io.out_tty = isatty(STDOUT_FILENO) == 1;
  io.err_tty = isatty(STDERR_FILENO) == 1;
  io.terminal_columns = terminal_width(io.out_tty);
  for (char** e = environ; e != nullptr && *e != nullptr; ++e) {
    std::string entry(*e);
    auto eq = entry.find('=');
    if (eq != std::string::npos) io.env.emplace(entry.substr(0, eq), entry.substr(eq + 1));
  }
  return io;
}

}  // namespace pbfleet::cli
