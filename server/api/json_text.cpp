#include "server/api/json_text.hpp"

#include <charconv>
#include <cmath>

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

void append_json_number(std::string& out, double number) {
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

// Every token goes through one of these three: a value (comma before it when
// one is due), an opening bracket or a key (nothing may follow without a
// value), a closing bracket (a comma is due after it).
template <class Write>
JsonText& JsonText::put_value(Write write) {
  if (need_comma_) out_ += ',';
  write(out_);
  need_comma_ = true;
  return *this;
}

JsonText& JsonText::open(char bracket) {
  if (need_comma_) out_ += ',';
  out_ += bracket;
  need_comma_ = false;
  return *this;
}

JsonText& JsonText::close(char bracket) {
  out_ += bracket;
  need_comma_ = true;
  return *this;
}

JsonText& JsonText::begin_object() { return open('{'); }
JsonText& JsonText::end_object() { return close('}'); }
JsonText& JsonText::begin_array() { return open('['); }
JsonText& JsonText::end_array() { return close(']'); }

JsonText& JsonText::key(std::string_view name) {
  if (need_comma_) out_ += ',';
  append_json_string(out_, name);
  out_ += ':';
  need_comma_ = false;
  return *this;
}

JsonText& JsonText::value(std::string_view text) {
  return put_value([&](std::string& out) { append_json_string(out, text); });
}

JsonText& JsonText::value(double number) {
  return put_value([&](std::string& out) { append_json_number(out, number); });
}

JsonText& JsonText::value(std::int64_t number) {
  return put_value([&](std::string& out) { append_integer(out, number); });
}

JsonText& JsonText::value(std::uint64_t number) {
  return put_value([&](std::string& out) { append_integer(out, number); });
}

JsonText& JsonText::value(bool flag) {
  return put_value([&](std::string& out) { out += flag ? "true" : "false"; });
}

JsonText& JsonText::null() {
  return put_value([](std::string& out) { out += "null"; });
}

JsonText& JsonText::value(const std::vector<double>& numbers) {
  begin_array();
  for (double n : numbers) value(n);
  return end_array();
}

}  // namespace pbfleet::api
