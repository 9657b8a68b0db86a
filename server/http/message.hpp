// Transport-neutral HTTP request and response.
//
// The Beast session converts to and from these, so that the API layer (and
// its tests) never include Beast or Asio. Header names are stored lower-case.
#pragma once

#include <functional>
#include <map>
#include <memory>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace pbfleet::http {

struct Request {
  std::string method;                          // "GET", "POST", ...
  std::string target;                          // path with query, as sent
  std::map<std::string, std::string> headers;  // lower-case names
  std::string body;
  std::string peer;                            // "127.0.0.1:53122", for logs

  // Header value or empty when absent. `name` must be lower-case.
  [[nodiscard]] std::string_view header(std::string_view name) const {
    auto it = headers.find(std::string(name));
    return it == headers.end() ? std::string_view{} : std::string_view{it->second};
  }
};

struct Response {
  int status = 200;
  std::string content_type = "application/json";
  std::vector<std::pair<std::string, std::string>> headers;  // extra headers
  std::string body;
  // Sent instead of `body` when set: a body kept elsewhere and shared by
  // many answers (a cached report), written without a copy per answer.
  std::shared_ptr<const std::string> shared_body;

  [[nodiscard]] std::string_view body_text() const {
    return shared_body ? std::string_view(*shared_body) : std::string_view(body);
  }
};

// Called once with the response; may be called from any thread.
using Reply = std::function<void(Response)>;
// The whole application as seen by the transport: one request in, one reply out.
using Dispatch = std::function<void(Request, Reply)>;

}  // namespace pbfleet::http
