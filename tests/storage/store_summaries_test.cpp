// Per-battery summaries (reading_facts.hpp, schema 0004) on both stores:
// after random inserts in random order, refused batches, replays, bulk
// loads, restarts, a spec change and a change of derive rules, each
// battery's summary equals what the winter look-back finds when it is
// worked out again from the raw readings (analytics::winter_basis over
// readings_for). That recomputation is the reference: it shares no code
// with the triggers that keep the summaries.
#include "server/storage/reading_facts.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include <map>
#include <random>

#include "fixture.hpp"
#include "server/storage/sqlite_db.hpp"

namespace pbfleet::storage {
namespace {

using models::wire::ReadingInput;
using testing::at;
using testing::Fleet;

// How a battery's readings are taken: the share taken so the models trust
// them (hydrometer and a rested OCV), the rest a quick OCV after a short
// rest (unsettled: not trusted).
struct Habit {
  std::string serial;
  double trusted_share;
};

const std::vector<Habit> kHabits = {
    {"NY-0001", 0.9}, {"NY-0002", 0.5}, {"NY-0003", 0.15}, {"NY-0004", 0.04}, {"NY-0005", 0.0}};

class Readings {
 public:
  explicit Readings(std::uint32_t seed) : rng_(seed) {}

  ReadingInput next(const Habit& habit) {
    ReadingInput r;
    r.reading_id = "s-" + std::to_string(++count_);
    r.serial = habit.serial;
    // Few distinct days, so taken_at ties are common and order is random.
    r.taken_at = at(std::uniform_int_distribution<int>(0, 60)(rng_),
                    std::uniform_int_distribution<int>(0, 1)(rng_) * 6);
    std::uniform_real_distribution<double> unit(0.0, 1.0);
    if (unit(rng_) < habit.trusted_share) {
      const double sg = 1.150 + 0.120 * unit(rng_);
      for (int c = 0; c < 6; ++c) r.cell_sg.push_back(models::SpecificGravity{sg - 0.004 * (c % 3)});
      r.ocv = models::Volts{11.9 + 0.8 * unit(rng_)};
      r.rest = models::Hours{8 + 16 * unit(rng_)};
    } else {
      r.ocv = models::Volts{12.0 + 0.9 * unit(rng_)};
      r.rest = models::Hours{0.5};
    }
    if (unit(rng_) < 0.7) {
      r.electrolyte = models::wire::EnteredTemperature{models::Celsius{-15 + 40 * unit(rng_)},
                                                       models::wire::TempUnit::c};
    }
    r.after_charge = unit(rng_) < 0.2;
    return r;
  }

  std::vector<ReadingInput> batch(std::size_t size) {
    std::vector<ReadingInput> out;
    for (std::size_t i = 0; i < size; ++i) out.push_back(next(kHabits[pick_(rng_)]));
    return out;
  }

  std::size_t size(std::size_t max) { return std::uniform_int_distribution<std::size_t>(1, max)(rng_); }

