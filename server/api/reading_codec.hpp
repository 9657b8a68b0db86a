// JSON codec of readings and their derived values.
//
// Decoding checks JSON types only and refuses unknown fields; ranges are
// checked once, by models::wire::validate_reading, for JSON and CSV alike.
#pragma once

#include <nlohmann/json.hpp>

#include "models/analytics/derive.hpp"
#include "models/wire/reading.hpp"
#include "server/api/json_fields.hpp"
#include "server/api/json_text.hpp"
#include "server/storage/domain.hpp"

namespace pbfleet::api {

// Fields of one reading object (pointer prefix from `in`).
models::wire::ReadingInput read_reading(FieldReader& in);

// The raw reading as stored; temperatures in Celsius plus the unit entered.
nlohmann::json reading_json(const models::wire::ReadingInput& reading);
nlohmann::json reading_json(const storage::StoredReading& reading);
// The derived values of one reading.
nlohmann::json derived_json(const analytics::DerivedReading& derived);

// The same, written as text: the members of a reading (inside an object
// the caller opened; received_at when stored) and the derived object.
void write_reading_members(JsonText& out, const models::wire::ReadingInput& reading);
void write_reading_members(JsonText& out, const storage::StoredReading& reading);
void write_derived(JsonText& out, const analytics::DerivedReading& derived);

}  // namespace pbfleet::api
