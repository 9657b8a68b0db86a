#include "cli/import/batch.hpp"

#include <algorithm>
#include <cassert>
#include <charconv>

#include "cli/client/reading_json.hpp"
#include "cli/import/reading_id.hpp"

namespace pbfleet::cli::import {
namespace {

using models::wire::ReadingInput;
using models::wire::RowError;

void fill_defaults(ReadingInput& r) {
  if (r.source.empty()) r.source = kImportSource;
  if (r.reading_id.empty()) r.reading_id = derive_reading_id(r);
}

std::size_t count_of(const client::Json& body, const char* key) {
  auto it = body.find(key);
  return it != body.end() && it->is_number_unsigned() ? it->get<std::size_t>() : 0;
}

// The flagged readings of one chunk's answer: readings[k].flags, non-empty.
void collect_flagged(const client::Json& body, const Chunk& chunk, std::vector<Flagged>& out) {
  auto readings = body.find("readings");
  if (readings == body.end() || !readings->is_array()) return;
  for (std::size_t k = 0; k < readings->size() && k < chunk.count; ++k) {
    const auto& r = (*readings)[k];
    auto flags = r.find("flags");
    if (!r.is_object() || flags == r.end() || !flags->is_array() || flags->empty()) continue;
    Flagged f{chunk.first + k, {}};
    for (const auto& word : *flags)
      if (word.is_string()) f.flags.push_back(word.get<std::string>());
    if (!f.flags.empty()) out.push_back(std::move(f));
  }
}

// "/12/cell_sg/3" -> 12
std::optional<int> pointer_index(std::string_view field) {
  if (field.size() < 2 || field[0] != '/') return std::nullopt;
  int index = 0;
  auto [end, ec] = std::from_chars(field.data() + 1, field.data() + field.size(), index);
  if (ec != std::errc{} || (end != field.data() + field.size() && *end != '/')) return std::nullopt;
  return index;
}

}  // namespace

std::vector<Chunk> plan_chunks(std::size_t rows, std::size_t per_chunk) {
  assert(per_chunk > 0);
  std::vector<Chunk> chunks;
  for (std::size_t first = 0; first < rows; first += per_chunk) {
    chunks.push_back({first, std::min(per_chunk, rows - first)});
  }
  return chunks;
}

models::Result<Prepared> prepare_import(std::string_view csv_text, std::chrono::sys_seconds now) {
  auto parsed = models::wire::parse_reading_csv(csv_text);
  if (!parsed) return parsed.error();
  auto range_errors = models::wire::validate_reading_rows(*parsed, now, nullptr);
  Prepared p{std::move(parsed.value().readings), std::move(parsed.value().rows), std::move(parsed.value().errors)};
  p.errors.insert(p.errors.end(), range_errors.begin(), range_errors.end());
  for (auto& r : p.readings) fill_defaults(r);
  std::stable_sort(p.errors.begin(), p.errors.end(),
                   [](const RowError& a, const RowError& b) { return a.row < b.row; });
  return p;
}

SendOutcome send_readings(const client::Api& api, const std::vector<ReadingInput>& readings,
                          std::size_t per_chunk, const std::function<void(std::size_t)>& progress) {
  SendOutcome outcome;
  for (const auto& chunk : plan_chunks(readings.size(), per_chunk)) {
    client::Json body = client::Json::array();
    for (std::size_t i = chunk.first; i < chunk.first + chunk.count; ++i) {
      body.push_back(client::reading_to_json(readings[i]));
    }
    // Counts and flags are read back: the short answer saves the server
    // rendering every reading again (see POST /v1/readings, Prefer).
    auto reply = api.post("/v1/readings", body, "return=minimal");
    if (!reply.ok) {
      outcome.failed_chunk = chunk;
      outcome.failure = std::move(reply);
      return outcome;
    }
    outcome.stored += count_of(reply.json, "stored");
    outcome.replayed += count_of(reply.json, "replayed");
    collect_flagged(reply.json, chunk, outcome.flagged);
    outcome.rows_done += chunk.count;
    if (progress) progress(outcome.rows_done);
  }
  return outcome;
}

std::optional<int> file_row(const client::ProblemField& error, const Chunk& chunk, const std::vector<int>& rows) {
  std::optional<int> index = pointer_index(error.field);
  if (!index && error.row) index = *error.row - 1;
  if (!index || *index < 0 || static_cast<std::size_t>(*index) >= chunk.count) return std::nullopt;
  auto at = chunk.first + static_cast<std::size_t>(*index);
  return at < rows.size() ? std::optional<int>(rows[at]) : std::nullopt;
}

}  // namespace pbfleet::cli::import
