// Storing readings on PostgreSQL: idempotent batches, group commit and the
// bulk load, set at a time. The rules are sqlite_readings.cpp's; the way
// differs because every statement is a round trip to the server:
//
//   1. the batteries of every serial in the group, one query (ids, and the
//      specs each reading's facts are derived with: reading_facts.hpp);
//   2. each row checked in memory (unknown serial, a reading_id repeated
//      inside its batch, with the same or other content);
//   3. the new rows of every batch still clean go in ONE
//      INSERT ... SELECT FROM unnest(arrays) ON CONFLICT (reading_id)
//      DO NOTHING RETURNING id, reading_id;
//   4. the rows that did not go in are looked up by reading_id, one query,
//      and their content hashes compared (same: a replay answered with the
//      original, fetched in one more query; other: a conflict);
//   5. a batch with any problem has its new rows deleted again, so it
//      leaves nothing; the others stand.
//
// All of it runs in one write transaction under the cross-instance write
// lock (pg_store.hpp), so no other instance inserts between 3 and 4. When a
// reading_id is new in two batches of one group (a client retrying while
// its first request is still queued), the batches go one at a time so the
// first one owns the row, as on SQLite.

#include <algorithm>
#include <map>
#include <unordered_map>
#include <unordered_set>

#include "server/storage/reading_facts.hpp"
#include "server/storage/tokens.hpp"
#include "server/storage/pg_rows.hpp"
#include "server/storage/pg_store_impl.hpp"

namespace pbfleet::storage::pg {
namespace {

using models::wire::ReadingInput;
using std::chrono::sys_seconds;
using Tx = pqxx::transaction_base;

constexpr std::size_t kLoadChunk = 5000;  // rows per INSERT in the bulk load
constexpr std::size_t kMaxCachedRefs = 100'000;  // BatteryRefCache entries at most

std::optional<double> temperature(const std::optional<models::wire::EnteredTemperature>& t) {
  return t ? std::optional<double>(t->value.value) : std::nullopt;
}

std::optional<std::string> unit(const std::optional<models::wire::EnteredTemperature>& t) {
  if (!t) return std::nullopt;
  return std::string(t->unit == models::wire::TempUnit::f ? "F" : "C");
}

// The batteries of `serials` (unknown serials are absent), one query: read
// in the write transaction, so a spec changed by another instance is seen.
BatteryRefs battery_refs(Tx& tx, const std::vector<std::string>& serials) {
  std::unordered_set<std::string> wanted(serials.begin(), serials.end());
  ArrayLiteral list;
  for (const auto& s : wanted) list.text(s);
  BatteryRefs out;
  for (const auto& row : tx.exec_prepared("batteries_by_serials", list.str())) {
    const Battery b = read_battery(row);
    out.emplace(b.serial, BatteryRef{b.id, spec_of(b)});
  }
  return out;
}

// One array per readings column, in the INSERT's column order.
class Columns {
 public:
  void add(const PreparedReading& prepared, const BatteryRef& battery, sys_seconds now) {
    const ReadingInput& r = prepared.input;
    const ContentHash& hash = prepared.hash;
    const Id battery_id = battery.id;
    const ReadingFacts facts = facts_for(prepared, battery.spec);
    c_[0].text(r.reading_id);
    c_[1].integer(battery_id);
    c_[2].integer(to_db(r.taken_at));
    c_[3].integer(to_db(now));
    c_[4].number(raw(r.ocv));
    c_[5].text(prepared.cell_sg_text);
    c_[6].number(temperature(r.electrolyte));
    c_[7].opt_text(unit(r.electrolyte));
    c_[8].number(temperature(r.ambient));
    c_[9].opt_text(unit(r.ambient));
    c_[10].number(raw(r.rest));
    c_[11].number(raw(r.load_test_current));
    c_[12].number(raw(r.load_test_end));
    c_[13].text(r.logged_by);
    c_[14].text(r.source);
    c_[15].text(r.note);
    c_[16].boolean(r.after_charge);
    c_[17].boolean(r.water_added);
    c_[18].text(bytea_param(hash.data(), hash.size()));
    c_[19].number(facts.trusted_soc_pct);
    c_[20].number(facts.trusted_temp_c);
    ++rows_;
  }
  [[nodiscard]] std::size_t rows() const { return rows_; }

  // Inserts the rows; reading_id -> id of those that went in.
  std::unordered_map<std::string, Id> insert(Tx& tx) const {
    std::unordered_map<std::string, Id> ids;
    if (rows_ == 0) return ids;
    const auto result = tx.exec_prepared(
        "readings_insert_many", c_[0].str(), c_[1].str(), c_[2].str(), c_[3].str(), c_[4].str(),
        c_[5].str(), c_[6].str(), c_[7].str(), c_[8].str(), c_[9].str(), c_[10].str(),
        c_[11].str(), c_[12].str(), c_[13].str(), c_[14].str(), c_[15].str(), c_[16].str(),
        c_[17].str(), c_[18].str(), c_[19].str(), c_[20].str());
    ids.reserve(result.size());
    for (const auto& row : result) ids.emplace(text(row[1]), row[0].as<Id>());
    return ids;
  }

