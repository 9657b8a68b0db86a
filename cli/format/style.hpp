// How output may look on this terminal: colour or not, Unicode or ASCII.
//
// Colour only on a TTY, never with NO_COLOR (any value) or TERM=dumb, unless
// --color=always; Unicode when the locale says UTF-8 and TERM is not dumb,
// unless --ascii.
#pragma once

#include <optional>
#include <string>
#include <string_view>

#include "cli/io.hpp"

namespace pbfleet::cli::format {

enum class ColorMode { automatic, always, never };

// "auto", "always", "never" -> mode; nullopt otherwise.
std::optional<ColorMode> parse_color_mode(std::string_view text);

struct Style {
  bool color = false;
  bool unicode = false;
};

// Decides colour for a stream that is (or is not) a terminal.
bool want_color(ColorMode mode, bool stream_is_tty, const Io& io);
// Decides Unicode drawing: UTF-8 locale (LC_ALL, LC_CTYPE, LANG in that order),
// TERM not dumb, and no --ascii.
bool want_unicode(bool ascii_requested, const Io& io);

// What a cell or message means; mapped to a colour when colour is on.
enum class Tone { plain, good, warn, bad, dim, bold };

// `text` wrapped in the ANSI colour for `tone` when style.color; else as is.
std::string paint(const Style& style, Tone tone, std::string_view text);

// Columns a UTF-8 string takes on a terminal (one per code point; ANSI
// colour sequences take none).
std::size_t display_width(std::string_view text);

}  // namespace pbfleet::cli::format
