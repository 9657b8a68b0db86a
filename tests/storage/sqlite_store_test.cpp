#include "server/storage/sqlite_store.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <atomic>
#include <thread>

#include "fixture.hpp"
#include "server/storage/sqlite_db.hpp"

namespace pbfleet::storage {
namespace {

using testing::at;
using testing::Fleet;
using testing::reading;
using testing::TempDir;

}  // namespace

TEST_CASE("the store runs with WAL, synchronous FULL, foreign keys and a busy timeout") {
  Fleet f;
  const auto s = f.store->durability();
  REQUIRE(s.ok());
  CHECK(s->journal_mode == "wal");
  CHECK(s->synchronous == 2);  // FULL
  CHECK(s->foreign_keys);
  CHECK(s->busy_timeout_ms == 5000);
  CHECK(s->schema_version == known_schema_version());
}

TEST_CASE("a backup is a consistent copy that passes integrity_check and opens as a store") {
  Fleet f;
  REQUIRE(
      f.store->append_readings({reading("b1", "NY-0001", 1), reading("b2", "NY-0001", 8)}, at(9))
          .ok());
  const auto target = f.dir.file("backup.db");
  const auto report = f.store->backup_to(target);
  REQUIRE_MESSAGE(report.ok(), (report.ok() ? "" : report.error().detail));
  CHECK(report->integrity == "ok");
  CHECK(report->bytes == std::filesystem::file_size(target));

  auto restored = testing::open_store(target);
  CHECK(restored->readings_count().value() == 2);
  CHECK(restored->get_battery("NY-0001").ok());
}

TEST_CASE("a backup never overwrites an existing file") {
  Fleet f;
  const auto target = f.dir.file("taken.db");
  REQUIRE(f.store->backup_to(target).ok());
  const auto again = f.store->backup_to(target);
  REQUIRE_FALSE(again.ok());
  CHECK(again.error().code == StoreErrc::conflict);
}

TEST_CASE("a backup taken while writers run holds whole batches only") {
  Fleet f;
  std::atomic<bool> stop{false};
  std::thread writer([&] {
    for (int b = 0; !stop && b < 400; ++b) {
      std::vector<models::wire::ReadingInput> batch;
      for (int i = 0; i < 10; ++i) {
        batch.push_back(reading("w" + std::to_string(b) + "-" + std::to_string(i), "NY-0001", b));
      }
      REQUIRE(f.store->append_readings(batch, at(1)).ok());
    }
  });
  std::this_thread::sleep_for(std::chrono::milliseconds(50));
  const auto report = f.store->backup_to(f.dir.file("live.db"));
  stop = true;
  writer.join();
  REQUIRE(report.ok());
  CHECK(report->integrity == "ok");
  auto copy = testing::open_store(f.dir.file("live.db"));
  const auto count = copy->readings_count().value();
  CHECK(count % 10 == 0);
  // The counter agrees with the rows actually present.
  sqlite::Db db(f.dir.file("live.db"), sqlite::Db::Mode::read_only);
  CHECK(db.query_int("SELECT count(*) FROM readings") == count);
}

TEST_CASE("a full database refuses the batch whole, keeps serving reads and accepts small writes") {
  TempDir dir;
  // A cap just above the empty schema: a few hundred readings fit, not thousands.
  auto store = testing::open_store(dir.file("small.db"), 160 * 1024);
  REQUIRE(store->create_depot({0, "Ridge Pass", "Europe/Oslo", models::Celsius{-30}}).ok());
  REQUIRE(store->create_battery(testing::make_battery("RP-0001"), at(0)).ok());

  std::vector<models::wire::ReadingInput> huge;
  for (int i = 0; i < 5000; ++i) {
    auto r = reading("big-" + std::to_string(i), "RP-0001", i % 300);
    r.note = std::string(200, 'n');
    huge.push_back(r);
  }
  const auto refused = store->append_readings(huge, at(1));
  REQUIRE_FALSE(refused.ok());
  CHECK(refused.error().code == StoreErrc::disk_full);
  CHECK(store->readings_count().value() == 0);
  CHECK(store->get_battery("RP-0001").ok());

  const auto small = store->append_readings({reading("small-1", "RP-0001", 1)}, at(2));
  REQUIRE(small.ok());
  CHECK(store->readings_count().value() == 1);
}

STORE_TEST_CASE("readers and a writer work concurrently without busy errors") {
  Fleet<Backend> f;
  std::atomic<int> failures{0};
  std::vector<std::thread> threads;
  threads.emplace_back([&] {
    for (int i = 0; i < 200; ++i) {
      if (!f.store->append_readings({reading("c" + std::to_string(i), "NY-0001", i % 30)}, at(1))
               .ok()) {
        ++failures;
      }
    }
  });
  for (int t = 0; t < 3; ++t) {
    threads.emplace_back([&] {
      for (int i = 0; i < 200; ++i) {
        if (!f.store->readings_for("NY-0001", std::nullopt, std::nullopt).ok()) ++failures;
        if (!f.store->readings_count().ok()) ++failures;
      }
    });
  }
  for (auto& t : threads) t.join();
  CHECK(failures == 0);
  CHECK(f.store->readings_count().value() == 200);
}

TEST_CASE("ping answers while the database file is usable and fails once it is gone") {
  Fleet f;
  CHECK(f.store->ping().ok());
  std::filesystem::rename(f.dir.file("fleet.db"), f.dir.file("moved.db"));
  const auto gone = f.store->ping();
  REQUIRE_FALSE(gone.ok());
  CHECK(gone.error().code == StoreErrc::unavailable);
  std::filesystem::rename(f.dir.file("moved.db"), f.dir.file("fleet.db"));
  CHECK(f.store->ping().ok());
}

TEST_CASE("a read-only store serves reads and refuses writes as unavailable") {
  Fleet f;
  REQUIRE(f.store->append_readings({reading("ro-1", "NY-0001", 1)}, at(2)).ok());
  SqliteOptions options;
  options.file = f.dir.file("fleet.db");
  options.read_only = true;
  auto ro = std::move(open_sqlite_store(options)).value();
  CHECK(ro->readings_count().value() == 1);
  CHECK(ro->get_battery("NY-0001").ok());
  const auto refused = ro->append_readings({reading("ro-2", "NY-0001", 2)}, at(3));
  REQUIRE_FALSE(refused.ok());
  CHECK(refused.error().code == StoreErrc::unavailable);
  CHECK(f.store->readings_count().value() == 1);
}

TEST_CASE("more concurrent readers than pooled connections wait their turn and all succeed") {
  TempDir dir;
  SqliteOptions options;
  options.file = dir.file("pool.db");
  options.max_readers = 1;
  auto store = std::move(open_sqlite_store(options)).value();
  REQUIRE(store->create_depot({0, "Valley", "Europe/Oslo", models::Celsius{-18}}).ok());
  std::atomic<int> ok{0};
  std::vector<std::thread> threads;
  for (int t = 0; t < 4; ++t) {
    threads.emplace_back([&] {
      for (int i = 0; i < 50; ++i) ok += store->list_depots({}).ok() ? 1 : 0;
    });
  }
  for (auto& t : threads) t.join();
  CHECK(ok == 200);
}

TEST_CASE("an acknowledged batch survives the process being killed right after") {
  TempDir dir;
  const auto file = dir.file("killed.db");
  testing::open_store(file).reset();
  const pid_t child = ::fork();
  REQUIRE(child >= 0);
  if (child == 0) {
    SqliteOptions options;
    options.file = file;
    auto store = std::move(open_sqlite_store(options)).value();
    store->create_depot({0, "Valley", "Europe/Oslo", models::Celsius{-18}});
    store->create_battery(testing::make_battery("VA-0001"), at(0));
    const auto ok = store->append_readings({reading("k1", "VA-0001", 1)}, at(1)).ok();
    ::kill(::getpid(), SIGKILL);  // no destructors, no checkpoint
    ::_exit(ok ? 0 : 1);
  }
  int status = 0;
  ::waitpid(child, &status, 0);
  REQUIRE(WIFSIGNALED(status));
  auto store = testing::open_store(file);
  const auto readings = store->readings_for("VA-0001", std::nullopt, std::nullopt);
  REQUIRE(readings.ok());
  REQUIRE(readings->size() == 1);
  CHECK(readings->front().reading_id == "k1");
}

}  // namespace pbfleet::storage
