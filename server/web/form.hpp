// Decoding what a browser sends: application/x-www-form-urlencoded bodies
// and the Cookie header.
#pragma once

#include <map>
#include <string>
#include <string_view>

namespace pbfleet::web {

// Name -> value of a form body (the last of repeated names wins). Broken
// percent-escapes make `ok` false.
[[nodiscard]] std::map<std::string, std::string> parse_form(std::string_view body, bool* ok);

// The value of cookie `name` in a Cookie header, or empty.
[[nodiscard]] std::string cookie_value(std::string_view cookie_header, std::string_view name);

}  // namespace pbfleet::web
