// The group-commit writer: every batch acknowledged exactly once, after its
// commit, in submission order; a slow acknowledgement does not hold up the
// next commit; stopping stores and acknowledges everything queued.
#include "server/api/services/reading_writer.hpp"

#include <doctest/doctest.h>

#include <atomic>
#include <chrono>
#include <mutex>
#include <optional>
#include <thread>
#include <vector>

#include "tests/api/fixture.hpp"

namespace pbfleet::api::testing {
namespace {

using namespace std::chrono_literals;

ReadingWriter::Batch one_reading(const std::string& id) {
  models::wire::ReadingInput r;
  r.reading_id = id;
  r.serial = "NY-0001";
  r.taken_at = test_now() - std::chrono::hours{1};
  r.ocv = models::Volts{12.55};
  r.rest = models::Hours{6.0};
  r.logged_by = "writer test";
  r.source = "round";
  return storage::prepare_readings({r});
}

std::size_t stored_count(storage::Store& store) {
  auto all = store.readings_for("NY-0001", std::nullopt, std::nullopt);
  CHECK(all.ok());  // CHECK, not REQUIRE: also called on the acknowledging thread
  return all.ok() ? all.value().size() : 0;
}

TEST_CASE("each batch is acknowledged once, after its commit, in submission order") {
  ApiFixture f;
  std::mutex mutex;
  std::vector<int> order;
  std::vector<std::size_t> visible_at_ack;
  constexpr int kBatches = 40;
  {
    ReadingWriter writer(f.store(), f.clock());
    for (int i = 0; i < kBatches; ++i) {
      REQUIRE(writer.submit(one_reading("w-" + std::to_string(i)),
                            [&, i](storage::StoreResult<storage::AppendOutcome> result) {
                              CHECK(result.ok());
                              CHECK((result.ok() && result.value().stored == 1));
                              // Committed before acknowledged: a reader sees the row.
                              const std::size_t seen = stored_count(f.store());
                              std::lock_guard lock(mutex);
                              order.push_back(i);
                              visible_at_ack.push_back(seen);
                            }));
    }
  }  // the destructor stores and acknowledges what is queued
  REQUIRE(order.size() == kBatches);
  for (int i = 0; i < kBatches; ++i) {
    CHECK(order[i] == i);
    CHECK(visible_at_ack[i] >= static_cast<std::size_t>(i + 1));
  }
  CHECK(stored_count(f.store()) == kBatches);
}

TEST_CASE("a slow acknowledgement does not hold up the next commit") {
  ApiFixture f;
  std::atomic<bool> second_committed_meanwhile{false};
  std::atomic<int> acknowledged{0};
  {
    ReadingWriter writer(f.store(), f.clock());
    REQUIRE(writer.submit(one_reading("slow-1"), [&](auto result) {
      CHECK(result.ok());
      // Hold this acknowledgement until the writer has committed the next
      // batch (or give up after 10 s: then the writer was waiting on us).
      const auto deadline = std::chrono::steady_clock::now() + 10s;
      while (std::chrono::steady_clock::now() < deadline && writer.commits() < 2)
        std::this_thread::sleep_for(1ms);
      second_committed_meanwhile = writer.commits() >= 2;
      ++acknowledged;
    }));
    // Submitted once the first commit is done, so it is a commit of its own.
    while (writer.commits() < 1) std::this_thread::sleep_for(1ms);
    REQUIRE(writer.submit(one_reading("slow-2"), [&](auto result) {
      CHECK(result.ok());
      ++acknowledged;
    }));
  }
  CHECK(second_committed_meanwhile);
  CHECK(acknowledged == 2);
  CHECK(stored_count(f.store()) == 2);
}

TEST_CASE("preparers: one fewer than the cores by default, at least one, or as configured") {
  CHECK(preparers_for({}, 2) == 1);
  CHECK(preparers_for({}, 8) == 7);
  CHECK(preparers_for({}, 1) == 1);
  CHECK(preparers_for({}, 0) == 1);  // hardware_concurrency() may not know
  WriterOptions three;
  three.preparers = 3;
  CHECK(preparers_for(three, 2) == 3);
}

TEST_CASE("no more requests prepare at once than the writer allows") {
  ApiFixture f;
  WriterOptions options;
  options.preparers = 2;
  ReadingWriter writer(f.store(), f.clock(), options);
  std::atomic<int> inside{0}, most{0};
  std::vector<std::thread> requests;
  for (int i = 0; i < 6; ++i) {
    requests.emplace_back([&] {
      const ReadingWriter::PrepareSlot slot(writer);
      const int now = ++inside;
      int seen = most.load();
      while (now > seen && !most.compare_exchange_weak(seen, now)) {
      }
      // Stay until a second request is inside too (or 5 s passed), and a
      // little longer, so a third would get in here if the gate let it.
      const auto deadline = std::chrono::steady_clock::now() + 5s;
      while (most < 2 && std::chrono::steady_clock::now() < deadline) std::this_thread::sleep_for(1ms);
      std::this_thread::sleep_for(10ms);
      --inside;
    });
  }
  for (auto& t : requests) t.join();
  CHECK(most == 2);  // two at once, never three
}

}  // namespace
}  // namespace pbfleet::api::testing
