#include "server/api/json_fields.hpp"

#include <charconv>
#include <cmath>
#include <cstdio>

namespace pbfleet::api {

using nlohmann::json;

http::Response Issues::to_problem() const {
  if (!unknown.empty()) {
    std::string names;
    for (const auto& f : unknown) names += (names.empty() ? "" : ", ") + f.field;
    return problem(ProblemKind::unknown_field, "unknown fields: " + names, unknown);
  }
  return problem(ProblemKind::validation_failed,
                 std::to_string(invalid.size()) + " field(s) invalid; nothing was stored", invalid);
}

std::string pointer_to(std::string_view base, std::string_view key) {
  std::string out(base);
  out += '/';
  for (char c : key) {
    if (c == '~') {
      out += "~0";
    } else if (c == '/') {
      out += "~1";
    } else {
      out += c;
    }
  }
  return out;
}

std::optional<std::chrono::sys_days> parse_date(std::string_view text) {
  if (text.size() != 10 || text[4] != '-' || text[7] != '-') return std::nullopt;
  int y = 0;
  unsigned m = 0, d = 0;
  auto ok = [](std::from_chars_result r, const char* end) { return r.ec == std::errc{} && r.ptr == end; };
  const char* p = text.data();
  if (!ok(std::from_chars(p, p + 4, y), p + 4) || !ok(std::from_chars(p + 5, p + 7, m), p + 7) ||
      !ok(std::from_chars(p + 8, p + 10, d), p + 10))
    return std::nullopt;
  std::chrono::year_month_day ymd{std::chrono::year{y}, std::chrono::month{m}, std::chrono::day{d}};
  if (!ymd.ok()) return std::nullopt;
  return std::chrono::sys_days{ymd};
}

std::string format_date(std::chrono::sys_days day) {
  std::chrono::year_month_day ymd{day};
  char buffer[16];
  std::snprintf(buffer, sizeof buffer, "%04d-%02u-%02u", static_cast<int>(ymd.year()),
                static_cast<unsigned>(ymd.month()), static_cast<unsigned>(ymd.day()));
  return buffer;
}

FieldReader::FieldReader(const json& object, std::string pointer, Issues& issues,
                         std::optional<int> row)
    : object_(object), base_(std::move(pointer)), issues_(issues), row_(row) {
  if (!object_.is_object())
    issues_.invalid.push_back(
        {base_.empty() ? "/" : base_, "expected a JSON object", "an object", row_});
}

bool FieldReader::has(std::string_view key) const {
  if (!object_.is_object()) return false;
  auto it = object_.find(key);
  return it != object_.end() && !it->is_null();
}

bool FieldReader::is_null(std::string_view key) const {
  if (!object_.is_object()) return false;
  auto it = object_.find(key);
  return it != object_.end() && it->is_null();
}

void FieldReader::invalid(std::string_view key, std::string detail, std::string allowed) {
  issues_.invalid.push_back({pointer(key), std::move(detail), std::move(allowed), row_});
}

void FieldReader::invalid_item(std::string_view key, std::size_t index, std::string detail,
                               std::string allowed) {
  issues_.invalid.push_back(
      {pointer(key) + "/" + std::to_string(index), std::move(detail), std::move(allowed), row_});
}

const json* FieldReader::lookup(std::string_view key, bool required) {
  known_.emplace(key);
  if (!object_.is_object()) return nullptr;
  auto it = object_.find(key);
  if (it == object_.end() || it->is_null()) {
    if (required) invalid(key, "required field is missing");
    return nullptr;
  }
  return &*it;
}

const json* FieldReader::raw(std::string_view key, bool required) { return lookup(key, required); }

std::optional<std::string> FieldReader::text(std::string_view key, bool required,
                                             std::size_t max_length) {
  const json* v = lookup(key, required);
  if (!v) return std::nullopt;
  if (!v->is_string()) {
    invalid(key, "expected a string", "text up to " + std::to_string(max_length) + " characters");
    return std::nullopt;
  }
  const auto& s = v->get_ref<const std::string&>();
  if (s.size() > max_length || (required && s.empty())) {
    invalid(key, s.empty() ? "must not be empty" : "too long",
            "1 to " + std::to_string(max_length) + " characters");
    return std::nullopt;
  }
  return s;
}

std::optional<double> FieldReader::number(std::string_view key, bool required, double min,
                                          double max, std::string_view allowed) {
  const json* v = lookup(key, required);
  if (!v) return std::nullopt;
  if (!v->is_number()) {
    invalid(key, "expected a number", std::string(allowed));
    return std::nullopt;
  }
  const double x = v->get<double>();
  if (!std::isfinite(x) || x < min || x > max) {
    invalid(key, "out of range: " + v->dump(), std::string(allowed));
    return std::nullopt;
  }
  return x;
}

std::optional<std::int64_t> FieldReader::integer(std::string_view key, bool required,
                                                 std::int64_t min, std::int64_t max) {
  const json* v = lookup(key, required);
  if (!v) return std::nullopt;
  const std::string allowed = std::to_string(min) + " to " + std::to_string(max);
  if (!v->is_number_integer()) {
    invalid(key, "expected a whole number", allowed);
    return std::nullopt;
  }
  if (v->is_number_unsigned() && v->get<std::uint64_t>() > static_cast<std::uint64_t>(max)) {
    invalid(key, "out of range: " + v->dump(), allowed);
    return std::nullopt;
  }
  const auto x = v->get<std::int64_t>();
  if (x < min || x > max) {
    invalid(key, "out of range: " + v->dump(), allowed);
    return std::nullopt;
  }
  return x;
}

std::optional<bool> FieldReader::boolean(std::string_view key, bool required) {
  const json* v = lookup(key, required);
  if (!v) return std::nullopt;
  if (!v->is_boolean()) {
    invalid(key, "expected true or false", "true or false");
    return std::nullopt;
  }
  return v->get<bool>();
}

std::optional<std::chrono::sys_days> FieldReader::date(std::string_view key, bool required) {
  auto s = text(key, required, 10);
  if (!s) return std::nullopt;
  auto d = parse_date(*s);
  if (!d) invalid(key, "not a calendar date: '" + *s + "'", "YYYY-MM-DD");
  return d;
}

std::optional<std::string> FieldReader::choice(std::string_view key, bool required,
                                               const std::vector<std::string_view>& choices) {
  std::string allowed;
  for (auto c : choices) allowed += (allowed.empty() ? "" : ", ") + std::string(c);
  const json* v = lookup(key, required);
  if (!v) return std::nullopt;
  if (v->is_string()) {
    for (auto c : choices)
      if (v->get_ref<const std::string&>() == c) return std::string(c);
  }
  invalid(key, "not one of the accepted values: " + v->dump().substr(0, 64), "one of " + allowed);
  return std::nullopt;
}

void FieldReader::finish() {
  if (!object_.is_object()) return;
  for (const auto& [key, value] : object_.items()) {
    if (!known_.contains(key))
      issues_.unknown.push_back({pointer(key), "unknown field; nothing was stored", {}, row_});
  }
}

}  // namespace pbfleet::api
