#include "cli/commands/prompt.hpp"

#include <termios.h>
#include <unistd.h>

#include <istream>
#include <ostream>

namespace pbfleet::cli {
namespace {

// Echo off for the life of the object, restored even on early return.
class EchoOff {
 public:
  explicit EchoOff(bool active) : active_(active && tcgetattr(STDIN_FILENO, &saved_) == 0) {
    if (!active_) return;
    termios quiet = saved_;
    quiet.c_lflag &= ~static_cast<tcflag_t>(ECHO);
    tcsetattr(STDIN_FILENO, TCSAFLUSH, &quiet);
  }
  ~EchoOff() {
    if (active_) tcsetattr(STDIN_FILENO, TCSAFLUSH, &saved_);
  }
  EchoOff(const EchoOff&) = delete;
  EchoOff& operator=(const EchoOff&) = delete;

 private:
  termios saved_{};
  bool active_;
};

std::string trim(const std::string& s) {
  auto b = s.find_first_not_of(" \t\r\n");
  if (b == std::string::npos) return "";
  return s.substr(b, s.find_last_not_of(" \t\r\n") - b + 1);
}

}  // namespace

std::optional<std::string> ask(Context& ctx, std::string_view question, bool hidden) {
  ctx.err() << question << std::flush;
  std::string line;
  bool got = false;
  {
    EchoOff echo(hidden && ctx.io().in_tty);
    got = static_cast<bool>(std::getline(*ctx.io().in, line));
  }
  if (hidden && ctx.io().in_tty) ctx.err() << '\n';
  if (!got) return std::nullopt;
  return trim(line);
}

}  // namespace pbfleet::cli
