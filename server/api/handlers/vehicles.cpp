// /v1/vehicles: create, list (?depot_id=), get, update.
#include "server/api/handlers/common.hpp"
#include "server/api/handlers/handlers.hpp"

namespace pbfleet::api::handlers {

namespace {

std::variant<storage::Vehicle, http::Response> decode_vehicle(const Call& call, storage::Vehicle into,
                                                      bool creating) {
  return decode_object<storage::Vehicle>(
      call, std::move(into),
      [creating](FieldReader& in, storage::Vehicle& v) { read_vehicle(in, v, creating); });
}

}  // namespace

http::Response list_vehicles(const Call& call) {
  Issues issues;
  auto page = page_request(call.query("limit"), call.query("cursor"), issues);
  storage::VehicleFilter filter;
  if (const auto* depot = call.query("depot_id")) {
    filter.depot_id = parse_id(*depot);
    if (!filter.depot_id)
      issues.invalid.push_back({"depot_id", "not a depot id", "a positive whole number", {}});
  }
  if (!issues.empty()) return problem(ProblemKind::bad_query, "bad query", issues.invalid);
  if (call.caller && call.caller->depot_id) {
    if (filter.depot_id && filter.depot_id != call.caller->depot_id)
      return json_response(200, {{"items", nlohmann::json::array()}, {"next_cursor", nullptr}});
    filter.depot_id = call.caller->depot_id;
  }
  return render_page(call.ctx.store.list_vehicles(filter, page));
}

http::Response create_vehicle(const Call& call) {
  auto vehicle = decode_vehicle(call, {}, true);
  if (auto* refused = std::get_if<http::Response>(&vehicle)) return std::move(*refused);
  auto& v = std::get<storage::Vehicle>(vehicle);
  if (!in_scope(call, v.depot_id))
    return problem(ProblemKind::validation_failed, "depot outside the token's scope",
                   {{"/depot_id", "no such depot", {}, {}}});
  return render(call.ctx.store.create_vehicle(v), 201);
}

http::Response get_vehicle(const Call& call) {
  auto id = parse_id(call.param("id"));
  if (!id) return bad_id("vehicle", call.param("id"));
  auto vehicle = call.ctx.store.get_vehicle(*id);
  if (vehicle && !in_scope(call, vehicle->depot_id)) return bad_id("vehicle", call.param("id"));
  return render(vehicle);
}

http::Response patch_vehicle(const Call& call) {
  auto id = parse_id(call.param("id"));
  if (!id) return bad_id("vehicle", call.param("id"));
  auto current = call.ctx.store.get_vehicle(*id);
  if (!current) return store_problem(current.error());
  if (!in_scope(call, current->depot_id)) return bad_id("vehicle", call.param("id"));
  auto vehicle = decode_vehicle(call, current.value(), false);
  if (auto* refused = std::get_if<http::Response>(&vehicle)) return std::move(*refused);
  return render(call.ctx.store.update_vehicle(std::get<storage::Vehicle>(vehicle)));
}

}  // namespace pbfleet::api::handlers
