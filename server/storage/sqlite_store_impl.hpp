// SqliteStore: the Store on SQLite (see sqlite_store.hpp for the durability
// and threading model). Internal; callers use open_sqlite_store().
//
// The member functions are split by aggregate: sqlite_store.cpp (opening,
// connections, operations), sqlite_fleet.cpp (depots, vehicles, batteries),
// sqlite_readings.cpp, sqlite_tokens.cpp.
#pragma once

#include <atomic>
#include <condition_variable>
#include <memory>
#include <string>
#include <unordered_map>
#include <mutex>
#include <type_traits>
#include <vector>

#include "server/storage/sqlite_db.hpp"
#include "server/storage/sqlite_store.hpp"

namespace pbfleet::storage::sqlite {

class SqliteStore final : public Store {
 public:
  // Opens the writer, sets and verifies the pragmas, migrates. Throws DbError.
  explicit SqliteStore(SqliteOptions options);
  ~SqliteStore() override;

  StoreResult<Depot> create_depot(const Depot& depot) override;
  StoreResult<Depot> get_depot(Id id) override;
  StoreResult<Page<Depot>> list_depots(const PageRequest& page) override;
  StoreResult<Depot> update_depot(const Depot& depot) override;

  StoreResult<Vehicle> create_vehicle(const Vehicle& vehicle) override;
  StoreResult<Vehicle> get_vehicle(Id id) override;
  StoreResult<Page<Vehicle>> list_vehicles(const VehicleFilter& filter,
                                           const PageRequest& page) override;
  StoreResult<Vehicle> update_vehicle(const Vehicle& vehicle) override;

  StoreResult<Battery> create_battery(const Battery& battery, std::chrono::sys_seconds at) override;
  StoreResult<Battery> get_battery(std::string_view serial) override;
  StoreResult<Page<Battery>> list_batteries(const BatteryFilter& filter,
                                            const PageRequest& page) override;
  StoreResult<Battery> update_battery(const Battery& battery) override;
  StoreResult<Battery> fit_battery(std::string_view serial, Id vehicle_id,
                                   std::chrono::sys_seconds at) override;
  StoreResult<Battery> retire_battery(std::string_view serial, std::string_view reason,
                                      std::chrono::sys_seconds at) override;
  StoreResult<std::vector<BatteryEvent>> battery_events(std::string_view serial) override;

  StoreResult<AppendOutcome> append_readings(const std::vector<models::wire::ReadingInput>& batch,
                                             std::chrono::sys_seconds now) override;
  StoreResult<std::vector<AppendOutcome>> append_reading_batches(
      std::vector<std::vector<PreparedReading>> batches, std::chrono::sys_seconds now) override;
  StoreResult<std::size_t> load_readings(const std::vector<models::wire::ReadingInput>& batch,
                                         std::chrono::sys_seconds now) override;
  StoreResult<std::vector<StoredReading>> readings_for(
      std::string_view serial, std::optional<std::chrono::sys_seconds> from,
      std::optional<std::chrono::sys_seconds> to) override;
  StoreResult<Page<StoredReading>> list_readings(const ReadingFilter& filter,
                                                 const PageRequest& page) override;
  StoreResult<std::vector<BatteryReadings>> last_readings(const BatteryFilter& filter,
                                                          std::size_t count) override;
  StoreResult<Done> visit_last_measurements(const BatteryFilter& filter, std::size_t count,
                                            const MeasurementVisitor& visit) override;
  StoreResult<Done> visit_last_measurements_of(const std::vector<Id>& battery_ids, std::size_t count,
                                               const MeasurementVisitor& visit) override;
  StoreResult<std::vector<BatteryReadings>> latest_settled(const BatteryFilter& filter,
                                                           models::Hours min_rest) override;
  StoreResult<std::int64_t> readings_count() override;
  StoreResult<Done> visit_summaries(const BatteryFilter& filter, const SummaryVisitor& visit) override;
  StoreResult<std::int64_t> data_version() override;
  StoreResult<BatteryVersion> battery_version(Id battery_id) override;

