// Writing HTML safely: every text and attribute value goes through escape(),
// so data from the database (serials, names, reasons) can never become
// markup. Numbers are formatted with a fixed number of decimals.
#pragma once

#include <chrono>
#include <optional>
#include <string>
#include <string_view>

namespace pbfleet::web {

// Escapes & < > " ' for use in text and in double-quoted attributes.
[[nodiscard]] std::string escape(std::string_view text);

// Appends escaped text.
class Html {
 public:
  explicit Html(std::string& out) : out_(out) {}
  // Raw markup written by this program (never data).
  Html& raw(std::string_view markup) {
    out_ += markup;
    return *this;
  }
  // Escaped text or attribute value.
  Html& text(std::string_view text);
  Html& operator<<(std::string_view markup) { return raw(markup); }

 private:
  std::string& out_;
};

// "12.3" with `decimals` digits, or `none` when absent.
[[nodiscard]] std::string number(std::optional<double> value, int decimals,
                                 std::string_view none = "–");
// "2026-12-03" (UTC).
[[nodiscard]] std::string date_text(std::chrono::sys_seconds at);
[[nodiscard]] std::string date_text(std::chrono::sys_days day);
// "2026-12-03 07:40" (UTC).
[[nodiscard]] std::string time_text(std::chrono::sys_seconds at);
// Percent-encodes a path segment or query value.
[[nodiscard]] std::string url_encode(std::string_view text);

}  // namespace pbfleet::web
