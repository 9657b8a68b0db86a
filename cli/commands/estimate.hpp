// `pbfleet estimate`: the whole model chain for one set of readings, offline.
// The JSON keys are the ones POST /v1/estimate answers with.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "cli/client/api.hpp"
#include "models/estimate.hpp"

namespace pbfleet::cli {

// What the flags say, before any parsing of temperatures or names.
struct EstimateFlags {
  std::optional<double> sg;
  std::vector<double> cell_sg;
  std::optional<double> ocv_v;
  std::string temp = "25C";
  std::string chemistry = "flooded";
  int cells = 6;
  std::optional<double> full_sg;
  std::optional<double> rest_h;
  std::optional<double> rated_cca_a;
  std::optional<std::string> low;
  std::optional<double> required_cca_a;
  std::optional<std::string> engine;
  std::optional<double> displacement_l;
};

// Flags -> model input. Error names the flag and the accepted form or range.
models::Result<models::EstimateInput> estimate_input(const EstimateFlags& flags);

// The flag of `estimate` or `log` a model or validation error's wire field
// came from ("ocv_v" -> "--ocv";
// "cell_sg[3]" -> "--cell-sg (cell 4)", or "--sg" when one value was given).
std::string flag_for_field(std::string_view field, std::size_t sg_values = 0);

// One JSON object: always corrected_sg, acid_molality, acid_wt_percent,
// cell_emf_v, ocv_model_v, soc_percent, freeze_point_c (null when not
// computable); soc_from_ocv_percent with an OCV; cell_spread and weak_cell
// (1-based or null) with two or more cells; available_cca and crank_margin
// with a rated CCA and a low.
client::Json estimate_json(const models::EstimateInput& input, const models::EstimateOutput& output);

// The same for a person, with units; `unicode` allows the degree sign.
std::string estimate_text(const models::EstimateInput& input, const models::EstimateOutput& output,
                          bool unicode);

}  // namespace pbfleet::cli
