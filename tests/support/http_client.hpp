// Small blocking HTTP/1.1 clients for tests that talk to a real pbfleetd on
// 127.0.0.1: a keep-alive Beast client with a timeout on every request, and
// a raw socket for clients that misbehave on purpose (slow, flooding).
#pragma once

#include <chrono>
#include <cstdint>
#include <map>
#include <memory>
#include <stdexcept>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include <nlohmann/json.hpp>

namespace pbfleet::testing {

// A transport failure: connection refused or reset, timeout, closed early.
struct TransportError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

struct HttpReply {
  int status = 0;
  std::map<std::string, std::string> headers;  // lower-case names; repeats joined by '\n'
  std::string body;

  // Header value or empty. `name` lower-case.
  [[nodiscard]] std::string header(const std::string& name) const;
  // The body as JSON; a JSON null when it does not parse.
  [[nodiscard]] nlohmann::json json() const;
};

using Headers = std::vector<std::pair<std::string, std::string>>;

class HttpClient {
 public:
  // Connects lazily to 127.0.0.1:port on the first request.
  explicit HttpClient(std::uint16_t port,
                      std::chrono::milliseconds timeout = std::chrono::seconds{15});
  ~HttpClient();
  HttpClient(HttpClient&&) noexcept;
  HttpClient& operator=(HttpClient&&) noexcept;

  // Bearer token sent with every later request (empty: none).
  void set_token(std::string token);
  // Loopback address to connect from (e.g. "127.0.0.7"), so a test can act
  // as another client address; takes effect on the next connection.
  void set_source_address(std::string address);
  // One request on the keep-alive connection (reopened when the server
  // closed it after the previous reply). Throws TransportError.
  HttpReply send(std::string_view method, std::string_view target, std::string body = {},
                 std::string_view content_type = "application/json", const Headers& extra = {});
  HttpReply get(std::string_view target) { return send("GET", target); }
  HttpReply post(std::string_view target, const nlohmann::json& body) {
    return send("POST", target, body.dump());
  }
  // Closes the connection (the next request opens a new one).
  void disconnect();

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

// A plain TCP connection with no HTTP framing, for hostile-client tests.
class RawConnection {
 public:
  // Connects to 127.0.0.1:port; throws TransportError.
  explicit RawConnection(std::uint16_t port);
  ~RawConnection();
  RawConnection(const RawConnection&) = delete;
  RawConnection& operator=(const RawConnection&) = delete;

  // Sends all of `bytes`; false when the peer has closed or reset.
  bool write(std::string_view bytes);
  // Reads until the peer closes or `limit` passes; the bytes read.
  std::string read_until_close(std::chrono::milliseconds limit);
  // True when the peer closed (or reset) the connection within `limit`.
  bool closed_within(std::chrono::milliseconds limit);

 private:
  int fd_ = -1;
};

}  // namespace pbfleet::testing
