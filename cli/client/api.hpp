// pbfleetd's HTTP API as the commands use it: JSON in, JSON (or CSV) out,
// refusals as parsed problem details. Routes are in server/api/CONTRACT.md.
#pragma once

#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include <nlohmann/json.hpp>

#include "cli/client/http.hpp"
#include "cli/client/problem.hpp"

namespace pbfleet::cli::client {

// Key order kept as the server sent it, so tables show columns in its order.
using Json = nlohmann::ordered_json;

struct Reply {
  bool ok = false;                  // a 2xx answer
  int status = 0;                   // 0 when no answer arrived
  Json json;                        // 2xx JSON body (null otherwise)
  std::string text;                 // raw body (CSV when asked for CSV)
  std::optional<Problem> problem;   // the server's refusal (4xx, 5xx)
  std::string transport_error;      // why no answer arrived
};

// How a request reaches the server: the real one is client::send; tests
// put a fake in its place.
using Transport = std::function<models::Result<HttpResponse>(const HttpRequest&)>;

// The real transport to `url`.
Transport http_transport(Url url, std::chrono::seconds timeout = kDefaultTimeout);

class Api {
 public:
  Api(Transport transport, std::string token) : transport_(std::move(transport)), token_(std::move(token)) {}

  Reply get(const std::string& target, std::string_view accept = "application/json") const;
  // `prefer`: a Prefer header value, e.g. "return=minimal" when only the
  // counts of the answer matter.
  Reply post(const std::string& target, const Json& body, std::string_view prefer = {}) const;
  Reply patch(const std::string& target, const Json& body) const;
  Reply remove(const std::string& target) const;

 private:
  Reply exchange(HttpRequest request) const;

  Transport transport_;
  std::string token_;
};

// Percent-encodes a query value or path segment (RFC 3986 unreserved kept).
std::string url_encode(std::string_view text);

// "path?k=v&..." skipping pairs whose value is empty; values encoded.
std::string with_query(std::string path, const std::vector<std::pair<std::string, std::string>>& query);

}  // namespace pbfleet::cli::client
