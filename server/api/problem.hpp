// RFC 9457 problem details: the one place error responses are built, so the
// status, media type, `type` URI and fields of an error cannot drift apart.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "server/http/message.hpp"

namespace pbfleet::api {

// Stable problem kinds; the slug is the last segment of the `type` URI.
enum class ProblemKind {
  validation_failed,       // 422: fields out of range or missing
  unknown_field,           // 422: fields the API does not know
  malformed_body,          // 400: not JSON / not CSV / wrong shape
  bad_query,               // 400: a query parameter is malformed
  not_found,               // 404
  method_not_allowed,      // 405
  conflict,                // 409: unique key or reading_id reused with other content
  unauthorized,            // 401: no, unknown or revoked token
  forbidden,               // 403: role may not use this route
  payload_too_large,       // 413
  header_too_large,        // 431
  unsupported_media_type,  // 415
  not_acceptable,          // 406
  too_many_requests,       // 429
  storage_unavailable,     // 503
  storage_full,            // 507
  internal,                // 500
};

// One bad input field. `field` is a JSON pointer ("/0/cell_sg/2") for JSON
// bodies, or the column name with `row` set for CSV rows.
struct ProblemField {
  std::string field;
  std::string detail;
  std::string allowed;        // accepted range or form; may be empty
  std::optional<int> row;     // 1-based CSV data row, or batch index for JSON arrays
};

inline constexpr std::string_view kProblemTypeBase = "https://pbfleet.invalid/problems/";

[[nodiscard]] int status_of(ProblemKind kind);
[[nodiscard]] std::string_view slug_of(ProblemKind kind);

// The response: application/problem+json with type, title, status, detail
// and, when given, `errors`.
[[nodiscard]] http::Response problem(ProblemKind kind, std::string_view detail,
                                     const std::vector<ProblemField>& errors = {});

// The kind for an HTTP status the transport refuses on its own (413, 431, 503, 500).
[[nodiscard]] ProblemKind kind_for_status(int status);

}  // namespace pbfleet::api
