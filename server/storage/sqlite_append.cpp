// Storing readings: idempotent batches, group commit, the bulk load.

#include <algorithm>
#include <array>
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

constexpr std::string_view kInsertInto =
    "INSERT INTO readings (reading_id, battery_id, taken_at, received_at, ocv_v, cell_sg,"
    " electrolyte_temp_c, electrolyte_unit, ambient_temp_c, ambient_unit, rest_h, load_test_a,"
    " load_test_end_v, logged_by, source, note, after_charge, water_added, content_hash,"
    " trusted_soc_pct, trusted_temp_c) VALUES ";
constexpr int kColumnsPerRow = 21;

// Rows per INSERT statement, largest first. With one statement per row the
// statement itself costs more than the row: SQLite starts and halts the
// program and, since the summary triggers may fail after the row is in,
// opens and drops a statement journal every time. 32 rows to a statement
// took the writer from 8.4 to 6.0 us of CPU per row on the bench's schema
// (throwaway test: 100k rows, 500 per transaction, trusted facts bound).
constexpr std::array<std::size_t, 3> kRowsPerInsert = {32, 8, 1};

// INSERT ... VALUES (?, ...), ... ON CONFLICT (reading_id) DO NOTHING for
// `rows` rows: a reading_id stored already leaves its row out, so a new
// reading costs one index probe and a replay is found afterwards.
std::string insert_sql(std::size_t rows) {
  std::string sql(kInsertInto);
  for (std::size_t r = 0; r < rows; ++r) {
    sql += r == 0 ? "(" : ", (";
    for (int c = 0; c < kColumnsPerRow; ++c) sql += c == 0 ? "?" : ", ?";
    sql += ')';
  }
  sql += " ON CONFLICT (reading_id) DO NOTHING";
  return sql;
}

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

// A row of a batch on its way into a multi-row INSERT.
struct PendingRow {
  std::size_t row;           // index into the batch
  const BatteryRef* battery;
};

// The prepared statements of one write transaction, reused for every row.
struct ReadingStatements {
  explicit ReadingStatements(Db& db)
      : db(db),
        existing(db.prepare("SELECT id, content_hash FROM readings WHERE reading_id = ?1")),
        // Answered from the end of the table's b-tree, one seek.
        largest(db.prepare("SELECT max(id) FROM readings")),
        inserts{db.prepare(insert_sql(kRowsPerInsert[0])), db.prepare(insert_sql(kRowsPerInsert[1])),
                db.prepare(insert_sql(kRowsPerInsert[2]))},
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

  // Inserts one row (the bulk load); false (and nothing written) when its
  // reading_id is stored already.
  bool insert_row(const PreparedReading& prepared, const BatteryRef& battery, sys_seconds now) {
    Statement& s = inserts.back();
    s.reset();
    bind_row(s, 0, prepared, battery, now);
    s.run();
    return db.changes() == 1;
  }

  // Inserts `rows` of `batch` in order, with as few statements as fit;
  // returns how many went in (a reading_id stored already leaves its row
  // out).
  std::size_t insert_rows(const std::vector<PendingRow>& rows,
                          const std::vector<PreparedReading>& batch, sys_seconds now) {
    std::size_t done = 0, inserted = 0;
    while (done < rows.size()) {
      std::size_t size = 0;
      while (kRowsPerInsert[size] > rows.size() - done) ++size;
      Statement& s = inserts[size];
      s.reset();
      for (std::size_t i = 0; i < kRowsPerInsert[size]; ++i) {
        const PendingRow& r = rows[done + i];
        bind_row(s, static_cast<int>(i) * kColumnsPerRow, batch[r.row], *r.battery, now);
      }
      s.run();
      inserted += static_cast<std::size_t>(db.changes());  // rows of this statement, not the triggers'
      done += kRowsPerInsert[size];
    }
    return inserted;
  }

