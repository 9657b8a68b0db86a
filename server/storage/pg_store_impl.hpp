// PgStore: the Store on PostgreSQL (see pg_store.hpp for the durability,
// ordering and threading model). Internal; callers use open_postgres_store().
//
// The member functions are split by aggregate like the SQLite store:
// pg_store.cpp (connections, pool, operations), pg_fleet.cpp, pg_readings.cpp,
// pg_tokens.cpp; pg_migrate.cpp migrates.
#pragma once

#include <atomic>
#include <chrono>
#include <condition_variable>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <type_traits>
#include <unordered_map>
#include <vector>

#include "server/storage/pg_db.hpp"
#include "server/storage/migrations.hpp"
#include "server/storage/pg_store.hpp"

namespace pbfleet::storage::pg {

// Advisory lock keys (one 64-bit space per database).
inline constexpr std::int64_t kWriteLockKey = 0x7062666c74'01;    // every write transaction
inline constexpr std::int64_t kMigrateLockKey = 0x7062666c74'02;  // schema migration
// The start of every write transaction: BEGIN, the write lock and the
// fleet change count (counters, schema 0004; no row before it), one round
// trip (pg_store.cpp).
const std::string& begin_write_sql();
// The fleet change count a begin_write_sql() answered; -1 when none.
std::int64_t fleet_changes_of(const pqxx::result& begun);

// A battery a group of readings names: its row id and the spec its
// readings are derived with.
struct BatteryRef {
  Id id = 0;
  models::BatterySpec spec;
};
using BatteryRefs = std::unordered_map<std::string, BatteryRef>;

// The batteries write transactions have read, valid while the database's
// fleet change count (moved on by any instance's depot, vehicle or battery
// write, all of them under the write lock) stays what it was when they
// were read. Lets a group of readings for known batteries skip the query
// for their ids and specs: one round trip fewer per commit.
struct BatteryRefCache {
  std::int64_t fleet_changes = -1;  // -1: nothing cached
  BatteryRefs refs;
};

class PgStore final : public Store {
 public:
  // Connects the writer, checks its settings, migrates. Throws PgError.
  PgStore(std::string conninfo, PgOptions options);
  ~PgStore() override = default;

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
  using Connection = std::unique_ptr<pqxx::connection>;

  // A reader connection borrowed from the pool; returned on destruction
  // (closed instead when it broke).
  class Lease {
   public:
    Lease(PgStore& store, Connection c) : store_(store), c_(std::move(c)) {}
    ~Lease();
    Lease(const Lease&) = delete;
    Lease& operator=(const Lease&) = delete;
    pqxx::connection& connection() { return *c_; }

   private:
    PgStore& store_;
    Connection c_;
  };

  Connection open_connection();
  Lease lease_reader();
  void give_back(Connection c);
  pqxx::connection& writer();  // REQUIRES: write_mutex_ held; reconnects a broken writer

  // Runs `body(pqxx::transaction_base&)` in one READ COMMITTED write
  // transaction on the writer connection, under the writer mutex, after
  // taking the cross-instance write lock; commits when it returns, rolls
  // back when it throws. The transaction is spelled out on a
  // nontransaction so that BEGIN and the lock travel in one round trip
  // (the single-reading path is bounded by round trips per commit).
  template <class F>
  auto write(F&& body) -> StoreResult<std::invoke_result_t<F&, pqxx::transaction_base&>> {
    using Value = std::invoke_result_t<F&, pqxx::transaction_base&>;
    try {
      std::lock_guard lock(write_mutex_);
      pqxx::connection& c = writer();
      std::optional<Value> value;
      try {
        pqxx::nontransaction tx(c);
        write_fleet_changes_ = fleet_changes_of(tx.exec(begin_write_sql()));
        value.emplace(body(static_cast<pqxx::transaction_base&>(tx)));
        tx.exec("COMMIT");
      } catch (...) {
        roll_back_writer();
        throw;
      }
      return std::move(*value);
    } catch (const std::exception& e) {
      return classify(e);
    }
  }
  // After a failed write: ROLLBACK, or drop a connection that cannot.
  void roll_back_writer() noexcept;

  // write() for depots, vehicles and batteries: afterwards this process's
  // battery cache is looked up again.
  template <class F>
  auto write_fleet(F&& body) -> StoreResult<std::invoke_result_t<F&, pqxx::transaction_base&>> {
    auto result = write(std::forward<F>(body));
    fleet_version_.fetch_add(1, std::memory_order_acq_rel);
    return result;
  }

