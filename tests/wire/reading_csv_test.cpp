#include "models/wire/csv.hpp"

#include <doctest/doctest.h>

#include <chrono>
#include <cmath>
#include <string>
#include <string_view>
#include <vector>

using namespace std::chrono;
using namespace pbfleet::models;
using namespace pbfleet::models::wire;

namespace {

ParsedReadings parsed_ok(std::string_view text) {
  auto parsed = parse_reading_csv(text);
  if (!parsed.ok()) FAIL_CHECK(parsed.error().detail);
  REQUIRE(parsed.ok());
  return std::move(parsed).value();
}

std::string error_list(const std::vector<RowError>& errors) {
  std::string s;
  for (const auto& e : errors) {
    s += (s.empty() ? "" : " | ") + std::to_string(e.row) + ":" + e.error.field;
  }
  return s;
}

sys_seconds at(std::string_view text) { return *parse_timestamp(text, "taken_at"); }

}  // namespace

TEST_CASE("the documented columns are listed in order") {
  const auto& c = reading_csv_columns();
  REQUIRE(c.size() == 15);
  CHECK(c.front() == "reading_id");
  CHECK(c[3] == "ocv_v");
  CHECK(c.back() == "water_added");
}

TEST_CASE("a spreadsheet export with BOM, CRLF and quoted fields imports") {
  const std::string doc =
      "\xEF\xBB\xBF" "serial,taken_at,ocv_v,cell_sg,electrolyte_temp,note,after_charge\r\n"
      "NB-2023-0001,2026-11-30T07:15:00Z,12.62,1.265;1.260;1.270;1.255;1.265;1.262,41F,"
      "\"bay 3, north wall\",no\r\n"
      "NB-2023-0002,2026-11-30T08:15:00+01:00,12.41,,,\"said \"\"check\"\"\r\nagain\",TRUE\r\n"
      "\r\n";
  const auto p = parsed_ok(doc);
  CHECK(p.errors.empty());
  REQUIRE(p.readings.size() == 2);
  CHECK(p.rows == std::vector<int>{1, 2});
  const auto& a = p.readings[0];
  CHECK(a.serial == "NB-2023-0001");
  CHECK(a.taken_at == at("2026-11-30T07:15:00Z"));
  REQUIRE(a.ocv.has_value());
  CHECK(a.ocv->value == 12.62);
  REQUIRE(a.cell_sg.size() == 6);
  CHECK(a.cell_sg[3].value == 1.255);
  REQUIRE(a.electrolyte.has_value());
  CHECK(std::abs(a.electrolyte->value.value - 5.0) <= 1e-9);  // 41 F = 5 C (definition)
  CHECK(a.electrolyte->unit == TempUnit::f);
  CHECK(a.note == "bay 3, north wall");
  CHECK_FALSE(a.after_charge);
  const auto& b = p.readings[1];
  CHECK(b.taken_at == at("2026-11-30T07:15:00Z"));
  CHECK(b.cell_sg.empty());
  CHECK_FALSE(b.electrolyte.has_value());
  CHECK(b.note == "said \"check\"\r\nagain");
  CHECK(b.after_charge);
}

TEST_CASE("columns may come in any order") {
  const auto p = parsed_ok("ocv_v,taken_at,serial\n12.5,2026-11-30T07:15:00Z,NB-1\n");
  REQUIRE(p.readings.size() == 1);
  CHECK(p.readings[0].serial == "NB-1");
  CHECK(p.readings[0].ocv->value == 12.5);
}

TEST_CASE("a bad header is refused naming the column") {
  struct Case {
    std::string_view text;
    std::string_view field;
  };
  const Case cases[] = {
      {"", "header"},
      {"\n", "header"},
      {"serial,taken_at,ocv_v,colour\n", "colour"},         // unknown
      {"serial,taken_at,ocv_v,serial\n", "serial"},         // repeated
      {"serial,taken_at,ocv_v,\n", "header"},               // empty name
      {"taken_at,ocv_v\n", "serial"},                       // missing required
      {"serial,ocv_v\n", "taken_at"},
      {"serial,taken_at,note\n", "header"},                 // no ocv_v or cell_sg
      {"Serial,taken_at,ocv_v\n", "Serial"},                // names are exact
  };
  for (const auto& c : cases) {
    CAPTURE(c.text);
    const auto p = parse_reading_csv(c.text);
    REQUIRE_FALSE(p.ok());
    CHECK(p.error().field == c.field);
    CHECK_FALSE(p.error().allowed.empty());
  }
}

