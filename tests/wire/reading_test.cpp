#include "models/wire/reading.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <functional>
#include <limits>
#include <string>
#include <vector>

using namespace std::chrono;
using namespace pbfleet::models;
using namespace pbfleet::models::wire;

namespace {

const sys_seconds kNow = sys_days{year{2026} / 11 / 30} + hours{12};

// A complete, valid reading from the demo fleet (Fjellvik Transport).
ReadingInput good_reading() {
  ReadingInput r;
  r.reading_id = "nyard-2026-11-30-0001";
  r.serial = "NB-2023-0001";
  r.taken_at = kNow - hours{5};
  r.ocv = Volts{12.62};
  r.cell_sg = {SpecificGravity{1.265}, SpecificGravity{1.260}, SpecificGravity{1.270},
               SpecificGravity{1.255}, SpecificGravity{1.265}, SpecificGravity{1.262}};
  r.electrolyte = EnteredTemperature{Celsius{-4.0}, TempUnit::c};
  r.ambient = EnteredTemperature{Celsius{-9.0}, TempUnit::c};
  r.rest = Hours{14.0};
  r.logged_by = "K. Haugen";
  r.source = "round";
  r.note = "North Yard, bay 3";
  return r;
}

std::vector<std::string> fields_of(const FieldErrors& errors) {
  std::vector<std::string> fields;
  for (const auto& e : errors) fields.push_back(e.field);
  return fields;
}

// "a, b, c": readable in a failed check.
std::string joined(const std::vector<std::string>& fields) {
  std::string s;
  for (const auto& f : fields) s += (s.empty() ? "" : ", ") + f;
  return s;
}

struct Case {
  const char* what;
  std::function<void(ReadingInput&)> change;
  int cells;
  std::vector<std::string> fields;  // expected error fields, in order; empty = valid
};

void check_cases(const std::vector<Case>& cases) {
  for (const auto& c : cases) {
    const std::string what = c.what;
    CAPTURE(what);
    ReadingInput r = good_reading();
    c.change(r);
    const auto errors = validate_reading(r, kNow, c.cells);
    CHECK(joined(fields_of(errors)) == joined(c.fields));
    for (const auto& e : errors) {
      CAPTURE(e.field);
      CHECK_FALSE(e.detail.empty());
      CHECK_FALSE(e.allowed.empty());
    }
  }
}

std::vector<SpecificGravity> sg_values(std::size_t n, double v) {
  return std::vector<SpecificGravity>(n, SpecificGravity{v});
}

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

}  // namespace

TEST_CASE("a complete reading is valid, with or without a known cell count") {
  CHECK(validate_reading(good_reading(), kNow).empty());
  CHECK(validate_reading(good_reading(), kNow, 6).empty());
}

TEST_CASE("specific gravity is accepted from 1.000 to 1.400 per cell, edges included") {
  check_cases({
      {"1.000 at the low edge", [](auto& r) { r.cell_sg[0] = SpecificGravity{1.000}; }, 6, {}},
      {"1.400 at the high edge", [](auto& r) { r.cell_sg[5] = SpecificGravity{1.400}; }, 6, {}},
      {"0.999 below", [](auto& r) { r.cell_sg[0] = SpecificGravity{0.999}; }, 6, {"cell_sg/0"}},
      {"1.401 above", [](auto& r) { r.cell_sg[2] = SpecificGravity{1.401}; }, 6, {"cell_sg/2"}},
      {"NaN", [](auto& r) { r.cell_sg[5] = SpecificGravity{kNaN}; }, 6, {"cell_sg/5"}},
      {"two cells out", [](auto& r) {
         r.cell_sg[1] = SpecificGravity{1.5};
         r.cell_sg[4] = SpecificGravity{0.5};
       }, 6, {"cell_sg/1", "cell_sg/4"}},
  });
}

TEST_CASE("the number of SG values must match a known cell count") {
  check_cases({
      {"5 values for 6 cells", [](auto& r) { r.cell_sg.pop_back(); }, 6, {"cell_sg"}},
      {"7 values for 6 cells", [](auto& r) { r.cell_sg.push_back(SpecificGravity{1.26}); }, 6,
       {"cell_sg"}},
      {"5 values, cells unknown", [](auto& r) { r.cell_sg.pop_back(); }, 0, {}},
      {"3 values for a 6 V battery", [](auto& r) {
         r.cell_sg.resize(3);
         r.ocv = Volts{6.31};
       }, 3, {}},
      {"24 values, cells unknown", [](auto& r) { r.cell_sg = sg_values(24, 1.25); }, 0, {}},
      {"25 values, cells unknown", [](auto& r) { r.cell_sg = sg_values(25, 1.25); }, 0,
       {"cell_sg"}},
  });
}

