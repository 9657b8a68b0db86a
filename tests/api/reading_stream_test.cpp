// The scanner of reading bodies (reading_stream.hpp) against the tree
// reader it stands in for (read_reading over nlohmann's DOM): whatever the
// scanner takes, it must read exactly as the tree reader does with no
// problem; what it leaves, the tree reader words.
#include "server/api/reading_stream.hpp"

#include <doctest/doctest.h>

#include <nlohmann/json.hpp>
#include <cmath>
#include <random>

#include "server/api/json_fields.hpp"
#include "server/api/reading_codec.hpp"

namespace pbfleet::api {

using nlohmann::json;
namespace wire = models::wire;

namespace {

// The tree reader's result: the readings, or nullopt when it found problems.
std::optional<std::vector<wire::ReadingInput>> tree_read(const std::string& body) {
  const json doc = json::parse(body, nullptr, false);
  if (doc.is_discarded()) return std::nullopt;
  Issues issues;
  std::vector<wire::ReadingInput> out;
  auto one = [&](const json& item, const std::string& base) {
    FieldReader in(item, base, issues);
    out.push_back(read_reading(in));
  };
  if (doc.is_array()) {
    for (std::size_t i = 0; i < doc.size(); ++i) one(doc[i], "/" + std::to_string(i));
  } else {
    one(doc, "");
  }
  if (!issues.empty()) return std::nullopt;
  return out;
}

template <class Q>
std::optional<double> value_of(const std::optional<Q>& q) {
  return q ? std::optional<double>(q->value) : std::nullopt;
}

bool same_temperature(const std::optional<wire::EnteredTemperature>& a,
                      const std::optional<wire::EnteredTemperature>& b) {
  if (!a || !b) return !a && !b;
  return a->value.value == b->value.value && a->unit == b->unit;
}

bool same(const wire::ReadingInput& a, const wire::ReadingInput& b) {
  if (a.cell_sg.size() != b.cell_sg.size()) return false;
  for (std::size_t i = 0; i < a.cell_sg.size(); ++i)
    if (a.cell_sg[i].value != b.cell_sg[i].value) return false;
  return a.reading_id == b.reading_id && a.serial == b.serial && a.taken_at == b.taken_at &&
         value_of(a.ocv) == value_of(b.ocv) && same_temperature(a.electrolyte, b.electrolyte) &&
         same_temperature(a.ambient, b.ambient) && value_of(a.rest) == value_of(b.rest) &&
         value_of(a.load_test_current) == value_of(b.load_test_current) &&
         value_of(a.load_test_end) == value_of(b.load_test_end) && a.logged_by == b.logged_by &&
         a.source == b.source && a.note == b.note && a.after_charge == b.after_charge &&
         a.water_added == b.water_added;
}

// Agreement on one body: when the scanner takes it, the tree reader
// reads the same readings without problems.
void check_agrees(const std::string& body) {
  const auto streamed = stream_readings(body);
  if (!streamed) return;
  const auto tree = tree_read(body);
  INFO("body: " << body);
  REQUIRE(tree.has_value());
  REQUIRE(tree->size() == streamed->readings.size());
  for (std::size_t i = 0; i < tree->size(); ++i) CHECK(same((*tree)[i], streamed->readings[i]));
}

// A random reading of the plain shape: optional fields present, null or
// absent; numbers as integers or fractions; either temperature unit.
json random_reading(std::mt19937& rng, int n) {
  auto coin = [&](int in) { return std::uniform_int_distribution<int>(0, in - 1)(rng) == 0; };
  auto real = [&](double lo, double hi) { return std::uniform_real_distribution<double>(lo, hi)(rng); };
  json r = {{"serial", "HB-" + std::to_string(1000 + n)},
            {"taken_at", "2026-11-" + std::to_string(10 + n % 18) + "T07:3" + std::to_string(n % 10) + ":00Z"}};
  if (!coin(4)) r["reading_id"] = "round-" + std::to_string(n);
  if (!coin(3)) r["ocv_v"] = coin(5) ? json(12) : json(real(11.5, 12.9));
  if (!coin(3)) {
    json cells = json::array();
    for (int c = 0; c < 6; ++c) cells.push_back(real(1.1, 1.3));
    r["cell_sg"] = cells;
  }
  if (coin(2)) r[coin(2) ? "electrolyte_temp_c" : "electrolyte_temp_f"] = real(-20, 30);
  if (coin(3)) r[coin(2) ? "ambient_temp_c" : "ambient_temp_f"] = real(-30, 30);
  if (coin(3)) r["rest_h"] = coin(2) ? json(std::uniform_int_distribution<int>(0, 48)(rng)) : json(real(0, 48));
  if (coin(5)) {
    r["load_test_a"] = real(100, 400);
    r["load_test_end_v"] = real(9, 11);
  }
  if (coin(2)) r["logged_by"] = "crew " + std::to_string(n % 7);
  if (coin(3)) r["source"] = "round";
  if (coin(4)) r["note"] = coin(2) ? json(nullptr) : json("cap \"3\" cracked\n\u00e6");
  if (coin(4)) r["after_charge"] = coin(2);
  if (coin(4)) r["water_added"] = coin(2);
  if (coin(6)) r["rest_h"] = nullptr;
  return r;
}

}  // namespace

TEST_CASE("every plain body reads through the scanner exactly as through the tree") {
  std::mt19937 rng(20261204);
  for (int round = 0; round < 200; ++round) {
    json batch = json::array();
    const int n = std::uniform_int_distribution<int>(1, 12)(rng);
    for (int i = 0; i < n; ++i) batch.push_back(random_reading(rng, round * 100 + i));
    const std::string text = batch.dump();
    const auto streamed = stream_readings(text);
    INFO("body: " << text);
    REQUIRE(streamed.has_value());
    CHECK(streamed->batch);
    check_agrees(text);
    // One reading alone, not in an array.
    const std::string single = batch[0].dump();
    const auto one = stream_readings(single);
    REQUIRE(one.has_value());
    CHECK_FALSE(one->batch);
    check_agrees(single);
  }
}

TEST_CASE("bodies cut or altered at random are either read as the tree reads them or left to it") {
  std::mt19937 rng(7);
  int taken = 0, left = 0;
  for (int round = 0; round < 600; ++round) {
    json batch = json::array({random_reading(rng, round), random_reading(rng, round + 1)});
    std::string text = batch.dump();
    const auto at = std::uniform_int_distribution<std::size_t>(0, text.size() - 1)(rng);
    switch (round % 4) {
      case 0: text.erase(at, 1); break;                                  // a byte lost
      case 1: text.insert(at, 1, "{}[]\",:0n-"[round % 10]); break;      // a byte added
      case 2: text[at] = static_cast<char>("aZ9 .e\"\\"[round % 8]); break;  // a byte changed
      case 3: text.replace(at, std::min<std::size_t>(3, text.size() - at), "null"); break;
    }
    (stream_readings(text) ? taken : left)++;
    check_agrees(text);
  }
  // Both outcomes were exercised (a reader that refused everything, or
  // took everything, would not show here).
  CHECK(taken > 10);
  CHECK(left > 100);
}

TEST_CASE("the scanner reads JSON's own forms as the tree does") {
  const std::string head = R"({"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z",)";
  // Each of these is plain JSON (RFC 8259) that the scanner must take
  // itself, reading the same values as the tree reader.
  for (const std::string& body : {
           head + R"("ocv_v":1.26e1})",                      // exponent
           head + R"("ocv_v":126E-1})",                      // capital E, negative exponent
           head + R"("ocv_v":12.6e+0})",                     // explicit plus
           head + R"("ambient_temp_c":-0})",                 // the integer -0
           head + R"("ambient_temp_c":-0.0})",               // the fraction -0.0
           head + R"("rest_h":18446744073709551617})",       // past 64-bit integers
           head + R"("ocv_v":12.600000000000000000000001})", // more digits than a double holds
           head + R"("cell_sg":[]})",                        // no cells given
           " \t\r\n[ " + head + "\"cell_sg\" : [ 1.2 , 1.25 ]\n} ] \n",  // every kind of space
           head + R"("note":"\"quoted\" \\ \/ \b\f\n\r\t"})",  // every short escape
           head + R"("note":"\u00e6\u00C6 \u20ac \ud83d\ude97 \u0000"})",  // \u forms, a pair
           head + "\"note\":\"\xc3\xa6 \xe2\x82\xac \xf0\x9f\x9a\x97\"}",  // UTF-8 of 2, 3, 4 bytes
           head + R"("logged_by":"","source":null})",        // empty text; null is absent
       }) {
    INFO("body: " << body);
    REQUIRE(stream_readings(body).has_value());
    check_agrees(body);
  }
  const auto pair = stream_readings(head + R"("note":"\ud83d\ude97"})");
  REQUIRE(pair.has_value());
  CHECK(pair->readings[0].note == "\xf0\x9f\x9a\x97");
  const auto zero = stream_readings(head + R"("ambient_temp_c":-0})");
  REQUIRE(zero.has_value());
  CHECK_FALSE(std::signbit(zero->readings[0].ambient->value.value));  // as nlohmann reads "-0"
}

