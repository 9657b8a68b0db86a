// JsonText writes what nlohmann's compact dump (error handler `replace`)
// would: the same string escapes, numbers that read back equal, and the
// same document once parsed.
#include <doctest/doctest.h>

#include <charconv>
#include <cmath>
#include <random>
#include <vector>
#include <limits>
#include <nlohmann/json.hpp>

#include "server/api/json_text.hpp"

namespace pbfleet::api {
namespace {

using nlohmann::json;

std::string nlohmann_dump(const json& j) {
  return j.dump(-1, ' ', false, json::error_handler_t::replace);
}

std::string written(std::string_view text) {
  std::string out;
  append_json_string(out, text);
  return out;
}

TEST_CASE("strings are escaped byte for byte as nlohmann escapes them") {
  const std::string cases[] = {
      "",
      "plain ASCII",
      "quote \" backslash \\ slash /",
      "\b\f\n\r\t",
      std::string("nul \0 inside", 12),
      "\x01\x1f\x7f",
      "Fjellvik \xC3\xB8st \xE2\x80\x94 \xF0\x9F\x94\x8B",   // ø, em dash, U+1F50B
      "'; DROP TABLE readings; --",
      "lone \x80 continuation",
      "truncated \xE2\x82",
      "cut short \xE2\x82 mid-string \xF0\x9F\x94 too",
      "overlong \xC0\xAF and \xE0\x80\xAF",
      "surrogate \xED\xA0\x80",
      "above max \xF4\x90\x80\x80",
      "\xFF\xFE",
  };
  for (const auto& text : cases) {
    CAPTURE(text);
    CHECK(written(text) == nlohmann_dump(json(text)));
  }
}

TEST_CASE("numbers read back equal, whole doubles stay doubles, non-finite is null") {
  for (double d : {0.0, -0.0, 1.0, 1.265, -17.8, 12.63, 1e-5, 6.02214076e23, 0.1 + 0.2,
                   std::numeric_limits<double>::max(), std::numeric_limits<double>::denorm_min()}) {
    std::string out;
    append_json_number(out, d);
    CAPTURE(out);
    const json back = json::parse(out);
    CHECK(back.is_number_float());
    CHECK(back.get<double>() == d);
  }
  std::string out;
  append_json_number(out, 12.0);
  CHECK(out == "12.0");
  for (double d : {std::nan(""), std::numeric_limits<double>::infinity(),
                   -std::numeric_limits<double>::infinity()}) {
    std::string text;
    append_json_number(text, d);
    CHECK(text == "null");
  }
}

// What append_json_number wrote before its quick path: std::to_chars'
// shortest form, ".0" on whole numbers.
std::string general_form(double d) {
  if (!std::isfinite(d)) return "null";
  char buf[32];
  const auto end = std::to_chars(buf, buf + sizeof buf, d).ptr;
  std::string text(buf, end);
  if (text.find_first_of(".e") == std::string::npos) text += ".0";
  return text;
}

TEST_CASE("numbers with a few decimals are written exactly as the general form writes them") {
  std::vector<double> values = {0.001, -0.001, 0.00099999, 0.0001, 0.0012, 0.01, 0.5, 1.0, 10000.0,
                                99999.0, 99999.999999, 99999.9999999, 100000.0, 100000.5, 1e5 - 1e-6,
                                123456.0, 1.2730000000000001, 0.30000000000000004, 1.265, -40.545,
                                12.780000000000001, 74.37, 3.1, 0.006, 0.005999999999999783};
  std::mt19937_64 random(20261204);
  for (int decimals = 0; decimals <= 8; ++decimals) {
    const double scale = std::pow(10.0, decimals);
    for (int i = 0; i < 2000; ++i) {
      const auto k = static_cast<double>(random() % 200'000'000) - 1e8;
      values.push_back(k / scale);                    // the text "k e-decimals" as read
      values.push_back(std::round(k / 1e3) / scale);  // fewer digits
    }
  }
  std::uniform_real_distribution<double> any(-2e5, 2e5);
  for (int i = 0; i < 20000; ++i) values.push_back(any(random));
  for (double d : values) {
    std::string out;
    append_json_number(out, d);
    CAPTURE(d);
    CHECK(out == general_form(d));
  }
}

TEST_CASE("nested objects and arrays get their commas and parse to the same document") {
  std::string out;
  JsonText w(out);
  w.begin_object()
      .member("stored", 2)
      .member("ok", true)
      .member("none", std::optional<double>{})
      .member("some", std::optional<double>{1.5})
      .member("cells", std::vector<double>{1.265, 1.26})
      .key("empty")
      .begin_array()
      .end_array()
      .key("items")
      .begin_array();
  for (int i = 0; i < 3; ++i) w.begin_object().member("i", i).member("name", "n\"" + std::to_string(i)).end_object();
  w.end_array().key("inner").begin_object().end_object().end_object();

  const json expected = {{"stored", 2},
                         {"ok", true},
                         {"none", nullptr},
                         {"some", 1.5},
                         {"cells", {1.265, 1.26}},
                         {"empty", json::array()},
                         {"items", {{{"i", 0}, {"name", "n\"0"}}, {{"i", 1}, {"name", "n\"1"}}, {{"i", 2}, {"name", "n\"2"}}}},
                         {"inner", json::object()}};
  CHECK(json::parse(out) == expected);
  CHECK(out.find(",,") == std::string::npos);
  CHECK(out.find(",}") == std::string::npos);
  CHECK(out.find(",]") == std::string::npos);
}

}  // namespace
}  // namespace pbfleet::api