  // The largest reading row id so far (0 for none).
  Id largest_id() {
    largest.reset();
    const Id id = largest.step() ? largest.opt_int_at(0).value_or(0) : 0;
    largest.reset();
    return id;
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
  Statement largest;
  std::array<Statement, kRowsPerInsert.size()> inserts;  // one per kRowsPerInsert size
  Statement original;
  std::unordered_map<std::string, BatteryRef> batteries;

 private:
  // Binds the row with its derived facts (reading_facts.hpp; the summary
  // triggers read them) to parameters first + 1 .. first + kColumnsPerRow.
  // Texts are bound in place: `prepared` outlives the statement's step.
  void bind_row(Statement& s, int first, const PreparedReading& prepared, const BatteryRef& battery,
                sys_seconds now) {
    const ReadingInput& r = prepared.input;
    const ReadingFacts facts = facts_for(prepared, battery.spec);
    const auto at = [first](int column) { return first + column; };
    s.bind_kept(at(1), r.reading_id).bind(at(2), battery.id).bind(at(3), to_db(r.taken_at));
    s.bind(at(4), to_db(now)).bind(at(5), raw(r.ocv)).bind_kept(at(6), prepared.cell_sg_text);
    bind_temperature(s, at(7), r.electrolyte);
    bind_temperature(s, at(9), r.ambient);
    s.bind(at(11), raw(r.rest)).bind(at(12), raw(r.load_test_current));
    s.bind(at(13), raw(r.load_test_end));
    s.bind_kept(at(14), r.logged_by).bind_kept(at(15), r.source).bind_kept(at(16), r.note);
    s.bind(at(17), r.after_charge ? 1 : 0).bind(at(18), r.water_added ? 1 : 0);
    s.bind_blob_kept(at(19), prepared.hash.data(), prepared.hash.size());
    s.bind(at(20), facts.trusted_soc_pct).bind(at(21), facts.trusted_temp_c);
  }
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

// What became of one row of a batch.
struct RowFate {
  enum class Kind { inserted, replay_of_stored, replay_in_batch } kind = Kind::inserted;
  Id id = 0;              // inserted: its row id
  Id battery_id = 0;      // inserted
  std::size_t index = 0;  // replay_of_stored: into BatchPlan::originals;
                          // replay_in_batch: the earlier row
};

// A batch worked through inside a transaction: rows inserted, replays
// found, or the problems that refuse it. The batch's readings are not yet
// moved out, so a refused batch can be written again.
struct BatchPlan {
  std::vector<RowFate> fates;               // one per row (meaningful when accepted)
  std::vector<StoredReading> originals;     // the earlier readings replayed
  std::vector<RowProblem> problems;         // every refused row
};

// The pending rows of a clean batch go in; each one's fate is then known:
// inserted, or (its reading_id stored already) a replay of that reading or
// a conflict with it.
void insert_pending(Db& db, ReadingStatements& st, const std::vector<PreparedReading>& batch,
                    std::vector<PendingRow>& pending, BatchPlan& plan, sys_seconds now) {
  if (pending.empty()) return;
  const Id before = st.largest_id();
  const std::size_t inserted = st.insert_rows(pending, batch, now);
  const Id last = inserted > 0 ? db.last_insert_id() : before;
  if (inserted == pending.size() && last - before == static_cast<Id>(inserted)) {
    // All went in. SQLite gives a new row one more than the largest id so
    // far, row after row in VALUES order, so the ids are before + 1 .. last.
    for (std::size_t i = 0; i < pending.size(); ++i)
      plan.fates[pending[i].row] = {RowFate::Kind::inserted, before + 1 + static_cast<Id>(i),
                                    pending[i].battery->id, 0};
    pending.clear();
    return;
  }
  // Some reading_ids were stored already: every row is looked up, and an
  // id above `before` is one this insert made.
  for (const PendingRow& p : pending) {
    const PreparedReading& prepared = batch[p.row];
    const std::string& reading_id = prepared.input.reading_id;
    const auto found = find_existing(st, reading_id);
    if (!found) fail(StoreErrc::internal, "reading_id '" + reading_id + "' neither inserted nor found");
    if (found->id > before) {
      plan.fates[p.row] = {RowFate::Kind::inserted, found->id, p.battery->id, 0};
    } else if (found->hash != prepared.hash) {
      plan.problems.push_back(reading_id_conflict(p.row, reading_id));
    } else {
      plan.fates[p.row] = {RowFate::Kind::replay_of_stored, 0, 0, plan.originals.size()};
      plan.originals.push_back(st.read_original(found->id));
    }
  }
  pending.clear();
}

// The pending rows of a batch already refused are only checked, so that
// every conflict with a stored reading is reported too.
void check_pending(ReadingStatements& st, const std::vector<PreparedReading>& batch,
                   std::vector<PendingRow>& pending, BatchPlan& plan) {
  for (const PendingRow& p : pending) {
    const PreparedReading& prepared = batch[p.row];
    const auto found = find_existing(st, prepared.input.reading_id);
    if (found && found->hash != prepared.hash)
      plan.problems.push_back(reading_id_conflict(p.row, prepared.input.reading_id));
  }
  pending.clear();
}

// One batch inside an open transaction: every row is checked (so all
// problems are reported), rows are inserted until the first problem, in
// multi-row statements. The caller undoes the inserts when problems come
// back.
BatchPlan plan_batch(Db& db, ReadingStatements& st, std::vector<PreparedReading>& batch,
                     sys_seconds now) {
  BatchPlan plan;
  plan.fates.resize(batch.size());
  // reading_id -> row, for ids met earlier in this batch (views into `batch`).
  std::unordered_map<std::string_view, std::size_t> seen;
  seen.reserve(batch.size());
  std::vector<PendingRow> pending;
  pending.reserve(kRowsPerInsert.front());
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
        plan.problems.push_back(reading_id_conflict(row, input.reading_id));
        continue;
      }
      plan.fates[row] = {RowFate::Kind::replay_in_batch, 0, 0, it->second};
      continue;
    }
    seen.emplace(input.reading_id, row);
    pending.push_back({row, battery});
    // Once the batch has problems it will be undone, so rows are only checked.
    if (!plan.problems.empty()) check_pending(st, batch, pending, plan);
    else if (pending.size() == kRowsPerInsert.front()) insert_pending(db, st, batch, pending, plan, now);
  }
  if (plan.problems.empty()) insert_pending(db, st, batch, pending, plan, now);
  else check_pending(st, batch, pending, plan);
  // A repeat of a row that conflicts with a stored reading conflicts too.
  std::vector<bool> conflicting(batch.size(), false);
  for (const RowProblem& p : plan.problems) conflicting[p.row] = p.code == StoreErrc::conflict;
  for (std::size_t row = 0; row < batch.size() && !plan.problems.empty(); ++row) {
    const RowFate& fate = plan.fates[row];
    if (fate.kind == RowFate::Kind::replay_in_batch && conflicting[fate.index] && !conflicting[row])
      plan.problems.push_back(reading_id_conflict(row, batch[row].input.reading_id));
  }
  // In row order, however they were found.
  std::stable_sort(plan.problems.begin(), plan.problems.end(),
                   [](const RowProblem& a, const RowProblem& b) { return a.row < b.row; });
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
