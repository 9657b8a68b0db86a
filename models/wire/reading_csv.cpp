// The reading import/export format over the RFC 4180 tokenizer.
#include <algorithm>
#include <array>
#include <cmath>
#include <optional>
#include <string>
#include <string_view>

#include "models/wire/csv.hpp"
#include "models/wire/text.hpp"

namespace pbfleet::models::wire {
namespace {

enum class Col {
  reading_id, serial, taken_at, ocv_v, cell_sg, electrolyte_temp, ambient_temp, rest_h,
  load_test_a, load_test_end_v, logged_by, source, note, after_charge, water_added, count
};

constexpr std::size_t kColumnCount = static_cast<std::size_t>(Col::count);

constexpr std::array<std::string_view, kColumnCount> kColumnNames = {
    "reading_id", "serial", "taken_at", "ocv_v", "cell_sg", "electrolyte_temp",
    "ambient_temp", "rest_h", "load_test_a", "load_test_end_v", "logged_by", "source",
    "note", "after_charge", "water_added"};

constexpr std::string_view kNumberForm = "a decimal number, e.g. 12.65";
constexpr std::string_view kBoolForm = "true, false, 1, 0, yes or no (empty = false)";
constexpr std::string_view kSgListForm = "SG values separated by ';', e.g. 1.265;1.260;1.270";

std::string all_columns_text() {
  std::string s = "columns: ";
  for (std::size_t i = 0; i < kColumnCount; ++i) {
    if (i > 0) s += ", ";
    s += kColumnNames[i];
  }
  return s;
}

std::optional<Col> column_named(std::string_view name) {
  for (std::size_t i = 0; i < kColumnCount; ++i) {
    if (kColumnNames[i] == name) return static_cast<Col>(i);
  }
  return std::nullopt;
}

// Position of each known column in the document, or nullopt when absent.
using Layout = std::array<std::optional<std::size_t>, kColumnCount>;

std::optional<std::size_t>& slot(Layout& layout, Col c) {
  return layout[static_cast<std::size_t>(c)];
}

Result<Layout> read_header(const CsvRow& header) {
  Layout layout{};
  for (std::size_t i = 0; i < header.size(); ++i) {
    const std::string name{text::trim(csv_unguard(header[i]))};
    const auto col = column_named(name);
    const std::string where = "column " + std::to_string(i + 1);
    if (!col) {
      return Error{name.empty() ? "header" : text::excerpt(name),
                   where + " '" + text::excerpt(name) + "' is not a reading column",
                   all_columns_text()};
    }
    if (slot(layout, *col)) {
      return Error{name, where + " repeats column '" + name + "'", "each column at most once"};
    }
    slot(layout, *col) = i;
  }
  for (const Col required : {Col::serial, Col::taken_at}) {
    if (slot(layout, required)) continue;
    const std::string name{kColumnNames[static_cast<std::size_t>(required)]};
    return Error{name, "the header has no '" + name + "' column", all_columns_text()};
  }
  if (!slot(layout, Col::ocv_v) && !slot(layout, Col::cell_sg)) {
    return Error{"header", "the header needs an 'ocv_v' or a 'cell_sg' column", all_columns_text()};
  }
  return layout;
}

bool is_blank(const CsvRow& row) {
  return std::all_of(row.begin(), row.end(),
                     [](const std::string& f) { return text::trim(f).empty(); });
}

std::optional<bool> parse_bool(std::string_view s) {
  std::string lower;
  for (const char c : s) lower += static_cast<char>(c >= 'A' && c <= 'Z' ? c - 'A' + 'a' : c);
  if (lower == "true" || lower == "1" || lower == "yes") return true;
  if (lower == "false" || lower == "0" || lower == "no") return false;
  return std::nullopt;
}

// Turns one data row into a ReadingInput, collecting every cell problem.
class RowReader {
 public:
  RowReader(const Layout& layout, const CsvRow& row, int row_number, std::vector<RowError>& errors)
      : layout_(layout), row_(row), row_number_(row_number), errors_(errors) {}

