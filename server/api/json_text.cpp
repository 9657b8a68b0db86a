#include "server/api/json_text.hpp"

#include <charconv>
#include <cmath>
#include <cstdint>

namespace pbfleet::api {

namespace {

constexpr std::string_view kReplacement = "\xEF\xBF\xBD";  // U+FFFD

// How the bytes at the start of `s` read as UTF-8 (RFC 3629: no
// overlongs, no surrogates, nothing above U+10FFFF): `length` bytes that
// fit a sequence so far, `complete` when they form a whole character.
// An ill-formed sequence is replaced by one U+FFFD for its longest
// fitting prefix (at least one byte), as nlohmann's `replace` does.
struct Utf8Run {
  std::size_t length;
  bool complete;
};

Utf8Run utf8_run(std::string_view s) {
  const auto byte = [&](std::size_t i) { return static_cast<unsigned char>(s[i]); };
  const unsigned char lead = byte(0);
  std::size_t need = 0;
  unsigned char low = 0x80, high = 0xBF;  // allowed range of the second byte
  if (lead >= 0xC2 && lead <= 0xDF) need = 2;
  else if (lead >= 0xE0 && lead <= 0xEF) need = 3;
  else if (lead >= 0xF0 && lead <= 0xF4) need = 4;
  else return {1, false};
  if (lead == 0xE0) low = 0xA0;   // overlong
  if (lead == 0xED) high = 0x9F;  // surrogates
  if (lead == 0xF0) low = 0x90;   // overlong
  if (lead == 0xF4) high = 0x8F;  // above U+10FFFF
  std::size_t fit = 1;
  while (fit < need && fit < s.size()) {
    const unsigned char b = byte(fit);
    const bool ok = fit == 1 ? (b >= low && b <= high) : (b & 0xC0) == 0x80;
    if (!ok) break;
    ++fit;
  }
  return {fit, fit == need};
}

}  // namespace

void append_json_string(std::string& out, std::string_view text) {
  static constexpr char kHex[] = "0123456789abcdef";
  const auto plain = [](unsigned char c) { return c >= 0x20 && c < 0x80 && c != '"' && c != '\\'; };
  out += '"';
  std::size_t i = 0;
  while (i < text.size()) {
    // Most text is plain ASCII: copy each run of it in one append.
    std::size_t end = i;
    while (end < text.size() && plain(static_cast<unsigned char>(text[end]))) ++end;
    out.append(text.data() + i, end - i);
    if (end == text.size()) break;
    i = end;
    const auto c = static_cast<unsigned char>(text[i]);
    if (c >= 0x80) {
      const Utf8Run seq = utf8_run(text.substr(i));
      if (seq.complete) out.append(text.substr(i, seq.length));
      else out += kReplacement;
      i += seq.length;
      continue;
    }
    switch (c) {
      case '"': out += "\\\""; break;
      case '\\': out += "\\\\"; break;
      case '\b': out += "\\b"; break;
      case '\f': out += "\\f"; break;
      case '\n': out += "\\n"; break;
      case '\r': out += "\\r"; break;
      case '\t': out += "\\t"; break;
      default:
        out += "\\u00";  // the other control characters; plain text never gets here
        out += kHex[c >> 4];
        out += kHex[c & 0xF];
    }
    ++i;
  }
  out += '"';
}

namespace {

// Most numbers in answers are measurements and derived values with a few
// decimals (1.265, 12.41, -4.5). Their shortest round-trip text is found
// here with one multiplication and one division instead of the general
// shortest-digits search, which was half the time of rendering a stored
// batch. micro / 1e6 is correctly rounded (both exact doubles), so it
// equals `number` exactly when the decimal text of micro * 10^-6 reads back
// as `number`; the decimals it needs are then those of micro with trailing
// zeros dropped (below 1e5 the doubles are closer together than 10^-6, so
// no shorter text can name the same double). Between 1e-3 and 1e5 fixed
// notation is never longer than scientific, so the text is std::to_chars'
// too. False (nothing written) outside that range or past 6 decimals.
bool append_few_decimals(std::string& out, double number) {
  const double magnitude = number < 0 ? -number : number;
  if (!(magnitude >= 1e-3 && magnitude < 1e5)) return false;  // NaN fails too
  const auto micro = static_cast<std::uint64_t>(magnitude * 1e6 + 0.5);
  if (static_cast<double>(micro) / 1e6 != magnitude) return false;
  std::uint64_t digits = micro;
  std::size_t decimals = 6;
  while (decimals > 0 && digits % 10 == 0) {
    digits /= 10;
    --decimals;
  }
  char buf[24];
  const char* end = std::to_chars(buf, buf + sizeof buf, digits).ptr;
  const auto count = static_cast<std::size_t>(end - buf);
  if (number < 0) out += '-';
  if (decimals == 0) {
    out.append(buf, count);
    out.append(".0", 2);
  } else if (count > decimals) {
    out.append(buf, count - decimals);
    out += '.';
    out.append(buf + count - decimals, decimals);
  } else {
    out.append("0.", 2);
    out.append(decimals - count, '0');
    out.append(buf, count);
  }
  return true;
}

}  // namespace

void append_json_number(std::string& out, double number) {
  if (append_few_decimals(out, number)) return;
  if (!std::isfinite(number)) {
    out += "null";
    return;
  }
  char buf[32];
  const auto [end, ec] = std::to_chars(buf, buf + sizeof buf, number);
  const std::string_view text(buf, static_cast<std::size_t>(end - buf));
  out += text;
  if (text.find_first_of(".e") == std::string_view::npos) out += ".0";
}

namespace {

template <class Integer>
void append_integer(std::string& out, Integer number) {
  char buf[24];
  const auto [end, ec] = std::to_chars(buf, buf + sizeof buf, number);
  out.append(buf, end);
}

}  // namespace

JsonText& JsonText::value(std::string_view text) {
  before_value();
  append_json_string(out_, text);
  return *this;
}

JsonText& JsonText::value(double number) {
  before_value();
  append_json_number(out_, number);
  return *this;
}

JsonText& JsonText::value(std::int64_t number) {
  before_value();
  append_integer(out_, number);
  return *this;
}

JsonText& JsonText::value(std::uint64_t number) {
  before_value();
  append_integer(out_, number);
  return *this;
}

JsonText& JsonText::value(const std::vector<double>& numbers) {
  begin_array();
  for (double n : numbers) value(n);
  return end_array();
}

}  // namespace pbfleet::api
