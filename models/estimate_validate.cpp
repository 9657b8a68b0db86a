// Input validation of an estimate: every problem, each naming the wire field
// and the allowed range, so nothing is computed from half-valid input.
#include "models/estimate.hpp"

#include <cmath>
#include <string>

#include "models/acid.hpp"
#include "models/nernst.hpp"
#include "models/text_format.hpp"

namespace pbfleet::models {
namespace {

// Same bounds as the reading format (models/wire/reading.hpp), repeated here
// because models must not depend on wire: raw SG 1.000-1.400 (water to above
// any battery acid), temperatures -60 to +80 degC, OCV up to 2.5 V per cell
// (above a charging cell), rest up to a year, 1 to 24 cells.
constexpr double kMinRawSg = 1.000;
constexpr double kMaxRawSg = 1.400;
constexpr double kMaxOcvPerCellV = 2.5;
constexpr double kMaxRestH = 24.0 * 366;
constexpr int kMaxCells = 24;
// Ratings: no starting battery approaches 5000 A; no road engine 30 L.
constexpr double kMaxCurrentA = 5000.0;
constexpr double kMaxDisplacementL = 30.0;
// Full-charge SG must sit at least this far above the discharged SG.
constexpr double kMinSgSpan = 0.020;

bool within(double value, double lo, double hi) {
  return std::isfinite(value) && value >= lo && value <= hi;
}

void check_range(FieldErrors& errors, const std::string& field, double value, double lo,
                 double hi, int decimals, const std::string& unit, const std::string& what) {
  if (within(value, lo, hi)) return;
  errors.push_back({field, what + " " + detail::fixed(value, decimals) + " is out of range",
                    detail::range_text(lo, hi, decimals, unit)});
}

void check_spec(FieldErrors& errors, const BatterySpec& spec) {
  if (spec.cells < 1 || spec.cells > kMaxCells) {
    errors.push_back({"cells", "cell count " + std::to_string(spec.cells) + " is out of range",
                      "1 to " + std::to_string(kMaxCells)});
  }
  const double top = kMaxTableSg.value;
  check_range(errors, "discharged_sg", spec.discharged_sg.value, kMinTableSg.value,
              top - kMinSgSpan, 3, "", "discharged SG");
  check_range(errors, "full_sg", spec.full_charge_sg.value,
              spec.discharged_sg.value + kMinSgSpan, top, 3, "",
              "full-charge SG (must exceed the discharged SG by 0.020)");
  check_range(errors, "rated_cca_a", spec.rated_cca.value, 0.0, kMaxCurrentA, 0, "A",
              "rated CCA");
}

void check_readings(FieldErrors& errors, const EstimateInput& in) {
  const std::size_t n = in.cell_sg.size();
  if (n > 1 && static_cast<int>(n) != in.spec.cells) {
    errors.push_back({"cell_sg", std::to_string(n) + " SG values for a battery of " +
                                     std::to_string(in.spec.cells) + " cells",
                      "none, 1, or one per cell (" + std::to_string(in.spec.cells) + ")"});
  }
  for (std::size_t i = 0; i < n; ++i) {
    check_range(errors, "cell_sg[" + std::to_string(i) + "]", in.cell_sg[i].value, kMinRawSg,
                kMaxRawSg, 3, "", "SG reading");
  }
  if (n == 0 && !in.ocv) {
    errors.push_back({"cell_sg", "neither an SG reading nor an OCV was given",
                      "at least one SG value or ocv_v"});
  }
  if (in.ocv && in.spec.cells >= 1) {
    const double max_v = kMaxOcvPerCellV * in.spec.cells;
    if (!(in.ocv->value > 0.0 && within(in.ocv->value, 0.0, max_v))) {
      errors.push_back({"ocv_v", "OCV " + detail::fixed(in.ocv->value, 2) + " V is out of range",
                        "above 0 up to " + detail::fixed(max_v, 2) + " V"});
    }
  }
}

void check_conditions(FieldErrors& errors, const EstimateInput& in) {
  const double t_lo = kMinModelTemperature.value;
  const double t_hi = kMaxModelTemperature.value;
  check_range(errors, "electrolyte_temp_c", in.electrolyte.value, t_lo, t_hi, 1, "degC",
              "electrolyte temperature");
  if (in.rest) check_range(errors, "rest_h", in.rest->value, 0.0, kMaxRestH, 1, "h", "rest");
  check_range(errors, "settled_rest_h", in.settled_rest.value, 0.0, kMaxRestH, 1, "h",
              "settled-rest threshold");
  if (in.low) check_range(errors, "low_c", in.low->value, t_lo, t_hi, 1, "degC", "low");
}

void check_engine(FieldErrors& errors, const EstimateInput& in) {
  if (in.required_cca && !(in.required_cca->value > 0.0 &&
                           within(in.required_cca->value, 0.0, kMaxCurrentA))) {
    errors.push_back({"required_cca_a", "required CCA " + detail::fixed(in.required_cca->value, 0) +
                                            " A is out of range",
                      "above 0 up to " + detail::fixed(kMaxCurrentA, 0) + " A"});
  }
  if (in.engine && !in.displacement_l) {
    errors.push_back({"displacement_l", "an engine kind was given without its displacement",
                      "above 0 up to 30 L"});
  }
  if (in.displacement_l && !in.engine) {
    errors.push_back({"engine", "a displacement was given without the engine kind",
                      "gasoline or diesel"});
  }
  if (in.displacement_l && !(*in.displacement_l > 0.0 &&
                             within(*in.displacement_l, 0.0, kMaxDisplacementL))) {
    errors.push_back({"displacement_l",
                      "displacement " + detail::fixed(*in.displacement_l, 2) + " L is out of range",
                      "above 0 up to 30 L"});
  }
}

}  // namespace

FieldErrors validate_estimate_input(const EstimateInput& input) {
  FieldErrors errors;
  check_spec(errors, input.spec);
  check_readings(errors, input);
  check_conditions(errors, input);
  check_engine(errors, input);
  return errors;
}

}  // namespace pbfleet::models
