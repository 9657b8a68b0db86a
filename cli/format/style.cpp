#include "cli/format/style.hpp"

#include <algorithm>
#include <cctype>

namespace pbfleet::cli::format {
namespace {

std::string lower(std::string_view text) {
  std::string s(text);
  std::transform(s.begin(), s.end(), s.begin(), [](unsigned char c) { return std::tolower(c); });
  return s;
}

bool term_is_dumb(const Io& io) { return io.getenv("TERM").value_or("") == "dumb"; }

// The first of LC_ALL, LC_CTYPE, LANG that is set and not empty decides
// (POSIX locale precedence).
std::string effective_locale(const Io& io) {
  for (const char* name : {"LC_ALL", "LC_CTYPE", "LANG"}) {
    auto value = io.getenv(name);
    if (value && !value->empty()) return *value;
  }
  return "";
}

std::string_view ansi_code(Tone tone) {
  switch (tone) {
    case Tone::good: return "\x1b[32m";
    case Tone::warn: return "\x1b[33m";
    case Tone::bad: return "\x1b[1;31m";
    case Tone::dim: return "\x1b[2m";
    case Tone::bold: return "\x1b[1m";
    case Tone::plain: break;
  }
  return "";
}

}  // namespace

std::optional<ColorMode> parse_color_mode(std::string_view text) {
  if (text == "auto") return ColorMode::automatic;
  if (text == "always") return ColorMode::always;
  if (text == "never") return ColorMode::never;
  return std::nullopt;
}

bool want_color(ColorMode mode, bool stream_is_tty, const Io& io) {
  if (mode == ColorMode::always) return true;
  if (mode == ColorMode::never) return false;
  if (io.getenv("NO_COLOR").has_value()) return false;
  return stream_is_tty && !term_is_dumb(io);
}

bool want_unicode(bool ascii_requested, const Io& io) {
  if (ascii_requested || term_is_dumb(io)) return false;
  auto locale = lower(effective_locale(io));
  return locale.find("utf-8") != std::string::npos || locale.find("utf8") != std::string::npos;
}

std::string paint(const Style& style, Tone tone, std::string_view text) {
  auto code = ansi_code(tone);
  if (!style.color || code.empty()) return std::string(text);
  std::string s;
  s.reserve(text.size() + code.size() + 4);
  s.append(code).append(text).append("\x1b[0m");
  return s;
}

std::size_t display_width(std::string_view text) {
  std::size_t width = 0;
  for (std::size_t i = 0; i < text.size(); ++i) {
    auto c = static_cast<unsigned char>(text[i]);
    if (c == 0x1b) {  // skip an ANSI sequence up to its final letter
      while (i < text.size() && !std::isalpha(static_cast<unsigned char>(text[i]))) ++i;
      continue;
    }
    if ((c & 0xC0) != 0x80) ++width;  // count lead bytes, not continuation bytes
  }
  return width;
}

}  // namespace pbfleet::cli::format
