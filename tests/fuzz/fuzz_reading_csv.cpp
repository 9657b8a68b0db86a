// Fuzz target 2: the reading CSV importer and the validator behind it.
// Invariants: the tokenizer's rows survive being written with csv_cell and
// read again; every error names its row and field in valid UTF-8; every
// parsed reading, exported with format_reading_csv and imported again, comes
// back field for field and bit for bit, with the same validation result.
#include <chrono>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "models/wire/csv.hpp"
#include "models/wire/reading.hpp"
#include "tests/fuzz/fuzz_check.hpp"

using namespace std::chrono;
using namespace pbfleet::models;
using namespace pbfleet::models::wire;

namespace {

const sys_seconds kNow = sys_days{year{2026} / 11 / 30} + hours{12};

// Rows written with csv_cell and read back are the same rows.
void check_tokenizer_round_trip(const std::vector<CsvRow>& rows) {
  std::string doc;
  for (const auto& row : rows) {
    for (std::size_t i = 0; i < row.size(); ++i) doc += (i ? "," : "") + csv_cell(row[i]);
    doc += "\r\n";
  }
  auto back = parse_csv(doc);
  FUZZ_CHECK(back.ok());
  FUZZ_CHECK(back->size() == rows.size());
  for (std::size_t r = 0; r < rows.size(); ++r) {
    FUZZ_CHECK((*back)[r].size() == rows[r].size());
    for (std::size_t i = 0; i < rows[r].size(); ++i) {
      FUZZ_CHECK(csv_unguard((*back)[r][i]) == rows[r][i]);
    }
  }
}

bool same_temperature(const std::optional<EnteredTemperature>& a,
                      const std::optional<EnteredTemperature>& b) {
  if (a.has_value() != b.has_value()) return false;
  return !a || (a->value.value == b->value.value && a->unit == b->unit);
}

bool same_reading(const ReadingInput& a, const ReadingInput& b) {
  return a.reading_id == b.reading_id && a.serial == b.serial && a.taken_at == b.taken_at &&
         a.ocv == b.ocv && a.cell_sg == b.cell_sg && same_temperature(a.electrolyte, b.electrolyte) &&
         same_temperature(a.ambient, b.ambient) && a.rest == b.rest &&
         a.load_test_current == b.load_test_current && a.load_test_end == b.load_test_end &&
         a.logged_by == b.logged_by && a.source == b.source && a.note == b.note &&
         a.after_charge == b.after_charge && a.water_added == b.water_added;
}

void check_validation(const ReadingInput& r) {
  for (const auto& e : validate_reading(r, kNow, 6)) pbfleet::fuzz::check_error(e, false);
  for (const auto& e : validate_reading(r, kNow, 0)) pbfleet::fuzz::check_error(e, false);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view input(reinterpret_cast<const char*>(data), size);
  const auto rows = parse_csv(input);
  if (rows) check_tokenizer_round_trip(*rows);
  else pbfleet::fuzz::check_error(rows.error(), true);

  const auto parsed = parse_reading_csv(input);
  if (!parsed) {
    // A tokenizer error concerns the document, not a column: no field.
    const bool from_tokenizer = !rows;
    pbfleet::fuzz::check_error(parsed.error(), from_tokenizer);
    FUZZ_CHECK(!from_tokenizer || parsed.error().detail == rows.error().detail);
    return 0;
  }
  FUZZ_CHECK(parsed->rows.size() == parsed->readings.size());
  for (const auto& e : parsed->errors) {
    FUZZ_CHECK(e.row >= 1);
    pbfleet::fuzz::check_error(e.error, true);
  }
  for (const auto& r : parsed->readings) check_validation(r);

  const auto again = parse_reading_csv(format_reading_csv(parsed->readings));
  FUZZ_CHECK(again.ok());
  FUZZ_CHECK(again->errors.empty());
  FUZZ_CHECK(again->readings.size() == parsed->readings.size());
  for (std::size_t i = 0; i < parsed->readings.size(); ++i) {
    FUZZ_CHECK(same_reading(again->readings[i], parsed->readings[i]));
  }
  return 0;
}
