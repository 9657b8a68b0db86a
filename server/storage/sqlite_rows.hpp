// Row <-> domain conversions for the SQLite store: the column lists each
// query selects and the functions that read them back, kept together so
// the two cannot drift apart.
#pragma once

#include <array>
#include <string>
#include <string_view>
#include <vector>

#include "server/storage/domain.hpp"
#include "server/storage/reading_facts.hpp"
#include "server/storage/sqlite_db.hpp"

namespace pbfleet::storage::sqlite {

// SELECT lists (with their FROM/JOIN) matching the readers below.
inline constexpr std::string_view kDepotSelect =
    "SELECT d.id, d.name, d.time_zone, d.design_low_c FROM depots d";
inline constexpr std::string_view kVehicleSelect =
    "SELECT v.id, v.code, v.depot_id, v.engine, v.displacement_l, v.required_cca_a FROM vehicles v";
inline constexpr std::string_view kBatterySelect =
    "SELECT b.id, b.serial, b.chemistry, b.nominal_v, b.cells, b.rated_cca_a,"
    " b.reserve_capacity_min, b.capacity_ah, b.full_charge_sg, b.installed_on, b.vehicle_id,"
    " b.status, b.retired_at, b.retire_reason, v.depot_id"
    " FROM batteries b LEFT JOIN vehicles v ON v.id = b.vehicle_id";
inline constexpr std::string_view kReadingSelect =
    "SELECT r.id, r.reading_id, r.battery_id, b.serial, r.taken_at, r.received_at, r.ocv_v,"
    " r.cell_sg, r.electrolyte_temp_c, r.electrolyte_unit, r.ambient_temp_c, r.ambient_unit,"
    " r.rest_h, r.load_test_a, r.load_test_end_v, r.logged_by, r.source, r.note,"
    " r.after_charge, r.water_added"
    " FROM readings r JOIN batteries b ON b.id = r.battery_id";
// The measured columns of readings only (no join: the battery is known).
inline constexpr std::string_view kMeasurementSelect =
    "SELECT r.taken_at, r.ocv_v, r.cell_sg, r.electrolyte_temp_c, r.rest_h, r.load_test_a,"
    " r.load_test_end_v, r.after_charge, r.water_added FROM readings r";
inline constexpr std::string_view kTokenSelect =
    "SELECT t.id, t.name, t.role, t.depot_id, t.created_at, t.revoked_at, t.hash, t.expires_at"
    " FROM api_tokens t";

Depot read_depot(const Statement& s);
Vehicle read_vehicle(const Statement& s);
Battery read_battery(const Statement& s);
StoredReading read_reading(const Statement& s);
// Overwrites `m` with the row, reusing its cell_sg capacity.
void read_measurement(const Statement& s, ReadingMeasurement& m);
// A kTokenSelect row whose columns start at `first`.
ApiToken read_token(const Statement& s, int first = 0);

// Raw cell SGs as stored: shortest round-trip decimals joined by ';'.
std::string encode_cell_sg(const std::vector<models::SpecificGravity>& cells);
std::vector<models::SpecificGravity> decode_cell_sg(std::string_view text);
// Same, into `cells` (cleared first; its capacity is reused).
void decode_cell_sg_into(std::string_view text, std::vector<models::SpecificGravity>& cells);

using storage::ContentHash;  // reading_facts.hpp

// Opaque page cursors: the last id of the previous page.
std::string encode_cursor(Id last_id);
// Throws DbError(invalid, field "cursor") for anything encode_cursor did not make.
Id decode_cursor(std::string_view cursor);
// The id a page starts after (0 for the first page).
Id page_after(const PageRequest& page);
// The page size, clamped to 1..kMaxPageLimit.
std::int64_t page_limit(const PageRequest& page);

}  // namespace pbfleet::storage::sqlite