TEST_CASE("a huge SG list gives one count error and range errors for the first 24 only") {
  ReadingInput r = good_reading();
  r.cell_sg = sg_values(100000, 0.5);
  const auto errors = validate_reading(r, kNow, 0);
  REQUIRE(errors.size() == 25);
  CHECK(errors[0].field == "cell_sg");
  CHECK(errors[24].field == "cell_sg/23");
}

TEST_CASE("open-circuit voltage is 0 to 2.5 V per cell, or 0 to 30 V when cells are unknown") {
  check_cases({
      {"0 V", [](auto& r) { r.ocv = Volts{0.0}; }, 6, {}},
      {"15.00 V on 6 cells", [](auto& r) { r.ocv = Volts{15.0}; }, 6, {}},
      {"15.01 V on 6 cells", [](auto& r) { r.ocv = Volts{15.01}; }, 6, {"ocv_v"}},
      {"-0.01 V", [](auto& r) { r.ocv = Volts{-0.01}; }, 6, {"ocv_v"}},
      {"30 V unknown cells", [](auto& r) { r.ocv = Volts{30.0}; }, 0, {}},
      {"30.01 V unknown cells", [](auto& r) { r.ocv = Volts{30.01}; }, 0, {"ocv_v"}},
      {"infinite", [](auto& r) { r.ocv = Volts{kInf}; }, 0, {"ocv_v"}},
  });
}

TEST_CASE("a reading needs an OCV, SG values or both") {
  check_cases({
      {"OCV only", [](auto& r) { r.cell_sg.clear(); }, 6, {}},
      {"SG only", [](auto& r) { r.ocv.reset(); }, 6, {}},
      {"neither", [](auto& r) {
         r.ocv.reset();
         r.cell_sg.clear();
       }, 6, {"ocv_v"}},
  });
}

TEST_CASE("temperatures are -60 to 80 C, named by the unit they were entered in") {
  const auto f = [](double degrees_f) {
    return EnteredTemperature{celsius_from_fahrenheit(degrees_f), TempUnit::f};
  };
  check_cases({
      {"-60 C", [](auto& r) { r.electrolyte = EnteredTemperature{Celsius{-60.0}}; }, 6, {}},
      {"80 C", [](auto& r) { r.electrolyte = EnteredTemperature{Celsius{80.0}}; }, 6, {}},
      {"-60.01 C", [](auto& r) { r.electrolyte = EnteredTemperature{Celsius{-60.01}}; }, 6,
       {"electrolyte_temp_c"}},
      {"80.01 C", [](auto& r) { r.ambient = EnteredTemperature{Celsius{80.01}}; }, 6,
       {"ambient_temp_c"}},
      {"-76 F is -60 C", [f](auto& r) { r.electrolyte = f(-76.0); }, 6, {}},
      {"176 F is 80 C", [f](auto& r) { r.ambient = f(176.0); }, 6, {}},
      {"-76.1 F", [f](auto& r) { r.electrolyte = f(-76.1); }, 6, {"electrolyte_temp_f"}},
      {"176.1 F", [f](auto& r) { r.ambient = f(176.1); }, 6, {"ambient_temp_f"}},
      {"NaN C", [](auto& r) { r.ambient = EnteredTemperature{Celsius{kNaN}}; }, 6,
       {"ambient_temp_c"}},
      {"ambient may be absent", [](auto& r) { r.ambient.reset(); }, 6, {}},
      {"electrolyte required with SG", [](auto& r) { r.electrolyte.reset(); }, 6,
       {"electrolyte_temp_c"}},
      {"electrolyte not required without SG", [](auto& r) {
         r.electrolyte.reset();
         r.cell_sg.clear();
       }, 6, {}},
  });
}

