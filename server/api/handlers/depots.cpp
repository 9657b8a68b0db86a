// /v1/depots: create, list, get, update.
#include "server/api/handlers/common.hpp"
#include "server/api/handlers/handlers.hpp"

namespace pbfleet::api::handlers {

namespace {

std::variant<storage::Depot, http::Response> decode_depot(const Call& call, storage::Depot into,
                                                    bool creating) {
  return decode_object<storage::Depot>(
      call, std::move(into),
      [creating](FieldReader& in, storage::Depot& d) { read_depot(in, d, creating); });
}

}  // namespace

http::Response list_depots(const Call& call) {
  Issues issues;
  auto page = page_request(call.query("limit"), call.query("cursor"), issues);
  if (!issues.empty()) return problem(ProblemKind::bad_query, "bad paging", issues.invalid);
  return render_page(call.ctx.store.list_depots(page));
}

http::Response create_depot(const Call& call) {
  auto depot = decode_depot(call, {}, true);
  if (auto* refused = std::get_if<http::Response>(&depot)) return std::move(*refused);
  return render(call.ctx.store.create_depot(std::get<storage::Depot>(depot)), 201);
}

http::Response get_depot(const Call& call) {
  auto id = parse_id(call.param("id"));
  if (!id || !in_scope(call, id)) return bad_id("depot", call.param("id"));
  return render(call.ctx.store.get_depot(*id));
}

http::Response patch_depot(const Call& call) {
  auto id = parse_id(call.param("id"));
  if (!id || !in_scope(call, id)) return bad_id("depot", call.param("id"));
  auto current = call.ctx.store.get_depot(*id);
  if (!current) return store_problem(current.error());
  auto depot = decode_depot(call, current.value(), false);
  if (auto* refused = std::get_if<http::Response>(&depot)) return std::move(*refused);
  return render(call.ctx.store.update_depot(std::get<storage::Depot>(depot)));
}

}  // namespace pbfleet::api::handlers
