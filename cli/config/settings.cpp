#include "cli/config/settings.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <fstream>
#include <sstream>

namespace pbfleet::cli::config {
namespace {

using models::Error;

constexpr mode_t kFileMode = 0600;  // the file holds a bearer token
constexpr mode_t kDirMode = 0700;

std::string trim(std::string_view s) {
  const char* ws = " \t\r\n";
  auto b = s.find_first_not_of(ws);
  if (b == std::string_view::npos) return "";
  auto e = s.find_last_not_of(ws);
  return std::string(s.substr(b, e - b + 1));
}

Error file_error(const std::filesystem::path& path, std::string_view what) {
  return Error{"config", std::string(what) + " " + path.string() + ": " + std::strerror(errno), ""};
}

void apply(Settings& s, const Layer& layer, std::string_view server_source, std::string_view token_source) {
  if (layer.server_url && !layer.server_url->empty()) {
    s.server_url = *layer.server_url;
    s.server_from = server_source;
  }
  if (layer.token && !layer.token->empty()) {
    s.token = *layer.token;
    s.token_from = token_source;
  }
}

}  // namespace

models::Result<std::filesystem::path> config_path(const Io& io) {
  auto xdg = io.getenv("XDG_CONFIG_HOME");
  // XDG Base Directory spec: a relative XDG_CONFIG_HOME is invalid and ignored.
  if (xdg && !xdg->empty() && (*xdg)[0] == '/') return std::filesystem::path(*xdg) / "pbfleet" / "config";
  auto home = io.getenv("HOME");
  if (home && !home->empty()) return std::filesystem::path(*home) / ".config" / "pbfleet" / "config";
  return Error{"config", "cannot find the config directory: neither XDG_CONFIG_HOME nor HOME is set",
               "an absolute XDG_CONFIG_HOME or HOME"};
}

models::Result<Layer> parse_config(std::string_view text) {
  Layer layer;
  std::istringstream in{std::string(text)};
  std::string line;
  for (int number = 1; std::getline(in, line); ++number) {
    auto content = trim(line.substr(0, line.find('#')));
    if (content.empty()) continue;
    auto eq = content.find('=');
    if (eq == std::string::npos) {
      return Error{"config", "line " + std::to_string(number) + " has no '='", "key = value"};
    }
    auto key = trim(content.substr(0, eq));
    auto value = trim(content.substr(eq + 1));
    if (key == "server") layer.server_url = value;
    else if (key == "token") layer.token = value;
    else return Error{"config", "line " + std::to_string(number) + ": unknown key '" + key + "'", "server, token"};
  }
  return layer;
}

std::string format_config(const Layer& layer) {
  std::string s = "# pbfleet connection settings (written by `pbfleet connect`).\n";
  if (layer.server_url) s += "server = " + *layer.server_url + "\n";
  if (layer.token) s += "token = " + *layer.token + "\n";
  return s;
}

models::Result<Layer> load_config(const std::filesystem::path& path) {
  std::ifstream in(path);
  if (!in) {
    if (errno == ENOENT) return Layer{};
    return file_error(path, "cannot read");
  }
  std::stringstream text;
  text << in.rdbuf();
  auto layer = parse_config(text.str());
  if (!layer) return Error{"config", path.string() + ": " + layer.error().detail, layer.error().allowed};
  return layer;
}

models::Result<bool> store_config(const std::filesystem::path& path, const Layer& layer) {
  std::error_code ec;
  auto dir = path.parent_path();
  if (!std::filesystem::exists(dir, ec)) {
    std::filesystem::create_directories(dir, ec);
    if (ec) return Error{"config", "cannot create " + dir.string() + ": " + ec.message(), ""};
    ::chmod(dir.c_str(), kDirMode);
  }
  auto temp = path;
  temp += ".tmp";
  int fd = ::open(temp.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, kFileMode);
  if (fd < 0) return file_error(temp, "cannot write");
  ::fchmod(fd, kFileMode);  // also when the temporary file existed with wider rights
  auto text = format_config(layer);
  bool written = ::write(fd, text.data(), text.size()) == static_cast<ssize_t>(text.size());
  bool synced = ::fsync(fd) == 0;
  ::close(fd);
  if (!written || !synced || ::rename(temp.c_str(), path.c_str()) != 0) {
    auto error = file_error(path, "cannot save");
    ::unlink(temp.c_str());
    return error;
  }
  return true;
}

Layer environment_layer(const Io& io) {
  Layer layer;
  if (auto url = io.getenv("PBFLEET_URL")) layer.server_url = *url;
  if (auto token = io.getenv("PBFLEET_TOKEN")) layer.token = trim(*token);
  return layer;
}

models::Result<std::string> read_token_file(const std::filesystem::path& path) {
  std::ifstream in(path);
  if (!in) return file_error(path, "cannot read token file");
  std::string line;
  std::getline(in, line);
  auto token = trim(line);
  if (token.empty()) return Error{"--token-file", path.string() + " holds no token on its first line", ""};
  return token;
}

Settings resolve(const Layer& file, const Layer& environment, const Layer& flags) {
  Settings s;
  apply(s, file, "config file", "config file");
  apply(s, environment, "PBFLEET_URL", "PBFLEET_TOKEN");
  apply(s, flags, "--server", "--token-file");
  return s;
}

}  // namespace pbfleet::cli::config
