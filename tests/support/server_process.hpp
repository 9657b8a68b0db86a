// pbfleetd as a child process of a test: the build tree's daemon on
// 127.0.0.1 with an ephemeral port (--listen 127.0.0.1:0 --port-file), a
// database in a temporary folder, and its log captured to a file.
//
// It always stops: the destructor kills it by PID, the child gets SIGKILL
// if the test process dies (PR_SET_PDEATHSIG), and a watchdog thread kills
// every daemon still running and ends the test process once the watchdog
// limit passes (PBFLEET_TEST_WATCHDOG_S, default 300 s).
#pragma once

#include <sys/types.h>

#include <chrono>
#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

namespace pbfleet::testing {

// A fresh folder under $TMPDIR (or /tmp), removed with everything in it
// when the object goes away (kept when PBFLEET_KEEP_TEST_DIRS is set).
class TempDir {
 public:
  explicit TempDir(const std::string& prefix = "pbfleet-test");
  ~TempDir();
  TempDir(const TempDir&) = delete;
  TempDir& operator=(const TempDir&) = delete;
  [[nodiscard]] const std::filesystem::path& path() const { return path_; }
  [[nodiscard]] std::filesystem::path operator/(const std::string& name) const {
    return path_ / name;
  }

 private:
  std::filesystem::path path_;
};

struct ServerConfig {
  std::filesystem::path db;            // database file (created on first start); its
                                       // folder also holds the port file
  std::filesystem::path log;           // stdout and stderr of the daemon, appended
  std::filesystem::path admin_token;   // --init-admin-token file (written on first start)
  std::vector<std::string> extra_args; // more flags, e.g. {"--header-timeout-ms", "1000"}
  std::string log_level = "info";      // info: one access line per request
  std::string database;                // PostgreSQL URI: --database instead of --db
};

class ServerProcess {
 public:
  // The daemon this build made (PBFLEET_DAEMON_PATH, set by CMake).
  static std::filesystem::path executable();

  // Starts the daemon and waits (up to 20 s) until /healthz answers.
  // Throws std::runtime_error when it does not come up.
  explicit ServerProcess(ServerConfig config);
  ~ServerProcess();
  ServerProcess(const ServerProcess&) = delete;
  ServerProcess& operator=(const ServerProcess&) = delete;

  [[nodiscard]] std::uint16_t port() const { return port_; }
  [[nodiscard]] pid_t pid() const { return pid_; }
  [[nodiscard]] bool running() const { return pid_ > 0; }
  [[nodiscard]] const ServerConfig& config() const { return config_; }
  // The bootstrap admin token written on first start.
  [[nodiscard]] std::string admin_token() const;
  // Everything the daemon has written to its log so far.
  [[nodiscard]] std::string log_text() const;

  // SIGKILL now and reap (a crash: no cleanup runs in the daemon).
  void kill_hard();
  // SIGTERM, then wait up to `grace`; the exit code, or -1 when it had to
  // be killed or died of a signal.
  int terminate(std::chrono::milliseconds grace = std::chrono::seconds{10});
  // Starts again on the same database (a new port). REQUIRES: !running().
  void start();

 private:
  ServerConfig config_;
  pid_t pid_ = -1;
  std::uint16_t port_ = 0;
};

// A raw token's text read from a file (trailing newline dropped).
std::string read_text_file(const std::filesystem::path& file);
// Counts non-overlapping occurrences of `needle` in a file's bytes.
std::size_t count_in_file(const std::filesystem::path& file, const std::string& needle);

}  // namespace pbfleet::testing
