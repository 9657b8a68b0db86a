// pbfleetd: configuration -> open and migrate the database -> listen ->
// stop gracefully on SIGTERM/SIGINT (stop accepting, finish in-flight
// requests, close the database) and exit 0.
//
// Exit codes: 0 clean stop, 1 runtime failure, 2 bad configuration or usage.
#include <cstdio>
#include <fstream>
#include <iostream>
#include <map>

#include <CLI/CLI.hpp>
#include <spdlog/sinks/stdout_color_sinks.h>
#include <spdlog/spdlog.h>

#include "models/wire/reading.hpp"
#include "server/api/api.hpp"
#include "server/api/auth.hpp"
#include "server/api/bootstrap.hpp"
#include "server/api/config.hpp"
#include "server/http/server.hpp"
#include "server/storage/pg_store.hpp"
#include "server/storage/sqlite_store.hpp"
#include "server/web/dashboard.hpp"

namespace api = pbfleet::api;
namespace storage = pbfleet::storage;

namespace {

constexpr int kExitFailure = 1;
constexpr int kExitUsage = 2;

struct TokenCommand {
  std::string role = "crew";
  std::string name = "cli";
  std::optional<storage::Id> depot_id;
  std::optional<int> expires_in_days;  // nullopt: until revoked
};

int fail(int code, const std::string& message) {
  spdlog::error("{}", message);
  return code;
}

// Merges file, environment and flags (each overriding the last).
pbfleet::models::Result<api::Config> load_config(const std::string& file, api::Settings flags) {
  api::Settings merged;
  if (!file.empty()) {
    auto from_file = api::read_config_file(file);
    if (!from_file) return from_file.error();
    merged = std::move(from_file.value());
  }
  for (auto& [k, v] : api::settings_from_environment()) merged[k] = v;
  for (auto& [k, v] : flags) merged[k] = v;
  return api::make_config(merged);
}

int print_new_token(storage::Store& store, const TokenCommand& t) {
  auto role = storage::parse_role(t.role);
  if (!role) return fail(kExitUsage, "--role must be crew, technician, manager or admin");
  std::optional<std::chrono::days> lifetime;
  if (t.expires_in_days) lifetime = std::chrono::days{*t.expires_in_days};
  auto minted = api::mint_token(store, t.name, *role, t.depot_id, lifetime);
  if (!minted) return fail(kExitFailure, "cannot create token: " + minted.error().detail);
  std::cerr << "token " << minted->token.id << " (" << t.role << ") created";
  if (minted->token.expires_at)
    std::cerr << ", expires " << pbfleet::models::wire::format_timestamp(*minted->token.expires_at);
  std::cerr << "; it is shown once:\n";
  std::cout << minted->raw << std::endl;
  return 0;
}

// The database for logs: the SQLite file, or the PostgreSQL URI without its password.
std::string database_name(const api::Config& config) {
  return config.database.empty() ? config.db.string() : storage::redact_conninfo(config.database);
}

// Opens the configured store. On failure: one line naming the setting.
storage::StoreResult<std::unique_ptr<storage::Store>> open_store(const api::Config& config) {
  if (!config.database.empty()) {
    auto store = storage::open_postgres_store(config.database);
    if (!store) {
      return storage::StoreError{store.error().code,
                                 "database: cannot use " + database_name(config) + ": " + store.error().detail,
                                 "database"};
    }
    return store;
  }
  std::error_code ec;
  std::filesystem::create_directories(config.db.parent_path(), ec);
  auto store = storage::open_sqlite_store({.file = config.db, .max_size_bytes = config.max_db_bytes});
  if (!store) {
    return storage::StoreError{store.error().code,
                               "db: cannot open database " + config.db.string() + ": " + store.error().detail, "db"};
  }
  return store;
}

int serve(storage::Store& store, const api::Config& config, const std::string& port_file) {
  api::SystemClock clock;
  api::ApiOptions options;
  options.backup_dir = config.backup_dir;
  options.writer.preparers = config.prepare_threads;
  api::Api app(store, clock, options);
  pbfleet::web::Dashboard dashboard(
      app.context(), {.session_lifetime = std::chrono::hours{config.session_hours},
                      .secure_cookies = config.secure_cookies});
  app.set_pages(&dashboard);
  pbfleet::http::Server server(
      config.server, [&app](auto request, auto reply) { app.dispatch(std::move(request), std::move(reply)); },
      &api::Api::refusal);
  std::string error;
  if (!server.listen(config.host, config.port, &error)) return fail(kExitFailure, "cannot listen: " + error);
  spdlog::info("listening on {}:{} (database {}); dashboard at http://{}:{}/", config.host, server.port(),
               database_name(config), config.host, server.port());
  if (!port_file.empty()) std::ofstream(port_file) << server.port() << '\n';
  server.run();
  spdlog::info("stopped: in-flight requests finished, closing the database");
  return 0;
}

}  // namespace

