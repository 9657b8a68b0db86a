// One battery's history kept as rendered text (ctx.histories, keyed by the
// battery's version): asked again it is the same text until a reading for
// that battery or a fleet change; the ETag answers 304 until then; the
// depot scope is checked before anything kept is used.
#include <doctest/doctest.h>

#include <string>

#include "server/api/services/report_cache.hpp"
#include "tests/api/fixture.hpp"

namespace pbfleet::api {
namespace {

using testing::ApiFixture;
using testing::body_of;
using testing::good_reading;

std::string etag_in(const http::Response& r) {
  for (const auto& [name, value] : r.headers)
    if (name == "ETag") return value;
  return {};
}

http::Response history_with_tag(ApiFixture& f, const std::string& serial, const std::string& etag) {
  http::Request r;
  r.method = "GET";
  r.target = "/v1/batteries/" + serial + "/history";
  r.headers["authorization"] = "Bearer " + f.token("technician");
  if (!etag.empty()) r.headers["if-none-match"] = etag;
  return f.api().handle(r);
}

}  // namespace

TEST_CASE("a history asked again is the kept text until a reading for that battery or a fleet change") {
  ApiFixture f;
  ReportCache& kept = f.api().context().histories;
  REQUIRE(f.post("/v1/readings", good_reading("NY-0001", "hist-1", 60 * 24 * 7), "crew").status == 201);
  const auto first = f.get("/v1/batteries/NY-0001/history", "technician");
  REQUIRE(first.status == 200);
  CHECK(body_of(first)["readings"].size() == 1);
  const auto misses = kept.counts().misses;
  const auto hits = kept.counts().hits;

  const auto again = f.get("/v1/batteries/NY-0001/history", "technician");
  CHECK(again.body == first.body);
  CHECK(kept.counts().misses == misses);
  CHECK(kept.counts().hits == hits + 1);

  // A reading for another battery leaves this history as it was.
  REQUIRE(f.post("/v1/readings", good_reading("NY-0002", "hist-other"), "crew").status == 201);
  CHECK(f.get("/v1/batteries/NY-0001/history", "technician").body == first.body);
  CHECK(kept.counts().misses == misses);

  // A reading for this battery: a fresh answer holding it.
  REQUIRE(f.post("/v1/readings", good_reading("NY-0001", "hist-2"), "crew").status == 201);
  const auto after_reading = f.get("/v1/batteries/NY-0001/history", "technician");
  REQUIRE(after_reading.status == 200);
  const nlohmann::json readings = body_of(after_reading)["readings"];
  REQUIRE(readings.size() == 2);
  CHECK(readings[1]["reading_id"] == "hist-2");
  CHECK(kept.counts().misses == misses + 1);

  // A fleet change (the battery's full-charge SG): the battery and its
  // derived values are worked out afresh.
  REQUIRE(f.call("PATCH", "/v1/batteries/NY-0001", "admin", R"({"full_charge_sg": 1.300})").status == 200);
  const nlohmann::json changed = body_of(f.get("/v1/batteries/NY-0001/history", "technician"));
  CHECK(changed["battery"]["full_charge_sg"] == 1.3);
  CHECK(changed["readings"][1]["derived"] != readings[1]["derived"]);

  // A fleet change that leaves the readings alone: retiring it adds an event.
  REQUIRE(f.post("/v1/batteries/NY-0001/retire", {{"reason", "case cracked"}}, "admin").status == 200);
  const nlohmann::json retired = body_of(f.get("/v1/batteries/NY-0001/history", "technician"));
  CHECK(retired["battery"]["status"] == "retired");
  REQUIRE(!retired["events"].empty());
  CHECK(retired["events"].back()["kind"] == "retired");

  // Another range is another answer, holding only the readings in it.
  const std::string second_at = readings[1]["taken_at"];
  const nlohmann::json recent = body_of(f.get("/v1/batteries/NY-0001/history?from=" + second_at, "technician"));
  REQUIRE(recent["readings"].size() == 1);
  CHECK(recent["readings"][0]["reading_id"] == "hist-2");
}

TEST_CASE("a history's ETag gives 304 until a reading for that battery, and scope comes first") {
  ApiFixture f;
  REQUIRE(f.post("/v1/readings", good_reading("NY-0001", "tag-1"), "crew").status == 201);
  const auto first = history_with_tag(f, "NY-0001", "");
  REQUIRE(first.status == 200);
  const std::string tag = etag_in(first);
  REQUIRE(tag.size() == 18);
  const auto same = history_with_tag(f, "NY-0001", tag);
  CHECK(same.status == 304);
  CHECK(same.body.empty());
  CHECK(etag_in(same) == tag);
  CHECK(history_with_tag(f, "NY-0002", tag).status == 200);  // another battery, another tag

  REQUIRE(f.post("/v1/readings", good_reading("HB-0001", "tag-other"), "crew").status == 201);
  CHECK(history_with_tag(f, "NY-0001", tag).status == 304);
  REQUIRE(f.post("/v1/readings", good_reading("NY-0001", "tag-2"), "crew").status == 201);
  const auto moved = history_with_tag(f, "NY-0001", tag);
  CHECK(moved.status == 200);
  CHECK(etag_in(moved) != tag);

  // A token of another depot is refused though the answer is kept.
  CHECK(f.get("/v1/batteries/NY-0001/history", "manager_harbour").status == 404);
}

}  // namespace pbfleet::api
