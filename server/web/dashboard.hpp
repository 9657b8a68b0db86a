// The web dashboard: pages for the shop manager (winter risk, sulfation and
// replacement), the technician (one battery's history) and the crew (log a
// reading), served by pbfleetd on the API's port with the API's roles.
//
// Every request: route -> session (cookie) -> role -> CSRF check on POST
// -> page handler -> security headers. A path the dashboard does not know
// answers a 404 page; the API keeps its own routes and Bearer tokens.
#pragma once

#include "server/api/pages.hpp"
#include "server/web/sessions.hpp"

namespace pbfleet::web {

class Dashboard final : public api::Pages {
 public:
  Dashboard(api::Context& ctx, DashboardOptions options);

  [[nodiscard]] std::string_view route_of(std::string_view path) const override;
  http::Response serve(const http::Request& request, const api::Target& target) override;

 private:
  http::Response route(const http::Request& request, const api::Target& target);

  api::Context& ctx_;
  Sessions sessions_;
};

// Headers every dashboard answer carries: a strict Content-Security-Policy
// (own origin only, no inline script or style, no framing), nosniff, no
// referrer to other sites, no framing for old browsers.
void add_security_headers(http::Response& response);

}  // namespace pbfleet::web
