// Readings on PostgreSQL: the writes (set at a time, pg_append.cpp) and the
// queries. Every write runs under the cross-instance write lock
// (pg_store.hpp), so a reading_id raced through two instances is inserted by
// one and found as a replay (or a conflict) by the other.
#include <limits>
#include <unordered_set>

#include "server/storage/pg_rows.hpp"
#include "server/storage/pg_store_impl.hpp"

namespace pbfleet::storage::pg {
namespace {

using models::wire::ReadingInput;
using std::chrono::sys_seconds;
using Tx = pqxx::transaction_base;

constexpr std::int64_t kMinTime = std::numeric_limits<std::int64_t>::min();
constexpr std::int64_t kMaxTime = std::numeric_limits<std::int64_t>::max();

std::int64_t seconds_or(std::optional<sys_seconds> t, std::int64_t fallback) {
  return t ? to_db(*t) : fallback;
}

std::vector<StoredReading> collect(const pqxx::result& rows) {
  std::vector<StoredReading> out;
  out.reserve(rows.size());
  for (const auto& row : rows) out.push_back(read_reading(row));
  return out;
}

}  // namespace

StoreResult<AppendOutcome> PgStore::append_readings(const std::vector<ReadingInput>& batch,
                                                    sys_seconds now) {
  std::vector<std::vector<PreparedReading>> batches{prepare_readings(batch)};
  return write([&](pqxx::transaction_base& tx) {
    return std::move(append_group(tx, batches, now, battery_refs_, write_fleet_changes_).front());
  });
}

StoreResult<std::vector<AppendOutcome>> PgStore::append_reading_batches(
    std::vector<std::vector<PreparedReading>> batches, sys_seconds now) {
  return write([&](pqxx::transaction_base& tx) {
    return append_group(tx, batches, now, battery_refs_, write_fleet_changes_);
  });
}

StoreResult<std::size_t> PgStore::load_readings(const std::vector<ReadingInput>& batch,
                                                sys_seconds now) {
  return write([&](pqxx::transaction_base& tx) { return load_group(tx, batch, now); });
}

StoreResult<std::vector<StoredReading>> PgStore::readings_for(std::string_view serial,
                                                              std::optional<sys_seconds> from,
                                                              std::optional<sys_seconds> to) {
  return read([&](pqxx::dbtransaction& tx) {
    const Battery b = battery_by_serial(tx, serial);
    return collect(tx.exec_params(std::string(kReadingSelect) +
                                      " WHERE r.battery_id = $1 AND r.taken_at BETWEEN $2 AND $3"
                                      " ORDER BY r.taken_at, r.id",
                                  b.id, seconds_or(from, kMinTime), seconds_or(to, kMaxTime)));
  });
}

StoreResult<Page<StoredReading>> PgStore::list_readings(const ReadingFilter& f,
                                                        const PageRequest& page) {
  return read([&](pqxx::dbtransaction& tx) {
    const std::int64_t limit = page_limit(page);
    std::optional<Id> battery;
    if (f.serial) battery = battery_by_serial(tx, *f.serial).id;
    const auto rows = tx.exec_params(
        std::string(kReadingSelect) +
            " WHERE r.id > $1 AND r.taken_at BETWEEN $2 AND $3"
            " AND ($5::bigint IS NULL OR r.battery_id = $5) ORDER BY r.id LIMIT $4",
        page_after(page), seconds_or(f.from, kMinTime), seconds_or(f.to, kMaxTime), limit + 1,
        battery);
    Page<StoredReading> out;
    out.items = collect(rows);
    if (static_cast<std::int64_t>(out.items.size()) > limit) {
      out.items.pop_back();
      out.next_cursor = encode_cursor(out.items.back().id);
    }
    return out;
  });
}

namespace {

// Reports ask per battery; the batteries go to the server kChunk at a time,
// each chunk one statement (LATERAL, one index range per battery), so a
// fleet costs a few round trips and only one chunk's rows sit in memory.
constexpr std::size_t kChunk = 500;

std::string id_array(const std::vector<Battery>& batteries, std::size_t from, std::size_t to) {
  ArrayLiteral ids;
  for (std::size_t i = from; i < to; ++i) ids.integer(batteries[i].id);
  return ids.str();
}

// Calls `each(battery, rows of it)` for every battery in order, rows as the
// prepared statement `name` returns them (battery id in column `id_column`).
template <class Each, class Arg>
void per_battery(pqxx::dbtransaction& tx, const std::vector<Battery>& batteries, const char* name,
                 Arg arg, int id_column, Each each) {
  for (std::size_t from = 0; from < batteries.size(); from += kChunk) {
    const std::size_t to = std::min(batteries.size(), from + kChunk);
    const pqxx::result rows = tx.exec_prepared(name, id_array(batteries, from, to), arg);
    auto row = rows.begin();
    for (std::size_t i = from; i < to; ++i) {
      const auto first = row;
      while (row != rows.end() && (*row)[id_column].as<Id>() == batteries[i].id) ++row;
      each(batteries[i], first, row);
    }
  }
}

// The last `count` measurements of each battery, newest first, one battery
// at a time into one reused buffer, as on SQLite.
Done visit_measurements(pqxx::dbtransaction& tx, const std::vector<Battery>& batteries, std::size_t count,
                        const MeasurementVisitor& visit) {
  std::vector<ReadingMeasurement> rows;
  per_battery(tx, batteries, "last_measurements", static_cast<std::int64_t>(count), 9,
              [&](const Battery& b, auto first, auto last) {
                std::size_t n = 0;
                for (auto r = first; r != last; ++r) {
                  if (n == rows.size()) rows.emplace_back();
                  read_measurement(*r, rows[n++]);
                }
                visit(b, std::span<const ReadingMeasurement>(rows.data(), n));
              });
  return Done{};
}

}  // namespace

StoreResult<std::vector<BatteryReadings>> PgStore::last_readings(const BatteryFilter& filter,
                                                                 std::size_t count) {
  return read([&](pqxx::dbtransaction& tx) {
    auto batteries = batteries_matching(tx, filter);
    std::vector<BatteryReadings> out;
    out.reserve(batteries.size());
    per_battery(tx, batteries, "last_readings", static_cast<std::int64_t>(count), 2,
                [&](const Battery& b, auto first, auto last) {
                  BatteryReadings br{b, {}};
                  for (auto r = first; r != last; ++r) br.readings.push_back(read_reading(*r));
                  out.push_back(std::move(br));
                });
    return out;
  });
}

StoreResult<Done> PgStore::visit_last_measurements_of(const std::vector<Id>& battery_ids,
                                                      std::size_t count,
                                                      const MeasurementVisitor& visit) {
  return read([&](pqxx::dbtransaction& tx) {
    const std::unordered_set<Id> wanted(battery_ids.begin(), battery_ids.end());
    std::vector<Battery> batteries = batteries_matching(tx, {});
    std::erase_if(batteries, [&](const Battery& b) { return !wanted.contains(b.id); });
    return visit_measurements(tx, batteries, count, visit);
  });
}

StoreResult<Done> PgStore::visit_last_measurements(const BatteryFilter& filter, std::size_t count,
                                                   const MeasurementVisitor& visit) {
  return read([&](pqxx::dbtransaction& tx) { return visit_measurements(tx, batteries_matching(tx, filter), count, visit); });
}


StoreResult<std::vector<BatteryReadings>> PgStore::latest_settled(const BatteryFilter& filter,
                                                                  models::Hours min_rest) {
  return read([&](pqxx::dbtransaction& tx) {
    auto batteries = batteries_matching(tx, filter);
    std::vector<BatteryReadings> out;
    out.reserve(batteries.size());
    per_battery(tx, batteries, "latest_settled", min_rest.value, 2,
                [&](const Battery& b, auto first, auto last) {
                  BatteryReadings br{b, {}};
                  for (auto r = first; r != last; ++r) br.readings.push_back(read_reading(*r));
                  out.push_back(std::move(br));
                });
    return out;
  });
}

StoreResult<std::int64_t> PgStore::readings_count() {
  return read_one([](Tx& tx) {
    return tx.exec1("SELECT value FROM counters WHERE name = 'readings'")[0].as<std::int64_t>();
  });
}

}  // namespace pbfleet::storage::pg
