#include "models/wire/csv.hpp"

#include <doctest/doctest.h>

#include <string>
#include <string_view>
#include <vector>

using namespace pbfleet::models::wire;

namespace {

std::vector<CsvRow> rows_of(std::string_view text) {
  auto parsed = parse_csv(text);
  REQUIRE(parsed.ok());
  return *parsed;
}

}  // namespace

TEST_CASE("RFC 4180 documents split into rows and fields") {
  struct Case {
    std::string_view text;
    std::vector<CsvRow> rows;
  };
  // RFC 4180 section 2 rules 1 to 7.
  const Case cases[] = {
      {"", {}},
      {"a,b\r\n1,2\r\n", {{"a", "b"}, {"1", "2"}}},              // CRLF, final break
      {"a,b\n1,2", {{"a", "b"}, {"1", "2"}}},                    // LF, no final break
      {"a,b\r1,2\r", {{"a", "b"}, {"1", "2"}}},                  // lone CR
      {"\xEF\xBB\xBF" "a,b\r\n", {{"a", "b"}}},                  // UTF-8 BOM dropped
      {"\"a,b\",c\r\n", {{"a,b", "c"}}},                         // quoted comma
      {"\"say \"\"hi\"\"\",x\n", {{"say \"hi\"", "x"}}},         // doubled quotes
      {"\"\"\n", {{""}}},                                        // "" is an empty field
      {"\"\",\"\"\n", {{"", ""}}},
      {"\"line 1\r\nline 2\",x\r\n", {{"line 1\r\nline 2", "x"}}},  // embedded CRLF
      {"\"a\nb\"\n", {{"a\nb"}}},                                // embedded LF
      {"a,,c\n", {{"a", "", "c"}}},                              // empty middle field
      {"a,b,\n", {{"a", "b", ""}}},                              // empty last field
      {"a,b,", {{"a", "b", ""}}},                                // ... at end of text
      {",\n", {{"", ""}}},
      {"a\n\nb\n", {{"a"}, {""}, {"b"}}},                        // blank line is a row
      {"a,b\n\n", {{"a", "b"}, {""}}},                           // empty trailing line
      {" a , b \n", {{" a ", " b "}}},                           // spaces kept
      {"\xC3\x98st,\xE2\x82\xAC\n", {{"\xC3\x98st", "\xE2\x82\xAC"}}},  // UTF-8 kept
      {"'=1+1,x\n", {{"'=1+1", "x"}}},                           // no unguarding here
  };
  for (const auto& c : cases) {
    CAPTURE(c.text);
    CHECK(rows_of(c.text) == c.rows);
  }
}

TEST_CASE("broken quotes are refused with the line they are on") {
  struct Case {
    std::string_view text;
    std::string_view line;  // expected start of detail
  };
  const Case cases[] = {
      {"a,b\n\"open,x\n1,2\n", "line 2:"},           // never closed: the line it opened
      {"a,b\n1,2\n3,\"x\"y\n", "line 3:"},           // text after closing quote
      {"a,b\n1,2\n3,x\"y\n", "line 3:"},             // quote inside unquoted field
      {"\"a\r\nb\" c\n", "line 2:"},                 // after a quoted line break
      {"\"", "line 1:"},
  };
  for (const auto& c : cases) {
    CAPTURE(c.text);
    const auto parsed = parse_csv(c.text);
    REQUIRE_FALSE(parsed.ok());
    CHECK(parsed.error().detail.rfind(c.line, 0) == 0);
    CHECK(parsed.error().allowed.find("RFC 4180") != std::string::npos);
  }
}

TEST_CASE("cells are quoted only when they need it") {
  CHECK(csv_cell("NB-2023-0001") == "NB-2023-0001");
  CHECK(csv_cell("") == "");
  CHECK(csv_cell("a,b") == "\"a,b\"");
  CHECK(csv_cell("say \"hi\"") == "\"say \"\"hi\"\"\"");
  CHECK(csv_cell("line 1\r\nline 2") == "\"line 1\r\nline 2\"");
  CHECK(csv_cell(" padded ") == "\" padded \"");
  CHECK(csv_cell("\xEF\xBB\xBFx") == "\"\xEF\xBB\xBFx\"");  // survives BOM removal
}

TEST_CASE("text starting with = + - @ is guarded, numbers are not") {
  struct Case {
    std::string_view text;
    std::string_view cell;
  };
  // CWE-1236 (improper neutralization of formula elements in a CSV file).
  const Case cases[] = {
      {"=SUM(A1:A9)", "'=SUM(A1:A9)"},
      {"+47 555 0100", "'+47 555 0100"},
      {"-25C", "'-25C"},
      {"@cmd", "'@cmd"},
      {"=1,2", "\"'=1,2\""},           // guarded, then quoted
      {"'=x", "''=x"},                 // an existing guard is guarded again
      {"-25", "-25"},                  // numbers stay numbers
      {"+1.5", "+1.5"},
      {"-1e3", "-1e3"},
      {"-", "'-"},
      {"'hello", "'hello"},            // a quote before ordinary text is left alone
      {"a=b", "a=b"},
  };
  for (const auto& c : cases) {
    CAPTURE(c.text);
    CHECK(csv_cell(c.text) == c.cell);
  }
}

TEST_CASE("unguarding a written cell gives back the original text") {
  const std::string_view texts[] = {"=SUM(A1)", "'=SUM(A1)", "''@x", "-25", "-25C", "'", "''",
                                    "'hello", "", "+", "@", "plain", "'-5", "=\"a,b\""};
  for (const auto t : texts) {
    CAPTURE(t);
    const auto parsed = parse_csv(csv_cell(t) + "\r\n");
    REQUIRE(parsed.ok());
    REQUIRE(parsed->size() == 1);
    REQUIRE((*parsed)[0].size() == 1);
    CHECK(csv_unguard((*parsed)[0][0]) == t);
  }
}
