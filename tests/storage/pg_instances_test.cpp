// Two PostgreSQL stores on one database, as two pbfleetd instances would
// hold them: what one writes the other sees at once, a reading_id raced
// through both is stored once, a revocation holds everywhere, pages stay
// stable while the other inserts, and an acknowledged batch survives its
// writer being killed.
#include "server/storage/pg_store.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <atomic>
#include <set>
#include <thread>

#include "fixture.hpp"
#include "server/storage/tokens.hpp"

namespace pbfleet::storage {
namespace {

using testing::at;
using testing::Fleet;
using testing::PostgresBackend;
using testing::reading;

// Fleet on one database plus a second store (the other instance).
struct TwoInstances {
  std::string uri = pbfleet::testing::shared_pg_cluster().fresh_database();
  std::unique_ptr<Store> a = PostgresBackend::open_uri(uri);
  std::unique_ptr<Store> b = PostgresBackend::open_uri(uri);
  Id battery = 0;
  TwoInstances() {
    const Id depot = a->create_depot({0, "North Yard", "Europe/Oslo", models::Celsius{-25}})->id;
    const Id vehicle = a->create_vehicle({0, "TR-104", depot, Engine::diesel, 7.7, std::nullopt})->id;
    battery = a->create_battery(testing::make_battery("NY-0001", vehicle), at(0))->id;
  }
};

}  // namespace

#define PG_TEST_CASE(name) \
  TEST_CASE_TEMPLATE(name, Backend, pbfleet::storage::testing::PostgresBackend)

PG_TEST_CASE("a spec changed through one instance is the spec the other stores reading facts under") {
  TwoInstances two;
  // A stores a reading: it now knows NY-0001's id and spec.
  const Battery before = two.a->get_battery("NY-0001").value();
  std::vector<std::vector<PreparedReading>> first{{prepare_reading(reading("s-1", "NY-0001", 1), spec_of(before))}};
  REQUIRE(two.a->append_reading_batches(std::move(first), at(2))->front().accepted());
  // B changes the spec.
  Battery changed = before;
  changed.full_charge_sg = models::SpecificGravity{1.300};
  REQUIRE(two.b->update_battery(changed).ok());
  // A reading prepared under the old spec, as a request checked just before
  // the change would be, with facts no model gives: A must work them out
  // under the new spec.
  const auto r = reading("s-2", "NY-0001", 3);
  std::vector<std::vector<PreparedReading>> second{{prepare_reading(r, spec_of(before))}};
  second[0][0].facts = ReadingFacts{999.0, 99.0};
  REQUIRE(two.a->append_reading_batches(std::move(second), at(4))->front().accepted());
  const ReadingFacts want = facts_of(spec_of(changed), point_of(r));
  REQUIRE(want.trusted_soc_pct);
  std::optional<BatterySummary> kept;
  REQUIRE(two.a->visit_summaries({}, [&](const Battery&, const BatterySummary& s) { kept = s; }).ok());
  REQUIRE(kept);
  REQUIRE(kept->trusted);
  CHECK(kept->trusted->soc_percent == doctest::Approx(*want.trusted_soc_pct).epsilon(1e-9));
}

PG_TEST_CASE("what one instance writes the other reads at once, history and reports alike") {
  TwoInstances two;
  CHECK(two.b->get_battery("NY-0001")->id == two.battery);
  REQUIRE(two.a->append_readings({reading("x-1", "NY-0001", 1), reading("x-2", "NY-0001", 2)}, at(3))
              ->accepted());
  CHECK(two.b->readings_for("NY-0001", std::nullopt, std::nullopt)->size() == 2);
  CHECK(two.b->readings_count().value() == 2);
  const auto last = two.b->last_readings({}, 5).value();
  REQUIRE(last.size() == 1);
  CHECK(last[0].readings.size() == 2);
  // A fleet change through B reaches A's battery look-up within the cache
  // lifetime (1 s); A's own change shows at once.
  CHECK(two.a->get_battery("NY-0001")->rated_cca_a.value == 800.0);  // now cached in A
  Battery changed = two.b->get_battery("NY-0001").value();
  changed.rated_cca_a = models::Amperes{650};
  REQUIRE(two.b->update_battery(changed).ok());
  const auto changed_at = std::chrono::steady_clock::now();
  while (two.a->get_battery("NY-0001")->rated_cca_a.value != 650.0 &&
         std::chrono::steady_clock::now() - changed_at < std::chrono::seconds{3})
    std::this_thread::sleep_for(std::chrono::milliseconds{20});
  CHECK(std::chrono::steady_clock::now() - changed_at <= kBatteryCacheTtl + std::chrono::milliseconds{300});
  CHECK(two.a->get_battery("NY-0001")->rated_cca_a.value == 650.0);
  changed.rated_cca_a = models::Amperes{700};
  REQUIRE(two.a->update_battery(changed).ok());
  CHECK(two.a->get_battery("NY-0001")->rated_cca_a.value == 700.0);
}

PG_TEST_CASE("one reading_id raced through two instances from 8 threads is stored once") {
  TwoInstances two;
  std::vector<std::thread> threads;
  std::vector<Id> ids(8, -1);
  std::atomic<int> stored{0}, replayed{0}, failed{0};
  for (int t = 0; t < 8; ++t) {
    threads.emplace_back([&, t] {
      Store& via = t % 2 == 0 ? *two.a : *two.b;
      const auto out = via.append_readings({reading("race-1", "NY-0001", 4)}, at(5));
      if (!out || !out->accepted()) {
        ++failed;
        return;
      }
      stored += static_cast<int>(out->stored);
      replayed += static_cast<int>(out->replayed_count);
      ids[static_cast<std::size_t>(t)] = out->readings[0].id;
    });
  }
  for (auto& t : threads) t.join();
  CHECK(failed == 0);
  CHECK(stored == 1);
  CHECK(replayed == 7);
  CHECK(std::set<Id>(ids.begin(), ids.end()).size() == 1);
  CHECK(two.a->readings_count().value() == 1);
  // Other content under the same id through the other instance: a conflict.
  auto other = reading("race-1", "NY-0001", 4);
  other.note = "different";
  const auto clash = two.b->append_readings({other}, at(6)).value();
  REQUIRE(clash.problems.size() == 1);
  CHECK(clash.problems[0].code == StoreErrc::conflict);
  CHECK(clash.problems[0].field == "reading_id");
}

PG_TEST_CASE("a token revoked through one instance is revoked for the other at once") {
  TwoInstances two;
  const auto hash = hash_token(new_raw_token());
  const auto token = two.a->create_token("crew", Role::crew, std::nullopt, hash, at(1)).value();
  CHECK_FALSE(two.b->find_token(hash)->revoked_at.has_value());
  REQUIRE(two.a->revoke_token(token.id, at(2)).ok());
  CHECK(two.b->find_token(hash)->revoked_at == at(2));
}

PG_TEST_CASE("reading pages through one instance stay whole while the other inserts") {
  TwoInstances two;
  std::vector<models::wire::ReadingInput> first;
  for (int i = 0; i < 60; ++i) first.push_back(reading("pre-" + std::to_string(i), "NY-0001", i));
  REQUIRE(two.a->append_readings(first, at(1))->accepted());
  std::atomic<bool> stop{false};
  std::thread writer([&] {
    for (int i = 0; !stop && i < 400; ++i)
      two.b->append_readings({reading("live-" + std::to_string(i), "NY-0001", i % 50)}, at(2));
  });
  std::set<std::string> seen;
  std::size_t pages = 0;
  PageRequest page{7, ""};
  do {
    const auto got = two.a->list_readings({}, page).value();
    Id last = 0;
    for (const auto& r : got.items) {
      CHECK(r.id > last);
      last = r.id;
      CHECK(seen.insert(r.reading_id).second);  // never twice
    }
    page.cursor = got.next_cursor;
    ++pages;
  } while (!page.cursor.empty() && pages < 500);
  stop = true;
  writer.join();
  for (int i = 0; i < 60; ++i) CHECK(seen.count("pre-" + std::to_string(i)) == 1);
  // Every id below the largest one seen was seen: ids follow commit order.
  const auto all = two.a->list_readings({}, {1000, ""}).value().items;
  std::size_t below = 0;
  for (const auto& r : all) below += seen.count(r.reading_id);
  CHECK(below == seen.size());
}

PG_TEST_CASE("an acknowledged batch survives its writer being killed right after") {
  const std::string uri = pbfleet::testing::shared_pg_cluster().fresh_database();
  PostgresBackend::open_uri(uri).reset();
  const pid_t child = ::fork();
  REQUIRE(child >= 0);
  if (child == 0) {
    auto store = std::move(open_postgres_store(uri)).value();
    store->create_depot({0, "Valley", "Europe/Oslo", models::Celsius{-18}});
    store->create_battery(testing::make_battery("VA-0001"), at(0));
    const bool ok = store->append_readings({reading("k1", "VA-0001", 1)}, at(1)).ok();
    ::kill(::getpid(), SIGKILL);  // no destructors, no clean disconnect
    ::_exit(ok ? 0 : 1);
  }
  int status = 0;
  ::waitpid(child, &status, 0);
  REQUIRE(WIFSIGNALED(status));
  auto store = PostgresBackend::open_uri(uri);
  const auto readings = store->readings_for("VA-0001", std::nullopt, std::nullopt);
  REQUIRE(readings.ok());
  CHECK(readings->size() == 1);
}

}  // namespace pbfleet::storage
