#include "server/api/handlers/common.hpp"

#include <charconv>
#include <cstdint>
#include <cstdio>

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

std::string strong_etag(std::string_view key, std::int64_t version) {
  std::uint64_t h = 1469598103934665603ull;
  auto mix = [&](std::string_view text) {
    for (const unsigned char c : text) h = (h ^ c) * 1099511628211ull;
  };
  mix(key);
  mix("|" + std::to_string(version));
  char text[24];
  std::snprintf(text, sizeof text, "\"%016llx\"", static_cast<unsigned long long>(h));
  return text;
}

std::optional<http::Response> not_modified(const Call& call, const std::string& etag,
                                           std::string_view content_type,
                                           const std::vector<std::pair<std::string, std::string>>& validators) {
  if (call.request.header("if-none-match") != etag) return std::nullopt;
  http::Response r;
  r.status = 304;
  r.content_type = std::string(content_type);
  r.headers = validators;
  return r;
}

}  // namespace pbfleet::api::handlers