TEST_CASE("text that is not JSON is left to the tree reader, which refuses it too") {
  const std::string head = R"({"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z",)";
  for (const std::string& bad : {
           head + R"("ocv_v":012})",        // leading zero
           head + R"("ocv_v":12.})",        // no digit after the point
           head + R"("ocv_v":.5})",         // no digit before it
           head + R"("ocv_v":1e})",         // no exponent digits
           head + R"("ocv_v":+12})",        // a plus sign
           head + R"("ocv_v":1e999})",      // not a finite double
           head + R"("ocv_v":NaN})",
           head + R"("ocv_v":12.6,})",      // trailing comma
           head + R"("cell_sg":[1.2,]})",
           head + R"("note":"\x41"})",      // no such escape
           head + R"("note":"\ud83d"})",    // a high surrogate alone
           head + R"("note":"\ude97"})",    // a low surrogate alone
           head + R"("note":"\u12"})",      // short \u
           head + "\"note\":\"tab\there\"}",              // a raw control character
           head + "\"note\":\"\xc0\xaf\"}",                // overlong UTF-8
           head + "\"note\":\"\xed\xa0\x80\"}",            // a surrogate in UTF-8
           head + "\"note\":\"\xf4\x90\x80\x80\"}",        // past U+10FFFF
           head + "\"note\":\"\xe2\x82\"}",                // cut short
           head + R"("after_charge":tru})",
           head + R"("ocv_v":12.6} x)",     // text after the body
           head + R"("ocv_v":12.6}})",
           "[" + head + R"("ocv_v":12.6})",  // array not closed
       }) {
    INFO("body: " << bad);
    CHECK_FALSE(stream_readings(bad).has_value());
    CHECK_FALSE(tree_read(bad).has_value());
  }
}

