// Connection settings through the whole command line: precedence, storing
// with `connect`, and the token never shown.
#include <sys/stat.h>

#include <filesystem>
#include <fstream>

#include <doctest/doctest.h>

#include "cli/commands/context.hpp"
#include "tests/cli/fake_server.hpp"

using namespace pbfleet::cli;

namespace {

struct ConfigHome {
  std::filesystem::path dir;
  ConfigHome() {
    char pattern[] = "/tmp/pbfleet-connect-XXXXXX";
    dir = mkdtemp(pattern);
  }
  ~ConfigHome() { std::filesystem::remove_all(dir); }
  std::filesystem::path file() const { return dir / "pbfleet" / "config"; }
  void use(testing::Terminal& t) const { t.io.env["XDG_CONFIG_HOME"] = dir.string(); }
};

std::string slurp(const std::filesystem::path& p) {
  std::ifstream in(p);
  return {std::istreambuf_iterator<char>(in), {}};
}

}  // namespace

TEST_CASE("connect stores server and token from stdin in a 0600 file, and says so without the token") {
  ConfigHome home;
  testing::Terminal term("tok-from-stdin\n");
  home.use(term);
  REQUIRE(term.run({"connect", "--server", "http://depot-pc:8470", "--token-stdin"}) == 0);
  auto text = slurp(home.file());
  CHECK(text.find("server = http://depot-pc:8470") != std::string::npos);
  CHECK(text.find("token = tok-from-stdin") != std::string::npos);
  struct stat st {};
  REQUIRE(stat(home.file().c_str(), &st) == 0);
  CHECK((st.st_mode & 0777) == 0600);
  CHECK(term.out.str().find("tok-from-stdin") == std::string::npos);
  CHECK(term.err.str().find("tok-from-stdin") == std::string::npos);
}

TEST_CASE("connect keeps the stored token when only the server changes") {
  ConfigHome home;
  testing::Terminal first("tok-1\n");
  home.use(first);
  REQUIRE(first.run({"connect", "--server", "http://a:1", "--token-stdin"}) == 0);
  testing::Terminal second;
  home.use(second);
  REQUIRE(second.run({"connect", "--server", "http://b:2"}) == 0);
  auto text = slurp(home.file());
  CHECK(text.find("http://b:2") != std::string::npos);
  CHECK(text.find("tok-1") != std::string::npos);
}

TEST_CASE("connect --show names the sources, the environment beats the file, flags beat both") {
  ConfigHome home;
  std::filesystem::create_directories(home.file().parent_path());
  std::ofstream(home.file()) << "server = http://file:1\ntoken = file-secret\n";
  testing::Terminal env;
  home.use(env);
  env.io.env["PBFLEET_URL"] = "http://env:2";
  REQUIRE(env.run({"connect", "--show"}) == 0);
  CHECK(env.out.str().find("http://env:2  (from PBFLEET_URL)") != std::string::npos);
  CHECK(env.out.str().find("set (from config file)") != std::string::npos);
  CHECK(env.out.str().find("file-secret") == std::string::npos);

  testing::Terminal flag;
  home.use(flag);
  flag.io.env["PBFLEET_URL"] = "http://env:2";
  REQUIRE(flag.run({"--server", "http://flag:3", "connect", "--show"}) == 0);
  CHECK(flag.out.str().find("http://flag:3  (from --server)") != std::string::npos);
}

TEST_CASE("the resolved token is what goes out as the bearer") {
  ConfigHome home;
  std::filesystem::create_directories(home.file().parent_path());
  std::ofstream(home.file()) << "token = file-secret\n";
  std::ofstream(home.dir / "t") << "flag-secret\n";
  testing::FakeServer server([](const client::HttpRequest&) { return testing::json_response(200, R"({"items":[]})"); });
  testing::Terminal term;
  home.use(term);
  term.io.env["PBFLEET_TOKEN"] = "env-secret";
  REQUIRE(term.run({"depot", "list"}, {server.transport(), nullptr}) == 0);
  REQUIRE(term.run({"depot", "list", "--token-file", (home.dir / "t").string()}, {server.transport(), nullptr}) == 0);
  CHECK(server.requests.at(0).bearer_token == "env-secret");
  CHECK(server.requests.at(1).bearer_token == "flag-secret");
}

TEST_CASE("connect with nothing to store is a usage error, a bad URL is refused before saving") {
  ConfigHome home;
  testing::Terminal term;
  home.use(term);
  CHECK(term.run({"connect"}) == kExitUsage);
  testing::Terminal bad;
  home.use(bad);
  CHECK(bad.run({"connect", "--server", "depot-pc:8470"}) == kExitUsage);
  CHECK_FALSE(std::filesystem::exists(home.file()));
}
