// Transport limits over real sockets: body size, header size, slow
// clients, the connection cap.
#include "server/http/limits.hpp"

#include <doctest/doctest.h>

#include <thread>

#include "tests/support/http_client.hpp"
#include "tests/support/live_fleet.hpp"
#include "tests/support/server_process.hpp"

namespace pbfleet::testing {

namespace {

ServerConfig config_in(const TempDir& dir, std::vector<std::string> extra = {}) {
  ServerConfig c;
  c.db = dir / "pbfleet.db";
  c.log = dir / "pbfleetd.log";
  c.admin_token = dir / "admin.token";
  c.extra_args = std::move(extra);
  return c;
}

}  // namespace

TEST_CASE("a 10 MB body is refused with 413 problem+json before it is read") {
  TempDir dir;
  ServerProcess server(config_in(dir));
  RawConnection raw(server.port());
  const std::size_t ten_mb = 10 * 1024 * 1024;
  raw.write("POST /v1/readings HTTP/1.1\r\nHost: 127.0.0.1\r\nAuthorization: Bearer " +
            server.admin_token() + "\r\nContent-Type: application/json\r\nContent-Length: " +
            std::to_string(ten_mb) + "\r\n\r\n");
  raw.write(std::string(64 * 1024, ' '));  // the client keeps sending for a while
  const std::string answer = raw.read_until_close(std::chrono::seconds(5));
  CHECK(answer.rfind("HTTP/1.1 413", 0) == 0);
  CHECK(answer.find("application/problem+json") != std::string::npos);
  CHECK(answer.find("payload-too-large") != std::string::npos);
}

TEST_CASE("a chunked body growing past the limit is cut off with 413") {
  TempDir dir;
  ServerProcess server(config_in(dir, {"--body-limit-bytes", "65536"}));
  RawConnection raw(server.port());
  raw.write("POST /v1/readings HTTP/1.1\r\nHost: 127.0.0.1\r\nAuthorization: Bearer " +
            server.admin_token() +
            "\r\nContent-Type: application/json\r\nTransfer-Encoding: chunked\r\n\r\n");
  const std::string chunk(16 * 1024, 'x');
  for (int i = 0; i < 8; ++i)
    if (!raw.write("4000\r\n" + chunk + "\r\n")) break;
  const std::string answer = raw.read_until_close(std::chrono::seconds(5));
  CHECK(answer.rfind("HTTP/1.1 413", 0) == 0);
}

TEST_CASE("a header flood beyond 8 KiB is refused with 431") {
  TempDir dir;
  ServerProcess server(config_in(dir));
  RawConnection raw(server.port());
  std::string head = "GET /healthz HTTP/1.1\r\nHost: 127.0.0.1\r\n";
  for (int i = 0; i < 400; ++i) head += "X-Flood-" + std::to_string(i) + ": " + std::string(40, 'a') + "\r\n";
  raw.write(head + "\r\n");
  const std::string answer = raw.read_until_close(std::chrono::seconds(5));
  CHECK(answer.rfind("HTTP/1.1 431", 0) == 0);
  CHECK(answer.find("header-too-large") != std::string::npos);
}

TEST_CASE("a client trickling its header is closed by the header timeout while others are served") {
  TempDir dir;
  ServerProcess server(config_in(dir, {"--header-timeout-ms", "1000"}));
  RawConnection slow(server.port());
  const auto start = std::chrono::steady_clock::now();
  bool open = slow.write("GET /healthz HTTP/1.1\r\n");
  // One header byte every 200 ms: each arrives in time, the whole head never does.
  for (int i = 0; i < 25 && open; ++i) {
    HttpClient normal(server.port(), std::chrono::seconds(2));
    CHECK(normal.get("/healthz").status == 200);
    std::this_thread::sleep_for(std::chrono::milliseconds(200));
    open = slow.write("X");
  }
  const auto took = std::chrono::steady_clock::now() - start;
  CHECK((!open || slow.closed_within(std::chrono::seconds(2))));
  CHECK(took < std::chrono::seconds(4));
}

TEST_CASE("an idle keep-alive connection is closed after the header timeout") {
  TempDir dir;
  ServerProcess server(config_in(dir, {"--header-timeout-ms", "800"}));
  RawConnection idle(server.port());
  CHECK(idle.closed_within(std::chrono::seconds(3)));
}

TEST_CASE("connections beyond the cap get 503 and the server keeps serving") {
  TempDir dir;
  ServerProcess server(config_in(dir, {"--max-connections", "3"}));
  // The start-up probe's connection counts until the server has seen it
  // close, which on a loaded machine can be after the first connections
  // below arrive: a connection refused then is not held and is replaced.
  std::vector<std::unique_ptr<RawConnection>> held;
  for (int attempt = 0; held.size() < 3 && attempt < 30; ++attempt) {
    auto c = std::make_unique<RawConnection>(server.port());
    c->write("GET /healthz HTTP/1.1\r\nHost: x\r\n");  // head not finished: stays open
    if (!c->closed_within(std::chrono::milliseconds(150))) held.push_back(std::move(c));
  }
  REQUIRE(held.size() == 3);
  RawConnection extra(server.port());
  const std::string answer = extra.read_until_close(std::chrono::seconds(3));
  CHECK(answer.rfind("HTTP/1.1 503", 0) == 0);
  held.clear();
  // The server sees the closes asynchronously; within a few seconds it serves again.
  int status = 0;
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(5);
  while (status != 200 && std::chrono::steady_clock::now() < deadline) {
    HttpClient client(server.port());
    status = client.get("/healthz").status;
    if (status != 200) std::this_thread::sleep_for(std::chrono::milliseconds(50));
  }
  CHECK(status == 200);
}

}  // namespace pbfleet::testing
