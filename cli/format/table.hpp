// Aligned text tables for reports and lists, and the same rows as CSV.
//
// Kept small on purpose: no table library is packaged, and this is all the
// layout pbfleet needs (left/right alignment, a header rule, a tone per cell).
#pragma once

#include <string>
#include <vector>

#include "cli/format/style.hpp"

namespace pbfleet::cli::format {

enum class Align { left, right };

struct Column {
  std::string header;            // for people: "SOC %"
  Align align = Align::left;
  std::string csv_name;          // for machines: "soc_percent"; header when empty
};

struct Cell {
  std::string text;
  Tone tone = Tone::plain;
};

class Table {
 public:
  explicit Table(std::vector<Column> columns) : columns_(std::move(columns)) {}

  // REQUIRES: cells.size() == number of columns.
  void add_row(std::vector<Cell> cells);
  [[nodiscard]] std::size_t row_count() const { return rows_.size(); }

  // Header, a rule, then the rows; two spaces between columns; no trailing
  // blanks. Tones become colours only when style.color.
  [[nodiscard]] std::string render(const Style& style) const;
  // RFC 4180 CSV: header row (csv_name), then rows; text cells guarded against formula
  // injection (see models/wire/csv.hpp). Always CRLF-free "\n" line ends.
  [[nodiscard]] std::string render_csv() const;

 private:
  std::vector<std::size_t> widths() const;

  std::vector<Column> columns_;
  std::vector<std::vector<Cell>> rows_;
};

// One CSV line (with "\n") from plain cells, guarded like render_csv().
std::string csv_line(const std::vector<std::string>& cells);

}  // namespace pbfleet::cli::format
