#include "server/api/config.hpp"

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cstdlib>
#include <fstream>

namespace pbfleet::api {

namespace {

std::string trim(std::string s) {
  auto not_space = [](unsigned char c) { return !std::isspace(c); };
  s.erase(s.begin(), std::find_if(s.begin(), s.end(), not_space));
  s.erase(std::find_if(s.rbegin(), s.rend(), not_space).base(), s.end());
  return s;
}

bool known_key(const std::string& key) {
  const auto& keys = config_keys();
  return std::find(keys.begin(), keys.end(), key) != keys.end();
}

// A whole number in [min, max] from settings[key], when present.
template <class T>
models::Result<bool> read_number(const Settings& s, const std::string& key, T min, T max, T& into) {
  auto it = s.find(key);
  if (it == s.end()) return false;
  T value{};
  const auto& text = it->second;
  auto r = std::from_chars(text.data(), text.data() + text.size(), value);
  if (r.ec != std::errc{} || r.ptr != text.data() + text.size() || value < min || value > max)
    return models::Error{key, "'" + text + "' is not accepted",
                         std::to_string(min) + " to " + std::to_string(max)};
  into = value;
  return true;
}

models::Result<bool> apply_limits(const Settings& s, http::ServerOptions& o) {
  using ms = std::chrono::milliseconds;
  std::size_t body = o.limits.body_bytes, header = o.limits.header_bytes;
  long long header_ms = o.limits.header_timeout.count(), body_ms = o.limits.body_timeout.count(),
            write_ms = o.limits.write_timeout.count();
  std::vector<models::Result<bool>> results{
      read_number<std::size_t>(s, "body_limit_bytes", 1024, 256u << 20, body),
      read_number<std::size_t>(s, "header_limit_bytes", 1024, 1u << 20, header),
      read_number<long long>(s, "header_timeout_ms", 100, 600'000, header_ms),
      read_number<long long>(s, "body_timeout_ms", 100, 600'000, body_ms),
      read_number<long long>(s, "write_timeout_ms", 100, 600'000, write_ms),
      read_number<std::size_t>(s, "max_connections", 1, 100'000, o.limits.max_connections),
      read_number<std::size_t>(s, "io_threads", 1, 64, o.io_threads),
      read_number<std::size_t>(s, "worker_threads", 1, 256, o.worker_threads),
  };
  for (auto& r : results)
    if (!r) return r.error();
  o.limits.body_bytes = body;
  o.limits.header_bytes = header;
  o.limits.header_timeout = ms(header_ms);
  o.limits.body_timeout = ms(body_ms);
  o.limits.write_timeout = ms(write_ms);
  return true;
}

bool given(const Settings& s, const std::string& key) {
  auto it = s.find(key);
  return it != s.end() && !it->second.empty();
}

// `database` names a PostgreSQL database; data and db name SQLite files.
models::Result<bool> apply_database(const Settings& s, Config& c) {
  const std::string& uri = s.at("database");
  if (uri.rfind("postgresql://", 0) != 0 && uri.rfind("postgres://", 0) != 0)
    return models::Error{"database", "is not a PostgreSQL URI",
                         "postgresql://USER@HOST:PORT/DBNAME (SQLite: --data DIR or --db FILE)"};
  if (given(s, "data") || given(s, "db"))
    return models::Error{"database", "cannot be combined with data or db",
                         "either database (PostgreSQL) or data/db (SQLite)"};
  c.database = uri;
  if (given(s, "backup_dir")) c.backup_dir = s.at("backup_dir");
  return true;
}

models::Result<bool> apply_paths(const Settings& s, Config& c) {
  if (given(s, "database")) return apply_database(s, c);
  auto data = s.find("data");
  auto db = s.find("db");
  if (db != s.end() && !db->second.empty()) {
    c.db = db->second;
  } else if (data != s.end() && !data->second.empty()) {
    c.db = std::filesystem::path(data->second) / "pbfleet.db";
  } else {
    return models::Error{"data", "no database given",
                         "--data DIR or --db FILE (SQLite), or --database postgresql://..."};
  }
  auto backup = s.find("backup_dir");
  if (backup != s.end() && !backup->second.empty()) {
    c.backup_dir = backup->second;
  } else {
    c.backup_dir = c.db.parent_path() / "backups";
  }
  return true;
}

}  // namespace

const std::vector<std::string>& config_keys() {
  static const std::vector<std::string> kKeys{
      "listen",           "data",           "db",             "database",
      "log_level",        "backup_dir",     "body_limit_bytes",
      "header_limit_bytes", "header_timeout_ms", "body_timeout_ms",
      "write_timeout_ms", "max_connections", "io_threads",
      "worker_threads",   "prepare_threads",  "max_db_bytes",
      "secure_cookies",   "session_hours"};
  return kKeys;
}

std::optional<std::pair<std::string, std::uint16_t>> parse_listen(const std::string& text) {
  auto colon = text.rfind(':');
  if (colon == std::string::npos || colon == 0) return std::nullopt;
  std::string host = text.substr(0, colon);
  if (host.size() > 2 && host.front() == '[' && host.back() == ']') host = host.substr(1, host.size() - 2);
  unsigned port = 0;
  const char* begin = text.data() + colon + 1;
  const char* end = text.data() + text.size();
  auto r = std::from_chars(begin, end, port);
  if (r.ec != std::errc{} || r.ptr != end || begin == end || port > 65535) return std::nullopt;
  return std::pair{host, static_cast<std::uint16_t>(port)};
}

models::Result<Settings> read_config_file(const std::filesystem::path& file) {
  std::ifstream in(file);
  if (!in) return models::Error{"config", "cannot read " + file.string(), "a readable file"};
  Settings settings;
  std::string line;
  for (int number = 1; std::getline(in, line); ++number) {
    line = trim(line.substr(0, line.find('#')));
    if (line.empty()) continue;
    auto eq = line.find('=');
    const std::string where = file.string() + ":" + std::to_string(number);
    if (eq == std::string::npos)
      return models::Error{"config", where + ": expected key = value", "key = value"};
    std::string key = trim(line.substr(0, eq));
    if (!known_key(key))
      return models::Error{"config", where + ": unknown key '" + key + "'", "a documented key"};
    settings[key] = trim(line.substr(eq + 1));
  }
  return settings;
}

Settings settings_from_environment() {
  Settings settings;
  for (const auto& key : config_keys()) {
    std::string name = "PBFLEET_" + key;
    std::transform(name.begin(), name.end(), name.begin(),
                   [](unsigned char c) { return static_cast<char>(std::toupper(c)); });
    if (const char* value = std::getenv(name.c_str())) settings[key] = value;
  }
  return settings;
}

models::Result<Config> make_config(const Settings& s) {
  Config c;
  if (auto it = s.find("listen"); it != s.end()) {
    auto listen = parse_listen(it->second);
    if (!listen) return models::Error{"listen", "'" + it->second + "' is not HOST:PORT", "e.g. 127.0.0.1:8470"};
    c.host = listen->first;
    c.port = listen->second;
  }
  if (auto it = s.find("log_level"); it != s.end()) {
    static const std::vector<std::string> kLevels{"trace", "debug", "info", "warn", "error"};
    if (std::find(kLevels.begin(), kLevels.end(), it->second) == kLevels.end())
      return models::Error{"log_level", "'" + it->second + "' is not a level", "trace, debug, info, warn, error"};
    c.log_level = it->second;
  }
  if (auto r = apply_paths(s, c); !r) return r.error();
  if (auto r = apply_limits(s, c.server); !r) return r.error();
  if (auto r = read_number<std::uint64_t>(s, "max_db_bytes", 0, std::uint64_t{1} << 50, c.max_db_bytes); !r)
    return r.error();
  if (auto it = s.find("secure_cookies"); it != s.end()) {
    if (it->second != "true" && it->second != "false")
      return models::Error{"secure_cookies", "'" + it->second + "' is not true or false", "true or false"};
    c.secure_cookies = it->second == "true";
  }
  if (auto r = read_number<int>(s, "session_hours", 1, 168, c.session_hours); !r) return r.error();
  if (auto r = read_number<std::size_t>(s, "prepare_threads", 0, 256, c.prepare_threads); !r)
    return r.error();
  return c;
}

}  // namespace pbfleet::api
