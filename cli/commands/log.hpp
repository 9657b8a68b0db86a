// `pbfleet log SERIAL`: one reading, from flags or asked for cell by cell on
// a terminal, with the server's verdict shown at once.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "cli/client/api.hpp"
#include "cli/commands/context.hpp"
#include "models/wire/reading.hpp"

namespace pbfleet::cli {

struct LogFlags {
  std::string serial;
  std::optional<double> sg;
  std::vector<double> cell_sg;
  std::optional<double> ocv_v;
  std::string temp;
  std::string ambient;
  std::optional<double> rest_h;
  std::optional<double> load_test_a;
  std::optional<double> load_test_end_v;
  std::string at;
  std::string by;
  std::string note;
  std::string id;
  int cells = 6;
  bool water_added = false;
  bool after_charge = false;
  bool json = false;

  // True when the flags carry a measurement (else we ask on a terminal).
  [[nodiscard]] bool has_values() const { return sg || !cell_sg.empty() || ocv_v; }
};

// Flags -> reading (timestamps and temperatures parsed; logged_by from
// --by or $USER; id derived from content unless --id). Error names the flag.
models::Result<models::wire::ReadingInput> reading_from_flags(const LogFlags& flags, Context& ctx);

// Asks for temperature, SG cell by cell, OCV and rest; re-asks a bad answer.
// Fills `flags`. False when input ended before a usable reading.
bool ask_for_reading(LogFlags& flags, Context& ctx);

// The server's derived values for a stored reading, for a person.
std::string feedback_text(const client::Json& stored, bool unicode);

}  // namespace pbfleet::cli