TEST_CASE("a Fahrenheit range error states the range in both units") {
  ReadingInput r = good_reading();
  r.electrolyte = EnteredTemperature{celsius_from_fahrenheit(200.0), TempUnit::f};
  const auto errors = validate_reading(r, kNow, 6);
  REQUIRE(errors.size() == 1);
  CHECK(errors[0].allowed == "-76 to 176 F (-60 to 80 C)");
  CHECK(errors[0].detail.find("200") != std::string::npos);
}

TEST_CASE("rest is 0 to 8784 hours") {
  check_cases({
      {"0 h", [](auto& r) { r.rest = Hours{0.0}; }, 6, {}},
      {"8784 h", [](auto& r) { r.rest = Hours{8784.0}; }, 6, {}},
      {"8784.01 h", [](auto& r) { r.rest = Hours{8784.01}; }, 6, {"rest_h"}},
      {"-0.1 h", [](auto& r) { r.rest = Hours{-0.1}; }, 6, {"rest_h"}},
      {"absent", [](auto& r) { r.rest.reset(); }, 6, {}},
  });
}

TEST_CASE("a load test gives 0 to 3000 A and an end voltage within the OCV range, together") {
  const auto load = [](double amps, double volts) {
    return [amps, volts](ReadingInput& r) {
      r.load_test_current = Amperes{amps};
      r.load_test_end = Volts{volts};
    };
  };
  check_cases({
      {"400 A to 10.2 V", load(400, 10.2), 6, {}},
      {"0 A, 0 V", load(0, 0), 6, {}},
      {"3000 A, 15 V", load(3000, 15.0), 6, {}},
      {"3000.1 A", load(3000.1, 10.0), 6, {"load_test_a"}},
      {"-1 A", load(-1, 10.0), 6, {"load_test_a"}},
      {"15.01 V on 6 cells", load(400, 15.01), 6, {"load_test_end_v"}},
      {"-0.1 V", load(400, -0.1), 6, {"load_test_end_v"}},
      {"30 V, cells unknown", load(400, 30.0), 0, {}},
      {"current without end voltage", [](auto& r) { r.load_test_current = Amperes{400}; }, 6,
       {"load_test_end_v"}},
      {"end voltage without current", [](auto& r) { r.load_test_end = Volts{10.0}; }, 6,
       {"load_test_a"}},
  });
}

TEST_CASE("taken_at lies between 2000-01-01 and 24 hours ahead of now") {
  check_cases({
      {"now + 24 h", [](auto& r) { r.taken_at = kNow + hours{24}; }, 6, {}},
      {"now + 24 h + 1 s", [](auto& r) { r.taken_at = kNow + hours{24} + seconds{1}; }, 6,
       {"taken_at"}},
      {"2000-01-01T00:00:00Z", [](auto& r) { r.taken_at = sys_seconds{kEarliestReading}; }, 6, {}},
      {"one second before 2000", [](auto& r) {
         r.taken_at = sys_seconds{kEarliestReading} - seconds{1};
       }, 6, {"taken_at"}},
      {"default (1970)", [](auto& r) { r.taken_at = sys_seconds{}; }, 6, {"taken_at"}},
  });
}

TEST_CASE("serials are 1 to 64 characters with no path or control characters") {
  check_cases({
      {"64 characters", [](auto& r) { r.serial = std::string(64, 'S'); }, 6, {}},
      {"65 characters", [](auto& r) { r.serial = std::string(65, 'S'); }, 6, {"serial"}},
      {"64 two-byte characters", [](auto& r) {
         r.serial.clear();
         for (int i = 0; i < 64; ++i) r.serial += "\xC3\x98";
       }, 6, {}},
      {"empty", [](auto& r) { r.serial.clear(); }, 6, {"serial"}},
      {"slash", [](auto& r) { r.serial = "NB/2023"; }, 6, {"serial"}},
      {"backslash", [](auto& r) { r.serial = "NB\\2023"; }, 6, {"serial"}},
      {"dot dot", [](auto& r) { r.serial = "..NB"; }, 6, {"serial"}},
      {"single dots are fine", [](auto& r) { r.serial = "NB.2023.1"; }, 6, {}},
      {"newline", [](auto& r) { r.serial = "NB\n1"; }, 6, {"serial"}},
      {"NUL", [](auto& r) { r.serial = std::string("NB\0" "1", 4); }, 6, {"serial"}},
      {"DEL", [](auto& r) { r.serial = "NB\x7F"; }, 6, {"serial"}},
      {"leading space", [](auto& r) { r.serial = " NB-1"; }, 6, {"serial"}},
      {"trailing space", [](auto& r) { r.serial = "NB-1 "; }, 6, {"serial"}},
      {"inner space", [](auto& r) { r.serial = "NB 1"; }, 6, {}},
      {"invalid UTF-8", [](auto& r) { r.serial = "NB\xFF"; }, 6, {"serial"}},
      {"SQL meta characters are plain text", [](auto& r) { r.serial = "NB'; DROP TABLE x;--"; },
       6, {}},
  });
}