 private:
  ArrayLiteral c_[21];
  std::size_t rows_ = 0;
};

// One row of a batch after the in-memory checks.
struct Row {
  PreparedReading prepared;
  const BatteryRef* battery = nullptr;
  std::optional<std::size_t> same_as;  // an earlier row of the batch with this id and content
  bool problem = false;
};

struct BatchWork {
  std::vector<Row> rows;
  std::vector<RowProblem> problems;
  std::vector<Id> inserted;  // row ids this batch added
};

// Step 2: every row of one batch checked in memory.
BatchWork check_batch(std::vector<PreparedReading>& batch, const BatteryRefs& batteries) {
  BatchWork w;
  w.rows.resize(batch.size());
  std::unordered_map<std::string, std::size_t> first;  // reading_id -> row
  for (std::size_t i = 0; i < batch.size(); ++i) {
    Row& row = w.rows[i];
    row.prepared = std::move(batch[i]);
    const auto battery = batteries.find(row.prepared.input.serial);
    if (battery == batteries.end()) {
      w.problems.push_back({i, StoreErrc::not_found, "serial",
                            "no battery with serial '" + row.prepared.input.serial + "'"});
      row.problem = true;
      continue;
    }
    row.battery = &battery->second;
    if (row.prepared.input.reading_id.empty()) row.prepared.input.reading_id = new_reading_id();
    if (auto it = first.find(row.prepared.input.reading_id); it != first.end()) {
      if (w.rows[it->second].prepared.hash == row.prepared.hash) {
        row.same_as = it->second;
      } else {
        w.problems.push_back(reading_id_conflict(i, row.prepared.input.reading_id));
        row.problem = true;
      }
      continue;
    }
    first.emplace(row.prepared.input.reading_id, i);
  }
  return w;
}

// The stored readings with these reading_ids: id and content hash.
std::unordered_map<std::string, std::pair<Id, ContentHash>> existing(
    Tx& tx, const std::vector<std::string>& reading_ids) {
  std::unordered_map<std::string, std::pair<Id, ContentHash>> out;
  if (reading_ids.empty()) return out;
  ArrayLiteral list;
  for (const auto& id : reading_ids) list.text(id);
  for (const auto& row : tx.exec_prepared("readings_existing", list.str())) {
    std::pair<Id, ContentHash> e{row[0].as<Id>(), {}};
    bytea_into(row[2], e.second.data(), e.second.size());
    out.emplace(text(row[1]), e);
  }
  return out;
}

std::unordered_map<Id, StoredReading> originals(Tx& tx, const std::vector<Id>& ids) {
  std::unordered_map<Id, StoredReading> out;
  if (ids.empty()) return out;
  ArrayLiteral list;
  for (Id id : ids) list.integer(id);
  for (const auto& row : tx.exec_prepared("readings_by_ids", list.str())) {
    StoredReading r = read_reading(row);
    out.emplace(r.id, std::move(r));
  }
  return out;
}

bool reading_id_in_two_batches(const std::vector<BatchWork>& work) {
  std::unordered_map<std::string, std::size_t> owner;
  for (std::size_t b = 0; b < work.size(); ++b) {
    for (const Row& row : work[b].rows) {
      if (row.problem || row.same_as) continue;
      auto [it, fresh] = owner.emplace(row.prepared.input.reading_id, b);
      if (!fresh && it->second != b) return true;
    }
  }
  return false;
}

// Steps 3 to 5 for checked batches whose new reading_ids are distinct.
std::vector<AppendOutcome> store_checked(Tx& tx, std::vector<BatchWork>& work, sys_seconds now) {
  Columns columns;
  for (const BatchWork& w : work) {
    if (!w.problems.empty()) continue;
    for (const Row& row : w.rows)
      if (!row.same_as) columns.add(row.prepared, *row.battery, now);
  }
  const auto inserted = columns.insert(tx);
  std::vector<std::string> missing;
  for (const BatchWork& w : work)
    for (const Row& row : w.rows)
      if (!row.problem && !row.same_as && !inserted.count(row.prepared.input.reading_id))
        missing.push_back(row.prepared.input.reading_id);
  const auto earlier = existing(tx, missing);
  std::vector<Id> replay_ids;
  for (BatchWork& w : work) {
    for (std::size_t i = 0; i < w.rows.size(); ++i) {
      Row& row = w.rows[i];
      if (row.problem || row.same_as) continue;
      if (auto in = inserted.find(row.prepared.input.reading_id); in != inserted.end()) {
        w.inserted.push_back(in->second);
      } else if (auto e = earlier.find(row.prepared.input.reading_id); e != earlier.end()) {
        if (e->second.second == row.prepared.hash) {
          replay_ids.push_back(e->second.first);
        } else {
          w.problems.push_back(reading_id_conflict(i, row.prepared.input.reading_id));
          row.problem = true;
        }
      }
    }
    // A repeat of a conflicting row conflicts too.
    for (std::size_t i = 0; i < w.rows.size(); ++i) {
      if (w.rows[i].same_as && w.rows[*w.rows[i].same_as].problem) {
        w.problems.push_back(reading_id_conflict(i, w.rows[i].prepared.input.reading_id));
      }
    }
  }
  const auto replays = originals(tx, replay_ids);
  std::vector<Id> undo;
  std::vector<AppendOutcome> outcomes(work.size());
  for (std::size_t b = 0; b < work.size(); ++b) {
    BatchWork& w = work[b];
    AppendOutcome& out = outcomes[b];
    if (!w.problems.empty()) {
      undo.insert(undo.end(), w.inserted.begin(), w.inserted.end());
      std::sort(w.problems.begin(), w.problems.end(),
                [](const RowProblem& x, const RowProblem& y) { return x.row < y.row; });
      out.problems = std::move(w.problems);
      continue;
    }
    out.readings.reserve(w.rows.size());
    for (Row& row : w.rows) {
      if (row.same_as) {
        out.readings.push_back(out.readings[*row.same_as]);
        out.replayed.push_back(true);
      } else if (auto in = inserted.find(row.prepared.input.reading_id); in != inserted.end()) {
        StoredReading stored;
        static_cast<ReadingInput&>(stored) = std::move(row.prepared.input);
        stored.id = in->second;
        stored.battery_id = row.battery->id;
        stored.received_at = now;
        out.readings.push_back(std::move(stored));
        out.replayed.push_back(false);
      } else {
        out.readings.push_back(replays.at(earlier.at(row.prepared.input.reading_id).first));
        out.replayed.push_back(true);
      }
    }
    out.replayed_count =
        static_cast<std::size_t>(std::count(out.replayed.begin(), out.replayed.end(), true));
    out.stored = out.readings.size() - out.replayed_count;
  }
  if (!undo.empty()) {
    ArrayLiteral list;
    for (Id id : undo) list.integer(id);
    tx.exec_prepared("readings_delete_ids", list.str());
  }
  return outcomes;
}

}  // namespace

std::vector<AppendOutcome> append_group(Tx& tx, std::vector<std::vector<PreparedReading>>& batches,
                                        sys_seconds now, BatteryRefCache& cache,
                                        std::int64_t fleet_changes) {
  if (fleet_changes < 0 || fleet_changes != cache.fleet_changes) {
    cache.refs.clear();
    cache.fleet_changes = fleet_changes;
  }
  std::vector<std::string> unknown;
  for (const auto& batch : batches)
    for (const auto& r : batch)
      if (!cache.refs.contains(r.input.serial)) unknown.push_back(r.input.serial);
  if (!unknown.empty()) {
    if (cache.refs.size() > kMaxCachedRefs) cache.refs.clear();
    cache.refs.merge(battery_refs(tx, unknown));
  }
  const BatteryRefs& batteries = cache.refs;
  std::vector<BatchWork> work;
  work.reserve(batches.size());
  for (auto& batch : batches) work.push_back(check_batch(batch, batteries));
  std::vector<AppendOutcome> outcomes;
  if (reading_id_in_two_batches(work)) {
    outcomes.reserve(work.size());
    for (auto& w : work) {
      std::vector<BatchWork> one;
      one.push_back(std::move(w));
      outcomes.push_back(std::move(store_checked(tx, one, now).front()));
    }
  } else {
    outcomes = store_checked(tx, work, now);
  }
  return outcomes;
}

std::size_t load_group(Tx& tx, const std::vector<ReadingInput>& batch, sys_seconds now) {
  std::vector<std::string> serials;
  for (const auto& r : batch) serials.push_back(r.serial);
  const BatteryRefs batteries = battery_refs(tx, serials);
  for (std::size_t from = 0; from < batch.size(); from += kLoadChunk) {
    Columns columns;
    std::vector<std::string> wanted;
    for (std::size_t i = from; i < std::min(batch.size(), from + kLoadChunk); ++i) {
      ReadingInput r = batch[i];
      const auto battery = batteries.find(r.serial);
      if (battery == batteries.end())
        fail(StoreErrc::not_found, "no battery with serial '" + r.serial + "'", "serial");
      if (r.reading_id.empty()) r.reading_id = new_reading_id();
      wanted.push_back(r.reading_id);
      columns.add(prepare_reading(std::move(r), std::nullopt), battery->second, now);
    }
    const auto inserted = columns.insert(tx);
    if (inserted.size() != wanted.size()) {
      for (const auto& id : wanted)
        if (!inserted.count(id))
          fail(StoreErrc::conflict, "reading_id '" + id + "' is already stored", "reading_id");
    }
  }
  return batch.size();
}

}  // namespace pbfleet::storage::pg
