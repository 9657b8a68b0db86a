// Small text helpers shared by the wire parsers: strict decimal numbers,
// shortest round-trip formatting, whitespace trimming and UTF-8 checks.
//
// Internal to pbfleet_wire (the server and CLI use the parsers, not these),
// but kept public so the fuzz targets and tests can reach them.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>

namespace pbfleet::models::wire::text {

// Text without leading and trailing spaces and tabs.
std::string_view trim(std::string_view s);

// A finite decimal number: optional sign, digits with an optional point,
// optional exponent ("12.65", "-3", "+0.5", "1e2"). The whole text must be
// the number: no spaces, no "inf"/"nan", no hex. nullopt otherwise.
std::optional<double> parse_decimal(std::string_view s);

// True when `s` is exactly a number in the form parse_decimal accepts.
bool is_decimal(std::string_view s);

// Shortest text that parses back to exactly `v` ("12.65", "-25", "1.265").
std::string format_shortest(double v);

// Number of code points in `s` when it is well-formed UTF-8 (no overlong
// forms, no surrogates, nothing above U+10FFFF); nullopt otherwise.
std::optional<std::size_t> utf8_length(std::string_view s);

// True when `s` holds a C0 control character, DEL, or a C1 control
// (U+0080..U+009F). `allow_line_breaks` lets tab, CR and LF through.
// REQUIRES: utf8_length(s) has a value.
bool has_control(std::string_view s, bool allow_line_breaks);

// `s` made safe to quote in an error message: at most 40 code points (then
// "..."), invalid UTF-8 and control characters replaced by '?'. Error details
// end up in JSON, which must be valid UTF-8.
std::string excerpt(std::string_view s);

}  // namespace pbfleet::models::wire::text
