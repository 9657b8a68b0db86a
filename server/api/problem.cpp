#include "server/api/problem.hpp"

#include <array>

#include <nlohmann/json.hpp>

namespace pbfleet::api {

namespace {

struct KindInfo {
  ProblemKind kind;
  int status;
  std::string_view slug;
  std::string_view title;
};

constexpr std::array kKinds{
    KindInfo{ProblemKind::validation_failed, 422, "validation-failed", "Validation failed"},
    KindInfo{ProblemKind::unknown_field, 422, "unknown-field", "Unknown field"},
    KindInfo{ProblemKind::malformed_body, 400, "malformed-body", "Malformed body"},
    KindInfo{ProblemKind::bad_query, 400, "bad-query", "Bad query parameter"},
    KindInfo{ProblemKind::not_found, 404, "not-found", "Not found"},
    KindInfo{ProblemKind::method_not_allowed, 405, "method-not-allowed", "Method not allowed"},
    KindInfo{ProblemKind::conflict, 409, "conflict", "Conflict"},
    KindInfo{ProblemKind::unauthorized, 401, "unauthorized", "Unauthorized"},
    KindInfo{ProblemKind::forbidden, 403, "forbidden", "Forbidden"},
    KindInfo{ProblemKind::payload_too_large, 413, "payload-too-large", "Payload too large"},
    KindInfo{ProblemKind::header_too_large, 431, "header-too-large",
             "Request header fields too large"},
    KindInfo{ProblemKind::unsupported_media_type, 415, "unsupported-media-type",
             "Unsupported media type"},
    KindInfo{ProblemKind::not_acceptable, 406, "not-acceptable", "Not acceptable"},
    KindInfo{ProblemKind::too_many_requests, 429, "too-many-requests", "Too many requests"},
    KindInfo{ProblemKind::storage_unavailable, 503, "storage-unavailable",
             "Service unavailable"},
    KindInfo{ProblemKind::storage_full, 507, "storage-full", "Insufficient storage"},
    KindInfo{ProblemKind::internal, 500, "internal", "Internal error"},
};

const KindInfo& info(ProblemKind kind) {
  for (const auto& k : kKinds)
    if (k.kind == kind) return k;
  return kKinds.back();
}

nlohmann::json field_json(const ProblemField& f) {
  nlohmann::json j{{"field", f.field}, {"detail", f.detail}};
  if (!f.allowed.empty()) j["allowed"] = f.allowed;
  if (f.row) j["row"] = *f.row;
  return j;
}

}  // namespace

int status_of(ProblemKind kind) { return info(kind).status; }
std::string_view slug_of(ProblemKind kind) { return info(kind).slug; }

http::Response problem(ProblemKind kind, std::string_view detail,
                       const std::vector<ProblemField>& errors) {
  const KindInfo& k = info(kind);
  nlohmann::json body{{"type", std::string(kProblemTypeBase) + std::string(k.slug)},
                      {"title", k.title},
                      {"status", k.status},
                      {"detail", detail}};
  if (!errors.empty()) {
    auto& list = body["errors"] = nlohmann::json::array();
    for (const auto& e : errors) list.push_back(field_json(e));
  }
  http::Response r;
  r.status = k.status;
  r.content_type = "application/problem+json";
  r.body = body.dump(-1, ' ', false, nlohmann::json::error_handler_t::replace);
  if (kind == ProblemKind::unauthorized) r.headers.emplace_back("WWW-Authenticate", "Bearer");
  if (kind == ProblemKind::storage_unavailable || kind == ProblemKind::too_many_requests)
    r.headers.emplace_back("Retry-After", "1");
  return r;
}

ProblemKind kind_for_status(int status) {
  for (const auto& k : kKinds)
    if (k.status == status && k.kind != ProblemKind::unknown_field) return k.kind;
  return ProblemKind::internal;
}

}  // namespace pbfleet::api
