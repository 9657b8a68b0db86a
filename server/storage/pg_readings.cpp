// Readings on PostgreSQL: idempotent batch append, group commit, bulk load,
// queries. The same rules as sqlite_readings.cpp; every write runs under
// the cross-instance write lock (pg_store.hpp), so a reading_id raced
// through two instances is inserted by one and found as a replay (or a
// conflict) by the other.
#include <openssl/rand.h>

#include <algorithm>
#include <limits>
#include <unordered_map>

#include "server/storage/pg_rows.hpp"
#include "server/storage/pg_store_impl.hpp"

namespace pbfleet::storage::pg {
namespace {

using models::wire::ReadingInput;
using std::chrono::sys_seconds;
using Tx = pqxx::transaction_base;

// A reading id for a reading the client sent without one: 96 random bits.
std::string assigned_reading_id() {
  unsigned char bytes[12];
  if (RAND_bytes(bytes, sizeof bytes) != 1) fail(StoreErrc::internal, "random source failed");
  static constexpr char kHex[] = "0123456789abcdef";
  std::string id = "srv-";
  for (unsigned char b : bytes) {
    id += kHex[b >> 4];
    id += kHex[b & 0xf];
  }
  return id;
}

template <class Q>
std::optional<double> raw(const std::optional<Q>& q) {
  return q ? std::optional<double>(q->value) : std::nullopt;
}

std::optional<double> temperature(const std::optional<models::wire::EnteredTemperature>& t) {
  return t ? std::optional<double>(t->value.value) : std::nullopt;
}

std::optional<std::string> unit(const std::optional<models::wire::EnteredTemperature>& t) {
  if (!t) return std::nullopt;
  return std::string(t->unit == models::wire::TempUnit::f ? "F" : "C");
}

// Battery ids by serial for one write transaction.
class BatteryIds {
 public:
  std::optional<Id> of(Tx& tx, const std::string& serial) {
    if (auto it = ids_.find(serial); it != ids_.end()) return it->second;
    const auto rows = tx.exec_prepared("battery_id", serial);
    if (rows.empty()) return std::nullopt;
    const Id id = rows[0][0].as<Id>();
    ids_.emplace(serial, id);
    return id;
  }

