// A small synchronous HTTP/1.1 client over Boost.Beast: one connection per
// request, a deadline on every step, a bounded response body.
//
// Knows nothing of batteries; api.hpp speaks pbfleet on top of it.
#pragma once

#include <chrono>
#include <string>
#include <string_view>

#include "models/result.hpp"

namespace pbfleet::cli::client {

struct Url {
  std::string host;       // "127.0.0.1", "fleet.example"
  std::string port;       // "8470"
  std::string base_path;  // "" or "/pbfleet" (no trailing slash)
};

// "http://host[:port][/base]" -> Url (port 80 when absent). Error for other
// schemes (https needs a TLS proxy in front for now), user info, or an empty host.
models::Result<Url> parse_url(std::string_view text);

struct HttpRequest {
  std::string method = "GET";   // GET, POST, PATCH, DELETE
  std::string target;           // "/v1/depots?limit=100", appended to base_path
  std::string body;
  std::string content_type;     // empty = no body
  std::string accept = "application/json";
  std::string bearer_token;     // empty = no Authorization header
  std::string prefer;           // Prefer header (RFC 7240); empty = none
};

struct HttpResponse {
  int status = 0;
  std::string content_type;
  std::string body;
};

// Limits of one exchange, each on purpose.
inline constexpr std::chrono::seconds kDefaultTimeout{30};  // a slow report on a big fleet
inline constexpr std::size_t kMaxResponseBytes = 64u << 20;  // whole-fleet CSV export

// Sends one request and reads the whole response. Error (field "server")
// when the server cannot be reached, times out or answers garbage; any
// HTTP status, 4xx and 5xx included, is a response, not an error.
models::Result<HttpResponse> send(const Url& url, const HttpRequest& request,
                                  std::chrono::seconds timeout = kDefaultTimeout);

}  // namespace pbfleet::cli::client
