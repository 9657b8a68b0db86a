// The store: the fleet's system of record behind one small interface.
//
// Speaks domain types (domain.hpp), never rows, SQL or JSON. SQLite
// implements it now (sqlite_store.hpp); a PostgreSQL backend can plug in
// later without touching handlers or models.
//
// Errors are values: every call returns StoreResult<T>, either the value or
// a StoreError whose `code` the HTTP layer maps to a status
// (not_found -> 404, conflict -> 409, constraint/invalid -> 422/400,
// unavailable -> 503, disk_full -> 507, internal -> 500).
//
// Thread safety: every member function may be called from any thread
// concurrently; implementations say how they serialise writes.
#pragma once

#include <chrono>
#include <cstddef>
#include <filesystem>
#include <functional>
#include <optional>
#include <span>
#include <string>
#include <utility>
#include <variant>
#include <vector>

#include "models/wire/reading.hpp"
#include "server/storage/domain.hpp"
#include "server/storage/reading_facts.hpp"

namespace pbfleet::storage {

enum class StoreErrc {
  not_found,    // no such object (or outside the caller's scope)
  conflict,     // unique key taken, or reading_id reused with other content
  constraint,   // a reference or rule would break (e.g. vehicle of unknown depot)
  invalid,      // bad argument: malformed cursor, empty required name
  unavailable,  // database busy, read-only, unreadable or closed; retry later
  disk_full,    // no space (SQLITE_FULL); nothing of the write was kept
  internal,     // a broken invariant; a bug
};
std::string_view to_string(StoreErrc code);

struct StoreError {
  StoreErrc code = StoreErrc::internal;
  std::string detail;  // sentence for a person, e.g. "no battery with serial 'X'"
  std::string field;   // wire field concerned, may be empty ("serial", "depot_id")
};

template <class T>
class StoreResult {
 public:
  StoreResult(T value) : v_(std::move(value)) {}           // NOLINT: implicit by design
  StoreResult(StoreError error) : v_(std::move(error)) {}  // NOLINT: implicit by design

  [[nodiscard]] bool ok() const { return v_.index() == 0; }
  explicit operator bool() const { return ok(); }
  // REQUIRES: ok()
  const T& value() const& { return std::get<0>(v_); }
  T& value() & { return std::get<0>(v_); }
  T&& value() && { return std::get<0>(std::move(v_)); }
  const T& operator*() const& { return value(); }
  const T* operator->() const { return &value(); }
  // REQUIRES: !ok()
  const StoreError& error() const { return std::get<1>(v_); }

 private:
  std::variant<T, StoreError> v_;
};

// Success without a value.
struct Done {};

// ---- lists: keyset pagination ---------------------------------------------

inline constexpr std::size_t kDefaultPageLimit = 100;
inline constexpr std::size_t kMaxPageLimit = 1000;

// `limit` is clamped to 1..kMaxPageLimit. `cursor` is empty for the first
// page, else a next_cursor from an earlier page (opaque; a malformed one
// gives StoreErrc::invalid with field "cursor").
struct PageRequest {
  std::size_t limit = kDefaultPageLimit;
  std::string cursor;
};

// Items in ascending id order. Pages are stable under concurrent inserts:
// every object that existed when paging began appears exactly once.
template <class T>
struct Page {
  std::vector<T> items;
  std::string next_cursor;  // empty: no more items
};

struct VehicleFilter {
  std::optional<Id> depot_id;
};

struct BatteryFilter {
  std::optional<Id> depot_id;  // depot of the vehicle it is fitted to
  std::optional<BatteryStatus> status;
  std::optional<models::Chemistry> chemistry;
};

struct ReadingFilter {
  std::optional<std::string> serial;
  std::optional<std::chrono::sys_seconds> from;  // taken_at >= from
  std::optional<std::chrono::sys_seconds> to;    // taken_at <= to
};

// ---- readings ---------------------------------------------------------------

// One reading of a batch the store refused, by 0-based index in the batch.
struct RowProblem {
  std::size_t row = 0;
  StoreErrc code = StoreErrc::constraint;  // not_found (unknown serial) or conflict
  std::string field;                       // "serial" or "reading_id"
  std::string detail;
};

// The problem every store gives for a reading_id used before with other
// content (stored, or earlier in the same batch).
inline RowProblem reading_id_conflict(std::size_t row, const std::string& reading_id) {
  return RowProblem{row, StoreErrc::conflict, "reading_id",
                    "reading_id '" + reading_id +
                        "' was already used for a reading with different content; a retry must "
                        "resend exactly the same reading, a new reading needs a new id"};
}

// What became of one batch. Either every reading is stored (or replayed) or,
// when `problems` is non-empty, none is.
struct AppendOutcome {
  std::vector<StoredReading> readings;  // input order; empty when refused
  std::vector<bool> replayed;           // per reading: true = an earlier original
  std::size_t stored = 0;               // newly stored
  std::size_t replayed_count = 0;       // same id and same content as before
  std::vector<RowProblem> problems;     // every refused row; empty = accepted
  [[nodiscard]] bool accepted() const { return problems.empty(); }
};

// The version of one battery's history: its summary revision, which moves
// on with every reading stored for it, and the fleet change count (depots,
// vehicles, batteries and the events that come with them). Equal versions
// mean an equal history, in every process sharing the database.
struct BatteryVersion {
  std::int64_t revision = 0;
  std::int64_t fleet_changes = 0;
  friend bool operator==(const BatteryVersion&, const BatteryVersion&) = default;
};

// One battery with some of its readings, newest first (reports).
struct BatteryReadings {
  Battery battery;
  std::vector<StoredReading> readings;
};

// One battery's last readings, measurements only, newest first; the span
// is valid during the call only.
using MeasurementVisitor =
    std::function<void(const Battery& battery, std::span<const ReadingMeasurement> newest_first)>;

// One battery's summary (reading_facts.hpp), valid during the call only.
using SummaryVisitor = std::function<void(const Battery& battery, const BatterySummary& summary)>;

// ---- operations -------------------------------------------------------------

struct DurabilitySettings {
  std::string backend = "sqlite";  // "sqlite" or "postgresql"
  std::string journal_mode;  // "wal"
  int synchronous = 0;       // 2 = FULL (SQLite); 2 = every commit flushed (PostgreSQL)
  std::string synchronous_commit;  // PostgreSQL's setting in force ("on"); empty on SQLite
  std::optional<bool> fsync;       // PostgreSQL server's fsync; nullopt on SQLite
  bool foreign_keys = false;
  int busy_timeout_ms = 0;
  int schema_version = 0;
};

struct BackupReport {
  std::filesystem::path path;
  std::uintmax_t bytes = 0;
  std::string integrity;  // "ok", or the first problem integrity_check found
};

class Store {
 public:
  virtual ~Store() = default;

