// What the store keeps of each reading's derivation, and of each battery's
// newest readings, so the winter report reads one summary row per battery
// instead of deriving its recent readings on every request.
//
// Readings stay as entered. Beside them the store keeps two derived
// columns per reading (the SOC and electrolyte temperature of a trusted
// reading, NULL otherwise) and, per battery, the summary a look-back of
// analytics::kWinterLookback readings would find (schema 0004). Both are
// worked out by the models (analytics::derive) with the default settings;
// `facts_version()` names that derivation. When a binary's version differs
// from the one the database was summarised with, the store works the
// columns and summaries out again from the raw readings when it opens.
#pragma once

#include <array>
#include <optional>
#include <string>
#include <vector>

#include "models/analytics/derive.hpp"
#include "models/analytics/history.hpp"
#include "models/analytics/winter.hpp"
#include "models/wire/reading.hpp"
#include "server/storage/domain.hpp"

namespace pbfleet::storage {

// The model spec of a stored battery: chemistry defaults, then its own
// cell count, full-charge SG and ratings.
models::BatterySpec spec_of(const Battery& battery);
// A reading as a compact analytics point (Celsius, raw SG per cell).
analytics::ReadingPoint point_of(const models::wire::ReadingInput& reading);
analytics::ReadingPoint point_of(const ReadingMeasurement& reading);

// The derived columns of one reading: both set when the reading is trusted
// (analytics::DerivedReading::trusted), both empty otherwise.
struct ReadingFacts {
  std::optional<double> trusted_soc_pct;
  std::optional<double> trusted_temp_c;  // electrolyte temperature used (25 if not measured)
};
ReadingFacts facts_of(const models::BatterySpec& spec, const analytics::ReadingPoint& reading);
// The same, from the reading's derivation under the default settings.
ReadingFacts facts_from(const analytics::DerivedReading& derived);

// Fingerprint of everything a reading says except its reading_id: the first
// 16 bytes of SHA-256 over a length-prefixed canonical form. The same
// reading_id with another fingerprint is a conflict, with the same one a
// replay.
using ContentHash = std::array<unsigned char, 16>;
ContentHash content_hash(const models::wire::ReadingInput& reading);
// The same when the cell SGs are encoded already (encode_cell_sg).
ContentHash content_hash(const models::wire::ReadingInput& reading, std::string_view cell_sg_text);

// A reading with the per-reading work of storing it done beforehand, on the
// caller's thread, so that the one thread that writes does little more
// than insert: its fingerprint, its cell SGs as stored, and its facts under
// the battery spec the caller saw. A store uses `facts` only when the
// battery's spec read inside the write transaction equals `spec` (a spec
// changed meanwhile gets the facts worked out again).
struct PreparedReading {
  models::wire::ReadingInput input;
  ContentHash hash{};
  std::string cell_sg_text;                 // encode_cell_sg(input.cell_sg)
  std::optional<models::BatterySpec> spec;  // none: facts not worked out
  ReadingFacts facts;
};
// `spec`: the battery's spec as the caller knows it, or none to leave the
// facts to the store.
PreparedReading prepare_reading(models::wire::ReadingInput input,
                                const std::optional<models::BatterySpec>& spec);
// The same when the caller has derived the reading under `spec` already
// (analytics::derive, default settings).
PreparedReading prepare_reading(models::wire::ReadingInput input, const models::BatterySpec& spec,
                                const analytics::DerivedReading& derived);
std::vector<PreparedReading> prepare_readings(const std::vector<models::wire::ReadingInput>& batch);
// The facts to store for `reading` on a battery of spec `actual`.
ReadingFacts facts_for(const PreparedReading& reading, const models::BatterySpec& actual);

// Names the derivation behind the facts: the derive rules' version and the
// settings they use. Stored with the summaries; a change recomputes them.
std::string facts_version();

// One battery's summary: what winter_basis finds among its newest
// analytics::kWinterLookback readings, and a revision that moves on with
// every change to its readings (for callers that keep results per battery).
struct BatterySummary : analytics::WinterBasis {
  std::int64_t revision = 0;
};

// The summary from a battery's newest readings' facts, newest first (ties:
// the later stored first); only the first kWinterLookback are looked at.
struct FactsRow {
  std::chrono::sys_seconds taken_at{};
  ReadingFacts facts;
};
analytics::WinterBasis summary_of(std::span<const FactsRow> newest_first);

}  // namespace pbfleet::storage
