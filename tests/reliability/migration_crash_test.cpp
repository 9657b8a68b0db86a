// RELIABILITY-TESTS row 23: pbfleetd killed with SIGKILL while it migrates
// a version-1 database to the current schema. Each migration is one
// transaction, so after every kill the file is wholly at version 1, 2 or 3
// (never inside a migration) and passes integrity_check; a normal start then
// finishes the migration.
//
// The version-1 file is made by letting the daemon create a current
// database with data, then undoing migrations 0003 (the web_sessions table)
// and 0002 (the api_tokens.expires_at column). Kill times are spread at random over the
// daemon's measured start-up time, so runs land before, during and after
// the migration. (tests/storage/sqlite_migrate_test.cpp kills a process
// inside an open migration transaction deterministically.)
#include <doctest/doctest.h>

#include <fcntl.h>
#include <signal.h>
#include <sys/prctl.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <random>
#include <thread>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {
namespace {

using namespace std::chrono_literals;

// Starts pbfleetd on `db` (127.0.0.1, ephemeral port); its output goes to `log`.
pid_t spawn_daemon(const std::filesystem::path& db, const std::filesystem::path& port_file,
                   const std::filesystem::path& log) {
  std::vector<std::string> args{ServerProcess::executable().string(), "--listen", "127.0.0.1:0",
                                "--db", db.string(), "--log-level", "warn", "--port-file",
                                port_file.string()};
  std::vector<char*> argv;
  for (auto& a : args) argv.push_back(a.data());
  argv.push_back(nullptr);
  const pid_t parent = ::getpid();
  const pid_t pid = ::fork();
  REQUIRE(pid >= 0);
  if (pid == 0) {
    ::prctl(PR_SET_PDEATHSIG, SIGKILL);
    if (::getppid() != parent) ::_exit(126);
    const int fd = ::open(log.c_str(), O_WRONLY | O_CREAT | O_APPEND, 0600);
    if (fd >= 0) {
      ::dup2(fd, 1);
      ::dup2(fd, 2);
    }
    ::execv(argv[0], argv.data());
    ::_exit(127);
  }
  return pid;
}

// SIGKILL and reap; true when it died of the signal (it had not exited).
bool kill_and_reap(pid_t pid) {
  ::kill(pid, SIGKILL);
  int status = 0;
  ::waitpid(pid, &status, 0);
  return WIFSIGNALED(status);
}

// Time from spawn until the daemon has written its port file (migrated and listening).
std::chrono::microseconds startup_time(const std::filesystem::path& db, const TempDir& dir) {
  const auto port_file = dir / "calibrate.port";
  const auto start = std::chrono::steady_clock::now();
  const pid_t pid = spawn_daemon(db, port_file, dir / "calibrate.log");
  while (!std::filesystem::exists(port_file) && std::chrono::steady_clock::now() - start < 20s)
    std::this_thread::sleep_for(200us);
  const auto took = std::chrono::steady_clock::now() - start;
  kill_and_reap(pid);
  REQUIRE(std::filesystem::exists(port_file));
  return std::chrono::duration_cast<std::chrono::microseconds>(took);
}

struct Shape {
  std::int64_t version = 0;
  std::int64_t expiry_column = 0;
  std::int64_t sessions_table = 0;
  std::int64_t summaries_table = 0;
  bool fast_trusted_trigger = false;  // schema 0005's readings_summary_trusted
  std::string integrity;
};

Shape shape_of(const std::filesystem::path& db) {
  SqliteProbe probe(db);
  return {probe.integer("SELECT max(version) FROM schema_version"),
          probe.integer("SELECT count(*) FROM pragma_table_info('api_tokens') WHERE name = 'expires_at'"),
          probe.integer("SELECT count(*) FROM sqlite_schema WHERE name = 'web_sessions'"),
          probe.integer("SELECT count(*) FROM sqlite_schema WHERE name = 'battery_summaries'"),
          probe.integer("SELECT count(*) FROM sqlite_schema WHERE name = 'readings_summary_trusted'"
                        " AND sql LIKE '%trusted_id IS NOT NEW.id%'") == 1,
          probe.integrity()};
}

}  // namespace

// Each migration runs in its own transaction: a kill leaves the database
// exactly at one of the versions, each with its own shape.
bool whole_version(const Shape& s) {
  switch (s.version) {
    case 1: return s.expiry_column == 0 && s.sessions_table == 0 && s.summaries_table == 0;
    case 2: return s.expiry_column == 1 && s.sessions_table == 0 && s.summaries_table == 0;
    case 3: return s.expiry_column == 1 && s.sessions_table == 1 && s.summaries_table == 0;
    case 4: return s.expiry_column == 1 && s.sessions_table == 1 && s.summaries_table == 1 &&
                   !s.fast_trusted_trigger;
    case 5: return s.expiry_column == 1 && s.sessions_table == 1 && s.summaries_table == 1 &&
                   s.fast_trusted_trigger;
    default: return false;
  }
}