  // Depots. Names are unique (conflict otherwise).
  virtual StoreResult<Depot> create_depot(const Depot& depot) = 0;  // id ignored
  virtual StoreResult<Depot> get_depot(Id id) = 0;
  virtual StoreResult<Page<Depot>> list_depots(const PageRequest& page) = 0;
  virtual StoreResult<Depot> update_depot(const Depot& depot) = 0;  // by id, all fields

  // Vehicles. Codes are unique; depot_id must exist (constraint otherwise).
  virtual StoreResult<Vehicle> create_vehicle(const Vehicle& vehicle) = 0;
  virtual StoreResult<Vehicle> get_vehicle(Id id) = 0;
  virtual StoreResult<Page<Vehicle>> list_vehicles(const VehicleFilter& filter,
                                                   const PageRequest& page) = 0;
  virtual StoreResult<Vehicle> update_vehicle(const Vehicle& vehicle) = 0;

  // Batteries, addressed by serial. create ignores id, status, retired_*
  // and depot_id; a vehicle_id records a `fitted` event at `at`.
  virtual StoreResult<Battery> create_battery(const Battery& battery,
                                              std::chrono::sys_seconds at) = 0;
  virtual StoreResult<Battery> get_battery(std::string_view serial) = 0;
  virtual StoreResult<Page<Battery>> list_batteries(const BatteryFilter& filter,
                                                    const PageRequest& page) = 0;
  // Rating and type fields by serial; fitting and retiring have their own calls.
  virtual StoreResult<Battery> update_battery(const Battery& battery) = 0;
  // Fits an in-service battery to a vehicle (conflict if retired).
  virtual StoreResult<Battery> fit_battery(std::string_view serial, Id vehicle_id,
                                           std::chrono::sys_seconds at) = 0;
  // Retires it: status retired, unfitted, event recorded (conflict if retired).
  virtual StoreResult<Battery> retire_battery(std::string_view serial, std::string_view reason,
                                              std::chrono::sys_seconds at) = 0;
  // Events of one battery, oldest first.
  virtual StoreResult<std::vector<BatteryEvent>> battery_events(std::string_view serial) = 0;

  // Stores a batch atomically and idempotently on reading_id. The same id
  // with the same content is a replay answered with the original; the same
  // id with other content, or an unknown serial, is a RowProblem and nothing
  // of the batch is stored. Readings without an id get one assigned.
  // REQUIRES: each reading passed models::wire::validate_reading.
  virtual StoreResult<AppendOutcome> append_readings(
      const std::vector<models::wire::ReadingInput>& batch, std::chrono::sys_seconds now) = 0;
  // Group commit: several independent batches (e.g. from concurrent
  // requests) in ONE transaction; each batch is accepted or refused on its
  // own, exactly as append_readings would. On an error (disk full,
  // unavailable) nothing of any batch is stored. The readings come
  // prepared (prepare_reading, on the caller's thread), and are moved from.
  virtual StoreResult<std::vector<AppendOutcome>> append_reading_batches(
      std::vector<std::vector<PreparedReading>> batches, std::chrono::sys_seconds now) = 0;
  // Bulk load for benchmarks and the demo generator: one transaction, one
  // prepared insert, no replay lookups. Any duplicate id or unknown serial
  // refuses the whole batch (conflict / not_found). Returns rows stored.
  virtual StoreResult<std::size_t> load_readings(
      const std::vector<models::wire::ReadingInput>& batch, std::chrono::sys_seconds now) = 0;

