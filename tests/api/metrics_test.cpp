#include "server/api/metrics.hpp"

#include <doctest/doctest.h>

namespace pbfleet::api {

using std::chrono::microseconds;

TEST_CASE("request counters count by route and status") {
  Metrics m;
  for (int i = 0; i < 3; ++i) m.record_request("/healthz", 200, microseconds(100));
  m.record_request("/v1/readings", 422, microseconds(100));
  const auto text = m.render(-1);
  CHECK(text.find("pbfleet_http_requests_total{route=\"/healthz\",status=\"200\"} 3\n") !=
        std::string::npos);
  CHECK(text.find("pbfleet_http_requests_total{route=\"/v1/readings\",status=\"422\"} 1\n") !=
        std::string::npos);
}

TEST_CASE("histogram buckets are cumulative and end with +Inf, sum and count") {
  Metrics m;
  m.record_request("/r", 200, microseconds(300));     // <= 0.0005
  m.record_request("/r", 200, microseconds(2000));    // <= 0.0025
  m.record_request("/r", 200, std::chrono::seconds(5));  // only +Inf
  const auto text = m.render(-1);
  const std::string p = "pbfleet_http_request_duration_seconds_bucket{route=\"/r\",le=";
  CHECK(text.find(p + "\"0.0005\"} 1\n") != std::string::npos);
  CHECK(text.find(p + "\"0.001\"} 1\n") != std::string::npos);
  CHECK(text.find(p + "\"0.0025\"} 2\n") != std::string::npos);
  CHECK(text.find(p + "\"2.5\"} 2\n") != std::string::npos);
  CHECK(text.find(p + "\"+Inf\"} 3\n") != std::string::npos);
  CHECK(text.find("pbfleet_http_request_duration_seconds_count{route=\"/r\"} 3\n") !=
        std::string::npos);
  CHECK(text.find("pbfleet_http_request_duration_seconds_sum{route=\"/r\"} 5.0023\n") !=
        std::string::npos);
}

TEST_CASE("exposition has HELP and TYPE lines and ends with a newline") {
  Metrics m;
  m.add_readings_stored(7);
  const auto text = m.render(42);
  CHECK(text.find("# TYPE pbfleet_http_requests_total counter\n") != std::string::npos);
  CHECK(text.find("# TYPE pbfleet_http_request_duration_seconds histogram\n") != std::string::npos);
  CHECK(text.find("pbfleet_readings_stored_total 7\n") != std::string::npos);
  CHECK(text.find("# TYPE pbfleet_readings gauge\npbfleet_readings 42\n") != std::string::npos);
  REQUIRE_FALSE(text.empty());
  CHECK(text.back() == '\n');
}

TEST_CASE("label values escape quotes and backslashes") {
  Metrics m;
  m.record_request("a\"b\\c", 200, microseconds(1));
  CHECK(m.render(-1).find("route=\"a\\\"b\\\\c\"") != std::string::npos);
}

}  // namespace pbfleet::api
