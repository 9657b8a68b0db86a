// One battery's estimate from one set of readings: the full chain
// raw SG / OCV -> corrected SG -> acid -> EMF -> SOC -> freeze and crank
// margins. Served by `pbfleet estimate` offline and by POST /v1/estimate.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "models/battery.hpp"
#include "models/cranking.hpp"
#include "models/result.hpp"
#include "models/units.hpp"

namespace pbfleet::models {

struct EstimateInput {
  std::vector<SpecificGravity> cell_sg;       // raw hydrometer readings, one per cell (may be 1)
  std::optional<Volts> ocv;                   // battery open-circuit voltage
  Celsius electrolyte{25.0};                  // temperature the readings were taken at
  BatterySpec spec;                           // chemistry, cells, full SG, rated CCA
  std::optional<Hours> rest;                  // hours at rest before the OCV
  Hours settled_rest{4.0};                    // common practice, see state_of_charge.hpp
  std::optional<Celsius> low;                 // cold temperature to judge at
  std::optional<Amperes> required_cca;        // engine need at -18 degC
  std::optional<EngineKind> engine;           // or: engine kind ...
  std::optional<double> displacement_l;       // ... and displacement

};

struct EstimateOutput {
  // From SG (when any SG was given)
  std::optional<double> corrected_sg;         // mean of cells, SG 25/25
  std::vector<double> corrected_cell_sg;
  std::optional<double> acid_molality;        // mol/kg
  std::optional<double> acid_wt_percent;      // %
  std::optional<double> cell_emf_v;           // model EMF per cell at the electrolyte temperature
  std::optional<double> ocv_model_v;          // cells x cell EMF
  std::optional<double> soc_from_sg_percent;
  std::optional<double> table_soc_from_sg_percent;  // common-practice cross-check
  // From OCV (when given)
  std::optional<double> soc_from_ocv_percent;
  std::optional<double> table_soc_from_ocv_percent; // common-practice cross-check
  std::optional<bool> ocv_settled;
  // Combined
  double soc_percent = 0.0;
  double soc_uncertainty_percent = 0.0;
  bool disagreement = false;
  std::optional<double> freeze_point_c;
  std::optional<double> freeze_margin_c;      // with low
  // Cells (two or more cells given)
  std::optional<double> cell_spread;
  std::optional<int> weak_cell;               // 1-based, when the spread is flagged
  // Cranking (rated CCA and low given)
  std::optional<double> available_cca;        // A at the low and this SOC
  std::optional<double> required_cca_at_low;  // A
  std::optional<double> crank_margin;
  std::vector<std::string> flags;             // stable machine words, e.g. "ocv_unsettled"
  std::vector<std::string> notes;             // sentences for a person
};

// Stable flag words in EstimateOutput::flags.
inline constexpr std::string_view kFlagOcvUnsettled = "ocv_unsettled";
inline constexpr std::string_view kFlagOcvOutsideModel = "ocv_outside_model";
inline constexpr std::string_view kFlagSocDisagreement = "soc_disagreement";
inline constexpr std::string_view kFlagCellSpread = "cell_spread";
inline constexpr std::string_view kFlagFreezeRisk = "freeze_risk";
inline constexpr std::string_view kFlagWillNotCrank = "will_not_crank";
inline constexpr std::string_view kFlagLowSoc = "low_soc";

// SOC below which a battery is flagged low and a recharge is advised: 75 %,
// the 12.4 V line of US Army TM 5-3805-262-20 (below it, load test / recharge).
inline constexpr double kLowSocPct = 75.0;
// Freeze margin below which freeze_risk is raised (degC): a 0.005 hydrometer
// error moves the freezing point by 2-3 degC near SG 1.20, and forecasts of
// the low miss by a few degrees (our choice, stated).
inline constexpr double kFreezeRiskMarginC = 5.0;

// Every input problem of an estimate, each naming the field (wire name) and
// the allowed range. Empty = valid.
FieldErrors validate_estimate_input(const EstimateInput& input);

// Runs the chain. Error names the input field and the allowed range (the
// first problem validate_estimate_input finds, or a corrected SG outside the
// acid tables).
Result<EstimateOutput> estimate(const EstimateInput& input);

}  // namespace pbfleet::models
