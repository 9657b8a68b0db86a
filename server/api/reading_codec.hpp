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

// Length caps of the decoder (absurd inputs stay out of memory; the real
// limits are validate_reading's), shared by read_reading and the streaming
// reader (reading_stream.hpp) so both take the same bodies.
inline constexpr std::size_t kReadingTextCap = 4096;
inline constexpr std::size_t kTimestampTextCap = 40;

// A temperature as entered: stored in Celsius with the unit given.
models::wire::EnteredTemperature entered_temperature(double value, models::wire::TempUnit unit);

// Fields of one reading object (pointer prefix from `in`).
models::wire::ReadingInput read_reading(FieldReader& in);

// The raw reading as stored, written as the members of an object the
// caller opened (temperatures in Celsius plus the unit entered; received_at
// when stored), and the derived values as an object.
void write_reading_members(JsonText& out, const models::wire::ReadingInput& reading);
void write_reading_members(JsonText& out, const storage::StoredReading& reading);
void write_derived(JsonText& out, const analytics::DerivedReading& derived);

}  // namespace pbfleet::api
