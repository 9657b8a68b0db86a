// Turning the server's JSON into what a person reads: aligned tables with
// units in the headers and colour by meaning, plus --json / --csv output
// flags shared by every command that prints data.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include <CLI/CLI.hpp>

#include "cli/client/api.hpp"
#include "cli/format/table.hpp"

namespace pbfleet::cli {

enum class OutputMode { text, json, csv };

struct OutputFlags {
  bool json = false;
  bool csv = false;
  [[nodiscard]] OutputMode mode() const {
    return json ? OutputMode::json : csv ? OutputMode::csv : OutputMode::text;
  }
};

// Adds --json (and --csv when `with_csv`), mutually exclusive.
void add_output_flags(CLI::App& command, OutputFlags& flags, bool with_csv);

// "soc_percent" -> "SOC %", "design_low_c" -> "design low °C" (ASCII "C"
// without Unicode), "corrected_sg" -> "corrected SG".
std::string column_header(std::string_view key, bool unicode);

// A JSON scalar for a table cell: SG to 3 decimals, volts to 2, other
// numbers to 1; null as "-"; booleans "yes"/"no"; string arrays joined.
std::string cell_text(std::string_view key, const client::Json& value);

// What a value means at a glance (risk levels, low SOC, thin crank margin,
// flags), for colour.
format::Tone cell_tone(std::string_view key, const client::Json& value);

// Rows from a list answer: a bare array, or the first array of objects in an
// object ("items", "batteries", ...). A row holding one array of objects is
// spread into one row per element, keeping the parent's plain fields.
std::vector<client::Json> rows_of(const client::Json& body);

// A table of `rows`. Columns: `preferred` keys that occur (in that order),
// or, when none occurs, every plain field of the rows in server order.
// Safety texts ("cautions") are never columns: see cautions_of.
format::Table rows_table(const std::vector<client::Json>& rows, const std::vector<std::string>& preferred,
                         bool unicode);

// Every distinct safety caution the rows carry, in first-seen order.
std::vector<std::string> cautions_of(const std::vector<client::Json>& rows);

// Prints cautions as a "Safety:" block (nothing when empty).
std::string render_cautions(const std::vector<std::string>& cautions);

}  // namespace pbfleet::cli
