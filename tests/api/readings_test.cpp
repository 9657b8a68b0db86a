// POST /v1/readings and GET /v1/readings through dispatch (no sockets).
#include "server/api/handlers/handlers.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>

#include "server/api/request_util.hpp"
#include "tests/api/fixture.hpp"

namespace pbfleet::api {

using nlohmann::json;
using testing::ApiFixture;
using testing::body_of;
using testing::error_fields;
using testing::good_reading;
using testing::slug_of;

namespace {

bool has(const std::vector<std::string>& v, const std::string& x) {
  return std::find(v.begin(), v.end(), x) != v.end();
}

std::int64_t stored_count(ApiFixture& f) { return f.store().readings_count().value(); }

}  // namespace

TEST_CASE("one good reading is stored and answered 201 with derived values") {
  ApiFixture f;
  auto r = f.post("/v1/readings", good_reading("NY-0001", "r-1"), "crew");
  REQUIRE(r.status == 201);
  auto body = body_of(r);
  CHECK(body["stored"] == 1);
  CHECK(body["replayed"] == 0);
  REQUIRE(body["readings"].size() == 1);
  const auto& reading = body["readings"][0];
  CHECK(reading["reading_id"] == "r-1");
  CHECK(reading["serial"] == "NY-0001");
  CHECK(reading["derived"]["corrected_sg"].is_number());
  CHECK(reading["derived"]["soc_percent"].is_number());
  CHECK(reading["derived"]["flags"].is_array());
  CHECK(stored_count(f) == 1);
}

TEST_CASE("derived values are published with the stated decimals, measurements as entered") {
  ApiFixture f;
  json reading = good_reading("NY-0001", "r-round");
  reading["electrolyte_temp_c"] = -3.7;  // the SG correction gives long fractions
  reading["cell_sg"] = json({1.241, 1.262, 1.258, 1.249, 1.255, 1.263});
  reading["ocv_v"] = 12.437;
  auto r = f.post("/v1/readings", reading, "crew");
  REQUIRE(r.status == 201);
  const auto stored = body_of(r)["readings"][0];
  const json& d = stored["derived"];
  // Whole multiples of 10^-decimals, as the Derived schema states.
  const auto has_decimals = [](const json& v, int decimals) {
    const double scaled = v.get<double>() * std::pow(10.0, decimals);
    return std::fabs(scaled - std::round(scaled)) < 1e-6;
  };
  for (const char* key : {"corrected_sg", "sg_equivalent", "cell_spread"}) {
    CAPTURE(key);
    REQUIRE(d[key].is_number());
    CHECK(has_decimals(d[key], 4));
  }
  for (const auto& cell : d["corrected_cell_sg"]) CHECK(has_decimals(cell, 4));
  for (const char* key : {"soc_percent", "soc_from_sg_percent", "soc_from_ocv_percent",
                          "soc_uncertainty_percent", "freezing_point_c", "electrolyte_c"}) {
    CAPTURE(key);
    REQUIRE(d[key].is_number());
    CHECK(has_decimals(d[key], 3));
  }
  CHECK_FALSE(has_decimals(d["soc_from_sg_percent"], 0));  // rounded, not truncated to whole
  CHECK(stored["cell_sg"] == reading["cell_sg"]);
  CHECK(stored["ocv_v"] == 12.437);
  CHECK(stored["electrolyte_temp_c"] == -3.7);
}

TEST_CASE("the default answer echoes every field with its derived values, in the stored form") {
  ApiFixture f;
  json batch = json::array({good_reading("NY-0001", "r-a"), good_reading("NY-0001", "r-b", 30)});
  batch[1]["note"] = "tab\there, quote \" and \u00f8";
  batch[1]["electrolyte_temp_f"] = 41.0;
  batch[1].erase("electrolyte_temp_c");
  auto r = f.post("/v1/readings", batch, "crew");
  REQUIRE(r.status == 201);
  const auto body = body_of(r);
  REQUIRE(!body.is_discarded());
  REQUIRE(body["readings"].size() == 2);
  const auto& second = body["readings"][1];
  CHECK(second["note"] == "tab\there, quote \" and \u00f8");
  CHECK(second["electrolyte_temp_unit"] == "F");
  CHECK(second["electrolyte_temp_c"].get<double>() == doctest::Approx(5.0));
  CHECK(second["cell_sg"] == json({1.265, 1.260, 1.265, 1.255, 1.265, 1.260}));
  CHECK(second["ambient_temp_c"].is_null());
  CHECK(second["rest_h"] == 12.0);
  CHECK(second["replayed"] == false);
  CHECK(second["taken_at"] == batch[1]["taken_at"]);
  CHECK(second["received_at"].is_string());
  CHECK(second["derived"]["electrolyte_c"].get<double>() == doctest::Approx(5.0));
  // The same reading listed back through GET has the same raw fields.
  const auto listed = body_of(f.get("/v1/readings?serial=NY-0001", "crew"));
  REQUIRE(listed["items"].size() == 2);
  for (const auto& key : {"reading_id", "note", "cell_sg", "taken_at", "received_at",
                          "electrolyte_temp_unit", "electrolyte_temp_c", "logged_by"})
    CHECK(listed["items"][1][key] == second[key]);
  CHECK(listed["next_cursor"].is_null());
}

TEST_CASE("Prefer: return=minimal answers with counts, ids and flags only, and says so") {
  ApiFixture f;
  json low = good_reading("NY-0001", "m-2", 30);
  low["cell_sg"] = {1.180, 1.180, 1.185, 1.180, 1.180, 1.180};  // about half charged
  low["ocv_v"] = 12.25;
  const json batch = json::array({good_reading("NY-0001", "m-1"), low});
  auto send = [&](const std::string& prefer) {
    http::Request request;
    request.method = "POST";
    request.target = "/v1/readings";
    request.body = batch.dump();
    request.headers["content-type"] = "application/json";
    request.headers["authorization"] = "Bearer " + f.token("crew");
    request.headers["prefer"] = prefer;
    return f.api().handle(std::move(request));
  };
  auto first = send("respond-async, RETURN=minimal; x=1");
  REQUIRE(first.status == 201);
  const json minimal = body_of(first);
  CHECK(minimal["stored"] == 2);
  CHECK(minimal["replayed"] == 0);
  REQUIRE(minimal["readings"].size() == 2);
  CHECK(minimal["readings"][0] ==
        json({{"reading_id", "m-1"}, {"replayed", false}, {"flags", json::array()}}));
  CHECK(minimal["readings"][1]["reading_id"] == "m-2");
  const auto& low_flags = minimal["readings"][1]["flags"];
  CHECK(std::find(low_flags.begin(), low_flags.end(), "low_soc") != low_flags.end());
  CHECK(minimal["readings"][1].size() == 3);  // reading_id, replayed, flags: nothing else
  const auto applied = std::find(first.headers.begin(), first.headers.end(),
                                 std::pair<std::string, std::string>{"Preference-Applied", "return=minimal"});
  CHECK(applied != first.headers.end());
  CHECK(stored_count(f) == 2);

  auto again = send("return=minimal");
  CHECK(again.status == 200);
  CHECK(body_of(again)["replayed"] == 2);
  CHECK(body_of(again)["readings"][1]["replayed"] == true);

  // Any other preference gets the full answer, whose derived flags are the
  // minimal answer's.
  auto full = send("return=representation");
  CHECK(body_of(full)["readings"][0].contains("derived"));
  for (int i = 0; i < 2; ++i)
    CHECK(body_of(full)["readings"][i]["derived"]["flags"] == minimal["readings"][i]["flags"]);
  CHECK(std::none_of(full.headers.begin(), full.headers.end(),
                     [](const auto& h) { return h.first == "Preference-Applied"; }));
}

TEST_CASE("prefers() reads RFC 7240 preferences") {
  CHECK(prefers("return=minimal", "return=minimal"));
  CHECK(prefers("Return=minimal", "return=minimal"));
  CHECK(prefers(" wait=10 , return = \"minimal\" ;foo", "return=minimal"));
  CHECK_FALSE(prefers("", "return=minimal"));
  CHECK_FALSE(prefers("return=representation", "return=minimal"));
  CHECK_FALSE(prefers("return=minimalist", "return=minimal"));
  CHECK_FALSE(prefers("wait=10; return=minimal", "return=minimal"));  // a parameter, not a preference
}

TEST_CASE("the same reading_id and content again is a replay answered 200 with the original") {
  ApiFixture f;
  auto first = f.post("/v1/readings", good_reading("NY-0001", "r-1"), "crew");
  REQUIRE(first.status == 201);
  auto again = f.post("/v1/readings", good_reading("NY-0001", "r-1"), "technician");
  CHECK(again.status == 200);
  auto body = body_of(again);
  CHECK(body["stored"] == 0);
  CHECK(body["replayed"] == 1);
  CHECK(body["readings"][0]["replayed"] == true);
  CHECK(body["readings"][0]["received_at"] == body_of(first)["readings"][0]["received_at"]);
  CHECK(stored_count(f) == 1);
}

TEST_CASE("the same reading_id with other content is a 409 conflict and stores nothing") {
  ApiFixture f;
  REQUIRE(f.post("/v1/readings", good_reading("NY-0001", "r-1"), "crew").status == 201);
  auto changed = good_reading("NY-0001", "r-1");
  changed["ocv_v"] = 12.40;
  json batch = json::array({good_reading("NY-0002", "r-2"), changed});
  auto r = f.post("/v1/readings", batch, "crew");
  CHECK(r.status == 409);
  CHECK(slug_of(r) == "conflict");
  CHECK(has(error_fields(r), "/1/reading_id"));
  CHECK(stored_count(f) == 1);  // r-2 was not stored either: the batch is atomic
}

TEST_CASE("a batch with bad rows lists every bad field by JSON pointer and stores nothing") {
  ApiFixture f;
  auto bad_sg = good_reading("NY-0001", "a");
  bad_sg["cell_sg"][2] = 2.5;
  auto bad_ocv = good_reading("NY-0002", "b");
  bad_ocv["ocv_v"] = 30.0;
  bad_ocv["electrolyte_temp_c"] = -80.0;
  auto future = good_reading("NY-0001", "c");
  future["taken_at"] = "2026-01-12T12:00:00Z";  // 48 h ahead of the fixed clock
  json batch = json::array({good_reading("NY-0001", "ok"), bad_sg, bad_ocv, future});
  auto r = f.post("/v1/readings", batch, "crew");
  REQUIRE(r.status == 422);
  CHECK(slug_of(r) == "validation-failed");
  const auto fields = error_fields(r);
  CHECK(has(fields, "/1/cell_sg/2"));
  CHECK(has(fields, "/2/ocv_v"));
  CHECK(has(fields, "/2/electrolyte_temp_c"));
  CHECK(has(fields, "/3/taken_at"));
  CHECK(fields.size() == 4);
  // The body is held in a local: a range-for over body_of(r)["errors"] would
  // iterate a reference into a temporary already destroyed (C++20 lifetime).
  const json body = body_of(r);
  for (const auto& e : body["errors"]) CHECK_FALSE(e.value("allowed", "").empty());
  CHECK(stored_count(f) == 0);
}

TEST_CASE("a cell count that differs from the battery's is refused") {
  ApiFixture f;
  auto r5 = good_reading("NY-0001", "x");
  r5["cell_sg"] = {1.265, 1.265, 1.265, 1.265, 1.265};
  auto r = f.post("/v1/readings", r5, "crew");
  CHECK(r.status == 422);
  CHECK(has(error_fields(r), "/cell_sg"));
  CHECK(body_of(r)["errors"][0]["allowed"] == "6 values, one per cell");
}

TEST_CASE("unknown fields are refused with 422 unknown-field naming them") {
  ApiFixture f;
  auto r1 = good_reading("NY-0001", "x");
  r1["soc"] = 99;
  r1["created_by"] = "me";
  auto r = f.post("/v1/readings", json::array({r1}), "crew");
  CHECK(r.status == 422);
  CHECK(slug_of(r) == "unknown-field");
  CHECK(has(error_fields(r), "/0/soc"));
  CHECK(has(error_fields(r), "/0/created_by"));
  CHECK(stored_count(f) == 0);
}

TEST_CASE("an unknown battery serial is a validation error on that row") {
  ApiFixture f;
  auto r = f.post("/v1/readings", good_reading("NOPE-1", "x"), "crew");
  CHECK(r.status == 422);
  CHECK(has(error_fields(r), "/serial"));
}

TEST_CASE("a depot-scoped token cannot log for another depot's battery") {
  ApiFixture f;
  auto out = f.post("/v1/readings", good_reading("NY-0001", "x"), "crew_harbour");
  CHECK(out.status == 422);
  CHECK(body_of(out)["errors"][0]["detail"] == "no battery with serial 'NY-0001'");
  CHECK(f.post("/v1/readings", good_reading("HB-0001", "y"), "crew_harbour").status == 201);
}

TEST_CASE("a body that is not JSON is 400 and another media type is 415") {
  ApiFixture f;
  auto broken = f.call("POST", "/v1/readings", "crew", "{\"serial\":");
  CHECK(broken.status == 400);
  CHECK(slug_of(broken) == "malformed-body");
  auto xml = f.call("POST", "/v1/readings", "crew", "<reading/>", "application/xml");
  CHECK(xml.status == 415);
  CHECK(slug_of(xml) == "unsupported-media-type");
}

TEST_CASE("an empty batch is refused") {
  ApiFixture f;
  CHECK(f.call("POST", "/v1/readings", "crew", "[]").status == 422);
}

TEST_CASE("wrong JSON types are named by pointer") {
  ApiFixture f;
  auto r1 = good_reading("NY-0001", "x");
  r1["ocv_v"] = "12.6";
  r1["cell_sg"][0] = "high";
  r1["water_added"] = 1;
  auto r = f.post("/v1/readings", r1, "crew");
  CHECK(r.status == 422);
  CHECK(has(error_fields(r), "/ocv_v"));
  CHECK(has(error_fields(r), "/cell_sg/0"));
  CHECK(has(error_fields(r), "/water_added"));
}

TEST_CASE("Fahrenheit temperatures are accepted and kept with their unit") {
  ApiFixture f;
  auto r1 = good_reading("NY-0001", "f1");
  r1.erase("electrolyte_temp_c");
  r1["electrolyte_temp_f"] = 41.0;
  auto r = f.post("/v1/readings", r1, "crew");
  REQUIRE(r.status == 201);
  auto stored = body_of(r)["readings"][0];
  CHECK(stored["electrolyte_temp_unit"] == "F");
  CHECK(stored["electrolyte_temp_c"].get<double>() == doctest::Approx(5.0));
}

TEST_CASE("CSV readings share the validation and name the row and column") {
  ApiFixture f;
  const std::string csv =
      "serial,taken_at,ocv_v,cell_sg,electrolyte_temp,rest_h\r\n"
      "NY-0001,2026-01-10T08:00:00Z,12.60,1.265;1.260;1.265;1.255;1.265;1.260,41F,12\r\n"
      "NY-0002,2026-01-10T08:05:00Z,12.60,1.265;1.260;2.500;1.255;1.265;1.260,5C,12\r\n";
  auto r = f.call("POST", "/v1/readings", "crew", csv, "text/csv");
  REQUIRE(r.status == 422);
  auto e = body_of(r)["errors"];
  REQUIRE(e.size() == 1);
  CHECK(e[0]["field"] == "cell_sg/2");
  CHECK(e[0]["row"] == 2);
  CHECK(stored_count(f) == 0);

  const std::string good =
      "\xEF\xBB\xBFserial,taken_at,ocv_v,cell_sg,electrolyte_temp,rest_h\r\n"
      "NY-0001,2026-01-10T08:00:00Z,12.60,1.265;1.260;1.265;1.255;1.265;1.260,41F,12\r\n"
      "NY-0002,2026-01-10T08:05:00Z,12.60,1.265;1.260;1.265;1.255;1.265;1.260,5C,12\r\n";
  auto ok = f.call("POST", "/v1/readings", "crew", good, "text/csv; charset=utf-8");
  CHECK(ok.status == 201);
  CHECK(body_of(ok)["stored"] == 2);
  CHECK(stored_count(f) == 2);
}

TEST_CASE("readings are listed by battery with a cursor") {
  ApiFixture f;
  json batch = json::array();
  for (int i = 0; i < 5; ++i) batch.push_back(good_reading("NY-0001", "p" + std::to_string(i), 60 + i));
  REQUIRE(f.post("/v1/readings", batch, "crew").status == 201);
  auto page1 = f.get("/v1/readings?serial=NY-0001&limit=3", "technician");
  REQUIRE(page1.status == 200);
  auto b1 = body_of(page1);
  CHECK(b1["items"].size() == 3);
  REQUIRE(b1["next_cursor"].is_string());
  auto page2 = f.get("/v1/readings?serial=NY-0001&limit=3&cursor=" + b1["next_cursor"].get<std::string>(),
                     "technician");
  CHECK(body_of(page2)["items"].size() == 2);
  CHECK(f.get("/v1/readings?limit=5000").status == 400);
}

}  // namespace pbfleet::api
