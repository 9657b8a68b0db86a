#include "cli/client/http.hpp"

#include <doctest/doctest.h>

using namespace pbfleet::cli::client;

TEST_CASE("server URL: host, port and base path") {
  auto u = parse_url("http://127.0.0.1:8470");
  REQUIRE(u.ok());
  CHECK(u->host == "127.0.0.1");
  CHECK(u->port == "8470");
  CHECK(u->base_path.empty());
  auto p = parse_url("http://fleet.example/pbfleet/");
  REQUIRE(p.ok());
  CHECK(p->port == "80");
  CHECK(p->base_path == "/pbfleet");
  auto v6 = parse_url("http://[::1]:9000");
  REQUIRE(v6.ok());
  CHECK(v6->host == "::1");
  CHECK(v6->port == "9000");
}

TEST_CASE("server URL: other schemes, user info, bad ports and empty hosts are refused with the form") {
  for (const char* bad : {"https://x", "ftp://x", "127.0.0.1:8470", "http://user:pw@x", "http://x:0",
                          "http://x:70000", "http://x:port", "http://:80"}) {
    CAPTURE(bad);
    auto u = parse_url(bad);
    REQUIRE_FALSE(u.ok());
    CHECK(u.error().allowed == "http://HOST[:PORT][/PATH]");
  }
}

TEST_CASE("an unreachable server is an error naming host and port, not a response") {
  // Port 9 (discard) on loopback: nothing listens there on a test machine.
  auto r = send(parse_url("http://127.0.0.1:9").value(), HttpRequest{}, std::chrono::seconds(5));
  REQUIRE_FALSE(r.ok());
  CHECK(r.error().detail.find("127.0.0.1:9") != std::string::npos);
}
