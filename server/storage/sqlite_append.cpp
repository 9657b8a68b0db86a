// Storing readings: idempotent batches, group commit, the bulk load.

#include <algorithm>
#include <cstring>
#include <unordered_map>
#include <unordered_set>

#include "server/storage/reading_facts.hpp"
#include "server/storage/tokens.hpp"
#include "server/storage/sqlite_rows.hpp"
#include "server/storage/sqlite_store_impl.hpp"

namespace pbfleet::storage::sqlite {
namespace {

using models::wire::ReadingInput;
using std::chrono::sys_seconds;

constexpr std::string_view kInsertReading =
    "INSERT INTO readings (reading_id, battery_id, taken_at, received_at, ocv_v, cell_sg,"
    " electrolyte_temp_c, electrolyte_unit, ambient_temp_c, ambient_unit, rest_h, load_test_a,"
    " load_test_end_v, logged_by, source, note, after_charge, water_added, content_hash,"
    " trusted_soc_pct, trusted_temp_c)"
    " VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10, ?11, ?12, ?13, ?14, ?15, ?16, ?17, ?18, "
    "?19, ?20, ?21) ON CONFLICT (reading_id) DO NOTHING";

void bind_temperature(Statement& s, int index,
                      const std::optional<models::wire::EnteredTemperature>& t) {
  if (!t) return;
  s.bind(index, t->value.value).bind(index + 1, t->unit == models::wire::TempUnit::f ? "F" : "C");
}

// A battery a batch names: its row id and the spec its readings are
// derived with.
struct BatteryRef {
  Id id = 0;
  models::BatterySpec spec;
};

// The prepared statements of one write transaction, reused for every row.
struct ReadingStatements {
  explicit ReadingStatements(Db& db)
      : db(db),
        existing(db.prepare("SELECT id, content_hash FROM readings WHERE reading_id = ?1")),
        insert(db.prepare(kInsertReading)),
        original(db.prepare(std::string(kReadingSelect) + " WHERE r.id = ?1")) {}

  // The battery of a serial, cached for the transaction; nullopt if unknown.
  const BatteryRef* battery(const std::string& serial) {
    if (auto it = batteries.find(serial); it != batteries.end()) return &it->second;
    try {
      const Battery b = battery_by_serial(db, serial);
      return &batteries.emplace(serial, BatteryRef{b.id, spec_of(b)}).first->second;
    } catch (const DbError& e) {
      if (e.error().code == StoreErrc::not_found) return nullptr;
      throw;
    }
  }

  // Inserts the row with its derived facts (reading_facts.hpp; the
  // summary triggers read them); false (and nothing written) when its
  // reading_id is stored already, so a new reading costs one index probe.
  bool insert_row(const PreparedReading& prepared, const BatteryRef& battery, sys_seconds now) {
    const ReadingInput& r = prepared.input;
    const ReadingFacts facts = facts_for(prepared, battery.spec);
    Statement& s = insert;
    s.reset();
    // Texts bound in place: `prepared` outlives this row's step.
    s.bind_kept(1, r.reading_id).bind(2, battery.id).bind(3, to_db(r.taken_at)).bind(4, to_db(now));
    s.bind(5, raw(r.ocv)).bind_kept(6, prepared.cell_sg_text);
    bind_temperature(s, 7, r.electrolyte);
    bind_temperature(s, 9, r.ambient);
    s.bind(11, raw(r.rest)).bind(12, raw(r.load_test_current)).bind(13, raw(r.load_test_end));
    s.bind_kept(14, r.logged_by).bind_kept(15, r.source).bind_kept(16, r.note);
    s.bind(17, r.after_charge ? 1 : 0).bind(18, r.water_added ? 1 : 0);
    s.bind_blob_kept(19, prepared.hash.data(), prepared.hash.size());
    s.bind(20, facts.trusted_soc_pct).bind(21, facts.trusted_temp_c);
    s.run();
    return db.changes() == 1;
  }

  StoredReading read_original(Id id) {
    original.reset();
    original.bind(1, id).step();
    StoredReading r = read_reading(original);
    original.reset();
    return r;
  }

