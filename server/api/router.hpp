// The route table: the whole API on one screen (routes.cpp), and matching
// of a method and path against it.
#pragma once

#include <map>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "server/api/auth.hpp"
#include "server/api/context.hpp"

namespace pbfleet::api {

// Synchronous handler: the response is ready on return.
using SyncHandler = http::Response (*)(const Call& call);
// Asynchronous handler: calls `reply` once, possibly from another thread
// (readings wait for the group commit). Copies what it needs from `call`.
using AsyncHandler = void (*)(const Call& call, http::Reply reply);

struct Route {
  std::string_view method;
  std::string_view pattern;  // "/v1/batteries/{serial}"
  RoleSet roles;             // kPublic = no token
  SyncHandler sync = nullptr;
  AsyncHandler async = nullptr;
  // Media types the route answers with, comma-separated; empty means
  // "application/json". A request whose Accept excludes all of them gets
  // 406 not-acceptable before the handler runs.
  std::string_view produces = {};
};

// The media types a route answers with ("application/json" when unset).
[[nodiscard]] std::string_view produced_types(const Route& route);

// Every route of the API (routes.cpp).
std::span<const Route> routes();

struct Match {
  const Route* route = nullptr;               // null: no route for method and path
  std::map<std::string, std::string> params;  // captured {names}
  std::vector<std::string_view> allowed;      // methods the path has (for 405)
};

// Finds the route for method and path in `table`.
[[nodiscard]] Match match_route(std::span<const Route> table, std::string_view method,
                                std::string_view path);

}  // namespace pbfleet::api
