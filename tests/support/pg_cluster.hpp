// A throwaway PostgreSQL 15 cluster for tests and benchmarks.
//
// initdb into a fresh temporary folder, then `postgres` as a child of this
// process on 127.0.0.1 and a random free port (its unix socket stays in the
// temporary folder). As root (CI runs so), initdb and postgres run as the
// unprivileged user `nobody` (PostgreSQL refuses to run as root) and the
// folder is handed to that user. Stopped in the destructor: SIGINT (fast
// shutdown) to the PID this object started, then a wait; the server also
// gets SIGINT when the thread that started it dies (PR_SET_PDEATHSIG), so
// a crashed test leaves no server behind. The folder is removed afterwards.
//
// Binaries: $PBFLEET_PG_BIN, else /usr/lib/postgresql/15/bin
// (deploy/setup installs postgresql-15). A missing binary is an error (the
// postgres-labelled tests fail, they never skip).
#pragma once

#include <sys/types.h>

#include <cstdint>
#include <filesystem>
#include <string>

namespace pbfleet::testing {

struct PgClusterOptions {
  // fsync off makes throwaway clusters for functional tests fast;
  // benchmarks keep it on so figures include the commit flush.
  bool fsync = false;
};

class PgCluster {
 public:
  // Creates and starts the cluster; throws std::runtime_error (with the
  // server's log tail) when it cannot.
  explicit PgCluster(PgClusterOptions options = {});
  ~PgCluster();
  PgCluster(const PgCluster&) = delete;
  PgCluster& operator=(const PgCluster&) = delete;

  // A new empty database; returns its URI
  // postgresql://pbfleet@127.0.0.1:PORT/NAME.
  std::string create_database(const std::string& name);
  // A new database with a unique name ("t1", "t2", ...).
  std::string fresh_database();
  // URI of an existing database of this cluster.
  std::string uri(const std::string& database) const;

  [[nodiscard]] std::uint16_t port() const { return port_; }
  [[nodiscard]] pid_t pid() const { return pid_; }
  [[nodiscard]] const std::filesystem::path& folder() const { return dir_; }
  // The folder holding pg_dump, pg_restore, psql ...
  static std::filesystem::path bin_dir();

  // Stops the server now (fast shutdown) and reaps it; idempotent.
  void stop();

 private:
  void start();
  std::filesystem::path dir_;
  PgClusterOptions options_;
  pid_t pid_ = -1;
  std::uint16_t port_ = 0;
  int next_database_ = 0;
};

// A port on 127.0.0.1 that nothing listened on a moment ago.
std::uint16_t unused_local_port();

// One cluster per test process, started on first use and stopped at exit.
PgCluster& shared_pg_cluster();

}  // namespace pbfleet::testing
