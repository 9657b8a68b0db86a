// Pages served beside the API on the same port (the web dashboard,
// server/web). The API knows only this interface, so the dependency points
// from the dashboard to the API, never back: Api::dispatch hands a request
// whose path the pages claim to `serve`, after counting and logging it like
// any other request.
#pragma once

#include <string_view>

#include "server/api/request_util.hpp"
#include "server/http/message.hpp"

namespace pbfleet::api {

class Pages {
 public:
  virtual ~Pages() = default;
  // The route pattern that serves `path` (for metrics and the access log,
  // e.g. "/ui/batteries/{serial}"), or empty when the path is not a page's.
  [[nodiscard]] virtual std::string_view route_of(std::string_view path) const = 0;
  // Answers the request; may block on the database (runs on a worker thread).
  virtual http::Response serve(const http::Request& request, const Target& target) = 0;
};

}  // namespace pbfleet::api