  // The reading, or nullopt when any cell had a problem (all reported).
  std::optional<ReadingInput> read() {
    const std::size_t before = errors_.size();
    ReadingInput r;
    r.reading_id = cell(Col::reading_id);
    r.serial = cell(Col::serial);
    read_taken_at(r);
    r.ocv = number<Volts>(Col::ocv_v);
    read_cell_sg(r);
    r.electrolyte = temperature(Col::electrolyte_temp);
    r.ambient = temperature(Col::ambient_temp);
    r.rest = number<Hours>(Col::rest_h);
    r.load_test_current = number<Amperes>(Col::load_test_a);
    r.load_test_end = number<Volts>(Col::load_test_end_v);
    r.logged_by = cell(Col::logged_by);
    r.source = cell(Col::source);
    r.note = cell(Col::note);
    r.after_charge = boolean(Col::after_charge);
    r.water_added = boolean(Col::water_added);
    if (errors_.size() != before) return std::nullopt;
    return r;
  }

 private:
  static std::string name(Col c) { return std::string(kColumnNames[static_cast<std::size_t>(c)]); }

  std::string cell(Col c) const {
    const auto at = layout_[static_cast<std::size_t>(c)];
    return at ? csv_unguard(row_[*at]) : std::string();
  }

  void fail(std::string field, std::string detail, std::string_view allowed) {
    errors_.push_back(RowError{row_number_, FieldError{std::move(field), std::move(detail),
                                                       std::string(allowed)}});
  }

  void read_taken_at(ReadingInput& r) {
    const std::string raw = cell(Col::taken_at);
    const auto t = text::trim(raw);
    if (t.empty()) return fail("taken_at", "taken_at is required", "an RFC 3339 date-time");
    auto parsed = parse_timestamp(t, "taken_at");
    if (!parsed) return fail("taken_at", parsed.error().detail, parsed.error().allowed);
    r.taken_at = *parsed;
  }

  template <class Quantity>
  std::optional<Quantity> number(Col c) {
    const std::string raw = cell(c);
    const auto t = text::trim(raw);
    if (t.empty()) return std::nullopt;
    if (const auto v = text::parse_decimal(t)) return Quantity{*v};
    fail(name(c), "'" + text::excerpt(t) + "' is not a number", kNumberForm);
    return std::nullopt;
  }

  void read_cell_sg(ReadingInput& r) {
    const std::string raw = cell(Col::cell_sg);
    std::string_view rest = text::trim(raw);
    if (rest.empty()) return;
    for (std::size_t i = 0;; ++i) {
      if (i == std::size_t{kMaxCells}) {  // bound the work and the error list
        return fail("cell_sg", "cell_sg has more than " + std::to_string(kMaxCells) + " values",
                    "1 to " + std::to_string(kMaxCells) + " values, one per cell");
      }
      const auto cut = rest.find(';');
      const auto item = text::trim(rest.substr(0, cut));
      if (const auto v = text::parse_decimal(item)) {
        r.cell_sg.push_back(SpecificGravity{*v});
      } else {
        fail("cell_sg/" + std::to_string(i), "'" + text::excerpt(item) + "' is not an SG value",
             kSgListForm);
      }
      if (cut == std::string_view::npos) return;
      rest.remove_prefix(cut + 1);
    }
  }

  std::optional<EnteredTemperature> temperature(Col c) {
    const std::string raw = cell(c);
    if (text::trim(raw).empty()) return std::nullopt;
    auto t = parse_temperature(raw, name(c));
    if (t) return *t;
    fail(name(c), t.error().detail, t.error().allowed);
    return std::nullopt;
  }

  bool boolean(Col c) {
    const std::string raw = cell(c);
    const auto t = text::trim(raw);
    if (t.empty()) return false;
    if (const auto b = parse_bool(t)) return *b;
    fail(name(c), "'" + text::excerpt(t) + "' is not a yes/no value", kBoolForm);
    return false;
  }

