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

// A member name: a string literal of plain ASCII (no quote, backslash,
// control or non-ASCII byte), checked when the program is compiled, so it
// is written as is, with no escaping pass.
class JsonName {
 public:
  template <std::size_t N>
  consteval JsonName(const char (&text)[N]) : text_(text, N - 1) {  // NOLINT: implicit on purpose
    for (const char c : text_)
      if (c < 0x20 || c == '"' || c == '\\' || static_cast<unsigned char>(c) >= 0x80)
        throw "a JSON member name must be plain ASCII";  // not a constant expression: compile error
  }
  [[nodiscard]] constexpr std::string_view text() const { return text_; }

 private:
  std::string_view text_;
};

class JsonText {
 public:
  explicit JsonText(std::string& out) : out_(out) {}

  JsonText& begin_object() { return open('{'); }
  JsonText& end_object() { return close('}'); }
  JsonText& begin_array() { return open('['); }
  JsonText& end_array() { return close(']'); }
  // A member name; the next value, object or array is its value.
  JsonText& key(JsonName name) {
    const std::string_view text = name.text();
    if (need_comma_) out_ += ',';
    out_ += '"';
    out_.append(text.data(), text.size());
    out_.append("\":", 2);
    need_comma_ = false;
    return *this;
  }

  JsonText& value(std::string_view text);
  JsonText& value(const char* text) { return value(std::string_view(text)); }
  JsonText& value(const std::string& text) { return value(std::string_view(text)); }
  JsonText& value(double number);
  JsonText& value(std::int64_t number);
  JsonText& value(std::uint64_t number);
  JsonText& value(int number) { return value(static_cast<std::int64_t>(number)); }
  JsonText& value(bool flag) { return literal(flag ? std::string_view("true") : std::string_view("false")); }
  JsonText& null() { return literal("null"); }
  template <class T>
  JsonText& value(const std::optional<T>& v) {
    return v ? value(*v) : null();
  }
  JsonText& value(const std::vector<double>& numbers);

  // key(name).value(v) in one call.
  template <class T>
  JsonText& member(JsonName name, const T& v) {
    return key(name).value(v);
  }

 private:
  // Every token goes through one of these: a value (comma before it when
  // one is due), an opening bracket or a key (nothing may follow without a
  // value), a closing bracket (a comma is due after it).
  void before_value() {
    if (need_comma_) out_ += ',';
    need_comma_ = true;
  }
  JsonText& literal(std::string_view text) {
    before_value();
    out_.append(text.data(), text.size());
    return *this;
  }
  JsonText& open(char bracket) {
    if (need_comma_) out_ += ',';
    out_ += bracket;
    need_comma_ = false;
    return *this;
  }
  JsonText& close(char bracket) {
    out_ += bracket;
    need_comma_ = true;
    return *this;
  }

  std::string& out_;
  bool need_comma_ = false;
};

// Appends `text` as a JSON string literal, quotes included.
void append_json_string(std::string& out, std::string_view text);
// Appends `number` as nlohmann's dump would (null when not finite).
void append_json_number(std::string& out, double number);

}  // namespace pbfleet::api
