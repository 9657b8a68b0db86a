// Small helpers shared by the handlers: query strings, JSON bodies and
// JSON responses. No domain knowledge.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <variant>

#include <nlohmann/json_fwd.hpp>

#include "server/http/message.hpp"

namespace pbfleet::api {

// Splits "/a/b?x=1&y=%20z" into the path and decoded query parameters.
struct Target {
  std::string path;
  std::map<std::string, std::string> query;
  bool malformed = false;  // bad percent-encoding
};
[[nodiscard]] Target parse_target(std::string_view target);
// Percent-decoding; `ok` set false on a broken escape. '+' is a space only
// in query strings.
[[nodiscard]] std::string percent_decode(std::string_view text, bool* ok, bool plus_is_space);

// The request's media type without parameters, lower-case ("application/json").
[[nodiscard]] std::string media_type(std::string_view content_type);

// The body as JSON, or the problem to answer: 415 for a body that is not
// application/json, 400 for text that does not parse.
[[nodiscard]] std::variant<nlohmann::json, http::Response> json_body(const http::Request& request);

// A JSON response. Invalid UTF-8 in strings is replaced, never thrown.
[[nodiscard]] http::Response json_response(int status, const nlohmann::json& body);
[[nodiscard]] std::string dump(const nlohmann::json& body);
// A JSON response whose body is already rendered (JsonText).
[[nodiscard]] http::Response json_text_response(int status, std::string body);

// True when an Accept header value admits one of `produced` (media types,
// comma-separated): an absent or empty header admits anything; ranges
// "*/*" and "type/*" match; a range with q=0 admits nothing.
[[nodiscard]] bool accepts(std::string_view accept, std::string_view produced);

// True when a Prefer header (RFC 7240) value holds `preference`, e.g.
// "return=minimal": comma-separated preferences, each possibly followed by
// ";"-parameters; names compare case-insensitively, values exactly.
[[nodiscard]] bool prefers(std::string_view prefer, std::string_view preference);

// True when the client asked for CSV (Accept: text/csv).
[[nodiscard]] bool wants_csv(const http::Request& request);

}  // namespace pbfleet::api
