// Row <-> domain conversions for the PostgreSQL store. The SELECT lists
// are the SQLite store's (sqlite_rows.hpp: the same columns and meaning in
// both schemas), so the readers below match them column for column; the
// backend-neutral helpers (content hash, cell SG text, cursors) are shared
// from there too.
#pragma once

#include <pqxx/pqxx>

#include "server/storage/domain.hpp"
#include "server/storage/pg_db.hpp"
#include "server/storage/sqlite_rows.hpp"

namespace pbfleet::storage::pg {

using sqlite::kBatterySelect;
using sqlite::kDepotSelect;
using sqlite::kMeasurementSelect;
using sqlite::kReadingSelect;
using sqlite::kTokenSelect;
using sqlite::kVehicleSelect;

// The column lists of kReadingSelect and kMeasurementSelect without their
// FROM, for queries that bring their own (LATERAL per battery).
inline constexpr std::string_view kReadingColumns =
    "SELECT r.id, r.reading_id, r.battery_id, b.serial, r.taken_at, r.received_at, r.ocv_v,"
    " r.cell_sg, r.electrolyte_temp_c, r.electrolyte_unit, r.ambient_temp_c, r.ambient_unit,"
    " r.rest_h, r.load_test_a, r.load_test_end_v, r.logged_by, r.source, r.note,"
    " r.after_charge, r.water_added";
inline constexpr std::string_view kMeasurementColumns =
    "SELECT r.taken_at, r.ocv_v, r.cell_sg, r.electrolyte_temp_c, r.rest_h, r.load_test_a,"
    " r.load_test_end_v, r.after_charge, r.water_added";

using sqlite::decode_cell_sg_into;
using sqlite::encode_cell_sg;
using sqlite::encode_cursor;
using sqlite::page_after;
using sqlite::page_limit;

Depot read_depot(const pqxx::row& r);
Vehicle read_vehicle(const pqxx::row& r);
Battery read_battery(const pqxx::row& r);
StoredReading read_reading(const pqxx::row& r);
// Overwrites `m` with the row, reusing its cell_sg capacity.
void read_measurement(const pqxx::row& r, ReadingMeasurement& m);
// A kTokenSelect row whose columns start at `first`.
ApiToken read_token(const pqxx::row& r, int first = 0);

// Items of a page read with LIMIT limit+1: the extra row only says that
// another page exists.
template <class T, class Reader>
Page<T> page_of(const pqxx::result& rows, std::int64_t limit, Reader reader) {
  Page<T> page;
  for (const auto& row : rows) {
    if (static_cast<std::int64_t>(page.items.size()) == limit) {
      page.next_cursor = encode_cursor(page.items.back().id);
      break;
    }
    page.items.push_back(reader(row));
  }
  return page;
}

}  // namespace pbfleet::storage::pg
