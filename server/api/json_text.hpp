// JSON text written straight into a string.
//
// For large answers (a batch of stored readings, a fleet report) building
// an nlohmann tree first costs more than the answer itself: every object is
// a std::map of heap strings. JsonText appends tokens in order instead and
// puts the commas itself. Strings are escaped as nlohmann's compact dump
// with the `replace` error handler escapes them (invalid UTF-8 becomes
// U+FFFD); doubles are written in shortest round-trip form, with ".0" on
// whole numbers so they read back as doubles, and non-finite ones as null.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace pbfleet::api {

class JsonText {
 public:
  explicit JsonText(std::string& out) : out_(out) {}

  JsonText& begin_object();
  JsonText& end_object();
  JsonText& begin_array();
  JsonText& end_array();
  // A member name; the next value, object or array is its value.
  JsonText& key(std::string_view name);

  JsonText& value(std::string_view text);
  JsonText& value(const char* text) { return value(std::string_view(text)); }
  JsonText& value(const std::string& text) { return value(std::string_view(text)); }
  JsonText& value(double number);
  JsonText& value(std::int64_t number);
  JsonText& value(std::uint64_t number);
  JsonText& value(int number) { return value(static_cast<std::int64_t>(number)); }
  JsonText& value(bool flag);
  JsonText& null();
  template <class T>
  JsonText& value(const std::optional<T>& v) {
    return v ? value(*v) : null();
  }
  JsonText& value(const std::vector<double>& numbers);

  // key(name).value(v) in one call.
  template <class T>
  JsonText& member(std::string_view name, const T& v) {
    return key(name).value(v);
  }

 private:
  template <class Write>
  JsonText& put_value(Write write);
  JsonText& open(char bracket);
  JsonText& close(char bracket);

  std::string& out_;
  bool need_comma_ = false;
};

// Appends `text` as a JSON string literal, quotes included.
void append_json_string(std::string& out, std::string_view text);
// Appends `number` as nlohmann's dump would (null when not finite).
void append_json_number(std::string& out, double number);

}  // namespace pbfleet::api
