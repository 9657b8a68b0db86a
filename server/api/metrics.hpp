// Service metrics, written by hand in the Prometheus text exposition
// format 0.0.4 (no C++ client library is packaged for Debian).
//
// Request counts by route and status, a request latency histogram by route,
// readings stored (counter) and readings in the database (gauge).
// Thread safe; recording is a short mutex hold.
#pragma once

#include <array>
#include <chrono>
#include <cstdint>
#include <map>
#include <mutex>
#include <string>
#include <utility>

namespace pbfleet::api {

class Metrics {
 public:
  // Upper bounds of the latency buckets, in seconds (+Inf is implied).
  static constexpr std::array<double, 12> kBucketsS{0.0005, 0.001, 0.0025, 0.005, 0.01, 0.025,
                                                    0.05,   0.1,   0.25,   0.5,   1.0,  2.5};

  // `route` is the route pattern ("/v1/batteries/{serial}"), never the raw path,
  // so the label set stays bounded.
  void record_request(const std::string& route, int status, std::chrono::nanoseconds duration);
  void add_readings_stored(std::uint64_t count);
  // Renders every family; `readings_in_db` is the current count (or < 0 if unknown).
  [[nodiscard]] std::string render(std::int64_t readings_in_db) const;

 private:
  struct Histogram {
    std::array<std::uint64_t, kBucketsS.size()> buckets{};  // non-cumulative
    std::uint64_t count = 0;
    double sum_s = 0.0;
  };
  mutable std::mutex mutex_;
  std::map<std::pair<std::string, int>, std::uint64_t> requests_;  // (route, status) -> count
  std::map<std::string, Histogram> latency_;                       // route -> histogram
  std::uint64_t readings_stored_ = 0;
};

}  // namespace pbfleet::api
