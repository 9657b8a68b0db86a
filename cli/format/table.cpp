#include "cli/format/table.hpp"

#include <algorithm>
#include <cassert>

#include "models/wire/csv.hpp"

namespace pbfleet::cli::format {
namespace {

constexpr std::string_view kGap = "  ";

std::string pad(std::string_view text, std::size_t width, Align align) {
  auto used = display_width(text);
  std::string fill(width > used ? width - used : 0, ' ');
  return align == Align::left ? std::string(text) + fill : fill + std::string(text);
}

void trim_right(std::string& line) {
  while (!line.empty() && line.back() == ' ') line.pop_back();
}

}  // namespace

void Table::add_row(std::vector<Cell> cells) {
  assert(cells.size() == columns_.size());
  rows_.push_back(std::move(cells));
}

std::vector<std::size_t> Table::widths() const {
  std::vector<std::size_t> w;
  for (const auto& c : columns_) w.push_back(display_width(c.header));
  for (const auto& row : rows_) {
    for (std::size_t i = 0; i < row.size(); ++i) w[i] = std::max(w[i], display_width(row[i].text));
  }
  return w;
}

std::string Table::render(const Style& style) const {
  auto w = widths();
  std::string out;
  std::string header;
  std::string rule;
  for (std::size_t i = 0; i < columns_.size(); ++i) {
    if (i > 0) header += kGap, rule += kGap;
    header += pad(columns_[i].header, w[i], columns_[i].align);
    rule += std::string(w[i], '-');
  }
  trim_right(header);
  out += paint(style, Tone::bold, header) + "\n" + paint(style, Tone::dim, rule) + "\n";
  for (const auto& row : rows_) {
    std::string line;
    for (std::size_t i = 0; i < row.size(); ++i) {
      if (i > 0) line += kGap;
      // Pad first, then colour, so escape codes never disturb alignment.
      // The last left-aligned column needs no padding.
      bool last_left = i + 1 == row.size() && columns_[i].align == Align::left;
      auto text = last_left ? row[i].text : pad(row[i].text, w[i], columns_[i].align);
      line += paint(style, row[i].tone, text);
    }
    trim_right(line);
    out += line + "\n";
  }
  return out;
}

std::string Table::render_csv() const {
  std::vector<std::string> header;
  for (const auto& c : columns_) header.push_back(c.csv_name.empty() ? c.header : c.csv_name);
  std::string out = csv_line(header);
  for (const auto& row : rows_) {
    std::vector<std::string> cells;
    for (const auto& cell : row) cells.push_back(cell.text);
    out += csv_line(cells);
  }
  return out;
}

std::string csv_line(const std::vector<std::string>& cells) {
  std::string line;
  for (std::size_t i = 0; i < cells.size(); ++i) {
    if (i > 0) line += ',';
    line += models::wire::csv_cell(cells[i]);
  }
  return line + "\n";
}

}  // namespace pbfleet::cli::format
