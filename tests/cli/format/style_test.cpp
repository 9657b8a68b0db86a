#include "cli/format/style.hpp"

#include <doctest/doctest.h>

using namespace pbfleet::cli;
using namespace pbfleet::cli::format;

namespace {
Io io_with(std::map<std::string, std::string> env) {
  Io io;
  io.env = std::move(env);
  return io;
}
}  // namespace

TEST_CASE("colour is on for a terminal and off for a pipe") {
  auto io = io_with({{"TERM", "xterm"}});
  CHECK(want_color(ColorMode::automatic, true, io));
  CHECK_FALSE(want_color(ColorMode::automatic, false, io));
}

TEST_CASE("NO_COLOR with any value, even empty, turns colour off") {
  CHECK_FALSE(want_color(ColorMode::automatic, true, io_with({{"NO_COLOR", ""}})));
  CHECK_FALSE(want_color(ColorMode::automatic, true, io_with({{"NO_COLOR", "1"}})));
}

TEST_CASE("TERM=dumb turns colour and Unicode off") {
  auto io = io_with({{"TERM", "dumb"}, {"LANG", "en_US.UTF-8"}});
  CHECK_FALSE(want_color(ColorMode::automatic, true, io));
  CHECK_FALSE(want_unicode(false, io));
}

TEST_CASE("--color always and never override the terminal and NO_COLOR") {
  auto io = io_with({{"NO_COLOR", "1"}});
  CHECK(want_color(ColorMode::always, false, io));
  CHECK_FALSE(want_color(ColorMode::never, true, io_with({})));
  CHECK(parse_color_mode("auto") == ColorMode::automatic);
  CHECK_FALSE(parse_color_mode("sometimes").has_value());
}

TEST_CASE("Unicode follows the locale: LC_ALL before LC_CTYPE before LANG") {
  CHECK(want_unicode(false, io_with({{"LANG", "nb_NO.UTF-8"}})));
  CHECK(want_unicode(false, io_with({{"LC_CTYPE", "C.utf8"}})));
  CHECK_FALSE(want_unicode(false, io_with({{"LC_ALL", "C"}, {"LANG", "en_US.UTF-8"}})));
  CHECK_FALSE(want_unicode(false, io_with({})));
  CHECK_FALSE(want_unicode(true, io_with({{"LANG", "en_US.UTF-8"}})));  // --ascii
}