 private:
  std::mt19937 rng_;
  std::uniform_int_distribution<std::size_t> pick_{0, kHabits.size() - 1};
  int count_ = 0;
};

// The reference: the look-back worked out from the raw readings.
analytics::WinterBasis recomputed(Store& store, const Battery& battery) {
  const auto stored = store.readings_for(battery.serial, std::nullopt, std::nullopt).value();
  std::vector<analytics::ReadingPoint> points;
  for (const auto& r : stored) points.push_back(point_of(static_cast<const ReadingInput&>(r)));
  return analytics::winter_basis(points, spec_of(battery), analytics::AnalyticsSettings{});
}

struct Tally {
  int with_trusted = 0;
  int without = 0;
  int full_lookback = 0;
};

// Every battery's summary against the reference; counts what was seen so
// the caller can check the cases were not all alike.
Tally check_all(Store& store) {
  std::map<std::string, BatterySummary> kept;
  std::map<std::string, Battery> batteries;
  REQUIRE(store
              .visit_summaries({}, [&](const Battery& b, const BatterySummary& s) {
                kept[b.serial] = s;
                batteries[b.serial] = b;
              })
              .ok());
  REQUIRE(kept.size() == kHabits.size());
  Tally tally;
  for (const auto& [serial, summary] : kept) {
    CAPTURE(serial);
    const analytics::WinterBasis want = recomputed(store, batteries[serial]);
    CHECK(summary.latest_at == want.latest_at);
    CHECK(summary.recent == want.recent);
    REQUIRE(summary.trusted.has_value() == want.trusted.has_value());
    if (want.trusted) {
      CHECK(summary.trusted->taken_at == want.trusted->taken_at);
      CHECK(summary.trusted->soc_percent == doctest::Approx(want.trusted->soc_percent).epsilon(1e-9));
      CHECK(summary.trusted->electrolyte_c == doctest::Approx(want.trusted->electrolyte_c).epsilon(1e-9));
      ++tally.with_trusted;
    } else {
      ++tally.without;
    }
    tally.full_lookback += want.recent == analytics::kWinterLookback;
  }
  return tally;
}

// Prepared as the API prepares a batch: under each battery's own spec.
std::vector<PreparedReading> prepared_under_own_spec(Store& store, const std::vector<ReadingInput>& batch) {
  std::vector<PreparedReading> out;
  for (const auto& r : batch) out.push_back(prepare_reading(r, spec_of(store.get_battery(r.serial).value())));
  return out;
}

// A spec none of the batteries has, as if a battery's spec had changed
// between the request's check and the write.
models::BatterySpec stale_spec() {
  models::BatterySpec spec = models::default_spec(models::Chemistry::flooded, 6);
  spec.full_charge_sg = models::SpecificGravity{1.310};
  return spec;
}

// Prepared under `spec`, with facts no model would give: a store that kept
// them would show them in the summaries.
std::vector<PreparedReading> prepared_under(const models::BatterySpec& spec,
                                            const std::vector<ReadingInput>& batch) {
  std::vector<PreparedReading> out;
  for (const auto& r : batch) {
    out.push_back(prepare_reading(r, spec));
    out.back().facts = ReadingFacts{999.0, 99.0};
  }
  return out;
}

template <class Backend>
void add_batteries(Fleet<Backend>& f) {
  for (std::size_t i = 1; i < kHabits.size(); ++i) {
    Battery b = Fleet<Backend>::make_battery(kHabits[i].serial, f.vehicle.id);
    if (i == 2) b.chemistry = models::Chemistry::agm;
    if (i == 3) b.full_charge_sg = std::nullopt;
    REQUIRE(f.store->create_battery(b, at(0)).ok());
  }
}

}  // namespace

STORE_TEST_CASE("summaries equal the look-back worked out from the raw readings, whatever the order") {
  Fleet<Backend> f;
  add_batteries(f);
  Readings gen(20261203);
  // Nothing stored yet: every summary is empty.
  Tally t = check_all(*f.store);
  CHECK(t.without == 5);

  Tally seen;
  for (int round = 0; round < 12; ++round) {
    CAPTURE(round);
    // Single batches, out of taken_at order.
    for (int i = 0; i < 4; ++i) REQUIRE(f.store->append_readings(gen.batch(gen.size(20)), at(70)).ok());
    // A group with a refused batch (unknown serial): nothing of it may count.
    auto refused = gen.batch(5);
    refused.back().serial = "NO-SUCH";
    // Prepared as the API prepares them: the first batch under each
    // battery's own spec (its facts are stored as given), the last under a
    // spec no battery has (the store must work them out again).
    std::vector<std::vector<PreparedReading>> group_batches;
    group_batches.push_back(prepared_under_own_spec(*f.store, gen.batch(gen.size(30))));
    group_batches.push_back(prepare_readings(refused));
    group_batches.push_back(prepared_under(stale_spec(), gen.batch(3)));
    const auto group = f.store->append_reading_batches(std::move(group_batches), at(70));
    REQUIRE(group.ok());
    CHECK_FALSE(group.value()[1].accepted());
    // A replay of a stored batch adds nothing.
    const auto again = gen.batch(4);
    REQUIRE(f.store->append_readings(again, at(70)).ok());
    REQUIRE(f.store->append_readings(again, at(71)).value().replayed_count == 4);
    // The bulk load keeps them too.
    REQUIRE(f.store->load_readings(gen.batch(gen.size(40)), at(70)).ok());
    t = check_all(*f.store);
    seen.with_trusted += t.with_trusted;
    seen.without += t.without;
    seen.full_lookback += t.full_lookback;
    if (round % 4 == 3) f.store = Backend::reopen(f.dir);  // a restart keeps them
  }
  // The cases were mixed: batteries with and without a trusted reading in
  // their look-back, full look-backs among them.
  CHECK(seen.with_trusted > 10);
  CHECK(seen.without > 10);
  CHECK(seen.full_lookback > 10);

  // A spec change works the battery's facts out again with the new spec.
  Battery changed = f.store->get_battery("NY-0002").value();
  const auto before = recomputed(*f.store, changed);
  changed.chemistry = models::Chemistry::agm;
  changed.full_charge_sg = models::SpecificGravity{1.300};
  REQUIRE(f.store->update_battery(changed).ok());
  check_all(*f.store);
  const auto after = recomputed(*f.store, f.store->get_battery("NY-0002").value());
  REQUIRE(before.trusted);
  REQUIRE(after.trusted);
  CHECK(after.trusted->soc_percent != before.trusted->soc_percent);
}

TEST_CASE("a database summarised under other derive rules is summarised again when it opens") {
  Fleet<> f;
  add_batteries(f);
  Readings gen(7);
  REQUIRE(f.store->load_readings(gen.batch(300), at(70)).ok());
  f.store.reset();
  {
    // As if another binary had summarised it: other version, facts wiped,
    // summaries wrong.
    sqlite::Db db(f.dir.file("fleet.db"), sqlite::Db::Mode::read_write_create);
    db.exec("UPDATE summary_state SET value = 'derive 0' WHERE name = 'facts_version'");
    db.exec("UPDATE readings SET trusted_soc_pct = NULL, trusted_temp_c = NULL");
    db.exec("UPDATE battery_summaries SET recent = 0, latest_at = NULL, trusted_at = NULL,"
            " trusted_id = NULL, trusted_soc_pct = NULL, trusted_temp_c = NULL");
    CHECK(db.query_int("SELECT count(*) FROM readings WHERE trusted_soc_pct IS NOT NULL") == 0);
  }
  f.store = testing::SqliteBackend::reopen(f.dir);
  const Tally t = check_all(*f.store);
  CHECK(t.with_trusted >= 3);
  sqlite::Db db(f.dir.file("fleet.db"), sqlite::Db::Mode::read_only);
  CHECK(db.query_int("SELECT count(*) FROM readings WHERE trusted_soc_pct IS NOT NULL") > 0);
}

STORE_TEST_CASE("facts prepared under the battery's own spec are stored as given, without deriving again") {
  Fleet<Backend> f;
  // An unsettled OCV reading: the models do not trust it, so facts the
  // store worked out itself would be empty.
  ReadingInput r = testing::reading("p-1", "NY-0001", 3);
  r.cell_sg.clear();
  r.rest = models::Hours{0.5};
  REQUIRE_FALSE(facts_of(spec_of(f.battery), point_of(r)).trusted_soc_pct.has_value());
  std::vector<std::vector<PreparedReading>> group{{prepare_reading(r, spec_of(f.battery))}};
  group[0][0].facts = ReadingFacts{42.5, 7.0};
  REQUIRE(f.store->append_reading_batches(std::move(group), at(4)).ok());
  std::optional<BatterySummary> kept;
  REQUIRE(f.store->visit_summaries({}, [&](const Battery&, const BatterySummary& s) { kept = s; }).ok());
  REQUIRE(kept);
  REQUIRE(kept->trusted.has_value());
  CHECK(kept->trusted->soc_percent == 42.5);
  CHECK(kept->trusted->electrolyte_c == 7.0);
}

STORE_TEST_CASE("the data version moves on with each stored reading and fleet change, not with reads") {
  Fleet<Backend> f;
  const auto v0 = f.store->data_version().value();
  REQUIRE(f.store->readings_for("NY-0001", std::nullopt, std::nullopt).ok());
  CHECK(f.store->data_version().value() == v0);
  REQUIRE(f.store->append_readings({testing::reading("d-1", "NY-0001", 3)}, at(4)).ok());
  const auto v1 = f.store->data_version().value();
  CHECK(v1 > v0);
  // A replay stores nothing: same version.
  REQUIRE(f.store->append_readings({testing::reading("d-1", "NY-0001", 3)}, at(5)).ok());
  CHECK(f.store->data_version().value() == v1);
  Battery b = f.battery;
  b.rated_cca_a = models::Amperes{700};
  REQUIRE(f.store->update_battery(b).ok());
  const auto v2 = f.store->data_version().value();
  CHECK(v2 > v1);
  REQUIRE(f.store->retire_battery("NY-0001", "worn out", at(6)).ok());
  CHECK(f.store->data_version().value() > v2);
}

}  // namespace pbfleet::storage

