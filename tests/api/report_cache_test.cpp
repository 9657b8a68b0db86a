// The report cache (server/api/services/report_cache.hpp): a report asked
// again with no new data comes from memory; a stored reading or a fleet
// change, the depot scope and the format each give a fresh answer.
#include "server/api/services/report_cache.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include "tests/api/fixture.hpp"

namespace pbfleet::api {
namespace {

using testing::ApiFixture;
using testing::body_of;
using testing::good_reading;
using namespace std::chrono_literals;

const std::chrono::sys_seconds kNow{std::chrono::seconds{1'800'000'000}};

}  // namespace

TEST_CASE("the cache builds once per key and data version, and again when the entry is too old") {
  ReportCache cache({.max_entries = 2, .max_age = 60s});
  int builds = 0;
  auto make = [&]() -> storage::StoreResult<int> { return ++builds; };
  CHECK(*cache.get<int>("a", 1, kNow, make).value() == 1);
  CHECK(*cache.get<int>("a", 1, kNow + 59s, make).value() == 1);  // kept
  CHECK(*cache.get<int>("a", 2, kNow + 59s, make).value() == 2);  // new data
  CHECK(*cache.get<int>("a", 2, kNow + 59s + 60s, make).value() == 3);  // too old
  CHECK(*cache.get<int>("b", 2, kNow + 120s, make).value() == 4);
  CHECK(*cache.get<int>("c", 2, kNow + 121s, make).value() == 5);  // evicts the oldest ("a")
  CHECK(*cache.get<int>("b", 2, kNow + 122s, make).value() == 4);
  CHECK(*cache.get<int>("a", 2, kNow + 122s, make).value() == 6);
  CHECK(cache.counts().hits == 2);
  CHECK(cache.counts().misses == 6);
}

TEST_CASE("a failed build is passed on and not kept") {
  ReportCache cache;
  auto failing = []() -> storage::StoreResult<int> {
    return storage::StoreError{storage::StoreErrc::unavailable, "database is busy", ""};
  };
  CHECK_FALSE(cache.get<int>("a", 1, kNow, failing).ok());
  CHECK(*cache.get<int>("a", 1, kNow, [] { return storage::StoreResult<int>(7); }).value() == 7);
}

TEST_CASE("the same report twice is one build, and a new reading or a fleet change builds afresh") {
  ApiFixture f;
  ReportCache& cache = f.api().context().reports;
  const auto first = f.get("/v1/reports/winter?low_c=-30", "manager");
  REQUIRE(first.status == 200);
  const auto misses = cache.counts().misses;
  const auto second = f.get("/v1/reports/winter?low_c=-30", "manager");
  REQUIRE(second.status == 200);
  CHECK(second.body == first.body);
  CHECK(cache.counts().misses == misses);  // the body came from the cache
  CHECK(cache.counts().hits >= 1);

  // Another low, the CSV form and a depot-scoped caller are other entries.
  const auto colder = f.get("/v1/reports/winter?low_c=-40", "manager");
  CHECK(body_of(colder)["batteries"][0]["low_c"] == -40.0);
  const auto scoped = f.get("/v1/reports/winter?low_c=-30", "manager_harbour");
  REQUIRE(scoped.status == 200);
  const nlohmann::json scoped_body = body_of(scoped);
  REQUIRE(!scoped_body["batteries"].empty());
  for (const auto& b : scoped_body["batteries"]) CHECK(b["depot_name"] == "Harbour");

  // A new reading: NY-0001 had no reading, now it is judged on one.
  auto risk_of = [](const http::Response& r, const std::string& serial) -> nlohmann::json {
    const nlohmann::json body = body_of(r);
    for (const auto& b : body["batteries"])
      if (b["serial"] == serial) return b;
    return nullptr;
  };
  CHECK(risk_of(first, "NY-0001")["level"] == "no_data");
  REQUIRE(f.post("/v1/readings", good_reading("NY-0001", "cache-1"), "crew").status == 201);
  const auto after_reading = f.get("/v1/reports/winter?low_c=-30", "manager");
  CHECK(risk_of(after_reading, "NY-0001")["level"] != "no_data");
  CHECK(risk_of(after_reading, "NY-0001")["reading_at"].is_string());

  // A fleet change: a retired battery leaves the report.
  REQUIRE(f.post("/v1/batteries/NY-0002/retire", {{"reason", "case cracked"}}, "admin").status == 200);
  const auto after_retire = f.get("/v1/reports/winter?low_c=-30", "manager");
  CHECK(risk_of(after_reading, "NY-0002").is_object());
  CHECK(risk_of(after_retire, "NY-0002").is_null());
}

}  // namespace pbfleet::api