TEST_CASE("header names are trimmed of spaces") {
  const auto p = parsed_ok(" serial , taken_at ,ocv_v\nNB-1,2026-11-30T07:15:00Z,12.5\n");
  CHECK(p.readings.size() == 1);
}

TEST_CASE("a broken quote fails the whole document with its line") {
  const auto p = parse_reading_csv("serial,taken_at,ocv_v\nNB-1,2026-11-30T07:15:00Z,\"12.5\n");
  REQUIRE_FALSE(p.ok());
  CHECK(p.error().detail.rfind("line 2:", 0) == 0);
}

TEST_CASE("every bad cell in every row is reported with its row and column") {
  const std::string doc =
      "serial,taken_at,ocv_v,cell_sg,electrolyte_temp,rest_h,water_added\n"
      "NB-1,2026-11-30T07:15:00Z,12.5,1.26;x;1.25,5C,2,no\n"             // row 1: cell_sg/1
      "NB-2,2026-02-30T07:15:00Z,twelve,,,,\n"                           // row 2: two cells
      "NB-3,2026-11-30T07:15:00Z,12.5\n"                                 // row 3: 3 fields
      ",,,,,,\n"                                                         // row 4: blank
      "NB-5,,12.5,,5K,-,maybe\n"                                         // row 5: four cells
      "NB-6,2026-11-30T07:15:00Z,12.5,1.26;;1.25,41F,0.5,yes,extra\n"   // row 6: 8 fields
      "NB-7,2026-11-30T07:15:00Z,12.5,1.26;1.25,41F,0.5,YES\n";         // row 7: fine
  const auto p = parsed_ok(doc);
  CHECK(error_list(p.errors) ==
        "1:cell_sg/1 | 2:taken_at | 2:ocv_v | 3: | 5:taken_at | 5:electrolyte_temp | "
        "5:rest_h | 5:water_added | 6:");
  REQUIRE(p.readings.size() == 1);
  CHECK(p.rows == std::vector<int>{7});
  CHECK(p.readings[0].serial == "NB-7");
  CHECK(p.readings[0].water_added);
  for (const auto& e : p.errors) {
    CAPTURE(e.error.field);
    CHECK_FALSE(e.error.detail.empty());
    CHECK_FALSE(e.error.allowed.empty());
  }
}

TEST_CASE("an overlong SG list is one error, not one per value") {
  std::string list = "1.26";
  for (int i = 0; i < 1000; ++i) list += ";x";
  const auto p = parsed_ok("serial,taken_at,cell_sg,electrolyte_temp\nNB-1,2026-11-30T07:15:00Z," +
                           list + ",5C\n");
  // 23 bad values fit in the first 24, then the list is cut off.
  REQUIRE(p.errors.size() == 24);
  CHECK(p.errors.front().error.field == "cell_sg/1");
  CHECK(p.errors.back().error.field == "cell_sg");
  CHECK(p.readings.empty());
}

TEST_CASE("a document full of bad rows stops after the error limit") {
  std::string doc = "serial,taken_at,ocv_v\n";
  for (int i = 0; i < 3000; ++i) doc += "NB-1,2026-11-30T07:15:00Z,bad\n";
  const auto p = parsed_ok(doc);
  REQUIRE(p.errors.size() == kMaxRowErrors + 1);
  CHECK(p.errors[kMaxRowErrors - 1].row == static_cast<int>(kMaxRowErrors));
  CHECK(p.errors.back().row == static_cast<int>(kMaxRowErrors) + 1);
  CHECK(p.errors.back().error.field.empty());
  CHECK(p.errors.back().error.detail.find("too many errors") != std::string::npos);
}