  // One battery's readings, oldest first, taken_at within [from, to]
  // (either open). not_found for an unknown serial.
  virtual StoreResult<std::vector<StoredReading>> readings_for(
      std::string_view serial, std::optional<std::chrono::sys_seconds> from,
      std::optional<std::chrono::sys_seconds> to) = 0;
  virtual StoreResult<Page<StoredReading>> list_readings(const ReadingFilter& filter,
                                                         const PageRequest& page) = 0;
  // The last `count` readings of each matching battery, newest first, by
  // one index lookup per battery (never a scan of all readings).
  virtual StoreResult<std::vector<BatteryReadings>> last_readings(const BatteryFilter& filter,
                                                                  std::size_t count) = 0;
  // The same readings as last_readings, measurements only, handed to
  // `visit` one battery at a time in battery id order (one read snapshot),
  // so a fleet's readings never sit in memory at once. `visit` must not
  // call the store.
  virtual StoreResult<Done> visit_last_measurements(const BatteryFilter& filter,
                                                    std::size_t count,
                                                    const MeasurementVisitor& visit) = 0;
  // The same for the batteries with these ids only (unknown ids are skipped).
  virtual StoreResult<Done> visit_last_measurements_of(const std::vector<Id>& battery_ids,
                                                       std::size_t count,
                                                       const MeasurementVisitor& visit) = 0;
  // The newest reading of each matching battery with rest_h >= min_rest
  // (a settled OCV); batteries without one come with no readings.
  virtual StoreResult<std::vector<BatteryReadings>> latest_settled(const BatteryFilter& filter,
                                                                   models::Hours min_rest) = 0;
  // Readings stored in all (kept as a counter, O(1)).
  virtual StoreResult<std::int64_t> readings_count() = 0;
  // Each matching battery's summary (what a look-back over its newest
  // analytics::kWinterLookback readings finds; kept as readings are
  // stored), in battery id order, one read snapshot: the winter report
  // reads one row per battery. `visit` must not call the store.
  virtual StoreResult<Done> visit_summaries(const BatteryFilter& filter,
                                            const SummaryVisitor& visit) = 0;
  // Moves on with every reading stored and every change to depots,
  // vehicles or batteries, in every process sharing the database (O(1)):
  // equal versions mean equal report inputs (the report cache's key).
  virtual StoreResult<std::int64_t> data_version() = 0;
  // What one battery's history depends on (O(1)); not_found for an unknown id.
  virtual StoreResult<BatteryVersion> battery_version(Id battery_id) = 0;

  // API tokens. Only the hash is stored. `expires_at` (nullopt: never)
  // must lie after `at` (invalid, field "expires_at", otherwise).
  virtual StoreResult<ApiToken> create_token(
      std::string_view name, Role role, std::optional<Id> depot_id, const TokenHash& hash,
      std::chrono::sys_seconds at,
      std::optional<std::chrono::sys_seconds> expires_at = std::nullopt) = 0;
  // not_found for an unknown hash; a revoked or expired token is returned
  // as it is (revoked_at, expires_at): the caller decides.
  virtual StoreResult<ApiToken> find_token(const TokenHash& hash) = 0;
  virtual StoreResult<Page<ApiToken>> list_tokens(const PageRequest& page) = 0;
  // Revokes a token and ends its dashboard sessions, in one transaction.
  virtual StoreResult<ApiToken> revoke_token(Id id, std::chrono::sys_seconds at) = 0;

  // Dashboard sessions: only the SHA-256 of the cookie value is stored.
  // create also drops sessions that expired before `at`; token_id must name
  // an existing token (constraint otherwise).
  virtual StoreResult<WebSession> create_web_session(const TokenHash& session_hash, Id token_id,
                                                     std::string_view csrf,
                                                     std::chrono::sys_seconds at,
                                                     std::chrono::sys_seconds expires_at) = 0;
  // not_found for an unknown or ended session; an expired one, or one whose
  // token is revoked or expired, is returned as it is: the caller decides.
  virtual StoreResult<WebSession> find_web_session(const TokenHash& session_hash) = 0;
  // Ends a session (Done also when there is no such session).
  virtual StoreResult<Done> end_web_session(const TokenHash& session_hash) = 0;

  // Operations.
  // Consistent online copy to `path` (must not exist), then integrity_check
  // on the copy. Safe while writers run.
  virtual StoreResult<BackupReport> backup_to(const std::filesystem::path& path) = 0;
  virtual StoreResult<DurabilitySettings> durability() = 0;
  // The database answers a trivial query (for /readyz).
  virtual StoreResult<Done> ping() = 0;
};

}  // namespace pbfleet::storage
