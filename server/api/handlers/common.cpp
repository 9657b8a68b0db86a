#include "server/api/handlers/common.hpp"

#include <charconv>

namespace pbfleet::api::handlers {

std::optional<storage::Id> parse_id(const std::string& text) {
  storage::Id id = 0;
  auto r = std::from_chars(text.data(), text.data() + text.size(), id);
  if (r.ec != std::errc{} || r.ptr != text.data() + text.size() || id < 1) return std::nullopt;
  return id;
}

http::Response bad_id(const std::string& name, const std::string& text) {
  // Worded exactly as the store's not_found, so an object outside a
  // token's scope answers byte for byte like a missing one.
  return problem(ProblemKind::not_found, "no " + name + " with id " + text.substr(0, 40));
}

bool in_scope(const Call& call, std::optional<storage::Id> depot) {
  if (!call.caller || !call.caller->depot_id) return true;
  return depot && *depot == *call.caller->depot_id;
}

}  // namespace pbfleet::api::handlers
