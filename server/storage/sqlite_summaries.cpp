// Per-battery summaries (reading_facts.hpp, schema 0004): the rebuild when
// the derive rules changed, the winter report's read, the data version.

#include <algorithm>

#include "server/storage/reading_facts.hpp"
#include "server/storage/sqlite_rows.hpp"
#include "server/storage/sqlite_store_impl.hpp"

namespace pbfleet::storage::sqlite {

namespace {

using std::chrono::sys_seconds;

sys_seconds from_db_seconds(std::int64_t s) { return sys_seconds{std::chrono::seconds{s}}; }

// Works the facts of one battery's readings out again from their raw values.
void refill_facts(Db& db, const Battery& b) {
  std::string measured(kMeasurementSelect);
  measured.insert(measured.find(" FROM readings r"), ", r.id");  // column 9
  auto rows = db.prepare(measured + " WHERE r.battery_id = ?1");
  auto update = db.prepare("UPDATE readings SET trusted_soc_pct = ?2, trusted_temp_c = ?3 WHERE id = ?1");
  const auto spec = spec_of(b);
  ReadingMeasurement m;
  rows.bind(1, b.id);
  while (rows.step()) {
    read_measurement(rows, m);
    const ReadingFacts f = facts_of(spec, point_of(m));
    update.reset();
    update.bind(1, rows.int_at(9)).bind(2, f.trusted_soc_pct).bind(3, f.trusted_temp_c).run();
  }
}

// Sets one battery's summary from its newest readings' facts: what the
// insert triggers of schema 0004 keep up one reading at a time.
void rebuild_summary(Db& db, Id battery) {
  auto newest = db.prepare(
      "SELECT id, taken_at, trusted_soc_pct, trusted_temp_c FROM readings WHERE battery_id = ?1"
      " ORDER BY taken_at DESC, id DESC LIMIT ?2");
  newest.bind(1, battery).bind(2, static_cast<std::int64_t>(analytics::kWinterLookback));
  std::optional<std::int64_t> latest, trusted_id, trusted_at;
  std::optional<double> soc, temp;
  std::int64_t recent = 0, newer = 0;
  while (newest.step()) {
    if (!latest) latest = newest.int_at(1);
    if (!trusted_id && !newest.is_null(2)) {
      trusted_id = newest.int_at(0);
      trusted_at = newest.int_at(1);
      soc = newest.opt_real_at(2);
      temp = newest.opt_real_at(3);
      newer = recent;
    }
    ++recent;
  }
  newest.reset();
  db.prepare("INSERT OR IGNORE INTO battery_summaries (battery_id) VALUES (?1)").bind(1, battery).run();
  auto update = db.prepare(
      "UPDATE battery_summaries SET latest_at = ?2, recent = ?3, trusted_id = ?4, trusted_at = ?5,"
      " trusted_soc_pct = ?6, trusted_temp_c = ?7, newer_than_trusted = ?8, revision = revision + 1"
      " WHERE battery_id = ?1");
  update.bind(1, battery).bind(2, latest).bind(3, recent).bind(4, trusted_id).bind(5, trusted_at);
  update.bind(6, soc).bind(7, temp).bind(8, trusted_id ? newer : 0).run();
}

}  // namespace

void refresh_battery_facts(Db& db, const Battery& battery) {
  refill_facts(db, battery);
  rebuild_summary(db, battery.id);
}

void SqliteStore::refresh_summaries() {
  const std::string version = facts_version();
  Transaction tx(*writer_);
  auto stored = writer_->prepare("SELECT value FROM summary_state WHERE name = 'facts_version'");
  if (stored.step() && stored.text_at(0) == version) return;
  stored.reset();
  std::vector<Battery> batteries;
  {
    auto all = writer_->prepare(std::string(kBatterySelect) + " ORDER BY b.id");
    while (all.step()) batteries.push_back(read_battery(all));
  }
  for (const Battery& b : batteries) refresh_battery_facts(*writer_, b);
  writer_->prepare("UPDATE summary_state SET value = ?1 WHERE name = 'facts_version'")
      .bind(1, version)
      .run();
  tx.commit();
}

StoreResult<Done> SqliteStore::visit_summaries(const BatteryFilter& filter,
                                               const SummaryVisitor& visit) {
  return read([&](Db& db) {
    const std::vector<Battery> batteries = batteries_matching(db, filter);
    // Both in battery id order: one pass over the summaries table.
    auto s = db.prepare(
        "SELECT battery_id, latest_at, recent, trusted_at, trusted_soc_pct, trusted_temp_c, revision"
        " FROM battery_summaries ORDER BY battery_id");
    bool more = s.step();
    for (const Battery& b : batteries) {
      while (more && s.int_at(0) < b.id) more = s.step();
      BatterySummary summary;
      if (more && s.int_at(0) == b.id) {
        if (!s.is_null(1)) summary.latest_at = from_db_seconds(s.int_at(1));
        summary.recent = static_cast<std::size_t>(s.int_at(2));
        if (!s.is_null(3) && !s.is_null(4) && !s.is_null(5)) {
          summary.trusted = analytics::TrustedBasis{from_db_seconds(s.int_at(3)), s.real_at(4), s.real_at(5)};
        }
        summary.revision = s.int_at(6);
      }
      visit(b, summary);
    }
    return Done{};
  });
}

StoreResult<std::int64_t> SqliteStore::data_version() {
  return read([](Db& db) {
    return db.query_int(
        "SELECT sum(value) FROM counters WHERE name IN ('readings', 'fleet_changes')");
  });
}

StoreResult<BatteryVersion> SqliteStore::battery_version(Id battery_id) {
  return read([&](Db& db) {
    auto s = db.prepare(
        "SELECT s.revision, c.value FROM battery_summaries s, counters c"
        " WHERE s.battery_id = ?1 AND c.name = 'fleet_changes'");
    if (!s.bind(1, battery_id).step())
      fail(StoreErrc::not_found, "no battery with id " + std::to_string(battery_id));
    return BatteryVersion{s.int_at(0), s.int_at(1)};
  });
}

}  // namespace pbfleet::storage::sqlite