  const Layout& layout_;
  const CsvRow& row_;
  int row_number_;
  std::vector<RowError>& errors_;
};

// Celsius value as text in its entered unit, exact on re-import.
std::string temperature_text(const EnteredTemperature& t) {
  if (t.unit == TempUnit::c) return text::format_shortest(t.value.value) + "C";
  // Converting back and forth may land an ulp or two away from the number the
  // crew typed, so look at the doubles around the converted value and write
  // the shortest one that reads back to the very same Celsius value ("41F").
  constexpr int kUlpsEachWay = 4;
  const double f = fahrenheit_from_celsius(t.value);
  std::string best;
  double below = f, above = f;
  for (int step = 0; step <= kUlpsEachWay; ++step) {
    for (const double g : {below, above}) {
      if (celsius_from_fahrenheit(g).value != t.value.value) continue;
      std::string s = text::format_shortest(g);
      if (best.empty() || s.size() < best.size()) best = std::move(s);
    }
    below = std::nextafter(below, -HUGE_VAL);
    above = std::nextafter(above, HUGE_VAL);
  }
  if (best.empty()) best = text::format_shortest(f);  // no exact form: within 1e-12 C
  return best + "F";
}

template <class Quantity>
std::string optional_number(const std::optional<Quantity>& q) {
  return q ? text::format_shortest(q->value) : std::string();
}

std::string sg_list(const std::vector<SpecificGravity>& sg) {
  std::string s;
  for (std::size_t i = 0; i < sg.size(); ++i) {
    if (i > 0) s += ';';
    s += text::format_shortest(sg[i].value);
  }
  return s;
}

std::string row_text(const ReadingInput& r) {
  const auto temp = [](const std::optional<EnteredTemperature>& t) {
    return t ? temperature_text(*t) : std::string();
  };
  const std::array<std::string, kColumnCount> cells = {
      r.reading_id, r.serial, format_timestamp(r.taken_at), optional_number(r.ocv),
      sg_list(r.cell_sg), temp(r.electrolyte), temp(r.ambient), optional_number(r.rest),
      optional_number(r.load_test_current), optional_number(r.load_test_end), r.logged_by,
      r.source, r.note, r.after_charge ? "true" : "false", r.water_added ? "true" : "false"};
  std::string line;
  for (std::size_t i = 0; i < kColumnCount; ++i) {
    if (i > 0) line += ',';
    line += csv_cell(cells[i]);
  }
  return line + "\r\n";
}

}  // namespace

const std::vector<std::string_view>& reading_csv_columns() {
  static const std::vector<std::string_view> columns(kColumnNames.begin(), kColumnNames.end());
  return columns;
}

Result<ParsedReadings> parse_reading_csv(std::string_view text) {
  auto rows = parse_csv(text);
  if (!rows) return rows.error();
  if (rows->empty() || is_blank(rows->front())) {
    return Error{"header", "the document has no header row", all_columns_text()};
  }
  auto layout = read_header(rows->front());
  if (!layout) return layout.error();
  const std::size_t width = rows->front().size();
  ParsedReadings out;
  for (std::size_t i = 1; i < rows->size(); ++i) {
    const CsvRow& row = (*rows)[i];
    const int number = static_cast<int>(i);
    if (is_blank(row)) continue;
    if (row.size() != width) {
      out.errors.push_back(RowError{
          number, FieldError{"", "the row has " + std::to_string(row.size()) +
                                     " fields; the header has " + std::to_string(width),
                             std::to_string(width) + " fields, as in the header"}});
      continue;
    }
    if (out.errors.size() >= kMaxRowErrors) {
      out.errors.push_back(RowError{
          number, FieldError{"", "too many errors: reading stopped at this row",
                             "at most " + std::to_string(kMaxRowErrors) + " errors reported"}});
      break;
    }
    if (auto reading = RowReader(*layout, row, number, out.errors).read()) {
      out.readings.push_back(std::move(*reading));
      out.rows.push_back(number);
    }
  }
  return out;
}

std::string csv_column_for_field(std::string_view field) {
  for (const std::string_view base : {"electrolyte_temp", "ambient_temp"}) {
    if (field.size() == base.size() + 2 && field.starts_with(base) &&
        (field.ends_with("_c") || field.ends_with("_f"))) {
      return std::string(base);
    }
  }
  return std::string(field);
}

std::vector<RowError> validate_reading_rows(
    const ParsedReadings& parsed, std::chrono::sys_seconds now,
    const std::function<int(const std::string& serial)>& cells_of) {
  std::vector<RowError> errors;
  for (std::size_t i = 0; i < parsed.readings.size(); ++i) {
    const ReadingInput& r = parsed.readings[i];
    for (auto& e : validate_reading(r, now, cells_of ? cells_of(r.serial) : 0)) {
      e.field = csv_column_for_field(e.field);
      errors.push_back(RowError{parsed.rows[i], std::move(e)});
    }
  }
  return errors;
}

std::string format_reading_csv(const std::vector<ReadingInput>& readings) {
  std::string out;
  for (std::size_t i = 0; i < kColumnCount; ++i) {
    if (i > 0) out += ',';
    out += kColumnNames[i];
  }
  out += "\r\n";
  for (const auto& r : readings) out += row_text(r);
  return out;
}

}  // namespace pbfleet::models::wire
