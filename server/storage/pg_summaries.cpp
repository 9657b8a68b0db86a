// Per-battery summaries on PostgreSQL (reading_facts.hpp, schema 0004):
// the rebuild when the derive rules changed, the winter report's read, the
// data version. The summaries themselves are kept by the triggers of
// schema/postgresql/0004_battery_summaries.sql.

#include "server/storage/pg_rows.hpp"
#include "server/storage/pg_store_impl.hpp"
#include "server/storage/reading_facts.hpp"

namespace pbfleet::storage::pg {

namespace {

using Tx = pqxx::transaction_base;
using std::chrono::sys_seconds;

constexpr std::size_t kUpdateChunk = 5000;  // rows per UPDATE ... FROM unnest

sys_seconds from_db_seconds(std::int64_t s) { return sys_seconds{std::chrono::seconds{s}}; }

// Writes the facts of `ids` (same order as `facts`), a chunk at a time.
void write_facts(Tx& tx, const std::vector<Id>& ids, const std::vector<ReadingFacts>& facts) {
  for (std::size_t from = 0; from < ids.size(); from += kUpdateChunk) {
    ArrayLiteral id_list, soc, temp;
    for (std::size_t i = from; i < std::min(ids.size(), from + kUpdateChunk); ++i) {
      id_list.integer(ids[i]);
      soc.number(facts[i].trusted_soc_pct);
      temp.number(facts[i].trusted_temp_c);
    }
    tx.exec_params(
        "UPDATE readings r SET trusted_soc_pct = f.soc, trusted_temp_c = f.temp"
        " FROM unnest($1::bigint[], $2::float8[], $3::float8[]) AS f(id, soc, temp) WHERE r.id = f.id",
        id_list.str(), soc.str(), temp.str());
  }
}

}  // namespace

void refresh_battery_facts(Tx& tx, const Battery& battery) {
  const auto spec = spec_of(battery);
  std::vector<Id> ids;
  std::vector<ReadingFacts> facts;
  ReadingMeasurement m;
  const auto rows = tx.exec_params(std::string(kMeasurementColumns) +
                                       ", r.id FROM readings r WHERE r.battery_id = $1",
                                   battery.id);
  for (const auto& row : rows) {
    read_measurement(row, m);
    ids.push_back(row[9].as<Id>());
    facts.push_back(facts_of(spec, point_of(m)));
  }
  write_facts(tx, ids, facts);
  tx.exec_params("SELECT refresh_battery_summaries(ARRAY[$1::bigint])", battery.id);
}

void refresh_summaries(pqxx::connection& c) {
  const std::string version = facts_version();
  pqxx::nontransaction tx(c);
  tx.exec(begin_write_sql());  // no instance writes readings meanwhile
  try {
    const auto stored = tx.exec1("SELECT value FROM summary_state WHERE name = 'facts_version'");
    if (text(stored[0]) != version) {
      std::vector<Battery> batteries;
      for (const auto& row : tx.exec(std::string(kBatterySelect) + " ORDER BY b.id"))
        batteries.push_back(read_battery(row));
      for (const Battery& b : batteries) refresh_battery_facts(tx, b);
      tx.exec("SELECT refresh_battery_summaries(ARRAY(SELECT id FROM batteries))");
      tx.exec_params("UPDATE summary_state SET value = $1 WHERE name = 'facts_version'", version);
    }
    tx.exec("COMMIT");
  } catch (...) {
    try {
      tx.exec("ROLLBACK");
    } catch (...) {
    }
    throw;
  }
}

StoreResult<Done> PgStore::visit_summaries(const BatteryFilter& filter, const SummaryVisitor& visit) {
  return read([&](pqxx::dbtransaction& tx) {
    const std::vector<Battery> batteries = batteries_matching(tx, filter);
    const auto rows = tx.exec(
        "SELECT battery_id, latest_at, recent, trusted_at, trusted_soc_pct, trusted_temp_c, revision"
        " FROM battery_summaries ORDER BY battery_id");
    auto row = rows.begin();
    for (const Battery& b : batteries) {
      while (row != rows.end() && (*row)[0].as<Id>() < b.id) ++row;
      BatterySummary summary;
      if (row != rows.end() && (*row)[0].as<Id>() == b.id) {
        const auto& r = *row;
        if (!r[1].is_null()) summary.latest_at = from_db_seconds(r[1].as<std::int64_t>());
        summary.recent = r[2].as<std::size_t>();
        if (!r[3].is_null() && !r[4].is_null() && !r[5].is_null()) {
          summary.trusted = analytics::TrustedBasis{from_db_seconds(r[3].as<std::int64_t>()),
                                                    r[4].as<double>(), r[5].as<double>()};
        }
        summary.revision = r[6].as<std::int64_t>();
      }
      visit(b, summary);
    }
    return Done{};
  });
}

StoreResult<std::int64_t> PgStore::data_version() {
  return read_one([](Tx& tx) {
    return tx
        .exec1("SELECT sum(value)::bigint FROM counters WHERE name IN ('readings', 'fleet_changes')")[0]
        .as<std::int64_t>();
  });
}

StoreResult<BatteryVersion> PgStore::battery_version(Id battery_id) {
  return read_one([&](Tx& tx) {
    const auto rows = tx.exec_params(
        "SELECT s.revision, c.value FROM battery_summaries s, counters c"
        " WHERE s.battery_id = $1 AND c.name = 'fleet_changes'",
        battery_id);
    if (rows.empty()) fail(StoreErrc::not_found, "no battery with id " + std::to_string(battery_id));
    return BatteryVersion{rows[0][0].as<std::int64_t>(), rows[0][1].as<std::int64_t>()};
  });
}

}  // namespace pbfleet::storage::pg