TEST_CASE("reading ids are optional, 1 to 64 of letters, digits and . _ : -") {
  check_cases({
      {"empty", [](auto& r) { r.reading_id.clear(); }, 6, {}},
      {"all allowed characters", [](auto& r) { r.reading_id = "Az09._:-"; }, 6, {}},
      {"64 characters", [](auto& r) { r.reading_id = std::string(64, 'r'); }, 6, {}},
      {"65 characters", [](auto& r) { r.reading_id = std::string(65, 'r'); }, 6, {"reading_id"}},
      {"slash", [](auto& r) { r.reading_id = "a/b"; }, 6, {"reading_id"}},
      {"space", [](auto& r) { r.reading_id = "a b"; }, 6, {"reading_id"}},
      {"non-ASCII", [](auto& r) { r.reading_id = "\xC3\x98"; }, 6, {"reading_id"}},
  });
}

TEST_CASE("text fields hold at most 200 characters of valid UTF-8") {
  const auto two_byte = [](int n) {
    std::string s;
    for (int i = 0; i < n; ++i) s += "\xC3\xA6";  // "æ"
    return s;
  };
  check_cases({
      {"200 ASCII", [](auto& r) { r.note = std::string(200, 'n'); }, 6, {}},
      {"201 ASCII", [](auto& r) { r.note = std::string(201, 'n'); }, 6, {"note"}},
      {"200 two-byte characters", [two_byte](auto& r) { r.logged_by = two_byte(200); }, 6, {}},
      {"201 two-byte characters", [two_byte](auto& r) { r.logged_by = two_byte(201); }, 6,
       {"logged_by"}},
      {"invalid UTF-8", [](auto& r) { r.source = "round\xC3"; }, 6, {"source"}},
      {"overlong encoding", [](auto& r) { r.note = "\xC0\xAF"; }, 6, {"note"}},
      {"note may hold line breaks", [](auto& r) { r.note = "line 1\r\nline 2\tend"; }, 6, {}},
      {"logged_by may not", [](auto& r) { r.logged_by = "K.\nHaugen"; }, 6, {"logged_by"}},
      {"NUL in note", [](auto& r) { r.note = std::string("a\0b", 3); }, 6, {"note"}},
      {"SQL and formula text kept verbatim", [](auto& r) {
         r.note = "Robert'); DROP TABLE readings;-- =SUM(A1) \"quoted\"";
       }, 6, {}},
  });
}

TEST_CASE("every problem of a reading is reported at once, each with its allowed range") {
  ReadingInput r = good_reading();
  r.reading_id = "bad id";
  r.serial = "";
  r.taken_at = kNow + hours{48};
  r.ocv = Volts{40.0};
  r.cell_sg[3] = SpecificGravity{1.7};
  r.cell_sg.pop_back();
  r.electrolyte = EnteredTemperature{Celsius{95.0}};
  r.rest = Hours{-1.0};
  r.load_test_current = Amperes{5000};
  r.note = std::string(300, 'x');
  const auto errors = validate_reading(r, kNow, 6);
  const std::vector<std::string> expected = {
      "reading_id", "serial", "taken_at", "cell_sg", "cell_sg/3", "ocv_v",
      "electrolyte_temp_c", "rest_h", "load_test_a", "load_test_end_v", "note"};
  CHECK(joined(fields_of(errors)) == joined(expected));
  const auto sg = std::find_if(errors.begin(), errors.end(),
                               [](const auto& e) { return e.field == "cell_sg/3"; });
  REQUIRE(sg != errors.end());
  CHECK(sg->allowed == "1.000 to 1.400");
  const auto ocv = std::find_if(errors.begin(), errors.end(),
                                [](const auto& e) { return e.field == "ocv_v"; });
  REQUIRE(ocv != errors.end());
  CHECK(ocv->allowed.find("0.00 to 15.00 V") == 0);
}
