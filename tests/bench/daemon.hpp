// pbfleetd run by a benchmark: started on 127.0.0.1 port 0 (the kernel
// picks a free one; pbfleetd writes it to LOG.port) with the given database, waited for until /healthz answers, stopped by PID
// (SIGTERM, then SIGKILL after a grace period) when the object goes away.
#pragma once

#include <sys/types.h>

#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

namespace pbfleet::bench {

class Daemon {
 public:
  // Throws std::runtime_error when the daemon does not answer within 20 s.
  // Its output goes to `log`.
  Daemon(const std::filesystem::path& exe, const std::filesystem::path& db,
         const std::filesystem::path& log);
  // The same on a PostgreSQL database (--database URI).
  Daemon(const std::filesystem::path& exe, const std::string& database_uri,
         const std::filesystem::path& log);
  ~Daemon();
  Daemon(const Daemon&) = delete;
  Daemon& operator=(const Daemon&) = delete;

  [[nodiscard]] std::uint16_t port() const { return port_; }
  [[nodiscard]] pid_t pid() const { return pid_; }
  // A "Vm...:" line of /proc/PID/status in kB (VmHWM = peak RSS), or -1.
  [[nodiscard]] long status_kb(const std::string& field) const;
  // CPU time (user + system) the daemon's threads named `thread` have used
  // so far, in seconds; every thread when `thread` is empty. Threads that
  // ended are not counted, so compare snapshots of long-lived threads.
  [[nodiscard]] double cpu_seconds(const std::string& thread = {}) const;
  // Stops the daemon now (idempotent).
  void stop();

 private:
  Daemon(const std::filesystem::path& exe, const std::filesystem::path& log,
         std::vector<std::string> database_args);
  pid_t pid_ = -1;
  std::uint16_t port_ = 0;
};

// Kills every daemon still running (for the watchdog).
void kill_daemons();

}  // namespace pbfleet::bench
