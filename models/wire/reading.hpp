// A reading as the crew logs it, and the one set of rules that validates it.
//
// Shared by the server's JSON and CSV paths and by the CLI's dry run, so the
// rules exist once. Pure: the current time is passed in.
#pragma once

#include <array>
#include <chrono>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "models/result.hpp"
#include "models/units.hpp"

namespace pbfleet::models::wire {

// Unit a temperature was entered in, kept for display.
enum class TempUnit { c, f };

struct EnteredTemperature {
  Celsius value{0.0};
  TempUnit unit = TempUnit::c;
};

struct ReadingInput {
  std::string reading_id;                       // client-supplied; may be empty (server assigns)
  std::string serial;                           // battery serial
  std::chrono::sys_seconds taken_at{};          // UTC
  std::optional<Volts> ocv;
  std::vector<SpecificGravity> cell_sg;         // raw hydrometer readings, cell 1 first
  std::optional<EnteredTemperature> electrolyte;
  std::optional<EnteredTemperature> ambient;
  std::optional<Hours> rest;
  std::optional<Amperes> load_test_current;
  std::optional<Volts> load_test_end;
  std::string logged_by;
  std::string source;                           // "round", "bay", "import", ...
  std::string note;
  bool after_charge = false;                    // battery was charged since the last reading
  bool water_added = false;                     // water added today: holds the spread alarm
};

// Allowed ranges, each with its reason.
inline constexpr double kMinSg = 1.000;          // pure water
inline constexpr double kMaxSg = 1.400;          // above any battery electrolyte
inline constexpr double kMinTempC = -60.0;       // below any inhabited winter low
inline constexpr double kMaxTempC = 80.0;        // above any safe electrolyte temperature
inline constexpr double kMaxOcvPerCellV = 2.5;   // above a charging cell; absurd at rest
inline constexpr double kMaxRestH = 24.0 * 366;  // a year on the shelf
inline constexpr int kMaxCells = 24;
inline constexpr std::size_t kMaxTextLength = 200;
inline constexpr std::size_t kMaxIdLength = 64;
inline constexpr std::chrono::hours kMaxFutureSkew{24};
// Added by the wire library (additive to the first contract):
inline constexpr double kMaxOcvUnknownCellsV = 30.0;  // cells unknown: above a charging 24 V battery
inline constexpr double kMaxLoadTestA = 3000.0;       // above half the CCA of any starting battery
// Earliest accepted taken_at: older records are typing errors, not history.
inline constexpr std::chrono::sys_days kEarliestReading{
    std::chrono::year{2000} / std::chrono::January / 1};

// Every problem with a reading, each naming the field and the allowed range.
// `cells` is the battery's cell count when known (0 = unknown), used for the
// OCV range and the number of SG values. Empty = valid.
//
// Field naming (FieldError::field), one convention everywhere in the wire
// library: the API's JSON member name, and for a list member a JSON Pointer
// (RFC 6901) path relative to the reading, without the leading slash:
//   "ocv_v", "rest_h", "taken_at", "serial", "cell_sg" (the list as a whole),
//   "cell_sg/0" (first cell; indices are 0-based as in JSON Pointer),
//   "electrolyte_temp_c" or "electrolyte_temp_f" (the unit it was entered
//   in; "_c" when missing), "ambient_temp_c" / "ambient_temp_f".
// A caller builds a full pointer by prefixing "/" (one object) or
// "/<index>/" (array body). CSV import names its columns the same way except
// the two temperature columns (see csv_column_for_field in csv.hpp).
//
// Rules: serial 1..64 code points, no control characters, '/', '\\', ".." or
// leading/trailing spaces; reading_id empty or 1..64 of [A-Za-z0-9._:-];
// taken_at from 2000-01-01T00:00:00Z to now + 24 h; ocv_v and/or cell_sg;
// SG 1.000..1.400 each (past kMaxCells values only the count error is
// given), as many as `cells` when known, at most kMaxCells;
// electrolyte temperature required with cell_sg; temperatures -60..80 C;
// ocv_v and load_test_end_v 0..2.5 V x cells (0..30 V when cells unknown);
// rest_h 0..8784; load_test_a 0..3000 A, given together with load_test_end_v;
// logged_by, source, note at most 200 code points of valid UTF-8 (note may
// hold tab and line breaks, the others no control characters). SQL meta
// characters are ordinary text here: storage binds parameters.
FieldErrors validate_reading(const ReadingInput& reading, std::chrono::sys_seconds now,
                             int cells = 0);

// "41F", "5C", "5 °C", "-25c", "5" (bare = Celsius) -> temperature.
// Error names `field` and the accepted forms and range.
// Checks the form only, plus a physical band (absolute zero to 1000 C);
// the -60..80 C range is validate_reading's.
Result<EnteredTemperature> parse_temperature(std::string_view text, std::string_view field);

// RFC 3339 timestamp ("2026-11-30T07:15:00Z", offsets allowed) -> UTC.
// Strict RFC 3339 section 5.6 date-time: "YYYY-MM-DDThh:mm:ss", optional
// ".fraction" (truncated to whole seconds), then "Z" or "+hh:mm"/"-hh:mm"
// ("-00:00" read as UTC); 'T' and 'Z' in either case; nothing before or
// after. Refused: other shapes, impossible dates (Feb 30, Feb 29 outside
// leap years), hour 24, minute 60, leap second 60 (sys_seconds cannot hold
// it), offsets beyond 23:59. Range of dates is validate_reading's.
Result<std::chrono::sys_seconds> parse_timestamp(std::string_view text, std::string_view field);
// UTC -> "2026-11-30T07:15:00Z".
std::string format_timestamp(std::chrono::sys_seconds t);
// The same text in a fixed buffer, for answers that write two timestamps
// per reading for hundreds of readings (no heap allocation).
struct TimestampText {
  std::array<char, 32> chars{};
  std::size_t size = 0;
  [[nodiscard]] std::string_view view() const { return {chars.data(), size}; }
};
TimestampText timestamp_text(std::chrono::sys_seconds t);

}  // namespace pbfleet::models::wire
