// RFC 4180 CSV: a tokenizer and the reading import format.
//
// Accepts a UTF-8 BOM and CRLF or LF line ends; quoted fields may hold commas,
// quotes ("") and line breaks. Export helpers guard text cells against
// spreadsheet formula injection (CWE-1236).
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "models/result.hpp"
#include "models/wire/reading.hpp"

namespace pbfleet::models::wire {

using CsvRow = std::vector<std::string>;

// Splits a whole CSV document into rows. Error (with line number in
// `detail`) on a broken quote.
Result<std::vector<CsvRow>> parse_csv(std::string_view text);

// One cell for output: quoted when needed; text starting with = + - @ gets a
// leading ' unless it is a number.
std::string csv_cell(std::string_view text);

// Columns of the reading import format, in the documented order. Header row
// required; order is free; unknown or repeated columns are refused.
//   reading_id, serial, taken_at, ocv_v, cell_sg (values separated by ';'),
//   electrolyte_temp ("41F" / "5C"), ambient_temp, rest_h, load_test_a,
//   load_test_end_v, logged_by, source, note, after_charge, water_added
const std::vector<std::string_view>& reading_csv_columns();

struct RowError {
  int row = 0;          // 1-based data row (header is row 0)
  FieldError error;
};

struct ParsedReadings {
  std::vector<ReadingInput> readings;  // one per data row, in order
  std::vector<RowError> errors;        // parse errors (format, not ranges)
};

// Parses a reading CSV document into inputs; does not validate ranges (call
// validate_reading on each). Error for a broken document (quote, header).
Result<ParsedReadings> parse_reading_csv(std::string_view text);

// Writes readings in the import format (header + rows), for round-trips.
std::string format_reading_csv(const std::vector<ReadingInput>& readings);

}  // namespace pbfleet::models::wire