 private:
  std::unordered_map<std::string, Id> ids_;
};

// Inserts the row; nullopt (and nothing written) when its reading_id is
// stored already, so a new reading costs one statement.
std::optional<Id> insert_row(Tx& tx, const ReadingInput& r, Id battery_id, sys_seconds now,
                             const ContentHash& hash) {
  const auto rows = tx.exec_prepared(
      "reading_insert", r.reading_id, battery_id, to_db(r.taken_at), to_db(now), raw(r.ocv),
      encode_cell_sg(r.cell_sg), temperature(r.electrolyte), unit(r.electrolyte),
      temperature(r.ambient), unit(r.ambient), raw(r.rest), raw(r.load_test_current),
      raw(r.load_test_end), r.logged_by, r.source, r.note, r.after_charge, r.water_added,
      bytea_param(hash.data(), hash.size()));
  if (rows.empty()) return std::nullopt;
  return rows[0][0].as<Id>();
}

// A reading already stored under a reading_id: its row id and content hash.
struct Earlier {
  Id id;
  ContentHash hash;
};

std::optional<Earlier> find_existing(Tx& tx, const std::string& reading_id) {
  const auto rows = tx.exec_prepared("reading_existing", reading_id);
  if (rows.empty()) return std::nullopt;
  Earlier e{rows[0][0].as<Id>(), {}};
  bytea_into(rows[0][1], e.hash.data(), e.hash.size());
  return e;
}

RowProblem conflict_problem(std::size_t row, const std::string& reading_id) {
  return RowProblem{row, StoreErrc::conflict, "reading_id",
                    "reading_id '" + reading_id +
                        "' was already used for a reading with different content; a retry must "
                        "resend exactly the same reading, a new reading needs a new id"};
}

struct SeenInBatch {
  std::size_t index;
  ContentHash hash;
};

// One batch inside an open (sub)transaction: every row is checked (so all
// problems are reported), rows are inserted until the first problem. The
// caller rolls the batch back when problems come back.
AppendOutcome append_batch(Tx& tx, BatteryIds& ids, const std::vector<ReadingInput>& batch,
                           sys_seconds now) {
  AppendOutcome out;
  out.readings.reserve(batch.size());
  out.replayed.reserve(batch.size());
  std::unordered_map<std::string, SeenInBatch> seen;
  seen.reserve(batch.size());
  for (std::size_t row = 0; row < batch.size(); ++row) {
    ReadingInput input = batch[row];
    const auto battery_id = ids.of(tx, input.serial);
    if (!battery_id) {
      out.problems.push_back(
          {row, StoreErrc::not_found, "serial", "no battery with serial '" + input.serial + "'"});
      continue;
    }
    const ContentHash hash = content_hash(input);
    if (input.reading_id.empty()) input.reading_id = assigned_reading_id();
    if (auto it = seen.find(input.reading_id); it != seen.end()) {
      if (it->second.hash != hash) {
        out.problems.push_back(conflict_problem(row, input.reading_id));
        continue;
      }
      out.readings.push_back(out.readings[it->second.index]);
      out.replayed.push_back(true);
      continue;
    }
    if (out.problems.empty()) {
      if (auto id = insert_row(tx, input, *battery_id, now, hash)) {
        StoredReading stored;
        static_cast<ReadingInput&>(stored) = std::move(input);
        stored.id = *id;
        stored.battery_id = *battery_id;
        stored.received_at = now;
        seen.emplace(stored.reading_id, SeenInBatch{out.readings.size(), hash});
        out.readings.push_back(std::move(stored));
        out.replayed.push_back(false);
        continue;
      }
    }
    if (auto earlier = find_existing(tx, input.reading_id)) {
      if (earlier->hash != hash) {
        out.problems.push_back(conflict_problem(row, input.reading_id));
        continue;
      }
      seen.emplace(input.reading_id, SeenInBatch{out.readings.size(), hash});
      out.readings.push_back(read_reading(tx.exec_prepared("reading_by_id", earlier->id)[0]));
      out.replayed.push_back(true);
    }
  }
  if (!out.problems.empty()) {
    out.readings.clear();
    out.replayed.clear();
    return out;
  }
  out.replayed_count =
      static_cast<std::size_t>(std::count(out.replayed.begin(), out.replayed.end(), true));
  out.stored = out.readings.size() - out.replayed_count;
  return out;
}

// Batch append inside a savepoint: a refused batch leaves no trace. An
// exception leaves the savepoint to the enclosing transaction's rollback.
AppendOutcome append_isolated(pqxx::dbtransaction& tx, BatteryIds& ids,
                              const std::vector<ReadingInput>& batch, sys_seconds now) {
  tx.exec0("SAVEPOINT batch");
  AppendOutcome out = append_batch(tx, ids, batch, now);
  tx.exec0(out.accepted() ? "RELEASE SAVEPOINT batch" : "ROLLBACK TO SAVEPOINT batch");
  return out;
}

void count_stored(Tx& tx, std::size_t stored) {
  if (stored > 0) tx.exec_prepared("readings_added", static_cast<std::int64_t>(stored));
}

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
  return write([&](pqxx::dbtransaction& tx) {
    BatteryIds ids;
    AppendOutcome out = append_isolated(tx, ids, batch, now);
    count_stored(tx, out.stored);
    return out;
  });
}

StoreResult<std::vector<AppendOutcome>> PgStore::append_reading_batches(
    const std::vector<std::vector<ReadingInput>>& batches, sys_seconds now) {
  return write([&](pqxx::dbtransaction& tx) {
    BatteryIds ids;
    std::vector<AppendOutcome> outcomes;
    outcomes.reserve(batches.size());
    std::size_t stored = 0;
    for (const auto& batch : batches) {
      outcomes.push_back(append_isolated(tx, ids, batch, now));
      stored += outcomes.back().stored;
    }
    count_stored(tx, stored);
    return outcomes;
  });
}

StoreResult<std::size_t> PgStore::load_readings(const std::vector<ReadingInput>& batch,
                                                sys_seconds now) {
  return write([&](pqxx::dbtransaction& tx) {
    BatteryIds ids;
    for (const ReadingInput& given : batch) {
      const auto battery_id = ids.of(tx, given.serial);
      if (!battery_id) {
        fail(StoreErrc::not_found, "no battery with serial '" + given.serial + "'", "serial");
      }
      ReadingInput r = given;
      if (r.reading_id.empty()) r.reading_id = assigned_reading_id();
      if (!insert_row(tx, r, *battery_id, now, content_hash(r)))
        fail(StoreErrc::conflict, "reading_id '" + r.reading_id + "' is already stored",
             "reading_id");
    }
    count_stored(tx, batch.size());
    return batch.size();
  });
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

StoreResult<std::vector<BatteryReadings>> PgStore::last_readings(const BatteryFilter& filter,
                                                                 std::size_t count) {
  return read([&](pqxx::dbtransaction& tx) {
    std::vector<BatteryReadings> out;
    for (Battery& b : batteries_matching(tx, filter)) {
      auto rows = tx.exec_prepared("last_readings", b.id, static_cast<std::int64_t>(count));
      out.push_back(BatteryReadings{std::move(b), collect(rows)});
    }
    return out;
  });
}

StoreResult<Done> PgStore::visit_last_measurements(const BatteryFilter& filter, std::size_t count,
                                                   const MeasurementVisitor& visit) {
  return read([&](pqxx::dbtransaction& tx) {
    // One buffer for every battery, as on SQLite.
    std::vector<ReadingMeasurement> rows;
    for (const Battery& b : batteries_matching(tx, filter)) {
      const auto result =
          tx.exec_prepared("last_measurements", b.id, static_cast<std::int64_t>(count));
      std::size_t n = 0;
      for (const auto& row : result) {
        if (n == rows.size()) rows.emplace_back();
        read_measurement(row, rows[n++]);
      }
      visit(b, std::span<const ReadingMeasurement>(rows.data(), n));
    }
    return Done{};
  });
}

StoreResult<std::vector<BatteryReadings>> PgStore::latest_settled(const BatteryFilter& filter,
                                                                  models::Hours min_rest) {
  return read([&](pqxx::dbtransaction& tx) {
    std::vector<BatteryReadings> out;
    for (Battery& b : batteries_matching(tx, filter)) {
      auto rows = tx.exec_prepared("latest_settled", b.id, min_rest.value);
      out.push_back(BatteryReadings{std::move(b), collect(rows)});
    }
    return out;
  });
}

StoreResult<std::int64_t> PgStore::readings_count() {
  return read_one([](Tx& tx) {
    return tx.exec1("SELECT value FROM counters WHERE name = 'readings'")[0].as<std::int64_t>();
  });
}

}  // namespace pbfleet::storage::pg
