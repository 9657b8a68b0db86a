// pbfleetd configuration: a `key = value` file, then PBFLEET_<KEY>
// environment variables, then command-line flags, each overriding the last.
//
// Keys (flags are the same names with '-' for '_', e.g. --log-level):
//   listen              HOST:PORT, default 127.0.0.1:8470 (loopback)
//   data                data folder; the database is DATA/pbfleet.db
//   db                  database file (overrides data)
//   database            a PostgreSQL database instead of SQLite:
//                       postgresql://USER@HOST:PORT/DBNAME (libpq's PG*
//                       variables and ~/.pgpass apply; a password in the URI
//                       is never logged). Not together with data or db.
//   log_level           trace, debug, info, warn, error (default info)
//   backup_dir          folder for POST /v1/admin/backup (default DATA/backups
//                       or beside the database)
//   body_limit_bytes    default 1048576 (1 MiB)
//   header_limit_bytes  default 8192
//   header_timeout_ms   default 10000
//   body_timeout_ms     default 30000
//   write_timeout_ms    default 30000
//   max_connections     default 512
//   io_threads          default 2
//   worker_threads      default 8
//   prepare_threads     requests preparing readings at once, 0..256; 0 (the
//                       default) = one fewer than the cores, at least 1, so
//                       the database writer keeps a core to itself
//   max_db_bytes        cap on the database file size, 0 = none (default);
//                       a write that would pass it gets 507 storage-full and
//                       stores nothing, exactly as on a full disk
//   secure_cookies      true when a TLS proxy fronts pbfleetd: the dashboard's
//                       cookies then carry Secure (default false)
//   session_hours       how long a dashboard sign-in lasts, 1..168 (default 12)
#pragma once

#include <cstdint>
#include <filesystem>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "models/result.hpp"
#include "server/http/server.hpp"

namespace pbfleet::api {

struct Config {
  std::string host = "127.0.0.1";
  std::uint16_t port = 8470;
  std::filesystem::path db;          // resolved SQLite database file (empty with `database`)
  std::string database;              // PostgreSQL URI; empty = SQLite at `db`
  std::filesystem::path backup_dir;  // resolved backup folder (SQLite; empty with `database`)
  std::string log_level = "info";
  std::uint64_t max_db_bytes = 0;    // 0 = no cap (see storage SqliteOptions)
  http::ServerOptions server;        // limits and threads
  std::size_t prepare_threads = 0;   // 0 = cores - 1 (see WriterOptions::preparers)
  bool secure_cookies = false;       // dashboard cookies carry Secure
  int session_hours = 12;            // dashboard session lifetime
};

using Settings = std::map<std::string, std::string>;

// Every key the configuration knows, in documentation order.
const std::vector<std::string>& config_keys();

// Reads a `key = value` file ('#' starts a comment). Error names the line.
models::Result<Settings> read_config_file(const std::filesystem::path& file);
// PBFLEET_<KEY> variables present in the environment.
Settings settings_from_environment();
// Builds the configuration from merged settings. Error names the key and
// the accepted form.
models::Result<Config> make_config(const Settings& settings);

// "HOST:PORT" -> host and port; nullopt when malformed.
std::optional<std::pair<std::string, std::uint16_t>> parse_listen(const std::string& text);

}  // namespace pbfleet::api
