// What every command is handed: the streams, the global flags, the resolved
// connection settings and an API client, plus the one way to say what went
// wrong and with which exit code.
#pragma once

#include <chrono>
#include <functional>
#include <optional>
#include <string>
#include <string_view>

#include "cli/client/api.hpp"
#include "cli/config/settings.hpp"
#include "cli/format/style.hpp"
#include "cli/io.hpp"

namespace pbfleet::cli {

// Documented exit codes (pbfleet --help).
inline constexpr int kExitOk = 0;
inline constexpr int kExitFailure = 1;   // runtime or server error
inline constexpr int kExitUsage = 2;     // bad command line
inline constexpr int kExitRejected = 3;  // data rejected by validation (local or server)

// "field: detail (allowed: range)" for a person.
std::string describe(const models::Error& error);

// Flags accepted before or after any subcommand.
struct GlobalOptions {
  std::string server;           // --server URL
  std::string token_file;       // --token-file FILE
  std::string color = "auto";   // --color auto|always|never
  bool ascii = false;           // --ascii
};

// Seams for tests: a fake server and a fixed clock.
struct Seams {
  std::optional<client::Transport> transport;
  std::function<std::chrono::sys_seconds()> clock;
};

class Context {
 public:
  Context(Io& io, Seams seams) : io_(io), seams_(std::move(seams)) {}

  Io& io() { return io_; }
  std::ostream& out() { return *io_.out; }
  std::ostream& err() { return *io_.err; }
  GlobalOptions& global() { return global_; }

  [[nodiscard]] format::Style out_style() const;  // colour and Unicode for stdout
  [[nodiscard]] format::Style err_style() const;  // for stderr
  [[nodiscard]] std::chrono::sys_seconds now() const;

  // Settings from the config file, the environment and the flags.
  models::Result<config::Settings> settings() const;
  // A client for the resolved server and token.
  models::Result<client::Api> api() const;

  // "error: ..." on stderr; returns `code` so commands can `return fail(...)`.
  int fail(int code, std::string_view message);
  // "warning: ..." on stderr.
  void warn(std::string_view message);
  // Explains a failed exchange on stderr and returns its exit code (3 for a
  // data rejection, 1 otherwise). `row_offset` shifts problem row numbers.
  int fail(const client::Reply& reply, int row_offset = 0);

  int exit_code = kExitOk;  // set by the command that ran

 private:
  Io& io_;
  Seams seams_;
  GlobalOptions global_;
};

}  // namespace pbfleet::cli
