// Readings through the Store interface (SQLite and PostgreSQL, each case on both): atomic idempotent batches,
// group commit, bulk load and the report queries.
#include "server/storage/store.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include <algorithm>
#include <cstdio>
#include <map>
#include <random>
#include <set>

#include "fixture.hpp"

namespace pbfleet::storage {
namespace {

using models::wire::ReadingInput;
using testing::at;
using testing::Fleet;
using testing::reading;

std::vector<ReadingInput> week_round(const std::string& prefix, int count, int day = 1) {
  std::vector<ReadingInput> batch;
  for (int i = 0; i < count; ++i)
    batch.push_back(reading(prefix + std::to_string(i), "NY-0001", day + i));
  return batch;
}

}  // namespace

STORE_TEST_CASE("a batch is stored whole and every raw field reads back unchanged") {
  Fleet<Backend> f;
  ReadingInput r = reading("r-1", "NY-0001", 3);
  r.electrolyte = models::wire::EnteredTemperature{models::Celsius{-5}, models::wire::TempUnit::f};
  r.ambient = models::wire::EnteredTemperature{models::Celsius{-12.5}, models::wire::TempUnit::c};
  r.load_test_current = models::Amperes{400};
  r.load_test_end = models::Volts{9.9};
  r.note = "cell 3 low; water added";
  r.after_charge = true;
  r.water_added = true;
  const auto out = f.store->append_readings({r}, at(4));
  REQUIRE(out.ok());
  REQUIRE(out->accepted());
  CHECK(out->stored == 1);
  CHECK(out->replayed_count == 0);

  const auto back = f.store->readings_for("NY-0001", std::nullopt, std::nullopt).value();
  REQUIRE(back.size() == 1);
  const StoredReading& s = back[0];
  CHECK(s.id == out->readings[0].id);
  CHECK(s.battery_id == f.battery.id);
  CHECK(s.received_at == at(4));
  CHECK(s.reading_id == "r-1");
  CHECK(s.serial == "NY-0001");
  CHECK(s.taken_at == at(3));
  CHECK(s.ocv->value == 12.62);
  REQUIRE(s.cell_sg.size() == 6);
  CHECK(s.cell_sg[2].value == 1.260);
  CHECK(s.electrolyte->value.value == -5.0);
  CHECK(s.electrolyte->unit == models::wire::TempUnit::f);
  CHECK(s.ambient->value.value == -12.5);
  CHECK(s.rest->value == 12.0);
  CHECK(s.load_test_current->value == 400.0);
  CHECK(s.load_test_end->value == 9.9);
  CHECK(s.note == "cell 3 low; water added");
  CHECK(s.logged_by == "crew-a");
  CHECK(s.source == "round");
  CHECK(s.after_charge);
  CHECK(s.water_added);
}

STORE_TEST_CASE("optional fields left out stay absent") {
  Fleet<Backend> f;
  ReadingInput r;
  r.reading_id = "bare";
  r.serial = "NY-0001";
  r.taken_at = at(1);
  r.electrolyte = models::wire::EnteredTemperature{models::Celsius{2}, models::wire::TempUnit::c};
  REQUIRE(f.store->append_readings({r}, at(1))->accepted());
  const auto s = f.store->readings_for("NY-0001", {}, {}).value().at(0);
  CHECK_FALSE(s.ocv.has_value());
  CHECK(s.cell_sg.empty());
  CHECK_FALSE(s.ambient.has_value());
  CHECK_FALSE(s.rest.has_value());
  CHECK_FALSE(s.load_test_current.has_value());
}

STORE_TEST_CASE("one unknown serial refuses the whole batch and every bad row is listed") {
  Fleet<Backend> f;
  auto batch = week_round("atom-", 5);
  batch[1].serial = "NO-SUCH";
  batch[3].serial = "ALSO-MISSING";
  const auto out = f.store->append_readings(batch, at(9));
  REQUIRE(out.ok());
  CHECK_FALSE(out->accepted());
  REQUIRE(out->problems.size() == 2);
  CHECK(out->problems[0].row == 1);
  CHECK(out->problems[0].code == StoreErrc::not_found);
  CHECK(out->problems[0].field == "serial");
  CHECK(out->problems[0].detail.find("NO-SUCH") != std::string::npos);
  CHECK(out->problems[1].row == 3);
  CHECK(out->readings.empty());
  CHECK(out->stored == 0);
  CHECK(f.store->readings_count().value() == 0);
  CHECK(f.store->readings_for("NY-0001", {}, {}).value().empty());
}

STORE_TEST_CASE("the same reading id with the same content replays the original") {
  Fleet<Backend> f;
  const auto first = f.store->append_readings(week_round("w-", 3), at(5)).value();
  REQUIRE(first.accepted());
  const auto again = f.store->append_readings(week_round("w-", 3), at(6)).value();
  REQUIRE(again.accepted());
  CHECK(again.stored == 0);
  CHECK(again.replayed_count == 3);
  for (std::size_t i = 0; i < 3; ++i) {
    CHECK(again.replayed[i]);
    CHECK(again.readings[i].id == first.readings[i].id);
    CHECK(again.readings[i].received_at == at(5));  // the original, not the retry
  }
  CHECK(f.store->readings_count().value() == 3);
}

STORE_TEST_CASE("a batch mixing new readings and replays stores only the new ones") {
  Fleet<Backend> f;
  REQUIRE(f.store->append_readings(week_round("m-", 2), at(5))->accepted());
  const auto out = f.store->append_readings(week_round("m-", 4), at(6)).value();
  REQUIRE(out.accepted());
  CHECK(out.stored == 2);
  CHECK(out.replayed_count == 2);
  CHECK(out.replayed == std::vector<bool>{true, true, false, false});
  CHECK(f.store->readings_count().value() == 4);
}

STORE_TEST_CASE("the same reading id with other content is a conflict naming the id, nothing is stored") {
  Fleet<Backend> f;
  REQUIRE(f.store->append_readings({reading("dup", "NY-0001", 1)}, at(2))->accepted());
  auto changed = reading("dup", "NY-0001", 1);
  changed.ocv = models::Volts{12.40};
  const auto out =
      f.store->append_readings({reading("fresh", "NY-0001", 2), changed}, at(3)).value();
  CHECK_FALSE(out.accepted());
  REQUIRE(out.problems.size() == 1);
  CHECK(out.problems[0].row == 1);
  CHECK(out.problems[0].code == StoreErrc::conflict);
  CHECK(out.problems[0].field == "reading_id");
  CHECK(out.problems[0].detail.find("'dup'") != std::string::npos);
  CHECK(f.store->readings_count().value() == 1);
  CHECK(f.store->readings_for("NY-0001", {}, {}).value().at(0).ocv->value == 12.62);
}

STORE_TEST_CASE("a reading id repeated inside one batch is one reading, or a conflict if it differs") {
  Fleet<Backend> f;
  const auto twice =
      f.store->append_readings({reading("x", "NY-0001", 1), reading("x", "NY-0001", 1)}, at(2))
          .value();
  REQUIRE(twice.accepted());
  CHECK(twice.stored == 1);
  CHECK(twice.replayed == std::vector<bool>{false, true});
  CHECK(twice.readings[0].id == twice.readings[1].id);

  const auto differs =
      f.store->append_readings({reading("y", "NY-0001", 1), reading("y", "NY-0001", 2)}, at(2))
          .value();
  CHECK_FALSE(differs.accepted());
  CHECK(differs.problems.at(0).row == 1);
  CHECK(f.store->readings_count().value() == 1);
}

STORE_TEST_CASE("readings without an id get a unique one and are never merged") {
  Fleet<Backend> f;
  auto a = reading("", "NY-0001", 1);
  const auto out = f.store->append_readings({a, a}, at(2)).value();
  REQUIRE(out.accepted());
  CHECK(out.stored == 2);
  CHECK_FALSE(out.readings[0].reading_id.empty());
  CHECK(out.readings[0].reading_id != out.readings[1].reading_id);
}

STORE_TEST_CASE("group commit accepts and refuses each batch on its own in one transaction") {
  Fleet<Backend> f;
  REQUIRE(f.store->append_readings({reading("seen", "NY-0001", 1)}, at(1))->accepted());
  auto bad = week_round("g2-", 2);
  bad[1].serial = "GHOST";
  const auto outcomes = f.store->append_reading_batches(
      testing::prepared({week_round("g1-", 3), bad, {reading("seen", "NY-0001", 1)}, week_round("g4-", 2, 10)}),
      at(20));
  REQUIRE(outcomes.ok());
  REQUIRE(outcomes->size() == 4);
  CHECK((*outcomes)[0].stored == 3);
  CHECK_FALSE((*outcomes)[1].accepted());
  CHECK((*outcomes)[1].problems.at(0).row == 1);
  CHECK((*outcomes)[2].replayed_count == 1);
  CHECK((*outcomes)[3].stored == 2);
  CHECK(f.store->readings_count().value() == 1 + 3 + 2);
  const auto all = f.store->list_readings({}, {}).value().items;
  for (const auto& r : all) CHECK(r.reading_id.rfind("g2-", 0) != 0);
  // The accepted batches' answers still carry their readings as given,
  // though the group was written a second time because of the refused one.
  const auto first = week_round("g1-", 3);
  REQUIRE((*outcomes)[0].readings.size() == first.size());
  for (std::size_t i = 0; i < first.size(); ++i) {
    CHECK((*outcomes)[0].readings[i].reading_id == first[i].reading_id);
    CHECK((*outcomes)[0].readings[i].serial == first[i].serial);
    CHECK((*outcomes)[0].readings[i].id > 0);
  }
  CHECK((*outcomes)[3].readings.at(1).reading_id == week_round("g4-", 2, 10).at(1).reading_id);
}

STORE_TEST_CASE("a clean group goes in whole, each answer holding its readings as given") {
  Fleet<Backend> f;
  REQUIRE(f.store->append_readings({reading("seen", "NY-0001", 1)}, at(1))->accepted());
  auto noted = week_round("c2-", 2, 5);
  noted[0].note = "topped up cell 3";
  const std::vector<std::vector<ReadingInput>> given = {
      week_round("c1-", 3), noted, {reading("seen", "NY-0001", 1), reading("c3-a", "NY-0001", 9)}};
  const auto outcomes = f.store->append_reading_batches(testing::prepared(given), at(20)).value();
  REQUIRE(outcomes.size() == given.size());
  std::set<Id> ids;
  for (std::size_t b = 0; b < given.size(); ++b) {
    CAPTURE(b);
    REQUIRE(outcomes[b].accepted());
    REQUIRE(outcomes[b].readings.size() == given[b].size());
    REQUIRE(outcomes[b].replayed.size() == given[b].size());
    for (std::size_t i = 0; i < given[b].size(); ++i) {
      const StoredReading& r = outcomes[b].readings[i];
      CHECK(r.reading_id == given[b][i].reading_id);
      CHECK(r.taken_at == given[b][i].taken_at);
      CHECK(r.note == given[b][i].note);
      ids.insert(r.id);
    }
  }
  CHECK(outcomes[2].replayed == std::vector<bool>{true, false});
  CHECK(outcomes[2].readings[0].received_at == at(1));  // the original, as first stored
  CHECK(outcomes[0].readings[0].received_at == at(20));
  CHECK(ids.size() == 3 + 2 + 2);
  CHECK(f.store->readings_count().value() == 1 + 3 + 2 + 1);
}

STORE_TEST_CASE("random groups of batches of 1 to 80 rows get each row's fate right") {
  // Batches cross the sizes the SQLite writer inserts in (32, 8 and 1 rows
  // to a statement) with new readings, replays of stored ones, repeats
  // inside a batch, conflicts and unknown serials anywhere in them. A
  // simple model says what each batch must come to, batch after batch.
  Fleet<Backend> f;
  std::mt19937 random(20261204);
  std::map<std::string, ReadingInput> stored;  // by reading_id
  const auto same = [](const ReadingInput& a, const ReadingInput& b) {
    return content_hash(a) == content_hash(b);
  };
  int next_id = 0;
  for (int group = 0; group < 12; ++group) {
    const int day = group + 1;
    std::vector<std::vector<ReadingInput>> batches(1 + random() % 3);
    for (auto& batch : batches) {
      const std::size_t rows = 1 + random() % 80;
      for (std::size_t row = 0; row < rows; ++row) {
        const unsigned kind = random() % 100;
        ReadingInput r = reading("g" + std::to_string(next_id++), "NY-0001", day);
        r.note = r.reading_id;
        if (kind < 12 && !stored.empty()) {  // a replay of a stored reading
          r = std::next(stored.begin(), static_cast<long>(random() % stored.size()))->second;
        } else if (kind < 14 && !stored.empty()) {  // a stored id, other content
          r.reading_id = stored.begin()->first;
        } else if (kind < 22 && !batch.empty()) {  // a repeat inside the batch
          r = batch[random() % batch.size()];
        } else if (kind < 24 && !batch.empty()) {  // an id of the batch, other content
          r.reading_id = batch[random() % batch.size()].reading_id;
        } else if (kind < 25) {
          r.serial = "NY-9999";
        }
        batch.push_back(r);
      }
    }
    const auto outcomes = f.store->append_reading_batches(testing::prepared(batches), at(day, 12));
    REQUIRE(outcomes.ok());
    REQUIRE(outcomes->size() == batches.size());
    for (std::size_t b = 0; b < batches.size(); ++b) {
      const auto& batch = batches[b];
      const AppendOutcome& out = (*outcomes)[b];
      // The model. A row is refused for an unknown serial, or for a
      // reading_id used before (in the batch, or stored) with other content.
      std::vector<std::size_t> problem_rows;
      std::map<std::string, ReadingInput> in_batch;
      std::vector<bool> replayed;
      std::size_t fresh = 0;
      for (std::size_t row = 0; row < batch.size(); ++row) {
        const ReadingInput& r = batch[row];
        if (r.serial != "NY-0001") {
          problem_rows.push_back(row);
          continue;
        }
        const auto earlier = in_batch.find(r.reading_id);
        const auto kept = stored.find(r.reading_id);
        if (earlier != in_batch.end()) {
          // A repeat: refused when it differs from the first, or when the
          // first differs from the stored reading (so does the repeat).
          const bool conflict = kept != stored.end() && !same(kept->second, r);
          if (!same(earlier->second, r) || conflict) problem_rows.push_back(row);
          replayed.push_back(true);
          continue;
        }
        if (kept != stored.end() && !same(kept->second, r)) problem_rows.push_back(row);
        replayed.push_back(kept != stored.end());
        fresh += kept == stored.end() ? 1 : 0;
        in_batch.emplace(r.reading_id, r);
      }
      CAPTURE(group);
      CAPTURE(b);
      std::vector<std::size_t> got_rows;
      for (const auto& p : out.problems) got_rows.push_back(p.row);
      const auto rows_text = [](const std::vector<std::size_t>& rows) {
        std::string text;
        for (const auto row : rows) text += std::to_string(row) + " ";
        return text;
      };
      INFO("refused rows: ", rows_text(got_rows), "| expected: ", rows_text(problem_rows));
      CHECK(got_rows == problem_rows);
      CHECK(out.accepted() == problem_rows.empty());
      if (!out.accepted()) continue;
      CHECK(out.stored == fresh);
      CHECK(out.replayed == replayed);
      REQUIRE(out.readings.size() == batch.size());
      for (std::size_t row = 0; row < batch.size(); ++row) {
        CHECK(out.readings[row].reading_id == batch[row].reading_id);
        CHECK(same(out.readings[row], batch[row]));
      }
      for (const auto& [id, r] : in_batch) stored.emplace(id, r);
    }
    // Every answered id is the row stored under its reading_id.
    const auto history = f.store->readings_for("NY-0001", std::nullopt, std::nullopt);
    REQUIRE(history.ok());
    std::map<std::string, Id> ids;
    for (const auto& r : *history) ids.emplace(r.reading_id, r.id);
    CHECK(ids.size() == stored.size());
    for (const auto& out : *outcomes)
      for (const auto& r : out.readings) CHECK(ids.at(r.reading_id) == r.id);
  }
  CHECK(f.store->readings_count().value() == static_cast<std::int64_t>(stored.size()));
}

STORE_TEST_CASE("texts with quotes, backslashes, braces, commas and NULL read back verbatim") {
  Fleet<Backend> f;
  auto r = reading("t\"1\\,{x}", "NY-0001", 1);
  r.note = "cell \"3\" {low}, NULL; back\\slash 'quote' \xE2\x80\x94 ok";
  r.logged_by = "NULL";
  r.source = "";
  REQUIRE(f.store->append_readings({r, reading("plain", "NY-0001", 2)}, at(3))->accepted());
  const auto back = f.store->readings_for("NY-0001", {}, {}).value();
  REQUIRE(back.size() == 2);
  CHECK(back[0].reading_id == r.reading_id);
  CHECK(back[0].note == r.note);
  CHECK(back[0].logged_by == "NULL");
  CHECK(back[0].source.empty());
  CHECK_FALSE(back[0].ambient.has_value());
  // The same text again is a replay, not a conflict.
  CHECK(f.store->append_readings({r}, at(4))->replayed_count == 1);
}

STORE_TEST_CASE("a reading id new in two batches of one group is stored by the first, replayed by the second") {
  Fleet<Backend> f;
  auto changed = reading("twice", "NY-0001", 1);
  changed.note = "other";
  const auto outcomes = f.store->append_reading_batches(
      testing::prepared({{reading("twice", "NY-0001", 1), reading("a", "NY-0001", 2)},
                {reading("twice", "NY-0001", 1)},
                {changed, reading("b", "NY-0001", 3)}}),
      at(5)).value();
  REQUIRE(outcomes.size() == 3);
  REQUIRE(outcomes[0].accepted());
  CHECK(outcomes[0].stored == 2);
  REQUIRE(outcomes[1].accepted());
  CHECK(outcomes[1].replayed_count == 1);
  CHECK(outcomes[1].readings[0].id == outcomes[0].readings[0].id);
  REQUIRE_FALSE(outcomes[2].accepted());
  CHECK(outcomes[2].problems.at(0).code == StoreErrc::conflict);
  CHECK(outcomes[2].problems.at(0).row == 0);
  CHECK(f.store->readings_count().value() == 2);
  CHECK(f.store->readings_for("NY-0001", {}, {}).value().size() == 2);  // "b" left nothing
}

STORE_TEST_CASE("the bulk loader stores a batch in one go and refuses duplicates whole") {
  Fleet<Backend> f;
  const auto loaded = f.store->load_readings(week_round("bulk-", 50), at(1));
  REQUIRE(loaded.ok());
  CHECK(*loaded == 50);
  auto again = week_round("more-", 3);
  again.push_back(reading("bulk-7", "NY-0001", 99));
  const auto refused = f.store->load_readings(again, at(2));
  REQUIRE_FALSE(refused.ok());
  CHECK(refused.error().code == StoreErrc::conflict);
  CHECK(refused.error().detail.find("bulk-7") != std::string::npos);
  CHECK(f.store->readings_count().value() == 50);
  CHECK(f.store->load_readings({reading("z", "NOPE", 1)}, at(2)).error().code ==
        StoreErrc::not_found);
}

STORE_TEST_CASE("history is one battery's readings in time order within the range") {
  Fleet<Backend> f;
  REQUIRE(f.store->create_battery(testing::make_battery("NY-0002", f.vehicle.id), at(0)).ok());
  auto batch = week_round("h-", 6);          // days 1..6
  std::reverse(batch.begin(), batch.end());  // logged out of order
  batch.push_back(reading("other", "NY-0002", 3));
  REQUIRE(f.store->append_readings(batch, at(10))->accepted());

  const auto all = f.store->readings_for("NY-0001", {}, {}).value();
  REQUIRE(all.size() == 6);
  for (std::size_t i = 1; i < all.size(); ++i) CHECK(all[i - 1].taken_at < all[i].taken_at);
  const auto some = f.store->readings_for("NY-0001", at(2), at(4)).value();
  REQUIRE(some.size() == 3);
  CHECK(some.front().taken_at == at(2));
  CHECK(some.back().taken_at == at(4));
  CHECK(f.store->readings_for("NOPE", {}, {}).error().code == StoreErrc::not_found);
}

STORE_TEST_CASE("last readings per battery come newest first, at most N each") {
  Fleet<Backend> f;
  REQUIRE(f.store->create_battery(testing::make_battery("NY-0002", f.vehicle.id), at(0)).ok());
  REQUIRE(f.store->create_battery(testing::make_battery("STOCK-9"), at(0)).ok());
  auto batch = week_round("l-", 20);
  batch.push_back(reading("n2-a", "NY-0002", 5));
  REQUIRE(f.store->append_readings(batch, at(30))->accepted());

  const auto last = f.store->last_readings({f.depot.id, {}, {}}, 13).value();
  REQUIRE(last.size() == 2);  // STOCK-9 is in no depot
  CHECK(last[0].battery.serial == "NY-0001");
  REQUIRE(last[0].readings.size() == 13);
  CHECK(last[0].readings.front().taken_at == at(20));
  CHECK(last[0].readings.back().taken_at == at(8));
  CHECK(last[1].readings.size() == 1);
  const auto everyone = f.store->last_readings({}, 1).value();
  REQUIRE(everyone.size() == 3);
  CHECK(everyone[2].readings.empty());
}

STORE_TEST_CASE("visiting last measurements gives last_readings' readings, measured fields only") {
  Fleet<Backend> f;
  REQUIRE(f.store->create_battery(testing::make_battery("NY-0002", f.vehicle.id), at(0)).ok());
  REQUIRE(f.store->create_battery(testing::make_battery("STOCK-9"), at(0)).ok());
  auto batch = week_round("v-", 20);
  batch[19].electrolyte = models::wire::EnteredTemperature{models::Celsius{-5}, models::wire::TempUnit::f};
  batch[19].load_test_current = models::Amperes{400};
  batch[19].load_test_end = models::Volts{9.9};
  batch[19].after_charge = true;
  batch[18].water_added = true;
  batch[18].cell_sg.pop_back();  // the reused row buffer must not keep a stale cell
  auto no_cells = reading("n2-a", "NY-0002", 5);
  no_cells.cell_sg.clear();
  no_cells.ocv.reset();
  batch.push_back(no_cells);
  REQUIRE(f.store->append_readings(batch, at(30))->accepted());

  const auto expected = f.store->last_readings({}, 13).value();
  std::vector<std::string> serials;
  std::size_t index = 0;
  const auto done = f.store->visit_last_measurements(
      {}, 13, [&](const Battery& b, std::span<const ReadingMeasurement> rows) {
        REQUIRE(index < expected.size());
        const auto& want = expected[index++];
        serials.push_back(b.serial);
        CHECK(b.serial == want.battery.serial);
        REQUIRE(rows.size() == want.readings.size());
        for (std::size_t i = 0; i < rows.size(); ++i) {
          const auto& r = want.readings[i];
          const auto& m = rows[i];
          CHECK(m.taken_at == r.taken_at);
          CHECK(m.ocv.has_value() == r.ocv.has_value());
          if (m.ocv && r.ocv) CHECK(m.ocv->value == r.ocv->value);
          REQUIRE(m.cell_sg.size() == r.cell_sg.size());
          for (std::size_t c = 0; c < m.cell_sg.size(); ++c) CHECK(m.cell_sg[c].value == r.cell_sg[c].value);
          CHECK(m.electrolyte.has_value() == r.electrolyte.has_value());
          if (m.electrolyte && r.electrolyte) CHECK(m.electrolyte->value == r.electrolyte->value.value);
          CHECK(m.rest.has_value() == r.rest.has_value());
          CHECK(m.load_test_current.has_value() == r.load_test_current.has_value());
          CHECK(m.load_test_end.has_value() == r.load_test_end.has_value());
          if (m.load_test_end && r.load_test_end) CHECK(m.load_test_end->value == r.load_test_end->value);
          CHECK(m.after_charge == r.after_charge);
          CHECK(m.water_added == r.water_added);
        }
      });
  REQUIRE(done.ok());
  CHECK(index == expected.size());
  CHECK(serials == std::vector<std::string>{"NY-0001", "NY-0002", "STOCK-9"});
  const auto& newest = expected[0].readings.front();
  CHECK(newest.after_charge);
  CHECK(newest.electrolyte->value.value == doctest::Approx(-5));
}

STORE_TEST_CASE("report reads over more batteries than one chunk keep each battery's readings apart") {
  // The PostgreSQL store asks for 500 batteries per statement; 510 cross it.
  Fleet<Backend> f;
  std::vector<ReadingInput> rows;
  for (int i = 2; i <= 510; ++i) {
    char serial[16];
    std::snprintf(serial, sizeof serial, "NY-%04d", i);
    REQUIRE(f.store->create_battery(testing::make_battery(serial, f.vehicle.id), at(0)).ok());
    for (int k = 0; k < i % 3; ++k) rows.push_back(reading(std::string(serial) + "-" + std::to_string(k), serial, k + 1));
  }
  REQUIRE(f.store->load_readings(rows, at(9)).ok());
  const auto last = f.store->last_readings({}, 5).value();
  REQUIRE(last.size() == 510);
  std::size_t visited = 0;
  REQUIRE(f.store->visit_last_measurements({}, 5, [&](const Battery& b, auto newest_first) {
    const auto& expected = last[visited++];
    CHECK(b.serial == expected.battery.serial);
    CHECK(newest_first.size() == expected.readings.size());
  }).ok());
  CHECK(visited == 510);
  for (const auto& br : last) {
    const int i = std::stoi(br.battery.serial.substr(3));
    CHECK(br.readings.size() == static_cast<std::size_t>(i == 1 ? 0 : i % 3));
    for (const auto& r : br.readings) CHECK(r.serial == br.battery.serial);
  }
}

STORE_TEST_CASE("the latest settled reading skips readings with too little rest") {
  Fleet<Backend> f;
  auto rested = reading("s-1", "NY-0001", 1);
  rested.rest = models::Hours{30};
  auto newer_rested = reading("s-2", "NY-0001", 2);
  newer_rested.rest = models::Hours{8};
  auto fresh = reading("s-3", "NY-0001", 3);
  fresh.rest = models::Hours{1};
  auto unknown = reading("s-4", "NY-0001", 4);
  unknown.rest.reset();
  REQUIRE(f.store->append_readings({rested, newer_rested, fresh, unknown}, at(5))->accepted());
  // 6 h minimum rest for a settled OCV (common practice, see CONVENTIONS).
  const auto six = f.store->latest_settled({}, models::Hours{6}).value();
  REQUIRE(six.size() == 1);
  REQUIRE(six[0].readings.size() == 1);
  CHECK(six[0].readings[0].reading_id == "s-2");
  const auto day = f.store->latest_settled({}, models::Hours{24}).value();
  CHECK(day[0].readings.at(0).reading_id == "s-1");
}

STORE_TEST_CASE("reading pages cover every stored reading once while new ones arrive") {
  Fleet<Backend> f;
  REQUIRE(f.store->load_readings(week_round("p-", 1005), at(1)).ok());
  const auto huge = f.store->list_readings({}, {5000, ""}).value();
  CHECK(huge.items.size() == kMaxPageLimit);
  CHECK_FALSE(huge.next_cursor.empty());

  std::set<std::string> seen;
  PageRequest page{97, ""};
  int extra = 0;
  for (;;) {
    const auto got = f.store->list_readings({"NY-0001", {}, {}}, page).value();
    for (const auto& r : got.items) CHECK(seen.insert(r.reading_id).second);
    REQUIRE(
        f.store->append_readings({reading("late-" + std::to_string(extra++), "NY-0001", 2)}, at(2))
            ->accepted());
    if (got.next_cursor.empty()) break;
    page.cursor = got.next_cursor;
  }
  for (int i = 0; i < 1005; ++i) CHECK(seen.count("p-" + std::to_string(i)) == 1);
}

STORE_TEST_CASE("reading lists filter by time") {
  Fleet<Backend> f;
  REQUIRE(f.store->append_readings(week_round("t-", 10), at(11))->accepted());
  const auto page = f.store->list_readings({std::nullopt, at(3), at(5)}, {}).value();
  CHECK(page.items.size() == 3);
  CHECK(page.next_cursor.empty());
}

}  // namespace pbfleet::storage