TEST_CASE("booleans read true/false, 1/0 and yes/no in any case, empty is false") {
  struct Case {
    std::string_view cell;
    bool value;
  };
  const Case cases[] = {{"true", true},  {"TRUE", true},   {"1", true},  {"yes", true},
                        {"Yes", true},   {"false", false}, {"0", false}, {"no", false},
                        {"NO", false},   {"", false},      {" yes ", true}};
  for (const auto& c : cases) {
    CAPTURE(c.cell);
    const auto p = parsed_ok("serial,taken_at,ocv_v,after_charge\nNB-1,2026-11-30T07:15:00Z,12.5," +
                             std::string(c.cell) + "\n");
    REQUIRE(p.readings.size() == 1);
    CHECK(p.readings[0].after_charge == c.value);
  }
}

TEST_CASE("temperature cells read 41F, 5C and bare numbers as Celsius") {
  struct Case {
    std::string_view cell;
    double celsius;
    TempUnit unit;
  };
  const Case cases[] = {{"41F", 5.0, TempUnit::f}, {"5C", 5.0, TempUnit::c},
                        {"5", 5.0, TempUnit::c},   {"-13F", -25.0, TempUnit::f},
                        {"'-25C", -25.0, TempUnit::c}};  // guarded by an export
  for (const auto& c : cases) {
    CAPTURE(c.cell);
    const auto p = parsed_ok("serial,taken_at,ocv_v,ambient_temp\nNB-1,2026-11-30T07:15:00Z,12.5," +
                             std::string(c.cell) + "\n");
    REQUIRE(p.readings.size() == 1);
    REQUIRE(p.readings[0].ambient.has_value());
    CHECK(std::abs(p.readings[0].ambient->value.value - c.celsius) <= 1e-9);
    CHECK(p.readings[0].ambient->unit == c.unit);
  }
}

TEST_CASE("validation field names map to their CSV columns") {
  CHECK(csv_column_for_field("electrolyte_temp_c") == "electrolyte_temp");
  CHECK(csv_column_for_field("electrolyte_temp_f") == "electrolyte_temp");
  CHECK(csv_column_for_field("ambient_temp_f") == "ambient_temp");
  CHECK(csv_column_for_field("cell_sg/2") == "cell_sg/2");
  CHECK(csv_column_for_field("ocv_v") == "ocv_v");
}

TEST_CASE("validating parsed rows names each problem by row and CSV column") {
  const std::string doc =
      "serial,taken_at,ocv_v,cell_sg,electrolyte_temp\n"
      "NB-1,2026-11-30T07:15:00Z,12.5,1.26;1.25;1.27;1.26;1.25;1.26,5C\n"   // row 1: fine
      "NB-2,2026-11-30T07:15:00Z,bad,,\n"                                   // row 2: parse error
      "NB-3,2026-11-30T07:15:00Z,12.5,1.26;1.5;1.27,200F\n"                 // row 3: three
      "NB/4,2026-11-30T07:15:00Z,12.5,,\n";                                 // row 4: serial
  const auto p = parsed_ok(doc);
  CHECK(error_list(p.errors) == "2:ocv_v");
  const sys_seconds now = at("2026-11-30T12:00:00Z");
  const auto errors = validate_reading_rows(p, now, [](const std::string& serial) {
    return serial == "NB-3" ? 6 : 0;  // NB-3 is a known 12 V battery
  });
  CHECK(error_list(errors) == "3:cell_sg | 3:cell_sg/1 | 3:electrolyte_temp | 4:serial");
}