namespace pbfleet::storage {

STORE_TEST_CASE("a battery's summary revision moves on with each reading stored for it, and only then") {
  Fleet<Backend> f;
  REQUIRE(f.store->create_battery(Fleet<Backend>::make_battery("NY-0002", f.vehicle.id), at(0)).ok());
  auto revisions = [&] {
    std::map<std::string, std::int64_t> out;
    REQUIRE(f.store->visit_summaries({}, [&](const Battery& b, const BatterySummary& s) { out[b.serial] = s.revision; }).ok());
    return out;
  };
  const auto r0 = revisions();
  REQUIRE(f.store->append_readings({testing::reading("v-1", "NY-0001", 9)}, at(10)).ok());
  const auto r1 = revisions();
  CHECK(r1.at("NY-0001") > r0.at("NY-0001"));
  CHECK(r1.at("NY-0002") == r0.at("NY-0002"));
  // An older reading (below the look-back's view of the summary) still counts.
  REQUIRE(f.store->append_readings({testing::reading("v-2", "NY-0001", 1)}, at(10)).ok());
  const auto r2 = revisions();
  CHECK(r2.at("NY-0001") > r1.at("NY-0001"));
  // A replay and a refused batch store nothing: no change.
  REQUIRE(f.store->append_readings({testing::reading("v-2", "NY-0001", 1)}, at(11)).ok());
  auto bad = testing::reading("v-3", "NO-SUCH", 2);
  REQUIRE_FALSE(f.store->append_readings({testing::reading("v-4", "NY-0001", 3), bad}, at(11)).value().accepted());
  const auto r3 = revisions();
  // PostgreSQL undoes a refused batch by deleting its rows, which moves
  // the revision on again; either way it never goes back.
  CHECK(r3.at("NY-0001") >= r2.at("NY-0001"));
  if constexpr (!Backend::kPostgres) CHECK(r3.at("NY-0001") == r2.at("NY-0001"));
  CHECK(r3.at("NY-0002") == r0.at("NY-0002"));
}

STORE_TEST_CASE("a battery's version is its summary revision and the fleet change count") {
  Fleet<Backend> f;
  const Id one = f.store->get_battery("NY-0001").value().id;
  const auto v0 = f.store->battery_version(one).value();
  REQUIRE(f.store->append_readings({testing::reading("bv-1", "NY-0001", 9)}, at(10)).ok());
  const auto v1 = f.store->battery_version(one).value();
  CHECK(v1.revision > v0.revision);
  CHECK(v1.fleet_changes == v0.fleet_changes);
  // Another battery: a fleet change, then its reading; this battery's
  // revision stays.
  REQUIRE(f.store->create_battery(Fleet<Backend>::make_battery("NY-0002", f.vehicle.id), at(11)).ok());
  REQUIRE(f.store->append_readings({testing::reading("bv-2", "NY-0002", 9)}, at(12)).ok());
  const auto v2 = f.store->battery_version(one).value();
  CHECK(v2.revision == v1.revision);
  CHECK(v2.fleet_changes > v1.fleet_changes);
  CHECK(f.store->battery_version(one).value() == v2);  // reads change nothing
  CHECK(f.store->battery_version(999'999).error().code == StoreErrc::not_found);
}

}  // namespace pbfleet::storage
