// What a page handler works with, and the frame every page shares.
//
// Page handlers read like the API's: read the query or form -> one service
// or store call -> render HTML. They never write SQL and never see Beast.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "server/api/context.hpp"
#include "server/api/request_util.hpp"
#include "server/http/message.hpp"
#include "server/web/sessions.hpp"

namespace pbfleet::web {

struct PageCall {
  const http::Request& request;
  const api::Target& target;
  std::map<std::string, std::string> params;  // path parameters, e.g. "serial"
  std::map<std::string, std::string> form;    // POST body fields
  const Viewer* viewer = nullptr;              // null on the sign-in pages
  api::Context& ctx;
  Sessions& sessions;

  // A query parameter, or empty.
  [[nodiscard]] std::string query(const std::string& name) const;
  // A form field, or empty.
  [[nodiscard]] std::string field(const std::string& name) const;
  // True when the viewer's token may reach objects of `depot` (nullopt: not
  // fitted to a vehicle, so in no depot: only unscoped tokens).
  [[nodiscard]] bool in_scope(std::optional<storage::Id> depot) const;
  // True when the viewer's role is in `roles`.
  [[nodiscard]] bool may(api::RoleSet roles) const;
};

// Who may open which page (the API's sets: the dashboard grants nothing the
// API would refuse).
inline constexpr api::RoleSet kReaders = api::kAnyRole;
inline constexpr api::RoleSet kLoggers = api::kCrew | api::kTechnician | api::kAdmin;
inline constexpr api::RoleSet kPlanners = api::kManager | api::kAdmin;

// A whole HTML document: head with the stylesheet and script, the
// navigation the viewer's role may use, the sign-out form, then `main`.
[[nodiscard]] std::string document(const PageCall& call, std::string_view title, std::string_view main);

// An HTML response (200 unless given) with the dashboard's headers.
[[nodiscard]] http::Response html_response(std::string body, int status = 200);
// 303 See Other to `location` (a path on this server).
[[nodiscard]] http::Response redirect(std::string_view location);
// A short page saying what went wrong (404, 403, 400, 503...).
[[nodiscard]] http::Response message_page(const PageCall& call, int status, std::string_view title,
                                          std::string_view text);

// The hidden field every state-changing form carries.
[[nodiscard]] std::string csrf_field(const PageCall& call);

// A risk level in words and a shape, so it reads without colour.
[[nodiscard]] std::string level_badge(std::string_view level);

// The safety cautions shown beside advice that can hurt someone, once each.
[[nodiscard]] std::string cautions_box(const std::vector<std::string_view>& cautions);

}  // namespace pbfleet::web
