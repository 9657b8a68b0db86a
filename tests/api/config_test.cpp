#include "server/api/config.hpp"

#include <doctest/doctest.h>

#include <cstdlib>
#include <fstream>

namespace pbfleet::api {

TEST_CASE("defaults listen on loopback port 8470 with the documented limits") {
  auto c = make_config({{"data", "/tmp/x"}});
  REQUIRE(c.ok());
  CHECK(c->host == "127.0.0.1");
  CHECK(c->port == 8470);
  CHECK(c->db == std::filesystem::path("/tmp/x/pbfleet.db"));
  CHECK(c->backup_dir == std::filesystem::path("/tmp/x/backups"));
  CHECK(c->server.limits.body_bytes == 1024 * 1024);
  CHECK(c->server.limits.header_bytes == 8 * 1024);
  CHECK(c->server.limits.header_timeout == std::chrono::seconds(10));
}

TEST_CASE("db overrides data, and limits are read as numbers") {
  auto c = make_config({{"data", "/tmp/x"}, {"db", "/srv/f.db"}, {"listen", "0.0.0.0:9000"},
                        {"body_limit_bytes", "2048"}, {"header_timeout_ms", "1500"}});
  REQUIRE(c.ok());
  CHECK(c->db == std::filesystem::path("/srv/f.db"));
  CHECK(c->host == "0.0.0.0");
  CHECK(c->port == 9000);
  CHECK(c->server.limits.body_bytes == 2048);
  CHECK(c->server.limits.header_timeout == std::chrono::milliseconds(1500));
}

TEST_CASE("bad values name the key and the accepted form") {
  auto no_db = make_config({});
  REQUIRE_FALSE(no_db.ok());
  CHECK(no_db.error().field == "data");
  auto bad_listen = make_config({{"data", "/x"}, {"listen", "localhost"}});
  REQUIRE_FALSE(bad_listen.ok());
  CHECK(bad_listen.error().field == "listen");
  auto bad_limit = make_config({{"data", "/x"}, {"max_connections", "0"}});
  REQUIRE_FALSE(bad_limit.ok());
  CHECK(bad_limit.error().field == "max_connections");
  CHECK(bad_limit.error().allowed == "1 to 100000");
  auto bad_level = make_config({{"data", "/x"}, {"log_level", "loud"}});
  CHECK_FALSE(bad_level.ok());
  auto bad_preparers = make_config({{"data", "/x"}, {"prepare_threads", "-1"}});
  REQUIRE_FALSE(bad_preparers.ok());
  CHECK(bad_preparers.error().field == "prepare_threads");
  CHECK(bad_preparers.error().allowed == "0 to 256");
}

TEST_CASE("prepare_threads defaults to 0 (one fewer than the cores) and reads a count") {
  auto c = make_config({{"data", "/x"}});
  REQUIRE(c.ok());
  CHECK(c->prepare_threads == 0);
  auto three = make_config({{"data", "/x"}, {"prepare_threads", "3"}});
  REQUIRE(three.ok());
  CHECK(three->prepare_threads == 3);
}

TEST_CASE("listen addresses parse with IPv4, bracketed IPv6 and port 0") {
  CHECK(parse_listen("127.0.0.1:0") == std::pair<std::string, std::uint16_t>{"127.0.0.1", 0});
  CHECK(parse_listen("[::1]:8470") == std::pair<std::string, std::uint16_t>{"::1", 8470});
  CHECK_FALSE(parse_listen("127.0.0.1:70000"));
  CHECK_FALSE(parse_listen("127.0.0.1:"));
}

TEST_CASE("the config file takes key = value lines with comments and refuses unknown keys") {
  auto path = std::filesystem::temp_directory_path() / "pbfleet-config-test.conf";
  {
    std::ofstream out(path);
    out << "# comment\nlisten = 127.0.0.1:9001  # trailing\n\nlog_level=debug\n";
  }
  auto s = read_config_file(path);
  REQUIRE(s.ok());
  CHECK(s->at("listen") == "127.0.0.1:9001");
  CHECK(s->at("log_level") == "debug");
  {
    std::ofstream out(path);
    out << "listen = 127.0.0.1:9001\nport = 3\n";
  }
  auto bad = read_config_file(path);
  REQUIRE_FALSE(bad.ok());
  CHECK(bad.error().detail.find(":2: unknown key 'port'") != std::string::npos);
  std::filesystem::remove(path);
}

TEST_CASE("environment variables are PBFLEET_ and the key in capitals") {
  ::setenv("PBFLEET_LOG_LEVEL", "warn", 1);
  auto s = settings_from_environment();
  ::unsetenv("PBFLEET_LOG_LEVEL");
  CHECK(s.at("log_level") == "warn");
}

TEST_CASE("database names a PostgreSQL database instead of a SQLite file") {
  auto c = make_config({{"database", "postgresql://fleet@db.example:5432/fleet"}});
  REQUIRE(c.ok());
  CHECK(c->database == "postgresql://fleet@db.example:5432/fleet");
  CHECK(c->db.empty());
  CHECK(c->backup_dir.empty());  // backups of PostgreSQL go through deploy/backup
  CHECK(make_config({{"database", "postgres://fleet@db/fleet"}}).ok());
}

TEST_CASE("database must be a PostgreSQL URI and is not combined with data or db") {
  auto not_uri = make_config({{"database", "/srv/pbfleet.db"}});
  REQUIRE_FALSE(not_uri.ok());
  CHECK(not_uri.error().field == "database");
  CHECK(not_uri.error().allowed.find("postgresql://") != std::string::npos);
  auto both = make_config({{"database", "postgresql://fleet@db/fleet"}, {"data", "/tmp/x"}});
  REQUIRE_FALSE(both.ok());
  CHECK(both.error().field == "database");
}

}  // namespace pbfleet::api