TEST_CASE("shapes the scanner leaves to the tree reader") {
  const std::string good =
      R"({"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z","ocv_v":12.6,"cell_sg":[1.26,1.26]})";
  REQUIRE(stream_readings(good).has_value());
  CHECK(stream_readings(R"([)" + good + "]")->readings.size() == 1);
  CHECK(stream_readings("[]")->readings.empty());  // the handler refuses an empty batch
  for (const std::string bad : {
           R"({"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z","colour":"red"})",     // unknown key
           R"({"serial":"HB-1","serial":"HB-2","taken_at":"2026-11-20T07:00:00Z"})",   // key twice
           R"({"taken_at":"2026-11-20T07:00:00Z"})",                                  // no serial
           R"({"serial":"","taken_at":"2026-11-20T07:00:00Z"})",                      // empty serial
           R"({"serial":"HB-1"})",                                                    // no taken_at
           R"({"serial":"HB-1","taken_at":"20 November"})",                           // bad time
           R"({"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z","ocv_v":"12.6"})",   // text number
           R"({"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z","cell_sg":[1.2,"x"]})",
           R"({"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z","cell_sg":1.2})",
           R"({"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z","electrolyte_temp_c":5,"electrolyte_temp_f":41})",
           R"({"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z","note":{"text":"x"}})",
           R"({"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z","after_charge":1})",
           R"({"serial":7,"taken_at":"2026-11-20T07:00:00Z"})",
           R"([{"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z"},42])",
           R"([[{"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z"}]])",
           "42", "null", "", "{\"serial\":\"HB-1\",", "{\"serial\":\"\xff\",\"taken_at\":\"2026-11-20T07:00:00Z\"}",
       }) {
    INFO("body: " << bad);
    CHECK_FALSE(stream_readings(bad).has_value());
  }
  // Text past the decoder's cap is the tree reader's to refuse.
  const std::string long_note = R"({"serial":"HB-1","taken_at":"2026-11-20T07:00:00Z","note":")" +
                                std::string(5000, 'n') + "\"}";
  CHECK_FALSE(stream_readings(long_note).has_value());
}

}  // namespace pbfleet::api