TEST_CASE("a migration killed at random moments leaves a whole version, and a restart finishes it") {
  TempDir dir("pbfleet-migrate");
  const auto v1 = dir / "v1.db";
  {
    // A current database with a fleet and tokens, then migrations 0002 to 0005 undone.
    LiveFleet fleet({.batteries_per_depot = 2, .extra_args = {}, .log_level = "warn", .database = {}});
    REQUIRE(fleet.client("crew").post("/v1/readings", good_reading(fleet.serials("North Yard")[0], "m-1", 1)).status == 201);
    REQUIRE(fleet.server().terminate() == 0);
    {
      SqliteProbe probe(fleet.db());
      REQUIRE(probe.integer("SELECT max(version) FROM schema_version") == 5);
      for (const char* trigger :
           {"readings_summary_untrusted", "readings_summary_trusted", "readings_summary_deleted",
            "batteries_summary", "depots_changed_insert", "depots_changed_update",
            "vehicles_changed_insert", "vehicles_changed_update", "batteries_changed_insert",
            "batteries_changed_update"})
        probe.column(std::string("DROP TRIGGER ") + trigger);
      probe.column("DROP TABLE battery_summaries");
      probe.column("DROP TABLE summary_state");
      probe.column("ALTER TABLE readings DROP COLUMN trusted_soc_pct");
      probe.column("ALTER TABLE readings DROP COLUMN trusted_temp_c");
      probe.column("DELETE FROM counters WHERE name = 'fleet_changes'");
      probe.column("DROP TABLE web_sessions");
      probe.column("ALTER TABLE api_tokens DROP COLUMN expires_at");
      probe.column("DELETE FROM schema_version WHERE version >= 2");
      probe.column("PRAGMA wal_checkpoint(TRUNCATE)");
    }
    std::filesystem::copy_file(fleet.db(), v1);
  }
  const Shape old = shape_of(v1);
  REQUIRE(old.version == 1);
  REQUIRE(old.expiry_column == 0);
  REQUIRE(old.sessions_table == 0);
  REQUIRE(old.summaries_table == 0);

  const auto work = dir / "work.db";
  std::filesystem::copy_file(v1, work);
  const auto full = startup_time(work, dir);
  MESSAGE("start-up with migration takes " << full.count() << " us");
  std::mt19937 rng(std::random_device{}());
  std::uniform_int_distribution<long> delay_us(0, full.count() + full.count() / 5);

  int at_old = 0, between = 0, at_new = 0, finished_first = 0;
  for (int run = 0; run < 20; ++run) {
    CAPTURE(run);
    std::filesystem::remove(work);
    std::filesystem::remove(work.string() + "-wal");
    std::filesystem::remove(work.string() + "-shm");
    std::filesystem::copy_file(v1, work);
    const auto delay = std::chrono::microseconds{delay_us(rng)};
    const pid_t pid = spawn_daemon(work, dir / "run.port", dir / "run.log");
    std::this_thread::sleep_for(delay);
    finished_first += !kill_and_reap(pid);
    const Shape after = shape_of(work);
    CAPTURE(after.version);
    CAPTURE(after.expiry_column);
    CAPTURE(after.sessions_table);
    CAPTURE(after.summaries_table);
    CHECK(after.integrity == "ok");
    CHECK(whole_version(after));
    at_old += after.version == 1;
    between += after.version >= 2 && after.version <= 4;
    at_new += after.version == 5;
    // A normal start finishes the migration and serves the old data.
    ServerConfig config;
    config.db = work;
    config.log = dir / "restart.log";
    config.log_level = "warn";
    ServerProcess restarted(config);
    CHECK(restarted.terminate() == 0);
    const Shape done = shape_of(work);
    CHECK(done.version == 5);
    CHECK(whole_version(done));
    SqliteProbe probe(work);
    CHECK(probe.integer("SELECT count(*) FROM readings WHERE reading_id = 'm-1'") == 1);
    // A kill after 0005 but before the summaries were made leaves them
    // unmade (facts_version empty); the restart makes them.
    CHECK(probe.integer("SELECT count(*) FROM summary_state WHERE name = 'facts_version' AND value <> ''") == 1);
    CHECK(probe.integer("SELECT s.recent FROM battery_summaries s JOIN readings r ON r.battery_id = s.battery_id"
                        " WHERE r.reading_id = 'm-1'") == 1);
    CHECK(probe.integer("SELECT count(*) FROM api_tokens WHERE expires_at IS NOT NULL") == 0);
  }
  MESSAGE("kills left " << at_old << " at version 1, " << between << " at 2 or 3 and " << at_new
                         << " at 4");
  CHECK(at_old + between + at_new == 20);
  CHECK(finished_first == 0);
}

}  // namespace pbfleet::testing