  Db& db;
  Statement existing;
  Statement insert;
  Statement original;
  std::unordered_map<std::string, BatteryRef> batteries;
};

// A reading already stored under a reading_id: its row id and content hash.
struct Earlier {
  Id id;
  ContentHash hash;
};

// The stored reading with this reading_id, if any (hash to compare).
std::optional<Earlier> find_existing(ReadingStatements& st, const std::string& reading_id) {
  st.existing.reset();
  std::optional<Earlier> found;
  if (st.existing.bind(1, reading_id).step()) {
    Earlier e{st.existing.int_at(0), {}};
    const auto blob = st.existing.blob_at(1);
    std::memcpy(e.hash.data(), blob.data(), std::min(blob.size(), e.hash.size()));
    found = e;
  }
  st.existing.reset();
  return found;
}

RowProblem conflict_problem(std::size_t row, const std::string& reading_id) {
  return RowProblem{row, StoreErrc::conflict, "reading_id",
                    "reading_id '" + reading_id +
                        "' was already used for a reading with different content; a retry must "
                        "resend exactly the same reading, a new reading needs a new id"};
}

// What became of one row of a batch.
struct RowFate {
  enum class Kind { inserted, replay_of_stored, replay_in_batch } kind;
  Id id = 0;              // inserted: its row id
  Id battery_id = 0;      // inserted
  std::size_t index = 0;  // replay_of_stored: into BatchPlan::originals;
                          // replay_in_batch: the earlier row
};

// A batch worked through inside a transaction: rows inserted, replays
// found, or the problems that refuse it. The batch's readings are not yet
// moved out, so a refused batch can be written again.
struct BatchPlan {
  std::vector<RowFate> fates;               // one per row when accepted
  std::vector<StoredReading> originals;     // the earlier readings replayed
  std::vector<RowProblem> problems;         // every refused row
};

// One batch inside an open transaction: every row is checked (so all
// problems are reported), rows are inserted until the first problem. The
// caller undoes the inserts when problems come back.
BatchPlan plan_batch(Db& db, ReadingStatements& st, std::vector<PreparedReading>& batch,
                     sys_seconds now) {
  BatchPlan plan;
  plan.fates.reserve(batch.size());
  // reading_id -> row, for ids met earlier in this batch (views into `batch`).
  std::unordered_map<std::string_view, std::size_t> seen;
  seen.reserve(batch.size());
  for (std::size_t row = 0; row < batch.size(); ++row) {
    PreparedReading& prepared = batch[row];
    ReadingInput& input = prepared.input;
    const BatteryRef* battery = st.battery(input.serial);
    if (!battery) {
      plan.problems.push_back(
          {row, StoreErrc::not_found, "serial", "no battery with serial '" + input.serial + "'"});
      continue;
    }
    if (input.reading_id.empty()) input.reading_id = new_reading_id();
    if (auto it = seen.find(input.reading_id); it != seen.end()) {
      if (batch[it->second].hash != prepared.hash) {
        plan.problems.push_back(conflict_problem(row, input.reading_id));
        continue;
      }
      plan.fates.push_back({RowFate::Kind::replay_in_batch, 0, 0, it->second});
      continue;
    }
    // A clean batch so far inserts at once; an existing reading_id makes
    // the insert a no-op and falls through to the replay check. Once the
    // batch has problems it will be undone, so rows are only checked.
    if (plan.problems.empty() && st.insert_row(prepared, *battery, now)) {
      seen.emplace(input.reading_id, row);
      plan.fates.push_back({RowFate::Kind::inserted, db.last_insert_id(), battery->id, 0});
      continue;
    }
    if (auto earlier = find_existing(st, input.reading_id)) {
      if (earlier->hash != prepared.hash) {
        plan.problems.push_back(conflict_problem(row, input.reading_id));
        continue;
      }
      seen.emplace(input.reading_id, row);
      plan.fates.push_back({RowFate::Kind::replay_of_stored, 0, 0, plan.originals.size()});
      plan.originals.push_back(st.read_original(earlier->id));
    } else if (plan.problems.empty()) {
      fail(StoreErrc::internal, "reading_id '" + input.reading_id + "' neither inserted nor found");
    }
  }
  return plan;
}

// The outcome of a batch: a refused one names its problems; an accepted
// one moves its readings out of `batch`, in input order.
AppendOutcome settle(std::vector<PreparedReading>& batch, BatchPlan& plan, sys_seconds now) {
  AppendOutcome out;
  if (!plan.problems.empty()) {
    out.problems = std::move(plan.problems);
    return out;
  }
  out.readings.reserve(batch.size());
  out.replayed.reserve(batch.size());
  for (std::size_t row = 0; row < plan.fates.size(); ++row) {
    const RowFate& fate = plan.fates[row];
    switch (fate.kind) {
      case RowFate::Kind::inserted: {
        StoredReading stored;
        static_cast<ReadingInput&>(stored) = std::move(batch[row].input);
        stored.id = fate.id;
        stored.battery_id = fate.battery_id;
        stored.received_at = now;
        out.readings.push_back(std::move(stored));
        ++out.stored;
        break;
      }
      case RowFate::Kind::replay_of_stored:
        out.readings.push_back(std::move(plan.originals[fate.index]));
        ++out.replayed_count;
        break;
      case RowFate::Kind::replay_in_batch:
        out.readings.push_back(out.readings[fate.index]);  // accepted: outcome row = input row
        ++out.replayed_count;
        break;
    }
    out.replayed.push_back(fate.kind != RowFate::Kind::inserted);
  }
  return out;
}

// Batch append guarded by a savepoint: a refused batch leaves no trace.
AppendOutcome append_isolated(Db& db, ReadingStatements& st, std::vector<PreparedReading>& batch,
                              sys_seconds now) {
  Savepoint sp(db);
  BatchPlan plan = plan_batch(db, st, batch, now);
  plan.problems.empty() ? sp.release() : sp.rollback();
  return settle(batch, plan, now);
}

// Thrown out of a write transaction to roll it back: a batch of the group
// was refused.
struct GroupRefused {};

}  // namespace

StoreResult<AppendOutcome> SqliteStore::append_readings(const std::vector<ReadingInput>& batch,
                                                        sys_seconds now) {
  std::vector<PreparedReading> prepared = prepare_readings(batch);
  return write([&](Db& db) {
    ReadingStatements st(db);
    return append_isolated(db, st, prepared, now);
  });
}

StoreResult<std::vector<AppendOutcome>> SqliteStore::append_reading_batches(
    std::vector<std::vector<PreparedReading>> batches, sys_seconds now) {
  // Nearly every group is clean, so its batches first go in without a
  // savepoint each: with one open, SQLite copies every page an insert
  // touches to its statement journal and drops the copy afterwards, about
  // a tenth of the writer's time. When a batch is refused the transaction
  // is rolled back (nothing was moved out of the batches yet) and the group
  // written again, each batch under its own savepoint.
  try {
    std::vector<BatchPlan> plans;
    auto committed = write([&](Db& db) {
      ReadingStatements st(db);
      plans.reserve(batches.size());
      for (auto& batch : batches) {
        plans.push_back(plan_batch(db, st, batch, now));
        if (!plans.back().problems.empty()) throw GroupRefused{};
      }
      return Done{};
    });
    if (!committed) return committed.error();
    std::vector<AppendOutcome> outcomes;
    outcomes.reserve(batches.size());
    for (std::size_t i = 0; i < batches.size(); ++i) outcomes.push_back(settle(batches[i], plans[i], now));
    return outcomes;
  } catch (const GroupRefused&) {
  }
  return write([&](Db& db) {
    ReadingStatements st(db);
    std::vector<AppendOutcome> outcomes;
    outcomes.reserve(batches.size());
    for (auto& batch : batches) outcomes.push_back(append_isolated(db, st, batch, now));
    return outcomes;
  });
}

StoreResult<std::size_t> SqliteStore::load_readings(const std::vector<ReadingInput>& batch,
                                                    sys_seconds now) {
  return write([&](Db& db) {
    ReadingStatements st(db);
    for (const ReadingInput& given : batch) {
      const BatteryRef* battery = st.battery(given.serial);
      if (!battery) {
        fail(StoreErrc::not_found, "no battery with serial '" + given.serial + "'", "serial");
      }
      PreparedReading r = prepare_reading(given, std::nullopt);
      if (r.input.reading_id.empty()) r.input.reading_id = new_reading_id();
      if (!st.insert_row(r, *battery, now))
        fail(StoreErrc::conflict, "reading_id '" + r.input.reading_id + "' is already stored",
             "reading_id");
    }
    return batch.size();
  });
}

}  // namespace pbfleet::storage::sqlite