  StoreResult<ApiToken> create_token(std::string_view name, Role role, std::optional<Id> depot_id,
                                     const TokenHash& hash, std::chrono::sys_seconds at,
                                     std::optional<std::chrono::sys_seconds> expires_at) override;
  StoreResult<ApiToken> find_token(const TokenHash& hash) override;
  StoreResult<Page<ApiToken>> list_tokens(const PageRequest& page) override;
  StoreResult<ApiToken> revoke_token(Id id, std::chrono::sys_seconds at) override;
  StoreResult<WebSession> create_web_session(const TokenHash& session_hash, Id token_id,
                                             std::string_view csrf, std::chrono::sys_seconds at,
                                             std::chrono::sys_seconds expires_at) override;
  StoreResult<WebSession> find_web_session(const TokenHash& session_hash) override;
  StoreResult<Done> end_web_session(const TokenHash& session_hash) override;

  StoreResult<BackupReport> backup_to(const std::filesystem::path& path) override;
  StoreResult<DurabilitySettings> durability() override;
  StoreResult<Done> ping() override;

 private:
  // A reader connection borrowed from the pool; returned on destruction.
  class Lease {
   public:
    Lease(SqliteStore& store, std::unique_ptr<Db> db) : store_(store), db_(std::move(db)) {}
    ~Lease();
    Lease(const Lease&) = delete;
    Lease& operator=(const Lease&) = delete;
    Db& db() { return *db_; }

   private:
    SqliteStore& store_;
    std::unique_ptr<Db> db_;
  };

  // Works the readings' facts and the summaries out again when the
  // database was summarised under other derive rules (sqlite_summaries.cpp).
  void refresh_summaries();

  std::unique_ptr<Db> open_reader();
  Lease lease_reader();
  void give_back(std::unique_ptr<Db> db);

  // Runs `body(Db&)` in one write transaction on the writer connection, under
  // the writer mutex; commits when it returns, rolls back when it throws.
  template <class F>
  auto write(F&& body) -> StoreResult<std::invoke_result_t<F&, Db&>> {
    try {
      std::lock_guard lock(write_mutex_);
      if (!writer_) fail(StoreErrc::unavailable, "the store was opened read-only");
      Transaction tx(*writer_);
      auto value = body(*writer_);
      tx.commit();
      return value;
    } catch (const DbError& e) {
      return e.error();
    }
  }

  // write() for depots, vehicles and batteries: afterwards the fleet
  // version moves on, so cached batteries are looked up again.
  template <class F>
  auto write_fleet(F&& body) -> StoreResult<std::invoke_result_t<F&, Db&>> {
    auto result = write(std::forward<F>(body));
    fleet_version_.fetch_add(1, std::memory_order_acq_rel);
    return result;
  }

  // Runs `body(Db&)` on a pooled reader inside one read transaction, so
  // multi-query reads see one consistent snapshot.
  template <class F>
  auto read(F&& body) -> StoreResult<std::invoke_result_t<F&, Db&>> {
    try {
      Lease lease = lease_reader();
      lease.db().exec("BEGIN");
      auto value = body(lease.db());
      lease.db().exec("COMMIT");
      return value;
    } catch (const DbError& e) {
      return e.error();
    }
  }

  SqliteOptions options_;
  std::mutex write_mutex_;
  std::unique_ptr<Db> writer_;  // GUARDED_BY(write_mutex_)

  // Batteries by serial as last read, with the fleet version read before
  // the query: every reading posted looks its battery up, and a reader
  // transaction costs far more than a map look-up while readings are being
  // written. Rows change only through write_fleet() (this process owns the
  // database), which moves the version on.
  struct CachedBattery {
    Battery battery;
    std::uint64_t fleet_version;
  };
  static constexpr std::size_t kMaxCachedBatteries = 100'000;
  std::atomic<std::uint64_t> fleet_version_{0};
  std::mutex battery_cache_mutex_;
  std::unordered_map<std::string, CachedBattery> battery_cache_;  // GUARDED_BY(battery_cache_mutex_)

  std::mutex pool_mutex_;
  std::condition_variable pool_free_;
  std::vector<std::unique_ptr<Db>> idle_readers_;  // GUARDED_BY(pool_mutex_)
  std::size_t open_readers_ = 0;                   // GUARDED_BY(pool_mutex_)
};

// Shared query helpers (defined in sqlite_fleet.cpp).
// The battery row for a serial; throws DbError(not_found, field "serial").
Battery battery_by_serial(Db& db, std::string_view serial);
// Batteries matching a filter, in id order (reports; no paging).
std::vector<Battery> batteries_matching(Db& db, const BatteryFilter& filter);
// Works one battery's reading facts and summary out again (after its spec
// changed; sqlite_summaries.cpp).
void refresh_battery_facts(Db& db, const Battery& battery);

}  // namespace pbfleet::storage::sqlite
