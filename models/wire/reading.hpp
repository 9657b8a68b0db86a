// A reading as the crew logs it, and the one set of rules that validates it.
//
// Shared by the server's JSON and CSV paths and by the CLI's dry run, so the
// rules exist once. Pure: the current time is passed in.
#pragma once

#include <chrono>
#include <cstdint>
#include <optional>
#include <string>
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

// Every problem with a reading, each naming the field and the allowed range.
// `cells` is the battery's cell count when known (0 = unknown), used for the
// OCV range and the number of SG values. Empty = valid.
FieldErrors validate_reading(const ReadingInput& reading, std::chrono::sys_seconds now,
                             int cells = 0);

// "41F", "5C", "5 °C", "-25c", "5" (bare = Celsius) -> temperature.
// Error names `field` and the accepted forms and range.
Result<EnteredTemperature> parse_temperature(std::string_view text, std::string_view field);

// RFC 3339 timestamp ("2026-11-30T07:15:00Z", offsets allowed) -> UTC.
Result<std::chrono::sys_seconds> parse_timestamp(std::string_view text, std::string_view field);
// UTC -> "2026-11-30T07:15:00Z".
std::string format_timestamp(std::chrono::sys_seconds t);

}  // namespace pbfleet::models::wire
