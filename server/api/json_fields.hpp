// Reading JSON objects field by field: type and range checks, JSON-pointer
// names, and refusal of unknown fields. Collects every problem instead of
// stopping at the first, so a client sees all its mistakes at once.
#pragma once

#include <chrono>
#include <cstdint>
#include <optional>
#include <set>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json.hpp>

#include "server/api/problem.hpp"

namespace pbfleet::api {

// Problems found while decoding one request body.
struct Issues {
  std::vector<ProblemField> unknown;  // fields the API does not know
  std::vector<ProblemField> invalid;  // wrong type, missing, out of range

  [[nodiscard]] bool empty() const { return unknown.empty() && invalid.empty(); }
  // 422 unknown-field when any field is unknown (listing them), else 422
  // validation-failed listing every invalid field.
  [[nodiscard]] http::Response to_problem() const;
};

// "/0/cell_sg" style pointer: `base` + "/" + escaped key (RFC 6901).
[[nodiscard]] std::string pointer_to(std::string_view base, std::string_view key);

class FieldReader {
 public:
  // `pointer` names the object ("" for the body, "/3" for a batch item).
  FieldReader(const nlohmann::json& object, std::string pointer, Issues& issues,
              std::optional<int> row = std::nullopt);

  // False (with an error recorded) when the value is not a JSON object.
  [[nodiscard]] bool is_object() const { return object_.is_object(); }
  // The key is present with a non-null value.
  [[nodiscard]] bool has(std::string_view key) const;
  // The key is present with null (a PATCH clearing an optional field).
  [[nodiscard]] bool is_null(std::string_view key) const;

  std::optional<std::string> text(std::string_view key, bool required,
                                  std::size_t max_length = 200);
  std::optional<double> number(std::string_view key, bool required, double min, double max,
                               std::string_view allowed);
  std::optional<std::int64_t> integer(std::string_view key, bool required, std::int64_t min,
                                      std::int64_t max);
  std::optional<bool> boolean(std::string_view key, bool required);
  // "YYYY-MM-DD".
  std::optional<std::chrono::sys_days> date(std::string_view key, bool required);
  // The raw value of a key (marks it known); nullptr when absent or null.
  const nlohmann::json* raw(std::string_view key, bool required);
  // One of `choices` (exact, lower-case).
  std::optional<std::string> choice(std::string_view key, bool required,
                                    const std::vector<std::string_view>& choices);

  // Records a problem with `key` of this object.
  void invalid(std::string_view key, std::string detail, std::string allowed = {});
  // Records a problem with item `index` of the array `key` ("/cell_sg/2").
  void invalid_item(std::string_view key, std::size_t index, std::string detail,
                    std::string allowed = {});
  // Records every key never asked for as unknown. Call once, at the end.
  void finish();
  [[nodiscard]] std::string pointer(std::string_view key) const { return pointer_to(base_, key); }

 private:
  const nlohmann::json* lookup(std::string_view key, bool required);

  const nlohmann::json& object_;
  std::string base_;
  Issues& issues_;
  std::optional<int> row_;
  std::set<std::string, std::less<>> known_;
};

// Parses "YYYY-MM-DD"; nullopt when malformed or not a calendar date.
std::optional<std::chrono::sys_days> parse_date(std::string_view text);
// "YYYY-MM-DD".
std::string format_date(std::chrono::sys_days day);

}  // namespace pbfleet::api