  // Runs `body(pqxx::dbtransaction&)` on a pooled reader in one REPEATABLE
  // READ, READ ONLY transaction, so multi-query reads see one snapshot.
  template <class F>
  auto read(F&& body) -> StoreResult<std::invoke_result_t<F&, pqxx::dbtransaction&>> {
    try {
      Lease lease = lease_reader();
      pqxx::transaction<pqxx::repeatable_read, pqxx::read_only> tx(lease.connection());
      auto value = body(static_cast<pqxx::dbtransaction&>(tx));
      tx.commit();
      return value;
    } catch (const std::exception& e) {
      return classify(e);
    }
  }

  // One-statement reads: no BEGIN/COMMIT round trips (a single statement
  // sees one snapshot by itself).
  template <class F>
  auto read_one(F&& body) -> StoreResult<std::invoke_result_t<F&, pqxx::transaction_base&>> {
    try {
      Lease lease = lease_reader();
      pqxx::nontransaction tx(lease.connection());
      return body(static_cast<pqxx::transaction_base&>(tx));
    } catch (const std::exception& e) {
      return classify(e);
    }
  }

  std::string conninfo_;
  PgOptions options_;
  std::mutex write_mutex_;
  Connection writer_;  // GUARDED_BY(write_mutex_)
  std::int64_t write_fleet_changes_ = -1;  // GUARDED_BY(write_mutex_): read as the write began
  BatteryRefCache battery_refs_;           // GUARDED_BY(write_mutex_)

  // Batteries by serial as last read, for at most kBatteryCacheTtl and only
  // while this process made no fleet write since (fleet_version_). Every
  // posted reading looks its battery up; without it each reading costs a
  // round trip to the server. Changes made through another instance are
  // seen within kBatteryCacheTtl.
  struct CachedBattery {
    Battery battery;
    std::uint64_t fleet_version;
    std::chrono::steady_clock::time_point until;
  };
  static constexpr std::size_t kMaxCachedBatteries = 100'000;
  std::atomic<std::uint64_t> fleet_version_{0};
  std::mutex battery_cache_mutex_;
  std::unordered_map<std::string, CachedBattery> battery_cache_;  // GUARDED_BY(battery_cache_mutex_)


  std::mutex pool_mutex_;
  std::condition_variable pool_free_;
  std::vector<Connection> idle_readers_;  // GUARDED_BY(pool_mutex_)
  std::size_t open_readers_ = 0;          // GUARDED_BY(pool_mutex_)
};

// Registers the prepared statements every connection uses (pg_store.cpp).
void prepare_statements(pqxx::connection& c);

// Storing readings set at a time (pg_append.cpp), inside a write transaction.
// One outcome per batch, as Store::append_reading_batches promises.
std::vector<AppendOutcome> append_group(pqxx::transaction_base& tx,
                                        std::vector<std::vector<PreparedReading>>& batches,
                                        std::chrono::sys_seconds now, BatteryRefCache& cache,
                                        std::int64_t fleet_changes);
// Store::load_readings' body: throws PgError (not_found, conflict).
std::size_t load_group(pqxx::transaction_base& tx,
                       const std::vector<models::wire::ReadingInput>& batch, std::chrono::sys_seconds now);

// Summaries (pg_summaries.cpp). Works the readings' facts and the
// summaries out again when the database was summarised under other derive
// rules; run by the instance that holds the migration lock.
void refresh_summaries(pqxx::connection& c);
// The same for one battery, after its spec changed.
void refresh_battery_facts(pqxx::transaction_base& tx, const Battery& battery);

// Shared query helpers (pg_fleet.cpp).
// The battery row for a serial; throws PgError(not_found, field "serial").
Battery battery_by_serial(pqxx::transaction_base& tx, std::string_view serial);
// Batteries matching a filter, in id order (reports; no paging).
std::vector<Battery> batteries_matching(pqxx::transaction_base& tx, const BatteryFilter& filter);

// Migrates to `migrations` under the migration advisory lock; returns the
// version now in force (pg_migrate.cpp). Throws PgError.
int migrate(pqxx::connection& c, const std::vector<Migration>& migrations,
            std::chrono::sys_seconds now);
// The version recorded in schema_version (0 when the table is missing).
int schema_version(pqxx::transaction_base& tx);

}  // namespace pbfleet::storage::pg
