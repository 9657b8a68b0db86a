#include "cli/commands/render.hpp"

#include <algorithm>
#include <array>
#include <utility>

#include <fmt/format.h>

namespace pbfleet::cli {
namespace {

using client::Json;

constexpr std::string_view kCautionsKey = "cautions";

// Unit suffixes of wire names (server/api/CONTRACT.md) and how a header shows them.
struct Suffix {
  std::string_view suffix;
  std::string_view unicode;
  std::string_view ascii;
};
constexpr std::array kSuffixes = {
    Suffix{"_percent", "%", "%"}, Suffix{"_c", "°C", "C"},   Suffix{"_f", "°F", "F"},
    Suffix{"_v", "V", "V"},       Suffix{"_a", "A", "A"},     Suffix{"_h", "h", "h"},
    Suffix{"_min", "min", "min"}, Suffix{"_ah", "Ah", "Ah"}, Suffix{"_l", "L", "L"},
    Suffix{"_days", "days", "days"}};

// Trade abbreviations kept in capitals.
constexpr std::array<std::pair<std::string_view, std::string_view>, 6> kAbbreviations = {
    {{"sg", "SG"}, {"soc", "SOC"}, {"ocv", "OCV"}, {"cca", "CCA"}, {"id", "ID"}, {"rc", "RC"}}};

bool ends_with(std::string_view s, std::string_view end) {
  return s.size() > end.size() && s.substr(s.size() - end.size()) == end;
}

std::string words(std::string_view key) {
  std::string out;
  std::size_t start = 0;
  while (start <= key.size()) {
    auto end = std::min(key.find('_', start), key.size());
    auto word = key.substr(start, end - start);
    auto abbr = std::find_if(kAbbreviations.begin(), kAbbreviations.end(),
                             [&](const auto& a) { return a.first == word; });
    if (!out.empty()) out += ' ';
    out += abbr != kAbbreviations.end() ? std::string(abbr->second) : std::string(word);
    start = end + 1;
  }
  return out;
}

bool is_plain(const Json& v) {
  if (v.is_primitive()) return true;
  return v.is_array() && std::all_of(v.begin(), v.end(), [](const Json& e) { return e.is_primitive(); });
}

bool is_object_array(const Json& v) {
  return v.is_array() && !v.empty() && std::all_of(v.begin(), v.end(), [](const Json& e) { return e.is_object(); });
}

std::string number_text(std::string_view key, double x) {
  // SG and SG differences (cell spread) are read to 0.001 on a hydrometer.
  if (key.find("sg") != std::string_view::npos || key.find("spread") != std::string_view::npos) {
    return fmt::format("{:.3f}", x);
  }
  if (ends_with(key, "_v")) return fmt::format("{:.2f}", x);
  if (key.find("margin") != std::string_view::npos && !ends_with(key, "_c")) return fmt::format("{:.2f}", x);
  return fmt::format("{:.1f}", x);
}

format::Tone level_tone(std::string_view v) {
  for (auto bad : {"act_now", "likely_permanent", "critical", "high", "freeze"}) {
    if (v.find(bad) != std::string_view::npos) return format::Tone::bad;
  }
  for (auto warn : {"watch", "advancing", "early", "no_data", "medium"}) {
    if (v.find(warn) != std::string_view::npos) return format::Tone::warn;
  }
  for (auto good : {"ok", "none", "low"}) {
    if (v == good) return format::Tone::good;
  }
  return format::Tone::plain;
}

// Spreads a row holding one array of objects into one row per element.
void spread_into(std::vector<Json>& rows, const Json& row) {
  const Json* children = nullptr;
  for (const auto& [key, value] : row.items()) {
    if (is_object_array(value)) children = children ? nullptr : &value;
  }
  if (!children) {
    rows.push_back(row);
    return;
  }
  for (const auto& child : *children) {
    Json merged = Json::object();
    for (const auto& [key, value] : row.items()) {
      if (is_plain(value)) merged[key] = value;
    }
    for (const auto& [key, value] : child.items()) merged[key] = value;
    rows.push_back(std::move(merged));
  }
}

std::vector<std::string> plain_keys(const std::vector<Json>& rows) {
  std::vector<std::string> keys;
  for (const auto& row : rows) {
    for (const auto& [key, value] : row.items()) {
      if (key == kCautionsKey || !is_plain(value)) continue;
      if (std::find(keys.begin(), keys.end(), key) == keys.end()) keys.push_back(key);
    }
  }
  return keys;
}

}  // namespace

void add_output_flags(CLI::App& command, OutputFlags& flags, bool with_csv) {
  auto* json = command.add_flag("--json", flags.json, "Print JSON for scripts instead of text");
  if (with_csv) {
    auto* csv = command.add_flag("--csv", flags.csv, "Print CSV (RFC 4180) instead of text");
    json->excludes(csv);
  }
}

std::string column_header(std::string_view key, bool unicode) {
  for (const auto& s : kSuffixes) {
    if (ends_with(key, s.suffix)) {
      return words(key.substr(0, key.size() - s.suffix.size())) + " " +
             std::string(unicode ? s.unicode : s.ascii);
    }
  }
  return words(key);
}

std::string cell_text(std::string_view key, const Json& v) {
  if (v.is_null()) return "-";
  if (v.is_boolean()) return v.get<bool>() ? "yes" : "no";
  if (v.is_number_integer()) return std::to_string(v.get<long long>());
  if (v.is_number()) return number_text(key, v.get<double>());
  if (v.is_string()) return v.get<std::string>();
  if (v.is_array()) {
    std::string joined;
    for (const auto& e : v) joined += (joined.empty() ? "" : "; ") + cell_text(key, e);
    return joined.empty() ? "-" : joined;
  }
  return v.dump();
}

format::Tone cell_tone(std::string_view key, const Json& v) {
  if (v.is_string() && (key == "level" || key == "risk" || key == "status" || ends_with(key, "_level"))) {
    return level_tone(v.get<std::string>());
  }
  if (key == "flags" && v.is_array() && !v.empty()) return format::Tone::warn;
  if (!v.is_number()) return format::Tone::plain;
  const double x = v.get<double>();
  // SOC below 75 % wants a charge before the cold; below 50 % it risks
  // freezing in a hard winter (common practice).
  if (key.find("soc_percent") != std::string_view::npos) {
    return x < 50 ? format::Tone::bad : x < 75 ? format::Tone::warn : format::Tone::good;
  }
  // Available over required current: below 1 it will likely not crank.
  if (key.find("crank_margin") != std::string_view::npos) return x < 1.0 ? format::Tone::bad : format::Tone::plain;
  if (key == "freeze_margin_c") return x < 0 ? format::Tone::bad : format::Tone::plain;
  return format::Tone::plain;
}

std::vector<Json> rows_of(const Json& body) {
  const Json* list = nullptr;
  if (body.is_array()) list = &body;
  if (body.is_object()) {
    if (auto it = body.find("items"); it != body.end() && it->is_array()) list = &*it;
    for (auto it = body.begin(); !list && it != body.end(); ++it) {
      if (is_object_array(*it)) list = &*it;
    }
  }
  std::vector<Json> rows;
  if (!list) return rows;
  for (const auto& row : *list) {
    if (row.is_object()) spread_into(rows, row);
  }
  return rows;
}

format::Table rows_table(const std::vector<Json>& rows, const std::vector<std::string>& preferred, bool unicode) {
  auto all = plain_keys(rows);
  std::vector<std::string> keys;
  for (const auto& k : preferred) {
    if (std::find(all.begin(), all.end(), k) != all.end()) keys.push_back(k);
  }
  if (keys.empty()) keys = all;
  std::vector<format::Column> columns;
  for (const auto& k : keys) {
    bool numeric = std::any_of(rows.begin(), rows.end(), [&](const Json& r) {
      auto it = r.find(k);
      return it != r.end() && it->is_number();
    });
    columns.push_back({column_header(k, unicode), numeric ? format::Align::right : format::Align::left, k});
  }
  format::Table table(std::move(columns));
  for (const auto& row : rows) {
    std::vector<format::Cell> cells;
    for (const auto& k : keys) {
      auto it = row.find(k);
      const Json& v = it != row.end() ? *it : Json();
      cells.push_back({cell_text(k, v), cell_tone(k, v)});
    }
    table.add_row(std::move(cells));
  }
  return table;
}

std::vector<std::string> cautions_of(const std::vector<Json>& rows) {
  std::vector<std::string> found;
  for (const auto& row : rows) {
    auto it = row.find(kCautionsKey);
    if (it == row.end() || !it->is_array()) continue;
    for (const auto& c : *it) {
      if (c.is_string() && std::find(found.begin(), found.end(), c.get<std::string>()) == found.end()) {
        found.push_back(c.get<std::string>());
      }
    }
  }
  return found;
}

std::string render_cautions(const std::vector<std::string>& cautions) {
  std::string out;
  for (const auto& c : cautions) out += (out.empty() ? "\nSafety: " : "Safety: ") + c + "\n";
  return out;
}

}  // namespace pbfleet::cli
