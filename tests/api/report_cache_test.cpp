// The report cache (server/api/services/report_cache.hpp): a report asked
// again with no new data comes from memory; a stored reading or a fleet
// change, the depot scope and the format each give a fresh answer.
#include "server/api/services/report_cache.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include <future>

#include "server/api/report_codec.hpp"
#include "server/api/services/reports.hpp"
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

namespace pbfleet::api {

// The sulfation bases kept between reports (services/trend_memo.hpp): a
// report equals one built from scratch, and only the batteries whose
// readings or spec changed are read again.
TEST_CASE("sulfation from kept bases equals a fresh build and rebuilds only what changed") {
  ApiFixture f;
  // Ten weekly readings per battery, the SG sagging on NY-0001.
  nlohmann::json batch = nlohmann::json::array();
  for (const char* serial : {"NY-0001", "NY-0002", "HB-0001"}) {
    for (int week = 0; week < 10; ++week) {
      auto r = good_reading(serial, std::string(serial) + "-w" + std::to_string(week), 60 * 24 * 7 * (10 - week));
      if (std::string(serial) == "NY-0001") r["cell_sg"] = nlohmann::json::array({1.20, 1.19, 1.20, 1.18, 1.20, 1.19});
      r["after_charge"] = week % 3 == 0;
      batch.push_back(r);
    }
  }
  REQUIRE(f.post("/v1/readings", batch, "crew").status == 201);
  TrendMemo& memo = f.api().context().trends;
  auto fresh_json = [&] {
    TrendMemo fresh;
    auto report = build_sulfation_report(f.store(), fresh, std::nullopt, f.clock().now(), {});
    REQUIRE(report.ok());
    return body_of(json_text_response(200, sulfation_json(*report)));
  };

  const auto first = f.get("/v1/reports/sulfation", "manager");
  REQUIRE(first.status == 200);
  CHECK(memo.counts().built == 3);
  CHECK(body_of(first) == fresh_json());

  // An older reading for one battery, out of order: only it is rebuilt.
  REQUIRE(f.post("/v1/readings", good_reading("NY-0002", "late-1", 60 * 24 * 100), "crew").status == 201);
  f.clock().at += std::chrono::hours{30};  // and a day later: the exposure moves on
  const auto second = f.get("/v1/reports/sulfation", "manager");
  CHECK(memo.counts().built == 4);
  CHECK(memo.counts().kept >= 2);
  CHECK(body_of(second) == fresh_json());

  // A spec change rebuilds that battery.
  REQUIRE(f.call("PATCH", "/v1/batteries/HB-0001", "admin", R"({"full_charge_sg": 1.280})").status == 200);
  const auto third = f.get("/v1/reports/replacements", "manager");
  REQUIRE(third.status == 200);
  CHECK(memo.counts().built == 5);
  CHECK(body_of(f.get("/v1/reports/sulfation", "manager")) == fresh_json());
}

}  // namespace pbfleet::api

namespace pbfleet::api {

TEST_CASE("a report answer carries an ETag, and asking with it gives 304 until the data changes") {
  ApiFixture f;
  auto get = [&](const std::string& target, const std::string& etag) {
    http::Request r;
    r.method = "GET";
    r.target = target;
    r.headers["authorization"] = "Bearer " + f.token("manager");
    if (!etag.empty()) r.headers["if-none-match"] = etag;
    return f.api().handle(r);
  };
  auto etag_of = [](const http::Response& r) {
    for (const auto& [name, value] : r.headers)
      if (name == "ETag") return value;
    return std::string();
  };
  const auto first = get("/v1/reports/winter", "");
  REQUIRE(first.status == 200);
  const std::string tag = etag_of(first);
  REQUIRE(tag.size() == 18);
  const auto again = get("/v1/reports/winter", tag);
  CHECK(again.status == 304);
  CHECK(again.body.empty());
  CHECK(etag_of(again) == tag);
  // Another report or parameter has its own tag.
  CHECK(get("/v1/reports/winter?low_c=-40", tag).status == 200);
  CHECK(get("/v1/reports/overdue", tag).status == 200);
  // New data: the old tag no longer matches.
  REQUIRE(f.post("/v1/readings", good_reading("NY-0001", "etag-1"), "crew").status == 201);
  const auto after = get("/v1/reports/winter", tag);
  CHECK(after.status == 200);
  CHECK(etag_of(after) != tag);
}

}  // namespace pbfleet::api

namespace pbfleet::api {

TEST_CASE("a cached report is sent as the cached text itself, not a copy per answer") {
  ApiFixture f;
  REQUIRE(f.post("/v1/readings", good_reading("NY-0001", "share-1"), "crew").status == 201);
  // Through dispatch, as the transport calls it.
  auto ask = [&](const std::string& accept) {
    http::Request r;
    r.method = "GET";
    r.target = "/v1/reports/winter";
    r.peer = "127.0.0.1:40000";
    r.headers["authorization"] = "Bearer " + f.token("manager");
    if (!accept.empty()) r.headers["accept"] = accept;
    std::promise<http::Response> answer;
    f.api().dispatch(std::move(r), [&](http::Response res) { answer.set_value(std::move(res)); });
    return answer.get_future().get();
  };
  const http::Response first = ask("");
  const http::Response second = ask("");
  REQUIRE(first.status == 200);
  REQUIRE(first.shared_body);
  CHECK(first.shared_body == second.shared_body);  // one text in memory, sent twice
  CHECK(first.body.empty());
  CHECK_FALSE(nlohmann::json::parse(first.body_text())["batteries"].empty());
  // The CSV form is its own text, shared the same way.
  const http::Response csv = ask("text/csv");
  REQUIRE(csv.shared_body);
  CHECK(csv.shared_body != first.shared_body);
  CHECK(csv.content_type.starts_with("text/csv"));
  // handle() (tests, tools) gives the same answer with the body in `body`.
  const http::Response handled = f.get("/v1/reports/winter", "manager");
  CHECK_FALSE(handled.shared_body);
  CHECK(handled.body == *first.shared_body);
}

}  // namespace pbfleet::api
