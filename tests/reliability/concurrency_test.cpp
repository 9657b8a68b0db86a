// RELIABILITY-TESTS row 15, bounded for CI: 32 concurrent keep-alive
// clients on loopback for 15 s, 24 logging readings (single and batches of
// 5) and 8 reading lists, histories and reports. Pass: no 5xx, no transport
// error, every acknowledged reading stored exactly once and nothing else.
// Latency percentiles are printed as figures, not asserted (timing targets
// belong to the benchmarks).
#include <doctest/doctest.h>

#include <algorithm>
#include <atomic>
#include <mutex>
#include <set>
#include <thread>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {
namespace {

using nlohmann::json;
using Steady = std::chrono::steady_clock;

constexpr int kWriters = 24;
constexpr int kReaders = 8;
constexpr auto kDuration = std::chrono::seconds{15};

struct Tally {
  std::mutex mutex;
  std::vector<double> latency_ms;
  std::set<std::string> acknowledged;
  std::map<int, int> statuses;
  std::vector<std::string> failures;  // first few unexpected answers

  void note(int status, double ms, const std::string& body) {
    std::lock_guard lock(mutex);
    ++statuses[status];
    latency_ms.push_back(ms);
    if ((status >= 500 || status == 0) && failures.size() < 5) failures.push_back(body.substr(0, 200));
  }
};

// One timed request; status 0 stands for a transport error.
HttpReply timed(HttpClient& client, Tally& tally, const std::function<HttpReply()>& call) {
  const auto start = Steady::now();
  HttpReply reply;
  try {
    reply = call();
  } catch (const TransportError& e) {
    reply.status = 0;
    reply.body = e.what();
    client.disconnect();
  }
  tally.note(reply.status, std::chrono::duration<double, std::milli>(Steady::now() - start).count(),
             reply.body);
  return reply;
}

void writer(const LiveFleet& fleet, int number, Tally& tally, Steady::time_point until) {
  auto client = fleet.client(number % 2 ? "crew" : "technician");
  std::vector<std::string> serials = fleet.serials(number % 2 ? "North Yard" : "Harbour");
  for (int n = 0; Steady::now() < until; ++n) {
    const int size = n % 3 == 0 ? 1 : 5;
    json items = json::array();
    std::vector<std::string> ids;
    for (int i = 0; i < size; ++i) {
      ids.push_back("w" + std::to_string(number) + "-" + std::to_string(n) + "-" + std::to_string(i));
      items.push_back(good_reading(serials[static_cast<std::size_t>(n + i) % serials.size()],
                                   ids.back(), n));
    }
    const json body = size == 1 ? items[0] : items;
    auto reply = timed(client, tally, [&] { return client.post("/v1/readings", body); });
    if (reply.status == 201) {
      std::lock_guard lock(tally.mutex);
      tally.acknowledged.insert(ids.begin(), ids.end());
    }
  }
}

void reader(const LiveFleet& fleet, int number, Tally& tally, Steady::time_point until) {
  auto client = fleet.client(number % 2 ? "manager" : "technician");
  const auto& serials = fleet.serials("North Yard");
  const std::vector<std::string> targets{
      "/v1/batteries/" + serials[0] + "/history", "/v1/readings?limit=50&serial=" + serials[1],
      "/v1/batteries", "/v1/reports/overdue?days=10",
      number % 2 ? "/v1/reports/winter?low_c=-25" : "/v1/depots"};
  for (std::size_t n = 0; Steady::now() < until; ++n)
    timed(client, tally, [&] { return client.get(targets[n % targets.size()]); });
}

double percentile(std::vector<double> values, double p) {
  if (values.empty()) return 0;
  std::sort(values.begin(), values.end());
  return values[std::min(values.size() - 1, static_cast<std::size_t>(p * values.size()))];
}

}  // namespace

TEST_CASE("32 concurrent clients logging and reading for 15 s get no 5xx and lose no reading") {
  LiveFleet fleet({.batteries_per_depot = 6, .extra_args = {}, .log_level = "warn", .database = {}});
  Tally tally;
  const auto until = Steady::now() + kDuration;
  std::vector<std::thread> threads;
  for (int i = 0; i < kWriters; ++i)
    threads.emplace_back([&, i] { writer(fleet, i, tally, until); });
  for (int i = 0; i < kReaders; ++i)
    threads.emplace_back([&, i] { reader(fleet, i, tally, until); });
  for (auto& t : threads) t.join();

  std::string statuses;
  for (const auto& [status, count] : tally.statuses)
    statuses += " " + std::to_string(status) + "x" + std::to_string(count);
  MESSAGE("requests " << tally.latency_ms.size() << ", statuses" << statuses << "; latency ms p50 "
                      << percentile(tally.latency_ms, 0.50) << ", p99 "
                      << percentile(tally.latency_ms, 0.99) << ", max "
                      << percentile(tally.latency_ms, 1.0) << "; readings acknowledged "
                      << tally.acknowledged.size());
  for (const auto& f : tally.failures) MESSAGE("unexpected answer: " << f);
  for (const auto& [status, count] : tally.statuses) {
    CHECK_MESSAGE(status != 0, count << " transport errors");
    CHECK_MESSAGE(status < 500, count << " answers with status " << status);
    CHECK_MESSAGE((status == 200 || status == 201), count << " answers with status " << status);
  }
  CHECK(tally.acknowledged.size() > 100);  // the load really ran

  REQUIRE(fleet.server().terminate() == 0);
  SqliteProbe db(fleet.db());
  CHECK(db.integrity() == "ok");
  std::set<std::string> stored;
  for (auto& id : db.column("SELECT reading_id FROM readings")) stored.insert(std::move(id));
  CHECK(db.integer("SELECT count(*) FROM readings") == static_cast<std::int64_t>(stored.size()));
  CHECK(stored == tally.acknowledged);
}

}  // namespace pbfleet::testing