int main(int argc, char** argv) {
  spdlog::set_default_logger(spdlog::stderr_color_mt("pbfleetd"));  // stdout is for data
  CLI::App cli{"pbfleetd: the pbfleet service (HTTP API over an embedded SQLite database, or PostgreSQL)"};
  cli.set_version_flag("--version", "pbfleetd 0.1.0");
  std::string config_file, init_token_file, port_file;
  std::map<std::string, std::string> flag_values;
  cli.add_option("--config", config_file, "Configuration file (key = value)");
  for (const auto& key : api::config_keys()) {
    std::string flag = "--" + key;
    std::replace(flag.begin(), flag.end(), '_', '-');
    cli.add_option(flag, flag_values[key], "Overrides '" + key + "' (see server/api/config.hpp)");
  }
  cli.add_option("--init-admin-token", init_token_file,
                 "On first start (no tokens yet), write an admin token to this new 0600 file");
  cli.add_option("--port-file", port_file, "Write the bound port here (for tests with port 0)");
  TokenCommand token;
  auto* token_cmd = cli.add_subcommand("token", "Token commands on the server host");
  auto* create = token_cmd->add_subcommand("create", "Create a token; prints it alone on the last line");
  create->add_option("--role", token.role, "crew, technician, manager or admin")->required();
  create->add_option("--name", token.name, "A name to recognise the token by");
  create->add_option("--depot-id", token.depot_id, "Limit the token to one depot");
  create->add_option("--expires-in", token.expires_in_days, "Days until the token stops working (default: until revoked)")
      ->type_name("DAYS")
      ->check(CLI::Range(api::kMinTokenLifetimeDays, api::kMaxTokenLifetimeDays));
  token_cmd->require_subcommand(1);
  token_cmd->fallthrough();
  create->fallthrough();
  try {
    cli.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    // Help and version end well; anything else is a usage error (exit 2,
    // like every other refused command line), not CLI11's own codes.
    return cli.exit(e) == 0 ? 0 : kExitUsage;
  }

  std::erase_if(flag_values, [](const auto& kv) { return kv.second.empty(); });
  auto config = load_config(config_file, flag_values);
  if (!config) return fail(kExitUsage, config.error().field + ": " + config.error().detail +
                                           " (accepted: " + config.error().allowed + ")");
  spdlog::set_level(spdlog::level::from_str(config->log_level));

  auto store = open_store(config.value());
  if (!store) return fail(kExitFailure, store.error().detail);

  if (*create) return print_new_token(*store.value(), token);
  if (!init_token_file.empty()) {
    auto written = api::init_admin_token(*store.value(), init_token_file);
    if (!written) return fail(kExitFailure, written.error().detail);
    if (*written) {
      spdlog::info("admin token written to {}", init_token_file);
    } else {
      spdlog::info("tokens exist; {} not written", init_token_file);
    }
  }
  return serve(*store.value(), config.value(), port_file);
}
