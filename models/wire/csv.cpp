// RFC 4180 tokenizer and the spreadsheet formula guard (CWE-1236).
#include "models/wire/csv.hpp"

#include <string>
#include <string_view>

#include "models/wire/text.hpp"

namespace pbfleet::models::wire {
namespace {

constexpr std::string_view kUtf8Bom = "\xEF\xBB\xBF";
constexpr std::string_view kCsvForm =
    "RFC 4180 CSV: fields separated by commas; a field holding a comma, quote or line break "
    "is enclosed in double quotes, and a quote inside it is doubled (\"\")";

bool starts_formula(std::string_view s) {
  const auto first = s.find_first_not_of('\'');
  if (first == std::string_view::npos) return false;
  const char c = s[first];
  return c == '=' || c == '+' || c == '-' || c == '@';
}

Error broken(int line, const std::string& what) {
  return Error{"", "line " + std::to_string(line) + ": " + what, std::string(kCsvForm)};
}

// A character-level state machine over the whole document. It runs longer
// than most functions here because the states share the cursor and the
// current row; splitting it would scatter the RFC 4180 grammar.
class Tokenizer {
 public:
  explicit Tokenizer(std::string_view text) : s_(text) {
    if (s_.starts_with(kUtf8Bom)) s_.remove_prefix(kUtf8Bom.size());
  }

  Result<std::vector<CsvRow>> run() {
    while (pos_ < s_.size()) {
      if (s_[pos_] == '"') {
        if (auto err = quoted_field()) return *err;
      } else if (auto err = plain_field()) {
        return *err;
      }
      if (pos_ >= s_.size()) break;
      if (s_[pos_] == ',') {
        ++pos_;
        if (pos_ == s_.size()) row_.emplace_back();  // "a," ends with an empty field
        continue;
      }
      end_line();  // only a line break can follow a field here
      end_row();
    }
    if (!row_.empty()) end_row();
    return std::move(rows_);
  }

 private:
  bool at_line_break() const { return s_[pos_] == '\n' || s_[pos_] == '\r'; }

  // Consumes one line break (CRLF, LF or a lone CR) and counts the line.
  void end_line() {
    if (s_[pos_] == '\r' && pos_ + 1 < s_.size() && s_[pos_ + 1] == '\n') ++pos_;
    ++pos_;
    ++line_;
  }

  void end_row() {
    rows_.push_back(std::move(row_));
    row_.clear();
  }

  std::optional<Error> plain_field() {
    std::string field;
    while (pos_ < s_.size() && s_[pos_] != ',' && !at_line_break()) {
      if (s_[pos_] == '"') return broken(line_, "a quote inside an unquoted field");
      field += s_[pos_++];
    }
    row_.push_back(std::move(field));
    return std::nullopt;
  }

  std::optional<Error> quoted_field() {
    const int opened = line_;
    std::string field;
    ++pos_;  // opening quote
    while (true) {
      if (pos_ >= s_.size()) {
        return broken(opened, "a quoted field is not closed before the end of the document");
      }
      const char c = s_[pos_];
      if (c == '"' && pos_ + 1 < s_.size() && s_[pos_ + 1] == '"') {
        field += '"';
        pos_ += 2;
      } else if (c == '"') {
        ++pos_;
        break;
      } else {
        if (c == '\n' || (c == '\r' && !(pos_ + 1 < s_.size() && s_[pos_ + 1] == '\n'))) ++line_;
        field += c;
        ++pos_;
      }
    }
    if (pos_ < s_.size() && s_[pos_] != ',' && !at_line_break()) {
      return broken(line_, "text after the closing quote of a field");
    }
    row_.push_back(std::move(field));
    return std::nullopt;
  }

  std::string_view s_;
  std::size_t pos_ = 0;
  int line_ = 1;
  CsvRow row_;
  std::vector<CsvRow> rows_;
};

bool needs_quotes(std::string_view s) {
  if (s.find_first_of(",\"\r\n") != std::string_view::npos) return true;
  if (s.starts_with(kUtf8Bom)) return true;  // else dropped as a BOM at the document start
  return !s.empty() && (s.front() == ' ' || s.front() == '\t' || s.back() == ' ' || s.back() == '\t');
}

}  // namespace

Result<std::vector<CsvRow>> parse_csv(std::string_view text) { return Tokenizer(text).run(); }

std::string csv_cell(std::string_view text) {
  std::string cell;
  if (starts_formula(text) && !text::is_decimal(text)) cell += '\'';
  cell += text;
  if (!needs_quotes(cell)) return cell;
  std::string quoted = "\"";
  for (const char c : cell) {
    if (c == '"') quoted += '"';
    quoted += c;
  }
  return quoted + '"';
}

std::string csv_unguard(std::string_view cell) {
  if (cell.starts_with('\'') && starts_formula(cell)) cell.remove_prefix(1);
  return std::string(cell);
}

}  // namespace pbfleet::models::wire
