// Readings: the queries. Storing them is sqlite_append.cpp.

#include <limits>
#include <unordered_set>

#include "server/storage/sqlite_rows.hpp"
#include "server/storage/sqlite_store_impl.hpp"

namespace pbfleet::storage::sqlite {
namespace {

using std::chrono::sys_seconds;

std::int64_t seconds_or(std::optional<sys_seconds> t, std::int64_t fallback) {
  return t ? to_db(*t) : fallback;
}

constexpr std::int64_t kMinTime = std::numeric_limits<std::int64_t>::min();
constexpr std::int64_t kMaxTime = std::numeric_limits<std::int64_t>::max();

std::vector<StoredReading> collect(Statement& s) {
  std::vector<StoredReading> out;
  while (s.step()) out.push_back(read_reading(s));
  return out;
}

}  // namespace

StoreResult<std::vector<StoredReading>> SqliteStore::readings_for(std::string_view serial,
                                                                  std::optional<sys_seconds> from,
                                                                  std::optional<sys_seconds> to) {
  return read([&](Db& db) {
    const Battery b = battery_by_serial(db, serial);
    auto s = db.prepare(std::string(kReadingSelect) +
                        " WHERE r.battery_id = ?1 AND r.taken_at BETWEEN ?2 AND ?3"
                        " ORDER BY r.taken_at, r.id");
    s.bind(1, b.id).bind(2, seconds_or(from, kMinTime)).bind(3, seconds_or(to, kMaxTime));
    return collect(s);
  });
}

StoreResult<Page<StoredReading>> SqliteStore::list_readings(const ReadingFilter& f,
                                                            const PageRequest& page) {
  return read([&](Db& db) {
    const std::int64_t limit = page_limit(page);
    const Id after = page_after(page);
    std::string sql =
        std::string(kReadingSelect) + " WHERE r.id > ?1 AND r.taken_at BETWEEN ?2 AND ?3";
    std::optional<Id> battery;
    if (f.serial) {
      battery = battery_by_serial(db, *f.serial).id;
      sql += " AND r.battery_id = ?5";
    }
    auto s = db.prepare(sql + " ORDER BY r.id LIMIT ?4");
    s.bind(1, after).bind(2, seconds_or(f.from, kMinTime)).bind(3, seconds_or(f.to, kMaxTime));
    s.bind(4, limit + 1);
    if (battery) s.bind(5, *battery);
    Page<StoredReading> out;
    out.items = collect(s);
    if (static_cast<std::int64_t>(out.items.size()) > limit) {
      out.items.pop_back();
      out.next_cursor = encode_cursor(out.items.back().id);
    }
    return out;
  });
}

StoreResult<std::vector<BatteryReadings>> SqliteStore::last_readings(const BatteryFilter& filter,
                                                                     std::size_t count) {
  return read([&](Db& db) {
    auto s = db.prepare(std::string(kReadingSelect) +
                        " WHERE r.battery_id = ?1 ORDER BY r.taken_at DESC, r.id DESC LIMIT ?2");
    std::vector<BatteryReadings> out;
    for (Battery& b : batteries_matching(db, filter)) {
      s.reset();
      s.bind(1, b.id).bind(2, static_cast<std::int64_t>(count));
      out.push_back(BatteryReadings{std::move(b), collect(s)});
    }
    return out;
  });
}

namespace {

// The last `count` measurements of each battery, newest first, one battery
// at a time.
Done visit_measurements(Db& db, const std::vector<Battery>& batteries, std::size_t count,
                        const MeasurementVisitor& visit) {
  auto s = db.prepare(std::string(kMeasurementSelect) +
                      " WHERE r.battery_id = ?1 ORDER BY r.taken_at DESC, r.id DESC LIMIT ?2");
  // One buffer for every battery: rows and their cell lists keep their
  // capacity, so the scan allocates only while the first batteries grow it.
  std::vector<ReadingMeasurement> rows;
  for (const Battery& b : batteries) {
    s.reset();
    s.bind(1, b.id).bind(2, static_cast<std::int64_t>(count));
    std::size_t n = 0;
    while (s.step()) {
      if (n == rows.size()) rows.emplace_back();
      read_measurement(s, rows[n++]);
    }
    visit(b, std::span<const ReadingMeasurement>(rows.data(), n));
  }
  return Done{};
}

}  // namespace

StoreResult<Done> SqliteStore::visit_last_measurements(const BatteryFilter& filter,
                                                         std::size_t count,
                                                         const MeasurementVisitor& visit) {
  return read([&](Db& db) { return visit_measurements(db, batteries_matching(db, filter), count, visit); });
}

StoreResult<Done> SqliteStore::visit_last_measurements_of(const std::vector<Id>& battery_ids,
                                                            std::size_t count,
                                                            const MeasurementVisitor& visit) {
  return read([&](Db& db) {
    const std::unordered_set<Id> wanted(battery_ids.begin(), battery_ids.end());
    std::vector<Battery> batteries = batteries_matching(db, {});
    std::erase_if(batteries, [&](const Battery& b) { return !wanted.contains(b.id); });
    return visit_measurements(db, batteries, count, visit);
  });
}

StoreResult<std::vector<BatteryReadings>> SqliteStore::latest_settled(const BatteryFilter& filter,
                                                                      models::Hours min_rest) {
  return read([&](Db& db) {
    auto s = db.prepare(std::string(kReadingSelect) +
                        " WHERE r.battery_id = ?1 AND r.rest_h >= ?2"
                        " ORDER BY r.taken_at DESC, r.id DESC LIMIT 1");
    std::vector<BatteryReadings> out;
    for (Battery& b : batteries_matching(db, filter)) {
      s.reset();
      s.bind(1, b.id).bind(2, min_rest.value);
      out.push_back(BatteryReadings{std::move(b), collect(s)});
    }
    return out;
  });
}

StoreResult<std::int64_t> SqliteStore::readings_count() {
  return read(
      [](Db& db) { return db.query_int("SELECT value FROM counters WHERE name = 'readings'"); });
}

}  // namespace pbfleet::storage::sqlite
