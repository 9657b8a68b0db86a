#include "cli/config/settings.hpp"

#include <sys/stat.h>

#include <filesystem>
#include <fstream>

#include <doctest/doctest.h>

using namespace pbfleet::cli;
using namespace pbfleet::cli::config;

namespace {

struct TempDir {
  std::filesystem::path path;
  TempDir() {
    char pattern[] = "/tmp/pbfleet-cli-test-XXXXXX";
    path = mkdtemp(pattern);
  }
  ~TempDir() { std::filesystem::remove_all(path); }
};

Layer layer(std::optional<std::string> url, std::optional<std::string> token) { return Layer{url, token}; }

}  // namespace

TEST_CASE("later sources override earlier ones: file, then environment, then flags") {
  auto s = resolve(layer("http://file:1", "file-token"), layer("http://env:2", std::nullopt), layer(std::nullopt, "flag-token"));
  CHECK(s.server_url == "http://env:2");
  CHECK(s.server_from == "PBFLEET_URL");
  CHECK(s.token == "flag-token");
  CHECK(s.token_from == "--token-file");

  auto flags_win = resolve(layer("http://file:1", std::nullopt), layer("http://env:2", "e"), layer("http://flag:3", std::nullopt));
  CHECK(flags_win.server_url == "http://flag:3");
  CHECK(flags_win.token == "e");
}

TEST_CASE("with no source at all the default local server is used and no token") {
  auto s = resolve({}, {}, {});
  CHECK(s.server_url == kDefaultServerUrl);
  CHECK(s.token.empty());
  CHECK(s.token_from == "none");
}

TEST_CASE("an empty environment variable does not wipe a configured value") {
  auto s = resolve(layer("http://file:1", "t"), layer("", ""), {});
  CHECK(s.server_url == "http://file:1");
  CHECK(s.token == "t");
}

TEST_CASE("config path follows XDG_CONFIG_HOME, else HOME/.config") {
  Io io;
  io.env = {{"XDG_CONFIG_HOME", "/x/cfg"}, {"HOME", "/home/kari"}};
  CHECK(config_path(io).value() == "/x/cfg/pbfleet/config");
  io.env = {{"XDG_CONFIG_HOME", "relative/ignored"}, {"HOME", "/home/kari"}};
  CHECK(config_path(io).value() == "/home/kari/.config/pbfleet/config");
  io.env = {};
  CHECK_FALSE(config_path(io).ok());
}

TEST_CASE("config file: comments and spaces are ignored, an unknown key names its line") {
  auto ok = parse_config("# fleet\n server = http://depot-pc:8470 \n\ntoken=abc   # for the Harbour crew\n");
  REQUIRE(ok.ok());
  CHECK(ok->server_url == "http://depot-pc:8470");
  CHECK(ok->token == "abc");
  auto bad = parse_config("server = http://x\nport = 80\n");
  REQUIRE_FALSE(bad.ok());
  CHECK(bad.error().detail.find("line 2") != std::string::npos);
  CHECK(bad.error().detail.find("port") != std::string::npos);
  CHECK_FALSE(parse_config("just words\n").ok());
}

TEST_CASE("stored config is readable by its owner only and reads back the same") {
  TempDir dir;
  auto path = dir.path / "pbfleet" / "config";
  REQUIRE(store_config(path, layer("http://depot-pc:8470", "secret-token")).ok());
  struct stat st {};
  REQUIRE(stat(path.c_str(), &st) == 0);
  CHECK((st.st_mode & 0777) == 0600);
  REQUIRE(stat(path.parent_path().c_str(), &st) == 0);
  CHECK((st.st_mode & 0077) == 0);
  auto back = load_config(path);
  REQUIRE(back.ok());
  CHECK(back->server_url == "http://depot-pc:8470");
  CHECK(back->token == "secret-token");
}

TEST_CASE("a missing config file is an empty layer, not an error") {
  TempDir dir;
  auto l = load_config(dir.path / "nope" / "config");
  REQUIRE(l.ok());
  CHECK_FALSE(l->server_url.has_value());
}

TEST_CASE("token file: first line, trimmed, an empty file is refused") {
  TempDir dir;
  std::ofstream(dir.path / "t") << "  tok-123  \nsecond line\n";
  CHECK(read_token_file(dir.path / "t").value() == "tok-123");
  std::ofstream(dir.path / "empty") << "\n";
  CHECK_FALSE(read_token_file(dir.path / "empty").ok());
  CHECK_FALSE(read_token_file(dir.path / "missing").ok());
}
