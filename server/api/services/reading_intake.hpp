// Checking a batch of readings before it is stored: every reading must name
// a known, in-service battery the caller may reach, and pass the one set of
// rules (models::wire::validate_reading) with that battery's cell count.
// Shared by the JSON and CSV paths of POST /v1/readings.
#pragma once

#include <chrono>
#include <functional>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "models/wire/reading.hpp"
#include "server/api/problem.hpp"
#include "server/storage/store.hpp"

namespace pbfleet::api {

// Names a problem field the way the body's format does: a JSON pointer for
// JSON ("/0/cell_sg/2"), the CSV column with the row for CSV.
using FieldNamer = std::function<ProblemField(std::size_t index, const std::string& wire_field)>;

struct IntakeResult {
  std::vector<ProblemField> problems;                 // empty = batch may be stored
  std::map<std::string, storage::Battery> batteries;  // by serial, for derived values
  bool storage_failed = false;                        // a lookup failed: answer 503
  storage::StoreError storage_error;
};

// Checks each reading. `depot_scope` set: batteries outside that depot
// count as unknown (same answer as a missing battery).
IntakeResult check_batch(storage::Store& store, const std::vector<models::wire::ReadingInput>& batch,
                         std::chrono::sys_seconds now, std::optional<storage::Id> depot_scope,
                         const FieldNamer& name);

}  // namespace pbfleet::api