namespace {

std::vector<ReadingInput> export_samples() {
  ReadingInput full;
  full.reading_id = "ridge-2026-11-30:0007";
  full.serial = "RP-2022-0117";
  full.taken_at = at("2026-11-30T06:05:09Z");
  full.ocv = Volts{12.600000000000001};
  full.cell_sg = {SpecificGravity{1.265}, SpecificGravity{1.2}, SpecificGravity{1.2655}};
  full.electrolyte = EnteredTemperature{celsius_from_fahrenheit(40.1), TempUnit::f};
  full.ambient = EnteredTemperature{Celsius{-25.5}, TempUnit::c};
  full.rest = Hours{0.1};
  full.load_test_current = Amperes{400};
  full.load_test_end = Volts{9.87};
  full.logged_by = "=HYPERLINK(\"http://x.invalid\")";
  full.source = "@import";
  full.note = "frost, \"heavy\"\r\nrow 2\n+1 cell low; '=x";
  full.after_charge = true;
  full.water_added = true;

  ReadingInput sparse;
  sparse.serial = "HB-2024-0003";
  sparse.taken_at = at("2026-12-01T23:59:59Z");
  sparse.ocv = Volts{-0.0};
  sparse.ambient = EnteredTemperature{celsius_from_fahrenheit(-13.37), TempUnit::f};
  sparse.note = " padded ";

  ReadingInput odd;
  odd.serial = "-5";
  odd.taken_at = at("2026-12-01T00:00:00Z");
  odd.cell_sg = {SpecificGravity{1.0 / 3.0}};
  odd.electrolyte = EnteredTemperature{Celsius{1.0 / 7.0}, TempUnit::c};
  odd.note = "'";
  return {full, sparse, odd};
}

bool same_temperature(const std::optional<EnteredTemperature>& a,
                      const std::optional<EnteredTemperature>& b) {
  if (a.has_value() != b.has_value()) return false;
  return !a || (a->value.value == b->value.value && a->unit == b->unit);
}

}  // namespace

TEST_CASE("export then re-import is lossless, field by field and bit for bit") {
  const auto original = export_samples();
  const std::string doc = format_reading_csv(original);
  CAPTURE(doc);
  const auto p = parsed_ok(doc);
  CHECK(p.errors.empty());
  REQUIRE(p.readings.size() == original.size());
  for (std::size_t i = 0; i < original.size(); ++i) {
    CAPTURE(i);
    const auto& a = original[i];
    const auto& b = p.readings[i];
    CHECK(b.reading_id == a.reading_id);
    CHECK(b.serial == a.serial);
    CHECK(b.taken_at == a.taken_at);
    CHECK(b.ocv == a.ocv);
    CHECK(b.cell_sg == a.cell_sg);
    CHECK(same_temperature(b.electrolyte, a.electrolyte));
    CHECK(same_temperature(b.ambient, a.ambient));
    CHECK(b.rest == a.rest);
    CHECK(b.load_test_current == a.load_test_current);
    CHECK(b.load_test_end == a.load_test_end);
    CHECK(b.logged_by == a.logged_by);
    CHECK(b.source == a.source);
    CHECK(b.note == a.note);
    CHECK(b.after_charge == a.after_charge);
    CHECK(b.water_added == a.water_added);
  }
  CHECK(format_reading_csv(p.readings) == doc);  // and the text is stable
}

TEST_CASE("a Celsius value with no exact Fahrenheit decimal comes back within 1e-12 C") {
  // Not every double Celsius value is (f - 32) * 5 / 9 of some double f; values
  // parsed from a Fahrenheit entry always are, and those come back exactly.
  ReadingInput r = export_samples()[2];
  r.electrolyte = EnteredTemperature{Celsius{1.0 / 7.0}, TempUnit::f};
  const auto p = parsed_ok(format_reading_csv({r}));
  REQUIRE(p.readings.size() == 1);
  REQUIRE(p.readings[0].electrolyte.has_value());
  CHECK(p.readings[0].electrolyte->unit == TempUnit::f);
  CHECK(std::abs(p.readings[0].electrolyte->value.value - 1.0 / 7.0) <= 1e-12);
}

TEST_CASE("export guards formula text, writes CRLF and keeps entered temperature units") {
  const std::string doc = format_reading_csv(export_samples());
  CHECK(doc.rfind("reading_id,serial,taken_at,", 0) == 0);
  CHECK(doc.find("\r\n") != std::string::npos);
  CHECK(doc.find(",\"'=HYPERLINK(\"\"http://x.invalid\"\")\",") != std::string::npos);
  CHECK(doc.find(",'@import,") != std::string::npos);
  CHECK(doc.find(",40.1F,") != std::string::npos);   // as the crew typed it
  CHECK(doc.find(",'-25.5C,") != std::string::npos);  // guarded, not a number
  CHECK(doc.find(",-5,") != std::string::npos);       // a numeric serial stays bare
  CHECK(doc.find(",1.265;1.2;1.2655,") != std::string::npos);
}
