// What the ingest benchmarks (SQLite and PostgreSQL) send: readings of a
// small generated fleet, as POST /v1/readings bodies.
#pragma once

#include <chrono>
#include <cstddef>
#include <string>
#include <vector>

#include "deploy/demogen/generator.hpp"
#include "models/wire/reading.hpp"

namespace pbfleet::bench {

// A generated fleet big enough for `wanted` readings (five years of weekly
// rounds up to `last_round`); `readings` gets exactly `wanted` of them.
// Exits when the generator falls short.
demogen::Fleet small_fleet(std::size_t wanted, std::chrono::sys_days last_round,
                           std::vector<models::wire::ReadingInput>& readings);

// Request bodies for readings [from, from + count): one JSON object each
// when per_body is 1, else JSON arrays of up to per_body readings.
std::vector<std::string> bodies(const std::vector<models::wire::ReadingInput>& readings,
                                std::size_t from, std::size_t count, std::size_t per_body);

}  // namespace pbfleet::bench
