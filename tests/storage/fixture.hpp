// Shared fixtures for the storage tests: a temporary folder removed at the
// end, a freshly opened store, and a small fictional fleet (Fjellvik
// Transport, North Yard depot).
//
// Backends: STORE_TEST_CASE registers a case once per store (doctest
// TEST_CASE_TEMPLATE over SqliteBackend and PostgresBackend; the names end
// in <sqlite> and <postgres>). Fleet<Backend> opens a fresh SQLite file or a
// fresh database in this process's throwaway PostgreSQL cluster
// (tests/support/pg_cluster.hpp). Cases about SQLite files and pragmas stay
// plain TEST_CASEs on Fleet<> (SQLite).
#pragma once

#include <chrono>
#include <cstdlib>
#include <filesystem>
#include <memory>
#include <string>

#include <doctest/doctest.h>

#include "server/storage/pg_store.hpp"
#include "server/storage/sqlite_store.hpp"
#include "server/storage/store.hpp"
#include "tests/support/pg_cluster.hpp"

namespace pbfleet::storage::testing {

using namespace std::chrono_literals;

class TempDir {
 public:
  TempDir() {
    std::string pattern =
        (std::filesystem::temp_directory_path() / "pbfleet-storage-XXXXXX").string();
    REQUIRE(::mkdtemp(pattern.data()) != nullptr);
    path_ = pattern;
  }
  ~TempDir() {
    std::error_code ignored;
    std::filesystem::remove_all(path_, ignored);
  }
  TempDir(const TempDir&) = delete;
  TempDir& operator=(const TempDir&) = delete;
  const std::filesystem::path& path() const { return path_; }
  std::filesystem::path file(const char* name) const { return path_ / name; }

 private:
  std::filesystem::path path_;
};

inline std::chrono::sys_seconds at(int day, int hour = 7) {
  using namespace std::chrono;
  return sys_days{year{2026} / November / 1} + days{day} + hours{hour};
}

inline std::unique_ptr<Store> open_store(const std::filesystem::path& file,
                                         std::uint64_t max_size_bytes = 0) {
  SqliteOptions options;
  options.file = file;
  options.max_size_bytes = max_size_bytes;
  auto store = open_sqlite_store(options);
  REQUIRE_MESSAGE(store.ok(), (store.ok() ? "" : store.error().detail));
  return std::move(store).value();
}

// A 12 V flooded battery with plausible ratings.
inline Battery make_battery(std::string serial, std::optional<Id> vehicle_id = std::nullopt) {
  Battery b;
  b.serial = std::move(serial);
  b.chemistry = models::Chemistry::flooded;
  b.nominal_v = models::Volts{12};
  b.cells = 6;
  b.rated_cca_a = models::Amperes{800};
  b.reserve_capacity_min = 160;
  b.full_charge_sg = models::SpecificGravity{1.265};
  b.installed_on = std::chrono::sys_days{std::chrono::year{2023} / 10 / 2};
  b.vehicle_id = vehicle_id;
  return b;
}

struct SqliteBackend {
  static constexpr bool kPostgres = false;
  static std::unique_ptr<Store> open(const TempDir& dir) { return open_store(dir.file("fleet.db")); }
  // The same database again (a restart).
  static std::unique_ptr<Store> reopen(const TempDir& dir) { return open(dir); }
};

struct PostgresBackend {
  static constexpr bool kPostgres = true;
  // A fresh database in this process's cluster.
  static std::unique_ptr<Store> open(const TempDir&) {
    last_uri = pbfleet::testing::shared_pg_cluster().fresh_database();
    return open_uri(last_uri);
  }
  // The database the last open() made, again (a restart).
  static std::unique_ptr<Store> reopen(const TempDir&) { return open_uri(last_uri); }
  static inline std::string last_uri;
  static std::unique_ptr<Store> open_uri(const std::string& uri) {
    auto store = open_postgres_store(uri);
    REQUIRE_MESSAGE(store.ok(), (store.ok() ? "" : store.error().detail));
    return std::move(store).value();
  }
};

// A temporary database with one depot, one vehicle and one battery
// (serial "NY-0001", fitted).
template <class Backend = SqliteBackend>
struct Fleet {
  TempDir dir;
  std::unique_ptr<Store> store = Backend::open(dir);
  Depot depot;
  Vehicle vehicle;
  Battery battery;

  Fleet() {
    depot = store->create_depot({0, "North Yard", "Europe/Oslo", models::Celsius{-25}}).value();
    vehicle =
        store->create_vehicle({0, "TR-104", depot.id, Engine::diesel, 7.7, std::nullopt}).value();
    battery = store->create_battery(make_battery("NY-0001", vehicle.id), at(0)).value();
  }

  static Battery make_battery(std::string serial, std::optional<Id> vehicle_id = std::nullopt) {
    return testing::make_battery(std::move(serial), vehicle_id);
  }
};

// Batches for Store::append_reading_batches, prepared as the API
// prepares them but without specs (the store works the facts out).
inline std::vector<std::vector<PreparedReading>> prepared(
    const std::vector<std::vector<models::wire::ReadingInput>>& batches) {
  std::vector<std::vector<PreparedReading>> out;
  for (const auto& b : batches) out.push_back(prepare_readings(b));
  return out;
}

// A plausible weekly reading (values are illustrative, not checked).
inline models::wire::ReadingInput reading(std::string id, std::string serial, int day) {
  models::wire::ReadingInput r;
  r.reading_id = std::move(id);
  r.serial = std::move(serial);
  r.taken_at = at(day);
  r.ocv = models::Volts{12.62};
  for (double sg : {1.265, 1.262, 1.260, 1.264, 1.258, 1.263}) {
    r.cell_sg.push_back(models::SpecificGravity{sg});
  }
  r.electrolyte = models::wire::EnteredTemperature{models::Celsius{5}, models::wire::TempUnit::c};
  r.rest = models::Hours{12};
  r.logged_by = "crew-a";
  r.source = "round";
  return r;
}

}  // namespace pbfleet::storage::testing

TYPE_TO_STRING_AS("sqlite", pbfleet::storage::testing::SqliteBackend);
TYPE_TO_STRING_AS("postgres", pbfleet::storage::testing::PostgresBackend);

// A storage case run once per backend; the body names the backend `Backend`.
#define STORE_TEST_CASE(name)                                                   \
  TEST_CASE_TEMPLATE(name, Backend, pbfleet::storage::testing::SqliteBackend, \
                     pbfleet::storage::testing::PostgresBackend)
