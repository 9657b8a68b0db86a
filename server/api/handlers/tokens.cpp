// /v1/tokens (admin): create (the raw token is shown once, optionally with
// a lifetime in days), list, revoke.
#include "server/api/handlers/common.hpp"
#include "server/api/handlers/handlers.hpp"
#include "server/storage/tokens.hpp"

namespace pbfleet::api::handlers {

namespace {

struct TokenRequest {
  std::string name;
  storage::Role role = storage::Role::crew;
  std::optional<storage::Id> depot_id;
  std::optional<std::int64_t> expires_in_days;
};

}  // namespace

http::Response list_tokens(const Call& call) {
  Issues issues;
  auto page = page_request(call.query("limit"), call.query("cursor"), issues);
  if (!issues.empty()) return problem(ProblemKind::bad_query, "bad paging", issues.invalid);
  return render_page(call.ctx.store.list_tokens(page));
}

http::Response create_token(const Call& call) {
  auto request = decode_object<TokenRequest>(call, {}, [](FieldReader& in, TokenRequest& t) {
    if (auto v = in.text("name", true, 100)) t.name = *v;
    if (auto v = in.choice("role", true, {"crew", "technician", "manager", "admin"}))
      t.role = *storage::parse_role(*v);
    if (auto v = in.integer("depot_id", false, 1, INT64_MAX)) t.depot_id = *v;
    if (auto v = in.integer("expires_in_days", false, kMinTokenLifetimeDays, kMaxTokenLifetimeDays))
      t.expires_in_days = *v;
    in.finish();
  });
  if (auto* refused = std::get_if<http::Response>(&request)) return std::move(*refused);
  const auto& t = std::get<TokenRequest>(request);
  const std::string raw = storage::new_raw_token();
  const auto now = call.ctx.clock.now();
  std::optional<std::chrono::sys_seconds> expires_at;
  if (t.expires_in_days) expires_at = now + std::chrono::days{*t.expires_in_days};
  auto created = call.ctx.store.create_token(t.name, t.role, t.depot_id, storage::hash_token(raw),
                                             now, expires_at);
  if (!created) return store_problem(created.error());
  auto body = to_json(created.value());
  body["token"] = raw;  // shown once; only its hash is kept
  return json_response(201, body);
}

http::Response revoke_token(const Call& call) {
  auto id = parse_id(call.param("id"));
  if (!id) return bad_id("token", call.param("id"));
  auto revoked = call.ctx.store.revoke_token(*id, call.ctx.clock.now());
  call.ctx.auth.forget_cached();  // effective on the very next request
  return render(revoked);
}

}  // namespace pbfleet::api::handlers
