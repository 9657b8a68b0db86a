#include "models/analytics/derive.hpp"

#include <algorithm>

#include "models/acid.hpp"
#include "models/cells.hpp"
#include "models/freeze_point.hpp"
#include "models/nernst.hpp"
#include "models/specific_gravity.hpp"
#include "models/state_of_charge.hpp"

namespace pbfleet::analytics {
namespace {

using models::Celsius;
using models::SpecificGravity;

// Electrolyte temperature assumed when none was logged: the SG model's
// reference, so no correction is applied (design choice, flagged).
constexpr double kAssumedElectrolyteC = 25.0;
// An OCV this far per cell above the model's full-charge EMF cannot come from
// the acid: surface charge (a few tens of mV on 12 V, the meter tolerance in
// CONVENTIONS.md; common practice).
constexpr double kSurfaceChargeMarginPerCellV = 0.010;
// Load tests are meaningful only at 75 % SOC or more (common practice).
constexpr double kLoadTestMinSocPct = 75.0;
// Load-test minimum end voltage, 12 V battery: 9.6 V at 21 degC and above,
// 8.5 V at -18 degC (common practice, CONVENTIONS.md).
constexpr double kLoadMinWarmV = 9.6, kLoadMinWarmC = 21.0;
constexpr double kLoadMinColdV = 8.5, kLoadMinColdC = -18.0;
constexpr int kCellsOf12V = 6;

struct SgPart {
  std::vector<double> sg25;  // per cell, model basis
  double mean25 = 0.0;
};

SgPart derive_sg(const ReadingPoint& r, Celsius t, const AnalyticsSettings& s, DerivedReading& d) {
  SgPart part;
  double sum_shown = 0.0;
  for (std::size_t i = 0; i < r.cells.size(); ++i) {
    const double c25 = models::correct_sg(r.cells[i], t, models::SgReference::c25).value;
    const double shown = models::correct_sg(r.cells[i], t, s.sg_reference).value;
    part.sg25.push_back(c25);
    d.corrected_cell_sg.push_back(shown);
    part.mean25 += c25;
    sum_shown += shown;
  }
  const auto n = static_cast<double>(r.cells.size());
  part.mean25 /= n;
  d.corrected_sg = sum_shown / n;
  return part;
}

void judge_spread(const SgPart& sg, const AnalyticsSettings& s, bool hold, DerivedReading& d) {
  if (sg.sg25.size() < 2) return;
  std::vector<SpecificGravity> cells;
  cells.reserve(sg.sg25.size());
  for (const double v : sg.sg25) cells.push_back(SpecificGravity{v});
  const auto spread = models::check_cells(cells, s.spread_limit);
  d.cell_spread = spread.spread;
  if (!spread.exceeds) return;
  if (hold) {
    d.flags.set(Flag::water_added_hold);
    return;
  }
  d.flags.set(Flag::cell_spread);
  if (spread.weak_cell) d.weak_cell = *spread.weak_cell + 1;
}

// What derive needs of a spec beyond its fields, the same for every
// reading of a battery: the model's full-charge cell EMF at 25 degC (an
// inverse acid-density solve), worked out once per history by derive_all.
struct SpecModel {
  std::optional<double> full_emf_25;  // nullopt: full-charge SG outside the cell model
};

SpecModel spec_model(const models::BatterySpec& spec) {
  const auto emf = models::cell_emf_from_sg(spec.full_charge_sg, Celsius{25.0});
  return SpecModel{emf ? std::optional(emf->value) : std::nullopt};
}

// Model OCV of a fully charged battery of this spec at temperature t
// (cell_emf_from_sg(full SG, t), through the once-computed 25 degC EMF).
std::optional<double> full_charge_ocv(const models::BatterySpec& spec, const SpecModel& model, Celsius t) {
  if (!model.full_emf_25) return std::nullopt;
  const auto emf = models::cell_emf_at(models::Volts{*model.full_emf_25}, t);
  if (!emf) return std::nullopt;
  return models::battery_ocv(*emf, spec.cells).value;
}

bool suspect_surface_charge(const ReadingPoint& r, const models::BatterySpec& spec, const SpecModel& model,
                            Celsius t, const AnalyticsSettings& s, const DerivedReading& d) {
  const double ocv = r.ocv_v.value();
  const auto full = full_charge_ocv(spec, model, t);
  if (full && ocv > *full + kSurfaceChargeMarginPerCellV * spec.cells) return true;
  if (d.ocv_settled.value_or(true)) return false;
  if (r.after_charge) return true;
  return d.soc_from_ocv_percent && d.soc_from_sg_percent &&
         *d.soc_from_ocv_percent - *d.soc_from_sg_percent > s.soc_disagreement_pct;
}

void derive_ocv(const ReadingPoint& r, const models::BatterySpec& spec, const SpecModel& model, Celsius t,
                const AnalyticsSettings& s, DerivedReading& d) {
  const auto rest = r.rest_h.get();
  const bool settled = rest && models::ocv_is_settled(models::Hours{*rest}, s.settled_rest);
  d.ocv_settled = settled;
  if (!settled) d.flags.set(Flag::ocv_unsettled);
  const auto soc = models::soc_from_ocv(models::Volts{r.ocv_v.value()}, t, spec);
  if (soc) {
    d.soc_from_ocv_percent = soc->value;
  } else {
    d.flags.set(Flag::ocv_out_of_range);
  }
  if (suspect_surface_charge(r, spec, model, t, s, d)) d.flags.set(Flag::surface_charge_suspected);
}

void combine(const AnalyticsSettings& s, DerivedReading& d) {
  models::SocInputs in;
  if (d.soc_from_sg_percent) in.from_sg = models::Percent{*d.soc_from_sg_percent};
  const bool surface = d.flags.has(Flag::surface_charge_suspected);
  if (d.soc_from_ocv_percent && !(surface && in.from_sg)) {
    in.from_ocv = models::Percent{*d.soc_from_ocv_percent};
  }
  if (!in.from_sg && !in.from_ocv) {
    d.flags.set(Flag::no_soc);
    return;
  }
  in.ocv_settled = d.ocv_settled.value_or(true) && !surface;
  in.disagreement_tolerance_pct = s.soc_disagreement_pct;
  const auto c = models::combine_soc(in);
  d.soc_percent = c.soc.value;
  d.soc_uncertainty_percent = c.uncertainty_pct;
  if (c.disagreement) d.flags.set(Flag::soc_disagreement);
}

void derive_sg_equivalent(const ReadingPoint& r, const models::BatterySpec& spec, Celsius t,
                          const SgPart& sg, DerivedReading& d) {
  if (!r.cells.empty()) {
    d.sg_equivalent = sg.mean25;
  } else if (r.ocv_v && d.ocv_settled.value_or(false) && !d.flags.has(Flag::surface_charge_suspected)) {
    const auto from_ocv = models::sg_from_ocv(models::Volts{r.ocv_v.value()}, spec.cells, t);
    if (from_ocv) d.sg_equivalent = from_ocv->value;
  }
  if (!d.sg_equivalent) return;
  const auto fp = models::freezing_point(SpecificGravity{*d.sg_equivalent});
  if (fp) d.freezing_point_c = fp->value;
}

void judge_load_test(const ReadingPoint& r, const models::BatterySpec& spec, Celsius t, DerivedReading& d) {
  if (!r.load_test_end_v) return;
  const double minimum = load_test_minimum(t, spec.cells).value;
  d.load_test_min_v = minimum;
  if (!d.soc_percent || *d.soc_percent < kLoadTestMinSocPct) {
    d.flags.set(Flag::load_test_at_low_soc);
  } else if (r.load_test_end_v.value() < minimum) {
    d.flags.set(Flag::load_test_failed);
  }
}

bool in_sg_range(double sg25) {
  return sg25 >= models::kMinTableSg.value && sg25 <= models::kMaxTableSg.value;
}

}  // namespace

std::string_view to_string(Flag flag) {
  switch (flag) {
    case Flag::ocv_unsettled: return "ocv_unsettled";
    case Flag::surface_charge_suspected: return "surface_charge_suspected";
    case Flag::soc_disagreement: return "soc_disagreement";
    case Flag::cell_spread: return "cell_spread";
    case Flag::water_added_hold: return "water_added_hold";
    case Flag::low_soc: return "low_soc";
    case Flag::temperature_assumed: return "temperature_assumed";
    case Flag::sg_out_of_range: return "sg_out_of_range";
    case Flag::ocv_out_of_range: return "ocv_out_of_range";
    case Flag::load_test_at_low_soc: return "load_test_at_low_soc";
    case Flag::load_test_failed: return "load_test_failed";
    case Flag::no_soc: return "no_soc";
  }
  return "unknown";
}

std::vector<std::string_view> FlagSet::words() const {
  std::vector<std::string_view> out;
  for (int i = 0; i < kFlagCount; ++i) {
    if (has(static_cast<Flag>(i))) out.push_back(to_string(static_cast<Flag>(i)));
  }
  return out;
}

namespace {

DerivedReading derive_with(const ReadingPoint& r, const models::BatterySpec& spec, const SpecModel& model,
                           const AnalyticsSettings& s, bool water_hold) {
  DerivedReading d;
  const bool measured_something = !r.cells.empty() || r.ocv_v;
  if (r.electrolyte_c) {
    d.electrolyte_c = r.electrolyte_c.value();
  } else {
    d.electrolyte_c = kAssumedElectrolyteC;
    if (measured_something) d.flags.set(Flag::temperature_assumed);
  }
  const Celsius t{d.electrolyte_c};
  SgPart sg;
  if (!r.cells.empty()) {
    sg = derive_sg(r, t, s, d);
    if (in_sg_range(sg.mean25)) {
      d.soc_from_sg_percent = models::soc_from_sg(SpecificGravity{sg.mean25}, spec).value;
    } else {
      d.flags.set(Flag::sg_out_of_range);
    }
    judge_spread(sg, s, water_hold || r.water_added, d);
  }
  if (r.ocv_v) derive_ocv(r, spec, model, t, s, d);
  combine(s, d);
  derive_sg_equivalent(r, spec, t, sg, d);
  if (d.soc_percent && *d.soc_percent < undercharge_threshold_pct(s, spec.chemistry)) {
    d.flags.set(Flag::low_soc);
  }
  judge_load_test(r, spec, t, d);
  const bool ocv_ok = !r.ocv_v || d.ocv_settled.value_or(false) || !r.cells.empty();
  d.trusted = d.soc_percent && !d.flags.has(Flag::surface_charge_suspected) && ocv_ok;
  return d;
}

}  // namespace

DerivedReading derive(const ReadingPoint& r, const models::BatterySpec& spec,
                      const AnalyticsSettings& s, bool water_hold) {
  return derive_with(r, spec, spec_model(spec), s, water_hold);
}

std::vector<DerivedReading> derive_all(std::span<const ReadingPoint> readings,
                                       const models::BatterySpec& spec,
                                       const AnalyticsSettings& settings) {
  std::vector<DerivedReading> out;
  out.reserve(readings.size());
  const SpecModel model = spec_model(spec);
  bool hold = false;
  for (const auto& r : readings) {
    if (r.after_charge) hold = false;  // charging mixes the watered cell
    if (r.water_added) hold = true;
    out.push_back(derive_with(r, spec, model, settings, hold));
  }
  return out;
}

models::Volts load_test_minimum(models::Celsius t, int cells) {
  const double c = std::clamp(t.value, kLoadMinColdC, kLoadMinWarmC);
  const double frac = (c - kLoadMinColdC) / (kLoadMinWarmC - kLoadMinColdC);
  const double v12 = kLoadMinColdV + frac * (kLoadMinWarmV - kLoadMinColdV);
  return models::Volts{v12 * cells / kCellsOf12V};
}

models::SpecificGravity sg_for_soc(models::Percent soc, const models::BatterySpec& spec) {
  double lo = spec.discharged_sg.value, hi = spec.full_charge_sg.value;
  constexpr int kBisectionSteps = 40;  // interval 0.145 / 2^40: far below 0.0001
  for (int i = 0; i < kBisectionSteps; ++i) {
    const double mid = 0.5 * (lo + hi);
    if (models::soc_from_sg(SpecificGravity{mid}, spec).value < soc.value) {
      lo = mid;
    } else {
      hi = mid;
    }
  }
  return SpecificGravity{0.5 * (lo + hi)};
}

}  // namespace pbfleet::analytics
