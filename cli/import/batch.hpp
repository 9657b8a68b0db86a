// Importing a weekly round from CSV: parse and validate locally (the same
// rules the server applies, from models/wire), give every row an id, and
// send the rows in chunks, each stored atomically by the server.
#pragma once

#include <chrono>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "cli/client/api.hpp"
#include "models/result.hpp"
#include "models/wire/csv.hpp"

namespace pbfleet::cli::import {

// 500 rows of about 300 bytes of JSON each is about 150 KB, well under the
// server's 1 MiB body limit, and one chunk's transaction stays short.
inline constexpr std::size_t kDefaultChunkRows = 500;
// Upper bound for --chunk: 2000 rows is about 600 KB, still under 1 MiB.
inline constexpr std::size_t kMaxChunkRows = 2000;
// Source recorded for imported rows that name none.
inline constexpr std::string_view kImportSource = "import";

struct Chunk {
  std::size_t first = 0;  // 0-based index of the first reading
  std::size_t count = 0;
};

// Consecutive chunks of at most `per_chunk` rows covering `rows` rows.
// REQUIRES: per_chunk > 0.
std::vector<Chunk> plan_chunks(std::size_t rows, std::size_t per_chunk);

struct Prepared {
  std::vector<models::wire::ReadingInput> readings;
  std::vector<int> rows;                        // rows[i]: data row of readings[i] (header = 0)
  std::vector<models::wire::RowError> errors;   // format and range problems, by row
};

// Parses and validates a CSV document. Rows without a reading_id get one
// derived from their content; rows without a source get "import". Error
// only for a broken document (quotes, header).
models::Result<Prepared> prepare_import(std::string_view csv_text, std::chrono::sys_seconds now);

// A stored reading the server flagged (low charge, unsettled OCV, ...).
struct Flagged {
  std::size_t index = 0;               // into the readings sent
  std::vector<std::string> flags;      // the server's flag words
};

struct SendOutcome {
  std::vector<Flagged> flagged;        // in the order sent
  std::size_t stored = 0;              // new readings the server kept
  std::size_t replayed = 0;            // already stored (same id and content)
  std::size_t rows_done = 0;           // rows in chunks the server accepted
  std::optional<Chunk> failed_chunk;   // the chunk the server refused, if any
  client::Reply failure;               // its answer (problem or transport error)
};

// Sends chunk after chunk, stopping at the first refusal. `progress` is told
// the rows done after each chunk.
SendOutcome send_readings(const client::Api& api, const std::vector<models::wire::ReadingInput>& readings,
                          std::size_t per_chunk, const std::function<void(std::size_t)>& progress);

// The file's data row a server field error points at, given the chunk it
// came from: from its "/N/..." pointer into the JSON array, else its "row"
// member (1-based within the request). `rows` as in Prepared.
std::optional<int> file_row(const client::ProblemField& error, const Chunk& chunk, const std::vector<int>& rows);

}  // namespace pbfleet::cli::import
