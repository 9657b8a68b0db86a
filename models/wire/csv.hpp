// RFC 4180 CSV: a tokenizer and the reading import format.
//
// Accepts a UTF-8 BOM and CRLF or LF line ends; quoted fields may hold commas,
// quotes ("") and line breaks. Export helpers guard text cells against
// spreadsheet formula injection (CWE-1236).
#pragma once

#include <chrono>
#include <functional>
#include <string>
#include <string_view>
#include <vector>

#include "models/result.hpp"
#include "models/wire/reading.hpp"

namespace pbfleet::models::wire {

using CsvRow = std::vector<std::string>;

// Splits a whole CSV document into rows. Error (with line number in
// `detail`) on a broken quote.
//
// Details: a leading UTF-8 BOM is dropped; CRLF, LF and a lone CR end a
// record; a final line break does not start another record, so "a\r\n" is
// one row; an empty line in the middle is a row holding one empty field.
// Fields are kept verbatim (no trimming). A quote inside an unquoted field,
// text after a closing quote, and a quote left open are errors; `detail`
// starts with "line N:" (1-based physical line; for an open quote, the line
// where it opened) and `field` is empty.
Result<std::vector<CsvRow>> parse_csv(std::string_view text);

// One cell for output: quoted when needed; text starting with = + - @ gets a
// leading ' unless it is a number.
//
// Precisely: text matching ^'*[=+-@] that is not a decimal number (see
// text::is_decimal) gets one leading '; the cell is quoted when it holds a
// comma, quote, CR or LF, starts with a UTF-8 BOM, or starts or ends with a
// space or tab.
std::string csv_cell(std::string_view text);

// Undoes the formula guard of csv_cell: a cell matching ^'+[=+-@] loses one
// leading '. csv_unguard of the unquoted csv_cell(t) is t for every t, so
// export then import is lossless. Added by the wire library.
std::string csv_unguard(std::string_view cell);

// Columns of the reading import format, in the documented order. Header row
// required; order is free; unknown or repeated columns are refused.
//   reading_id, serial, taken_at, ocv_v, cell_sg (values separated by ';'),
//   electrolyte_temp ("41F" / "5C"), ambient_temp, rest_h, load_test_a,
//   load_test_end_v, logged_by, source, note, after_charge, water_added
const std::vector<std::string_view>& reading_csv_columns();

// `row` counts CSV records after the header (the first data record is 1);
// a quoted field spanning lines is still one record. `error.field` is the
// column name, "cell_sg/<i>" (0-based) for one value of the cell_sg list, or
// empty for a problem with the whole row (wrong number of fields).
struct RowError {
  int row = 0;          // 1-based data row (header is row 0)
  FieldError error;
};

struct ParsedReadings {
  std::vector<ReadingInput> readings;  // rows that parsed without error, in order
  std::vector<RowError> errors;        // parse errors (format, not ranges)
  std::vector<int> rows;               // rows[i] is the data row of readings[i]
};

// Parses a reading CSV document into inputs; does not validate ranges (call
// validate_reading on each). Error for a broken document (quote, header).
//
// Header: names are trimmed of spaces and matched exactly. Refused (Error
// with `field` = the column, or "header"): an unknown, empty or repeated
// column; a missing serial or taken_at column; neither ocv_v nor cell_sg.
// Rows: blank lines are skipped (they still count in `row`); every cell is
// unguarded (csv_unguard) first; an empty cell means absent (false for the
// booleans), except taken_at, which is required. Numbers are decimals
// ("12.65"); cell_sg is "1.265;1.260;..." ; temperatures "41F", "5C", "5"
// (bare = C); booleans true/false/1/0/yes/no in any case. Every problem in
// every row is collected; a row with a problem gives no reading.
// Bounded: a cell_sg list longer than kMaxCells is one error; once
// kMaxRowErrors errors are collected, reading stops with a last error (empty
// field) at the row where it stopped, so the readings list is incomplete.
Result<ParsedReadings> parse_reading_csv(std::string_view text);

// Most row errors parse_reading_csv collects before it stops.
inline constexpr std::size_t kMaxRowErrors = 1000;

// validate_reading over every parsed reading, each problem with its data row
// and its CSV column name (csv_column_for_field). `cells_of(serial)` gives the
// battery's cell count, 0 when unknown. Added by the wire library.
std::vector<RowError> validate_reading_rows(
    const ParsedReadings& parsed, std::chrono::sys_seconds now,
    const std::function<int(const std::string& serial)>& cells_of);

// The CSV column that carries a validate_reading field: the temperature
// fields "electrolyte_temp_c"/"_f" map to "electrolyte_temp" (likewise
// ambient); every other field, including "cell_sg/2", is its own name.
std::string csv_column_for_field(std::string_view field);

// Writes readings in the import format (header + rows), for round-trips.
// All columns in reading_csv_columns() order, CRLF line ends, cells through
// csv_cell. Numbers in their shortest exact form; a temperature in the unit
// it was entered in ("-25C", "41F"). Fahrenheit is written as the shortest
// decimal that reads back to the very same Celsius value, which exists for
// every value parsed from a Fahrenheit entry; any other Celsius value comes
// back within 1e-12 C. REQUIRES: values as parse_reading_csv or the JSON
// decoder produce them (finite; temperatures within parse_temperature's
// band), else a cell may not read back.
std::string format_reading_csv(const std::vector<ReadingInput>& readings);

}  // namespace pbfleet::models::wire
