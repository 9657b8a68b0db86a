// One battery's estimate: raw readings -> corrected SG -> acid -> EMF -> SOC
// -> freeze and crank margins, with flags and notes. Every step is a model
// function cited in its own file; this file only chains them.
#include "models/estimate.hpp"

#include <algorithm>
#include <numeric>
#include <string>

#include "models/acid.hpp"
#include "models/cells.hpp"
#include "models/freeze_point.hpp"
#include "models/nernst.hpp"
#include "models/specific_gravity.hpp"
#include "models/state_of_charge.hpp"
#include "models/text_format.hpp"

namespace pbfleet::models {
namespace {

constexpr int kTableCells = 6;  // the OCV cross-check tables are for 12 V

const char* const kChargingSafetyNote =
    "Safety: charge only as the battery and charger makers instruct, following local codes "
    "and your workshop's licensed practice. Charging gives off hydrogen, which can explode: "
    "ventilate, keep sparks and flames away, and switch the charger off before connecting or "
    "disconnecting. Electrolyte is sulfuric acid: wear eye protection and acid-resistant gloves.";

void add_flag(EstimateOutput& out, std::string_view flag) { out.flags.emplace_back(flag); }

struct SgPart {
  std::vector<SpecificGravity> corrected;
  SpecificGravity mean{0.0};
};

// Corrects every cell to 25 degC; Error when a corrected value leaves the acid tables.
Result<SgPart> correct_cells(const EstimateInput& in) {
  SgPart part;
  for (std::size_t i = 0; i < in.cell_sg.size(); ++i) {
    const auto sg = correct_sg(in.cell_sg[i], in.electrolyte, SgReference::c25);
    if (!(sg >= kMinTableSg && sg <= kMaxTableSg)) {
      return Error{"cell_sg[" + std::to_string(i) + "]",
                   "reading " + detail::fixed(in.cell_sg[i].value, 3) + " at " +
                       detail::fixed(in.electrolyte.value, 1) + " degC corrects to " +
                       detail::fixed(sg.value, 3) + " at 25 degC, outside the acid tables",
                   "corrected SG " + detail::range_text(kMinTableSg.value, kMaxTableSg.value, 3)};
    }
    part.corrected.push_back(sg);
  }
  const double sum = std::accumulate(part.corrected.begin(), part.corrected.end(), 0.0,
                                     [](double acc, SpecificGravity sg) { return acc + sg.value; });
  part.mean = SpecificGravity{sum / static_cast<double>(part.corrected.size())};
  return part;
}

void fill_from_sg(EstimateOutput& out, const SgPart& part, const EstimateInput& in) {
  out.corrected_sg = part.mean.value;
  for (const auto sg : part.corrected) out.corrected_cell_sg.push_back(sg.value);
  const auto w = weight_percent_from_sg(part.mean);
  if (w) {
    out.acid_wt_percent = w->value;
    out.acid_molality = molality_from_weight_percent(*w).value;
  }
  const auto emf = cell_emf_from_sg(part.mean, in.electrolyte);
  if (emf) {
    out.cell_emf_v = emf->value;
    out.ocv_model_v = battery_ocv(*emf, in.spec.cells).value;
  } else {
    out.notes.push_back("No model EMF: " + emf.error().detail + " (" + emf.error().allowed + ").");
  }
  out.soc_from_sg_percent = soc_from_sg(part.mean, in.spec).value;
  out.table_soc_from_sg_percent = table_soc_from_sg(part.mean, in.spec.chemistry).value;
}

// The OCV of this battery as a 12 V battery at 80 degF, for the
// common-practice tables: scaled by cells, shifted by the cell model's
// temperature coefficient (nernst.hpp).
Volts ocv_for_tables(Volts ocv, const EstimateInput& in) {
  const double per_cell = ocv.value / in.spec.cells;
  const double shift = kCellEmfTemperatureCoefficientVPerK *
                       (in.electrolyte.value - celsius_from_fahrenheit(80.0).value);
  return Volts{(per_cell - shift) * kTableCells};
}

// SOC from OCV into `soc_inputs`; an OCV outside the model maps to 0 or 100 %
// with the unsettled uncertainty and a flag.
void fill_from_ocv(EstimateOutput& out, SocInputs& soc_inputs, const EstimateInput& in) {
  const Volts ocv = *in.ocv;
  const bool settled = ocv_is_settled(in.rest, in.settled_rest);
  out.ocv_settled = settled;
  soc_inputs.ocv_settled = settled;
  if (!settled) {
    add_flag(out, kFlagOcvUnsettled);
    out.notes.push_back(
        in.rest ? "The OCV was read after " + detail::fixed(in.rest->value, 1) +
                      " h of rest, less than " + detail::fixed(in.settled_rest.value, 1) +
                      " h: it may carry surface charge and counts for little."
                : "The rest time before the OCV is unknown: the OCV may carry surface charge "
                  "and counts for little.");
  }
  out.table_soc_from_ocv_percent = table_soc_from_ocv(ocv_for_tables(ocv, in), in.spec.chemistry).value;
  const auto soc = soc_from_ocv(ocv, in.electrolyte, in.spec);
  if (soc) {
    out.soc_from_ocv_percent = soc->value;
    soc_inputs.from_ocv = *soc;
    soc_inputs.ocv_uncertainty_pct =
        ocv_soc_uncertainty_pct(ocv, in.electrolyte, in.spec).value_or(kDefaultOcvSocUncertaintyPct);
    return;
  }
  add_flag(out, kFlagOcvOutsideModel);
  // The model spans about 1.80-2.18 V per cell: anything under 2 V missed it low.
  const bool below = ocv.value / in.spec.cells < 2.0;
  soc_inputs.from_ocv = Percent{below ? 0.0 : 100.0};
  soc_inputs.ocv_uncertainty_pct = kUnsettledOcvUncertaintyPct;
  out.notes.push_back(
      soc.error().detail + " (" + soc.error().allowed + "). " +
      (below ? "An OCV this low suggests a deeply discharged battery or a shorted cell."
             : "An OCV this high suggests surface charge from a recent charge."));
}

void fill_combined(EstimateOutput& out, const SocInputs& soc_inputs) {
  const auto combined = combine_soc(soc_inputs);
  out.soc_percent = combined.soc.value;
  out.soc_uncertainty_percent = combined.uncertainty_pct;
  out.disagreement = combined.disagreement;
  if (combined.disagreement) {
    add_flag(out, kFlagSocDisagreement);
    out.notes.push_back(combined.note);
  }
}

void fill_cells(EstimateOutput& out, const SgPart& part) {
  if (part.corrected.size() < 2) return;
  const auto spread = check_cells(part.corrected);
  out.cell_spread = spread.spread;
  if (!spread.exceeds) return;
  out.weak_cell = *spread.weak_cell + 1;
  add_flag(out, kFlagCellSpread);
  out.notes.push_back("Cell " + std::to_string(*out.weak_cell) + " reads " +
                      detail::fixed(spread.spread, 3) +
                      " below the highest cell, more than the 0.050 limit for starting "
                      "batteries: a weak cell, unless water was just added; recharge and "
                      "re-check, replace if it stays.");
}

// Freezing is judged on the lowest cell (it freezes first), else on the SG
// that the combined SOC implies.
void fill_freeze(EstimateOutput& out, const SgPart& part, const EstimateInput& in) {
  SpecificGravity sg{0.0};
  if (!part.corrected.empty()) {
    sg = *std::min_element(part.corrected.begin(), part.corrected.end());
  } else {
    const double span = in.spec.full_charge_sg.value - in.spec.discharged_sg.value;
    sg = SpecificGravity{in.spec.discharged_sg.value + span * out.soc_percent / 100.0};
  }
  const auto freezes_at = freezing_point(sg);
  if (!freezes_at) {
    out.notes.push_back("SG " + detail::fixed(sg.value, 3) +
                        " is beyond the published freezing-point data (" +
                        freezes_at.error().allowed +
                        "); such acid freezes below about -68 degC.");
    return;
  }
  out.freeze_point_c = freezes_at->value;
  if (!in.low) return;
  out.freeze_margin_c = in.low->value - freezes_at->value;
  if (*out.freeze_margin_c < kFreezeRiskMarginC) {
    add_flag(out, kFlagFreezeRisk);
    const std::string where =
        *out.freeze_margin_c < 0.0
            ? "above the low of " + detail::fixed(in.low->value, 0) + " degC: it is expected to freeze"
            : "within " + detail::fixed(kFreezeRiskMarginC, 0) + " degC of the low of " +
                  detail::fixed(in.low->value, 0) + " degC";
    out.notes.push_back("Electrolyte at SG " + detail::fixed(sg.value, 3) + " freezes near " +
                        detail::fixed(freezes_at->value, 0) + " degC, " + where +
                        ". Charge it before the cold: a frozen battery can crack its case.");
  }
}

std::optional<Amperes> required_at_test(const EstimateInput& in) {
  if (in.required_cca) return *in.required_cca;
  if (in.engine && in.displacement_l) return required_cca_for_engine(*in.engine, *in.displacement_l);
  return std::nullopt;
}

void fill_cranking(EstimateOutput& out, const EstimateInput& in) {
  if (!in.low) return;
  if (in.spec.rated_cca.value <= 0.0) {
    if (required_at_test(in)) {
      out.notes.push_back("The battery's rated CCA is unknown, so the crank margin was not computed.");
    }
    return;
  }
  const Percent soc{out.soc_percent};
  out.available_cca = available_cca(in.spec.rated_cca, *in.low, soc).value;
  const auto need = required_at_test(in);
  if (!need) return;
  const Amperes required = required_current_at(*need, *in.low);
  out.required_cca_at_low = required.value;
  out.crank_margin = crank_margin(Amperes{*out.available_cca}, required);
  if (*out.crank_margin < 1.0) {
    add_flag(out, kFlagWillNotCrank);
    out.notes.push_back("At " + detail::fixed(in.low->value, 0) + " degC and " +
                        detail::fixed(out.soc_percent, 0) + " % charge the battery gives about " +
                        detail::fixed(*out.available_cca, 0) + " A against the " +
                        detail::fixed(required.value, 0) +
                        " A the engine needs: it may not start (battery assumed at the low).");
  }
}

void fill_advice(EstimateOutput& out) {
  if (out.soc_percent < kLowSocPct) {
    add_flag(out, kFlagLowSoc);
    out.notes.push_back("Charge is about " + detail::fixed(out.soc_percent, 0) +
                        " %, below 75 %: recharge before any load test and before storage, "
                        "to avoid sulfation.");
  }
  const auto has = [&](std::string_view flag) {
    return std::find(out.flags.begin(), out.flags.end(), flag) != out.flags.end();
  };
  if (has(kFlagLowSoc) || has(kFlagFreezeRisk) || has(kFlagWillNotCrank)) {
    out.notes.emplace_back(kChargingSafetyNote);
  }
}

}  // namespace

Result<EstimateOutput> estimate(const EstimateInput& input) {
  const auto errors = validate_estimate_input(input);
  if (!errors.empty()) {
    const auto& first = errors.front();
    return Error{first.field, first.detail, first.allowed};
  }
  EstimateOutput out;
  SocInputs soc_inputs;
  SgPart sg_part;
  if (!input.cell_sg.empty()) {
    auto corrected = correct_cells(input);
    if (!corrected) return corrected.error();
    sg_part = std::move(corrected).value();
    fill_from_sg(out, sg_part, input);
    soc_inputs.from_sg = Percent{*out.soc_from_sg_percent};
    soc_inputs.sg_uncertainty_pct = sg_soc_uncertainty_pct(input.spec);
  }
  if (input.ocv) fill_from_ocv(out, soc_inputs, input);
  fill_combined(out, soc_inputs);
  fill_cells(out, sg_part);
  fill_freeze(out, sg_part, input);
  fill_cranking(out, input);
  fill_advice(out);
  return out;
}

}  // namespace pbfleet::models
