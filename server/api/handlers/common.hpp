// Steps every handler shares: decode a JSON object body, parse ids, check
// a depot-scoped token's reach, render a store result.
#pragma once

#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <variant>
#include <vector>

#include <nlohmann/json.hpp>

#include "server/api/codecs.hpp"
#include "server/api/context.hpp"
#include "server/api/json_fields.hpp"
#include "server/api/problem.hpp"
#include "server/api/request_util.hpp"

namespace pbfleet::api::handlers {

// A positive integer id from a path parameter; nullopt when malformed.
std::optional<storage::Id> parse_id(const std::string& text);
http::Response bad_id(const std::string& name, const std::string& text);

// True when the caller may see objects of `depot` (unscoped tokens see all;
// a scoped token sees only its depot's objects). Out of scope answers 404,
// like a missing object, so ids cannot be probed.
bool in_scope(const Call& call, std::optional<storage::Id> depot);

// A strong validator for an answer kept in a cache: FNV-1a over the cache
// key and the data version it was built at, quoted. Equal tags mean the
// same bytes.
std::string strong_etag(std::string_view key, std::int64_t version);

// 304 with `validators` (ETag and Cache-Control) when the request's
// If-None-Match names `etag`.
std::optional<http::Response> not_modified(const Call& call, const std::string& etag,
                                           std::string_view content_type,
                                           const std::vector<std::pair<std::string, std::string>>& validators);

// Decodes the body as one JSON object with `read`; the problem response
// (415, 400, 422) when anything is wrong.
template <class T>
std::variant<T, http::Response> decode_object(const Call& call, T into,
                                              const std::function<void(FieldReader&, T&)>& read) {
  auto body = json_body(call.request);
  if (auto* refused = std::get_if<http::Response>(&body)) return std::move(*refused);
  Issues issues;
  FieldReader in(std::get<nlohmann::json>(body), "", issues);
  if (in.is_object()) read(in, into);
  if (!issues.empty()) return issues.to_problem();
  return into;
}

// 200/201 with the object's JSON, or the store's problem.
template <class T>
http::Response render(const storage::StoreResult<T>& result, int status = 200) {
  if (!result) return store_problem(result.error());
  return json_response(status, to_json(result.value()));
}

// A list page as {"items", "next_cursor"}, or the store's problem.
template <class T>
http::Response render_page(const storage::StoreResult<storage::Page<T>>& result) {
  if (!result) return store_problem(result.error());
  return json_response(200, page_json(result.value()));
}

}  // namespace pbfleet::api::handlers
