// The application as the transport sees it: dispatch(request) -> response.
//
// Matches the route, authenticates and checks the role, runs the handler,
// and records metrics and one access-log line per request (method, route,
// status, duration, bytes, token id; never the token).
#pragma once

#include <memory>
#include <string_view>

#include "server/api/context.hpp"
#include "server/api/pages.hpp"
#include "server/http/message.hpp"
#include "server/storage/store.hpp"

namespace pbfleet::api {

class Api {
 public:
  Api(storage::Store& store, const Clock& clock, ApiOptions options = {});
  ~Api();
  Api(const Api&) = delete;
  Api& operator=(const Api&) = delete;

  // For the transport: `reply` is called once, maybe from another thread.
  void dispatch(http::Request request, http::Reply reply);
  // Synchronous form for tests and tools: waits for the reply.
  http::Response handle(http::Request request);
  // Problem response for a request the transport refused (413, 431, 503, 500).
  static http::Response refusal(int status, std::string_view detail);

  Metrics& metrics();
  // The services handlers use (for the pages served beside the API).
  Context& context();
  // Serves `pages` (not owned; must outlive the Api) for the paths they
  // claim; every other path goes to the API routes. Call before serving.
  void set_pages(Pages* pages);

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace pbfleet::api
