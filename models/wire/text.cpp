#include "models/wire/text.hpp"

#include <array>
#include <charconv>
#include <cmath>
#include <system_error>

namespace pbfleet::models::wire::text {
namespace {

bool is_digit(char c) { return c >= '0' && c <= '9'; }

// Length of a run of ASCII digits starting at `i`.
std::size_t digits_at(std::string_view s, std::size_t i) {
  std::size_t n = 0;
  while (i + n < s.size() && is_digit(s[i + n])) ++n;
  return n;
}

// Expected length of a UTF-8 sequence from its lead byte; 0 if invalid lead.
int sequence_length(unsigned char lead) {
  if (lead < 0x80) return 1;
  if (lead >= 0xC2 && lead <= 0xDF) return 2;
  if (lead >= 0xE0 && lead <= 0xEF) return 3;
  if (lead >= 0xF0 && lead <= 0xF4) return 4;
  return 0;  // continuation byte, overlong lead C0/C1, or above F4
}

// Allowed range of the second byte, which rules out overlong forms,
// surrogates (ED A0..BF) and code points above U+10FFFF (RFC 3629 table).
bool second_byte_ok(unsigned char lead, unsigned char b) {
  if (lead == 0xE0) return b >= 0xA0 && b <= 0xBF;
  if (lead == 0xED) return b >= 0x80 && b <= 0x9F;
  if (lead == 0xF0) return b >= 0x90 && b <= 0xBF;
  if (lead == 0xF4) return b >= 0x80 && b <= 0x8F;
  return b >= 0x80 && b <= 0xBF;
}

}  // namespace

std::string_view trim(std::string_view s) {
  const auto first = s.find_first_not_of(" \t");
  if (first == std::string_view::npos) return {};
  const auto last = s.find_last_not_of(" \t");
  return s.substr(first, last - first + 1);
}

bool is_decimal(std::string_view s) {
  std::size_t i = 0;
  if (i < s.size() && (s[i] == '+' || s[i] == '-')) ++i;
  const std::size_t int_digits = digits_at(s, i);
  i += int_digits;
  std::size_t frac_digits = 0;
  if (i < s.size() && s[i] == '.') {
    ++i;
    frac_digits = digits_at(s, i);
    i += frac_digits;
  }
  if (int_digits + frac_digits == 0) return false;
  if (i < s.size() && (s[i] == 'e' || s[i] == 'E')) {
    ++i;
    if (i < s.size() && (s[i] == '+' || s[i] == '-')) ++i;
    const std::size_t exp_digits = digits_at(s, i);
    if (exp_digits == 0) return false;
    i += exp_digits;
  }
  return i == s.size();
}

std::optional<double> parse_decimal(std::string_view s) {
  if (!is_decimal(s)) return std::nullopt;
  if (s.front() == '+') s.remove_prefix(1);  // from_chars refuses a plus sign
  double v = 0.0;
  const auto [end, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
  if (ec != std::errc{} || end != s.data() + s.size() || !std::isfinite(v)) {
    return std::nullopt;  // out of double range ("1e999") or not consumed
  }
  return v;
}

std::string format_shortest(double v) {
  std::array<char, 32> buf{};
  const auto [end, ec] = std::to_chars(buf.data(), buf.data() + buf.size(), v);
  if (ec != std::errc{}) return "nan";  // cannot happen: 32 chars fit any double
  return std::string(buf.data(), end);
}

std::optional<std::size_t> utf8_length(std::string_view s) {
  std::size_t count = 0;
  for (std::size_t i = 0; i < s.size(); ++count) {
    const auto lead = static_cast<unsigned char>(s[i]);
    const int n = sequence_length(lead);
    if (n == 0 || i + static_cast<std::size_t>(n) > s.size()) return std::nullopt;
    if (n > 1 && !second_byte_ok(lead, static_cast<unsigned char>(s[i + 1]))) return std::nullopt;
    for (int k = 2; k < n; ++k) {
      const auto b = static_cast<unsigned char>(s[i + static_cast<std::size_t>(k)]);
      if (b < 0x80 || b > 0xBF) return std::nullopt;
    }
    i += static_cast<std::size_t>(n);
  }
  return count;
}

bool has_control(std::string_view s, bool allow_line_breaks) {
  for (std::size_t i = 0; i < s.size(); ++i) {
    const auto c = static_cast<unsigned char>(s[i]);
    if (c == '\t' || c == '\n' || c == '\r') {
      if (!allow_line_breaks) return true;
      continue;
    }
    if (c < 0x20 || c == 0x7F) return true;
    // C1 controls are U+0080..U+009F, encoded C2 80..C2 9F.
    if (c == 0xC2 && i + 1 < s.size()) {
      const auto next = static_cast<unsigned char>(s[i + 1]);
      if (next >= 0x80 && next <= 0x9F) return true;
    }
  }
  return false;
}

std::string excerpt(std::string_view s) {
  constexpr std::size_t kMaxCodePoints = 40;
  std::string out;
  std::size_t count = 0;
  for (std::size_t i = 0; i < s.size(); ++count) {
    if (count == kMaxCodePoints) return out + "...";
    const auto lead = static_cast<unsigned char>(s[i]);
    const auto n = static_cast<std::size_t>(sequence_length(lead));
    const bool whole = n > 0 && i + n <= s.size() && utf8_length(s.substr(i, n)).has_value();
    if (!whole) {
      out += '?';
      ++i;
      continue;
    }
    const std::string_view one = s.substr(i, n);
    out += has_control(one, false) ? std::string_view("?") : one;
    i += n;
  }
  return out;
}

}  // namespace pbfleet::models::wire::text
