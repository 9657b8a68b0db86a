#include "server/storage/reading_facts.hpp"

#include <cstdio>

#include "models/analytics/derive.hpp"
#include "server/storage/sqlite_rows.hpp"

namespace pbfleet::storage {

namespace {

// Bump when analytics::derive changes what makes a reading trusted or what
// SOC it gives: every database is then summarised again at start-up.
constexpr int kDeriveRulesVersion = 1;

template <class Reading>
analytics::ReadingPoint point_with(const Reading& r, std::optional<double> electrolyte_c) {
  analytics::ReadingPoint p;
  p.taken_at = r.taken_at;
  if (r.ocv) p.ocv_v = r.ocv->value;
  if (electrolyte_c) p.electrolyte_c = *electrolyte_c;
  if (r.rest) p.rest_h = r.rest->value;
  if (r.load_test_current) p.load_test_a = r.load_test_current->value;
  if (r.load_test_end) p.load_test_end_v = r.load_test_end->value;
  p.cells = analytics::CellSgs(r.cell_sg);
  p.after_charge = r.after_charge;
  p.water_added = r.water_added;
  return p;
}

}  // namespace

models::BatterySpec spec_of(const Battery& b) {
  models::BatterySpec spec = models::default_spec(b.chemistry, b.cells);
  if (b.full_charge_sg) spec.full_charge_sg = *b.full_charge_sg;
  spec.rated_cca = b.rated_cca_a;
  spec.reserve_capacity_min = b.reserve_capacity_min;
  spec.capacity_ah = b.capacity_ah;
  return spec;
}

analytics::ReadingPoint point_of(const models::wire::ReadingInput& r) {
  return point_with(r, r.electrolyte ? std::optional<double>(r.electrolyte->value.value) : std::nullopt);
}

analytics::ReadingPoint point_of(const ReadingMeasurement& r) {
  return point_with(r, r.electrolyte ? std::optional<double>(r.electrolyte->value) : std::nullopt);
}

ReadingFacts facts_of(const models::BatterySpec& spec, const analytics::ReadingPoint& reading) {
  static const analytics::AnalyticsSettings kSettings;
  return facts_from(analytics::derive(reading, spec, kSettings));
}

ReadingFacts facts_from(const analytics::DerivedReading& d) {
  if (!d.trusted) return {};
  return {d.soc_percent, d.electrolyte_c};
}

namespace {

// The fingerprint and stored cell SGs, facts left empty.
PreparedReading without_facts(models::wire::ReadingInput input) {
  PreparedReading out;
  out.cell_sg_text = sqlite::encode_cell_sg(input.cell_sg);
  out.hash = content_hash(input, out.cell_sg_text);
  out.input = std::move(input);
  return out;
}

}  // namespace

PreparedReading prepare_reading(models::wire::ReadingInput input,
                                const std::optional<models::BatterySpec>& spec) {
  PreparedReading out = without_facts(std::move(input));
  if (spec) {
    out.spec = *spec;
    out.facts = facts_of(*spec, point_of(out.input));
  }
  return out;
}

PreparedReading prepare_reading(models::wire::ReadingInput input, const models::BatterySpec& spec,
                                const analytics::DerivedReading& derived) {
  PreparedReading out = without_facts(std::move(input));
  out.spec = spec;
  out.facts = facts_from(derived);
  return out;
}

std::vector<PreparedReading> prepare_readings(const std::vector<models::wire::ReadingInput>& batch) {
  std::vector<PreparedReading> out;
  out.reserve(batch.size());
  for (const auto& r : batch) out.push_back(prepare_reading(r, std::nullopt));
  return out;
}

ReadingFacts facts_for(const PreparedReading& reading, const models::BatterySpec& actual) {
  if (reading.spec && *reading.spec == actual) return reading.facts;
  return facts_of(actual, point_of(reading.input));
}

std::string facts_version() {
  const analytics::AnalyticsSettings s;
  char text[256];
  std::snprintf(text, sizeof text, "derive %d; settled %.3f h; reference %d; disagreement %.3f; spread %.4f; lookback %zu",
                kDeriveRulesVersion, s.settled_rest.value, static_cast<int>(s.sg_reference),
                s.soc_disagreement_pct, s.spread_limit, analytics::kWinterLookback);
  return text;
}

analytics::WinterBasis summary_of(std::span<const FactsRow> newest_first) {
  if (newest_first.size() > analytics::kWinterLookback)
    newest_first = newest_first.first(analytics::kWinterLookback);
  analytics::WinterBasis s;
  s.recent = newest_first.size();
  if (!newest_first.empty()) s.latest_at = newest_first.front().taken_at;
  for (const auto& row : newest_first) {
    if (row.facts.trusted_soc_pct && row.facts.trusted_temp_c) {
      s.trusted = analytics::TrustedBasis{row.taken_at, *row.facts.trusted_soc_pct, *row.facts.trusted_temp_c};
      break;
    }
  }
  return s;
}

}  // namespace pbfleet::storage
