// The quick way through a JSON body of readings: one hand-written pass
// over the text straight into ReadingInputs, with no document tree, no
// per-object key sets and no general-purpose lexer (nlohmann's SAX lexer
// had been the largest single cost of a batch on the request threads).
// Numbers go through std::from_chars, so each reads to the same nearest
// double as in the tree; strings are checked as UTF-8 and their escapes
// decoded as the tree reader does.
//
// It takes only the plain shape: one reading object or an array of them,
// known keys each at most once, strings where strings belong (within the
// decoder's length caps), numbers where numbers belong, cell_sg an array
// of numbers, taken_at a valid timestamp, serial and taken_at present, one
// unit per temperature; null counts as absent. Anything else gives
// nullopt, and the caller reads the body through the tree and FieldReader
// (read_reading), which words every problem. So a body either reads here
// exactly as read_reading reads it, or is left to read_reading.
#pragma once

#include <optional>
#include <string_view>
#include <vector>

#include "models/wire/reading.hpp"

namespace pbfleet::api {

struct StreamedReadings {
  std::vector<models::wire::ReadingInput> readings;
  bool batch = false;  // the body was an array
};

[[nodiscard]] std::optional<StreamedReadings> stream_readings(std::string_view body);

}  // namespace pbfleet::api
