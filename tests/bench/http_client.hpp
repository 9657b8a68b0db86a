// A small blocking HTTP/1.1 client for the benchmarks: one keep-alive
// connection to a loopback server, one request at a time.
#pragma once

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>

namespace pbfleet::bench {

struct HttpReply {
  int status = 0;
  std::string body;
  std::string etag;  // the ETag header, if any
};

class HttpClient {
 public:
  // Connects to host:port; throws std::runtime_error when it cannot.
  HttpClient(const std::string& host, std::uint16_t port);
  ~HttpClient();
  HttpClient(const HttpClient&) = delete;
  HttpClient& operator=(const HttpClient&) = delete;

  // Bearer token sent with every later request (empty: none).
  void set_token(std::string token);
  // Sends one request on the open connection and reads the whole reply.
  // Throws std::runtime_error on a transport error or a closed connection.
  // Sends If-None-Match: `if_none_match` on the next request only.
  void revalidate_next(std::string etag) { if_none_match_ = std::move(etag); }
  HttpReply send(std::string_view method, std::string_view target, std::string body = {},
                 std::string_view content_type = "application/json");

 private:
  std::string if_none_match_;
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace pbfleet::bench
