#include "cli/format/table.hpp"

#include <doctest/doctest.h>

using namespace pbfleet::cli::format;

TEST_CASE("table columns line up, numbers to the right, text to the left") {
  Table t({{"serial", Align::left, ""}, {"SOC %", Align::right, "soc_percent"}});
  t.add_row({{"NB-1"}, {"92.0"}});
  t.add_row({{"NB-20231"}, {"7.5"}});
  CHECK(t.render(Style{}) ==
        "serial    SOC %\n"
        "--------  -----\n"
        "NB-1       92.0\n"
        "NB-20231    7.5\n");
}

TEST_CASE("table width counts characters, not UTF-8 bytes") {
  Table t({{"temp", Align::left, ""}, {"x", Align::left, ""}});
  t.add_row({{"5 °C"}, {"a"}});
  t.add_row({{"41 F"}, {"b"}});
  auto text = t.render(Style{});
  CHECK(text.find("5 °C  a\n") != std::string::npos);
  CHECK(text.find("41 F  b\n") != std::string::npos);
}

TEST_CASE("colour codes do not disturb alignment and only appear when colour is on") {
  Table t({{"level", Align::left, ""}, {"n", Align::right, ""}});
  t.add_row({{"act_now", Tone::bad}, {"1"}});
  t.add_row({{"ok", Tone::good}, {"22"}});
  auto plain = t.render(Style{false, false});
  CHECK(plain.find('\x1b') == std::string::npos);
  auto coloured = t.render(Style{true, false});
  CHECK(coloured.find("\x1b[1;31mact_now\x1b[0m") != std::string::npos);
  CHECK(coloured.find("\x1b[32mok     \x1b[0m") != std::string::npos);
  CHECK(display_width("\x1b[32mok\x1b[0m") == 2);
}

TEST_CASE("CSV output uses machine names and guards text against formula injection") {
  Table t({{"serial", Align::left, ""}, {"SOC %", Align::right, "soc_percent"}, {"note", Align::left, ""}});
  t.add_row({{"=HYPERLINK(\"x\")"}, {"-5.0"}, {"cell 4, low"}});
  auto csv = t.render_csv();
  // CWE-1236: the text cell gets a leading quote; the negative number does not.
  CHECK(csv.rfind("serial,soc_percent,note\n", 0) == 0);
  CHECK(csv.find("'=HYPERLINK") != std::string::npos);
  CHECK(csv.find(",-5.0,") != std::string::npos);
  CHECK(csv.find("\"cell 4, low\"") != std::string::npos);
}
